package figure

import (
	"errors"
	"fmt"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Series is one curve of values indexed by spherical-harmonic degree:
// Y[l] is the value at degree l.
type Series struct {
	// Label names the series in the legend.
	Label string
	// Y holds one value per degree, from degree 0. NaN values are gaps.
	Y []float64
}

// XYSeries is one curve of (x, y) points, such as a sweep result for one
// value of a second parameter.
type XYSeries struct {
	// Label names the series in the legend.
	Label string
	// X and Y are the coordinates; they must have the same length. Points
	// with a NaN coordinate are gaps.
	X, Y []float64
}

// Spectrum is a plot of degree power spectra on a logarithmic y axis.
// Values that are not positive cannot be drawn on it and are gaps.
type Spectrum struct {
	// Title is written above the plot.
	Title string
	// YLabel names the power and its units, such as
	// "power per degree (mW/m²)²".
	YLabel string
	// Series are the spectra.
	Series []Series
	// MinDegree is the first degree drawn; zero means 1 (degree 0 is the
	// mean and usually dwarfs the rest).
	MinDegree int
	// Width and Height are the size in pixels (points in SVG); zero means
	// 900 x 440.
	Width, Height int
}

// Correlation is a plot of degree correlation between pairs of models,
// r in [-1, 1] against degree, with significance thresholds as dashed
// curves.
type Correlation struct {
	// Title is written above the plot.
	Title string
	// Series are the correlations r[l] of the pairs.
	Series []Series
	// Thresholds are significance curves such as the 95 % level of the
	// degree correlation; drawn dashed in grey.
	Thresholds []Series
	// MinDegree is the first degree drawn; zero means 1.
	MinDegree int
	// Width and Height are the size in pixels (points in SVG); zero means
	// 900 x 440.
	Width, Height int
}

// SweepPanel is one panel of a sweep summary: one quantity against the
// sweep parameter.
type SweepPanel struct {
	// YLabel names the quantity and its units.
	YLabel string
	// Series are the curves, one per value of a second parameter.
	Series []XYSeries
	// Identity draws the dashed line y = x, for a quantity that should
	// equal the swept parameter (achieved against requested q*).
	Identity bool
	// Fraction fixes the y range to [0, 1], for area fractions.
	Fraction bool
}

// Sweep is a row of panels summarising a parameter sweep, such as the
// achieved q* and the negative and sub-adiabatic area fractions against
// the requested q*, one series per truncation degree.
type Sweep struct {
	// Title is written above the panels.
	Title string
	// XLabel names the swept parameter, shared by all panels.
	XLabel string
	// Panels are drawn left to right under one legend: series i has the
	// same style and label (taken from the first panel that names it) in
	// every panel.
	Panels []SweepPanel
	// Width and Height are the size in pixels (points in SVG); zero means
	// 900 x 380.
	Width, Height int
}

func orSize(w, h, dw, dh int) (int, int) {
	if w == 0 {
		w = dw
	}
	if h == 0 {
		h = dh
	}
	return w, h
}

// newPlot returns a gonum plot set in the package's fonts and colours.
func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	set := func(s *text.Style, size vg.Length, bold bool) {
		s.Font = sans(size, bold)
		s.Handler = textHandler
		s.Color = inkText
	}
	set(&p.Title.TextStyle, 15, true)
	set(&p.X.Label.TextStyle, 12, false)
	set(&p.Y.Label.TextStyle, 12, false)
	set(&p.X.Tick.Label, 11, false)
	set(&p.Y.Tick.Label, 11, false)
	set(&p.Legend.TextStyle, 11, false)
	p.Title.Padding = 8
	p.X.Padding, p.Y.Padding = 4, 4
	p.Legend.ThumbnailWidth = 34
	p.Legend.Top = true
	return p
}

// seriesStyle returns the line style and glyph of series i: colour, dash
// pattern and marker all change, so series differ in print and for
// colour-blind readers.
func seriesStyle(i int) (draw.LineStyle, draw.GlyphStyle) {
	c := seriesColors[i%len(seriesColors)]
	dashes := [][]vg.Length{nil, {6, 3}, {2, 2.5}, {8, 3, 2, 3}, {4, 4}, {1, 3}}
	shapes := []draw.GlyphDrawer{draw.CircleGlyph{}, draw.SquareGlyph{}, draw.TriangleGlyph{}, draw.PyramidGlyph{}, draw.CrossGlyph{}, draw.PlusGlyph{}}
	ls := draw.LineStyle{Color: c, Width: 1.8, Dashes: dashes[(i/len(seriesColors)+i)%len(dashes)]}
	gs := draw.GlyphStyle{Color: c, Radius: 3.2, Shape: shapes[i%len(shapes)]}
	return ls, gs
}

