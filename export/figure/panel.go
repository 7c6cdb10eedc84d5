package figure

import (
	"errors"
	"fmt"
	"image"
	"io"
	"math"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Panel is a figure of several maps in a grid sharing one projection and
// one colour scale, so that patterns from several models, truncations or
// q* values can be compared by eye: the same colour means the same value
// in every map.
//
// From each Map the panel uses the field (Grid or Field), Outlines,
// Markers, NoExtrema and Title (as the map's caption); the projection, the
// scale, the label, units, levels and hatches are the panel's.
type Panel struct {
	// Title and Subtitle are written above the maps.
	Title, Subtitle string
	// Maps are placed row by row.
	Maps []*Map
	// Cols is the number of maps per row; zero means 2 (1 for one map).
	Cols int
	// Projection is the projection of every map; the zero value is
	// Mollweide centred on DefaultCentralLon.
	Projection Projection
	// Center is the value drawn in the centre colour in every map.
	Center float64
	// CenterLabel names Center in the colour-bar caption; empty means
	// "mean".
	CenterLabel string
	// HalfRange is the distance from Center to either colour limit; zero
	// means the largest |value - Center| over all maps.
	HalfRange float64
	// Label and Units describe the values, as for Map.
	Label, Units string
	// Levels are reference values marked on the colour bar.
	Levels []Level
	// Hatches mark, in every map, where the field is below given values;
	// at most two are drawn.
	Hatches []Hatch
	// Width is the width in pixels (points in SVG); zero means 900.
	// Height follows from the number of rows unless set.
	Width, Height int
}

const (
	panelGapX    = 14.0 // between columns
	panelCaption = 20.0 // above each map
	panelGapY    = 8.0  // between rows
)

func (p *Panel) grid() (cols, rows int, err error) {
	if len(p.Maps) == 0 {
		return 0, 0, errors.New("figure: panel with no maps")
	}
	cols = p.Cols
	switch {
	case cols < 0:
		return 0, 0, fmt.Errorf("figure: panel with %d columns", cols)
	case cols == 0 && len(p.Maps) == 1:
		cols = 1
	case cols == 0:
		cols = 2
	}
	cols = min(cols, len(p.Maps))
	rows = (len(p.Maps) + cols - 1) / cols
	return cols, rows, nil
}

// size returns the figure size and the size of one map cell.
func (p *Panel) size(cols, rows int) (w, h int, cellW, cellH float64) {
	w = p.Width
	if w == 0 {
		w = 900
	}
	xmax, ymax := p.Projection.Bounds()
	cellW = (float64(w) - 2*mapSide - float64(cols-1)*panelGapX) / float64(cols)
	cellH = cellW * ymax / xmax
	h = p.Height
	if h == 0 {
		h = int(math.Ceil(headerHeight(p.Title, p.Subtitle) + float64(rows)*(cellH+panelCaption+panelGapY) + mapBottomBand))
	} else {
		avail := float64(h) - headerHeight(p.Title, p.Subtitle) - mapBottomBand - float64(rows)*(panelCaption+panelGapY)
		cellH = math.Min(cellH, avail/float64(rows))
	}
	return w, h, cellW, cellH
}

// WritePNG writes the panel as a PNG image.
func (p *Panel) WritePNG(w io.Writer) error { return p.write(w, false) }

// WriteSVG writes the panel as an SVG document, each map's field as an
// embedded PNG image under vector overlays.
func (p *Panel) WriteSVG(w io.Writer) error { return p.write(w, true) }

func (p *Panel) write(out io.Writer, svg bool) error {
	if err := checkScale(p.Center, p.HalfRange); err != nil {
		return err
	}
	cols, rows, err := p.grid()
	if err != nil {
		return err
	}
	w, h, cellW, cellH := p.size(cols, rows)
	top := float64(h) - headerHeight(p.Title, p.Subtitle)
	ls := make([]*mapLayout, len(p.Maps))
	ss := make([]*sampled, len(p.Maps))
	var outlines []Outline
	noData := false
	for i, m := range p.Maps {
		r, c := i/cols, i%cols
		bx := mapSide + float64(c)*(cellW+panelGapX)
		by := top - float64(r+1)*(cellH+panelCaption+panelGapY) + panelGapY
		l, err := fitMap(p.Projection, bx, by, cellW, cellH)
		if err != nil {
			return fmt.Errorf("figure: panel size %d x %d too small for %d x %d maps", w, h, cols, rows)
		}
		s, err := m.sample(l)
		if err != nil {
			return fmt.Errorf("figure: panel map %d: %w", i+1, err)
		}
		ls[i], ss[i] = l, s
		outlines = append(outlines, m.Outlines...)
		noData = noData || s.noData
	}
	sc := autoScale(p.Center, p.HalfRange, ss...)
	imgs := make([]image.Image, len(p.Maps))
	for i := range p.Maps {
		imgs[i] = ss[i].image(ls[i], sc, p.Hatches)
	}
	return render(out, svg, w, h, func(dc draw.Canvas) error {
		drawHeader(dc, float64(w), float64(h), p.Title, p.Subtitle)
		for i, m := range p.Maps {
			l := ls[i]
			m.drawBody(dc, l, imgs[i], ss[i], cellW >= 500)
			if m.Title != "" {
				dc.FillText(textStyle(12.5, true, inkText, draw.XCenter, draw.YBottom),
					vg.Point{X: vg.Length(l.cx), Y: vg.Length(float64(l.y0+l.ny) + 5)}, m.Title)
			}
		}
		bar := colourBar{label: p.Label, units: p.Units, centerLabel: p.CenterLabel, levels: p.Levels, outlines: outlines, hatches: p.Hatches, noData: noData}
		bar.beyond(sc, ss...)
		bar.draw(dc, float64(w), mapBottomBand-22, sc)
		return nil
	})
}
