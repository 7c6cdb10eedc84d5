package figure

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"
	"strings"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/font/liberation"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure is anything this package can draw: maps and plots.
type Figure interface {
	// WritePNG writes the figure as a PNG image.
	WritePNG(w io.Writer) error
	// WriteSVG writes the figure as an SVG document.
	WriteSVG(w io.Writer) error
}

// PNG returns f encoded as PNG.
func PNG(f Figure) ([]byte, error) {
	var b bytes.Buffer
	err := f.WritePNG(&b)
	return b.Bytes(), err
}

// SVG returns f encoded as SVG.
func SVG(f Figure) ([]byte, error) {
	var b bytes.Buffer
	err := f.WriteSVG(&b)
	return b.Bytes(), err
}

// Ink colours shared by the figures.
var (
	inkText  = color.RGBA{0x22, 0x22, 0x22, 0xff}
	inkMuted = color.RGBA{0x55, 0x55, 0x55, 0xff}
	inkFrame = color.RGBA{0x30, 0x30, 0x30, 0xff}
	inkGrid  = color.NRGBA{0x20, 0x20, 0x20, 0x50}
	white    = color.RGBA{0xff, 0xff, 0xff, 0xff}
)

// textHandler lays out plain text with the fonts bundled with gonum/plot.
var textHandler = text.Plain{Fonts: font.NewCache(liberation.Collection())}

// sans returns the sans-serif face used for all text, at size pt.
func sans(size vg.Length, bold bool) font.Font {
	f := font.Font{Typeface: "Liberation", Variant: "Sans", Size: size}
	if bold {
		f.Weight = xfont.WeightBold
	}
	return f
}

// textStyle returns a text style at size pt with the given alignment.
func textStyle(size vg.Length, bold bool, c color.Color, xa text.XAlignment, ya text.YAlignment) draw.TextStyle {
	return draw.TextStyle{Color: c, Font: sans(size, bold), XAlign: xa, YAlign: ya, Handler: textHandler}
}

// render draws a figure of w x h points with fn onto a PNG or SVG canvas
// and writes it to out. One point is one pixel in the PNG.
func render(out io.Writer, svg bool, w, h int, fn func(c draw.Canvas) error) error {
	if w <= 0 || h <= 0 {
		return fmt.Errorf("figure: size %d x %d, want positive", w, h)
	}
	W, H := vg.Length(w), vg.Length(h)
	var (
		cv vg.CanvasWriterTo
		dc draw.Canvas
	)
	if svg {
		c := vgsvg.New(W, H)
		cv = c
		dc = draw.New(c)
		dc.SetColor(white)
		dc.Fill(rectPath(0, 0, W, H))
	} else {
		c := vgimg.NewWith(vgimg.UseWH(W, H), vgimg.UseDPI(72), vgimg.UseBackgroundColor(white))
		cv = vgimg.PngCanvas{Canvas: c}
		dc = draw.New(c)
	}
	if err := fn(dc); err != nil {
		return err
	}
	if !svg {
		_, err := cv.WriteTo(out)
		return err
	}
	// vgsvg labels embedded PNG images as JPEG; give them their true
	// media type (RFC 2397 data URIs carry it) so that strict readers
	// decode them.
	var b bytes.Buffer
	if _, err := cv.WriteTo(&b); err != nil {
		return err
	}
	svgb := bytes.ReplaceAll(b.Bytes(), []byte("data:image/jpg;base64,"), []byte("data:image/png;base64,"))
	// Text is laid out with Liberation Sans; where a viewer lacks it,
	// Arial has the same metrics (Liberation Sans was drawn to match
	// them), and any sans-serif face is closer than the default serif.
	svgb = bytes.ReplaceAll(svgb, []byte("font-family:Liberation Sans;"), []byte("font-family:'Liberation Sans',Arial,Helvetica,sans-serif;"))
	_, err := out.Write(svgb)
	return err
}

func rectPath(x0, y0, x1, y1 vg.Length) vg.Path {
	var p vg.Path
	p.Move(vg.Point{X: x0, Y: y0})
	p.Line(vg.Point{X: x1, Y: y0})
	p.Line(vg.Point{X: x1, Y: y1})
	p.Line(vg.Point{X: x0, Y: y1})
	p.Close()
	return p
}

// polyPath returns the open or closed path through pts.
func polyPath(pts []vg.Point, closed bool) vg.Path {
	var p vg.Path
	for i, q := range pts {
		if i == 0 {
			p.Move(q)
		} else {
			p.Line(q)
		}
	}
	if closed {
		p.Close()
	}
	return p
}

// formatValue formats v with about four significant digits, no exponent
// for ordinary magnitudes, and a proper minus sign.
func formatValue(v float64) string {
	if v == 0 {
		return "0"
	}
	a := math.Abs(v)
	var s string
	if a >= 1e-3 && a < 1e6 {
		d := 3 - int(math.Floor(math.Log10(a)))
		if d < 0 {
			d = 0
		}
		s = strconv.FormatFloat(v, 'f', d, 64)
		if strings.Contains(s, ".") {
			s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
		}
	} else {
		s = strconv.FormatFloat(v, 'g', 4, 64)
	}
	if strings.HasPrefix(s, "-") {
		s = "\u2212" + s[1:]
	}
	return s
}

// niceTicks returns round tick values covering [lo, hi] with about n
// intervals (Heckbert's "nice numbers", Graphics Gems 1990).
func niceTicks(lo, hi float64, n int) []float64 {
	if !(hi > lo) {
		return []float64{lo}
	}
	nice := func(x float64, round bool) float64 {
		e := math.Floor(math.Log10(x))
		f := x / math.Pow(10, e)
		var nf float64
		switch {
		case round && f < 1.5, !round && f <= 1:
			nf = 1
		case round && f < 3, !round && f <= 2:
			nf = 2
		case round && f < 7, !round && f <= 5:
			nf = 5
		default:
			nf = 10
		}
		return nf * math.Pow(10, e)
	}
	step := nice(nice(hi-lo, false)/float64(n), true)
	var t []float64
	for k := math.Ceil(lo/step - 1e-9); k*step <= hi+step*1e-9; k++ {
		v := k * step
		if math.Abs(v) < step*1e-9 {
			v = 0
		}
		t = append(t, v)
	}
	return t
}