// maxGlyphs is the largest number of points of a series drawn with
// markers; longer series are lines only, so that markers do not merge into
// a thick band.
const maxGlyphs = 40

// glyphs returns gs for a series of n points, nil when n > maxGlyphs.
func glyphs(gs *draw.GlyphStyle, n int) *draw.GlyphStyle {
	if n > maxGlyphs {
		return nil
	}
	return gs
}

// runs splits the points into runs of drawable points.
func runs(xs, ys []float64, ok func(x, y float64) bool) []plotter.XYs {
	var out []plotter.XYs
	var cur plotter.XYs
	for i := range xs {
		if ok(xs[i], ys[i]) {
			cur = append(cur, plotter.XY{X: xs[i], Y: ys[i]})
			continue
		}
		if len(cur) > 0 {
			out = append(out, cur)
		}
		cur = nil
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

func finite(x, y float64) bool {
	return !math.IsNaN(x) && !math.IsNaN(y) && !math.IsInf(x, 0) && !math.IsInf(y, 0)
}

// addSeries adds the runs of one series with style i and a legend entry.
func addSeries(p *plot.Plot, label string, rs []plotter.XYs, ls draw.LineStyle, gs *draw.GlyphStyle) error {
	for k, r := range rs {
		l, err := plotter.NewLine(r)
		if err != nil {
			return err
		}
		l.LineStyle = ls
		p.Add(l)
		var sc *plotter.Scatter
		if gs != nil {
			sc, err = plotter.NewScatter(r)
			if err != nil {
				return err
			}
			sc.GlyphStyle = *gs
			p.Add(sc)
		}
		if k == 0 && label != "" {
			if sc != nil {
				p.Legend.Add(label, l, sc)
			} else {
				p.Legend.Add(label, l)
			}
		}
	}
	return nil
}

func degreeRuns(s Series, lmin int, ok func(x, y float64) bool) []plotter.XYs {
	if lmin >= len(s.Y) {
		return nil
	}
	xs := make([]float64, 0, len(s.Y)-lmin)
	for l := lmin; l < len(s.Y); l++ {
		xs = append(xs, float64(l))
	}
	return runs(xs, s.Y[lmin:], ok)
}

// integerTicks marks every degree when there are few, else round steps.
type integerTicks struct{}

// Ticks returns ticks at integer degrees.
func (integerTicks) Ticks(min, max float64) []plot.Tick {
	span := max - min
	step := 1.0
	for _, s := range []float64{1, 2, 5, 10, 20, 50, 100, 200, 500, 1000} {
		step = s
		if span/s <= 16 {
			break
		}
	}
	var t []plot.Tick
	for v := math.Ceil(min/step) * step; v <= max+1e-9; v += step {
		t = append(t, plot.Tick{Value: v, Label: fmt.Sprintf("%g", v)})
	}
	return t
}

// logTicks labels a logarithmic axis: at 1, 2 and 5 times powers of ten
// when the range spans less than two decades, else at powers of ten, with
// unlabelled minor ticks at the other integer multiples.
type logTicks struct{}

// Ticks returns the ticks for the range [min, max], min > 0.
func (logTicks) Ticks(min, max float64) []plot.Tick {
	if !(min > 0) || !(max >= min) {
		return nil
	}
	dense := math.Log10(max/min) < 2
	var t []plot.Tick
	for e := math.Floor(math.Log10(min)); e <= math.Ceil(math.Log10(max)); e++ {
		p := math.Pow(10, e)
		for k := 1; k <= 9; k++ {
			v := float64(k) * p
			if v < min*(1-1e-9) || v > max*(1+1e-9) {
				continue
			}
			tk := plot.Tick{Value: v}
			if k == 1 || dense && (k == 2 || k == 5) {
				tk.Label = formatValue(v)
			}
			t = append(t, tk)
		}
	}
	return t
}

func (s *Spectrum) plot() (*plot.Plot, error) {
	if len(s.Series) == 0 {
		return nil, errors.New("figure: spectrum with no series")
	}
	lmin := s.MinDegree
	if lmin == 0 {
		lmin = 1
	}
	p := newPlot(s.Title, "spherical-harmonic degree l", s.YLabel)
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = logTicks{}
	p.X.Tick.Marker = integerTicks{}
	positive := func(x, y float64) bool { return finite(x, y) && y > 0 }
	n := 0
	lmax := lmin
	for i, ser := range s.Series {
		rs := degreeRuns(ser, lmin, positive)
		for _, r := range rs {
			n += len(r)
		}
		if len(ser.Y)-1 > lmax {
			lmax = len(ser.Y) - 1
		}
		ls, gs := seriesStyle(i)
		if err := addSeries(p, ser.Label, rs, ls, glyphs(&gs, len(ser.Y)-lmin)); err != nil {
			return nil, err
		}
	}
	if n == 0 {
		return nil, errors.New("figure: spectrum has no positive value to draw")
	}
	p.X.Min, p.X.Max = float64(lmin)-0.5, float64(lmax)+0.5
	addGrid(p)
	return p, nil
}

// addGrid adds light grid lines to p.
func addGrid(p *plot.Plot) {
	g := plotter.NewGrid()
	g.Vertical.Color = color.NRGBA{0, 0, 0, 0x22}
	g.Horizontal.Color = color.NRGBA{0, 0, 0, 0x22}
	g.Vertical.Width, g.Horizontal.Width = 0.6, 0.6
	p.Add(g)
}

// WritePNG writes the spectrum plot as a PNG image.
func (s *Spectrum) WritePNG(w io.Writer) error { return s.write(w, false) }

// WriteSVG writes the spectrum plot as an SVG document.
func (s *Spectrum) WriteSVG(w io.Writer) error { return s.write(w, true) }

func (s *Spectrum) write(out io.Writer, svg bool) error {
	p, err := s.plot()
	if err != nil {
		return err
	}
	w, h := orSize(s.Width, s.Height, 900, 440)
	return render(out, svg, w, h, func(dc draw.Canvas) error { p.Draw(pad(dc, 8)); return nil })
}

// pad returns dc less a margin on every side.
func pad(dc draw.Canvas, m vg.Length) draw.Canvas {
	return draw.Crop(dc, m, -m, m, -m)
}

func (c *Correlation) plot() (*plot.Plot, error) {
	if len(c.Series) == 0 {
		return nil, errors.New("figure: correlation plot with no series")
	}
	lmin := c.MinDegree
	if lmin == 0 {
		lmin = 1
	}
	p := newPlot(c.Title, "spherical-harmonic degree l", "degree correlation r")
	p.X.Tick.Marker = integerTicks{}
	p.Y.Min, p.Y.Max = -1, 1
	p.Y.Tick.Marker = plot.ConstantTicks([]plot.Tick{
		{Value: -1, Label: "−1"}, {Value: -0.5, Label: "−0.5"}, {Value: 0, Label: "0"},
		{Value: 0.5, Label: "0.5"}, {Value: 1, Label: "1"},
	})
	p.Legend.Top, p.Legend.Left = false, true
	addGrid(p)
	lmax := lmin
	zero, err := plotter.NewLine(plotter.XYs{{X: -1e9, Y: 0}, {X: 1e9, Y: 0}})
	if err != nil {
		return nil, err
	}
	zero.LineStyle = draw.LineStyle{Color: inkMuted, Width: 0.8}
	p.Add(zero)
	for i, th := range c.Thresholds {
		if len(th.Y)-1 > lmax {
			lmax = len(th.Y) - 1
		}
		ls := draw.LineStyle{Color: color.RGBA{0x70, 0x70, 0x70, 0xff}, Width: 1.2, Dashes: [][]vg.Length{{5, 3}, {2, 2}, {9, 3, 2, 3}}[i%3]}
		if err := addSeries(p, th.Label, degreeRuns(th, lmin, finite), ls, nil); err != nil {
			return nil, err
		}
	}
	for i, ser := range c.Series {
		for _, v := range ser.Y {
			if v < -1-1e-9 || v > 1+1e-9 {
				return nil, fmt.Errorf("figure: correlation %q has r = %v outside [-1, 1]", ser.Label, v)
			}
		}
		if len(ser.Y)-1 > lmax {
			lmax = len(ser.Y) - 1
		}
		ls, gs := seriesStyle(i)
		if err := addSeries(p, ser.Label, degreeRuns(ser, lmin, finite), ls, glyphs(&gs, len(ser.Y)-lmin)); err != nil {
			return nil, err
		}
	}
	p.X.Min, p.X.Max = float64(lmin)-0.5, float64(lmax)+0.5
	return p, nil
}

// WritePNG writes the correlation plot as a PNG image.
func (c *Correlation) WritePNG(w io.Writer) error { return c.write(w, false) }

// WriteSVG writes the correlation plot as an SVG document.
func (c *Correlation) WriteSVG(w io.Writer) error { return c.write(w, true) }

func (c *Correlation) write(out io.Writer, svg bool) error {
	p, err := c.plot()
	if err != nil {
		return err
	}
	w, h := orSize(c.Width, c.Height, 900, 440)
	return render(out, svg, w, h, func(dc draw.Canvas) error { p.Draw(pad(dc, 8)); return nil })
}

func (s *Sweep) plots() ([]*plot.Plot, error) {
	if len(s.Panels) == 0 {
		return nil, errors.New("figure: sweep summary with no panels")
	}
	var ps []*plot.Plot
	for _, pn := range s.Panels {
		p := newPlot("", s.XLabel, pn.YLabel)
		addGrid(p)
		p.Legend.Left = true
		xmin, xmax := math.Inf(1), math.Inf(-1)
		for i, ser := range pn.Series {
			if len(ser.X) != len(ser.Y) {
				return nil, fmt.Errorf("figure: sweep series %q has %d x and %d y values", ser.Label, len(ser.X), len(ser.Y))
			}
			for j := range ser.X {
				if finite(ser.X[j], ser.Y[j]) {
					xmin, xmax = math.Min(xmin, ser.X[j]), math.Max(xmax, ser.X[j])
				}
			}
			label := "" // the legend is shared, above the panels
			ls, gs := seriesStyle(i)
			if err := addSeries(p, label, runs(ser.X, ser.Y, finite), ls, glyphs(&gs, len(ser.X))); err != nil {
				return nil, err
			}
		}
		if pn.Identity && xmax >= xmin {
			id, err := plotter.NewLine(plotter.XYs{{X: xmin, Y: xmin}, {X: xmax, Y: xmax}})
			if err != nil {
				return nil, err
			}
			id.LineStyle = draw.LineStyle{Color: inkMuted, Width: 1, Dashes: []vg.Length{5, 3}}
			p.Add(id)
		}
		if pn.Fraction {
			p.Y.Min, p.Y.Max = 0, 1
		}
		ps = append(ps, p)
	}
	return ps, nil
}

// WritePNG writes the sweep summary as a PNG image.
func (s *Sweep) WritePNG(w io.Writer) error { return s.write(w, false) }

// WriteSVG writes the sweep summary as an SVG document.
func (s *Sweep) WriteSVG(w io.Writer) error { return s.write(w, true) }

func (s *Sweep) write(out io.Writer, svg bool) error {
	ps, err := s.plots()
	if err != nil {
		return err
	}
	w, h := orSize(s.Width, s.Height, 900, 380)
	return render(out, svg, w, h, func(dc draw.Canvas) error {
		top := vg.Length(8)
		if s.Title != "" {
			dc.FillText(textStyle(15, true, inkText, draw.XCenter, draw.YTop),
				vg.Point{X: vg.Length(w) / 2, Y: vg.Length(h) - 8}, s.Title)
			top = 32
		}
		if s.drawLegend(dc, float64(w), float64(h)-float64(top)-8) {
			top += 22
		}
		body := draw.Crop(dc, 8, -8, 8, -top)
		tiles := draw.Tiles{Rows: 1, Cols: len(ps), PadX: 18}
		cs := plot.Align([][]*plot.Plot{ps}, tiles, body)
		for i, p := range ps {
			p.Draw(cs[0][i])
		}
		return nil
	})
}

// drawLegend draws the shared legend centred on one row at height y and
// reports whether there was anything to show.
func (s *Sweep) drawLegend(dc draw.Canvas, width, y float64) bool {
	var labels []string
	identity := false
	for _, pn := range s.Panels {
		identity = identity || pn.Identity
		for i, ser := range pn.Series {
			for len(labels) <= i {
				labels = append(labels, "")
			}
			if labels[i] == "" {
				labels[i] = ser.Label
			}
		}
	}
	type entry struct {
		label string
		style int // series index, or -1 for the identity line
	}
	var es []entry
	for i, l := range labels {
		if l != "" {
			es = append(es, entry{l, i})
		}
	}
	if identity {
		es = append(es, entry{"y = x", -1})
	}
	if len(es) == 0 {
		return false
	}
	ts := textStyle(11.5, false, inkText, draw.XLeft, draw.YCenter)
	const sample, gap, space = 30.0, 6.0, 22.0
	total := 0.0
	for _, e := range es {
		total += sample + gap + float64(ts.Width(e.label)) + space
	}
	x := (width - total + space) / 2
	for _, e := range es {
		a, b := vg.Point{X: vg.Length(x), Y: vg.Length(y)}, vg.Point{X: vg.Length(x + sample), Y: vg.Length(y)}
		if e.style < 0 {
			dc.StrokeLines(draw.LineStyle{Color: inkMuted, Width: 1, Dashes: []vg.Length{5, 3}}, []vg.Point{a, b})
		} else {
			ls, gs := seriesStyle(e.style)
			dc.StrokeLines(ls, []vg.Point{a, b})
			dc.DrawGlyphNoClip(gs, vg.Point{X: vg.Length(x + sample/2), Y: vg.Length(y)})
		}
		dc.FillText(ts, vg.Point{X: vg.Length(x + sample + gap), Y: vg.Length(y)}, e.label)
		x += sample + gap + float64(ts.Width(e.label)) + space
	}
	return true
}
