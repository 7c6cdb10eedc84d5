package figure

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"runtime"
	"strings"
	"sync"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// OutlineStyle is how an outline is stroked on a map.
type OutlineStyle int

// Outline styles. All are drawn in a near-black ink over a thin white
// casing so that they stay visible on both ends of the colour scale.
const (
	// Solid is a continuous line.
	Solid OutlineStyle = iota
	// Dashed is a line of long dashes.
	Dashed
	// Dotted is a line of short dots.
	Dotted
)

// Outline is a set of lines drawn over a map, such as the boundary of the
// regions where the flux is below the adiabat.
type Outline struct {
	// Rings are the lines, each a sequence of (lon, lat) points in
	// degrees. A ring whose last point equals its first is drawn closed.
	// Lines that cross the map edge are cut there.
	Rings [][][2]float64
	// Label names the outline in the map's legend; empty leaves it out.
	Label string
	// Style is the stroke pattern.
	Style OutlineStyle
}

// Hatch marks the part of a map where the field is below a value with fine
// diagonal lines drawn into the raster, light on dark colours and dark on
// light ones, so that the region shows in grey print and for any colour
// vision, not only through its colour. The first hatch of a map is drawn
// rising to the right, the second falling, so that two regions nested in
// each other (below the adiabat, below zero) appear as single and cross
// hatching.
type Hatch struct {
	// Below is the value under which the map is hatched.
	Below float64
	// Label names the region in the legend, such as "below q_ad".
	Label string
}

// Level is a reference value marked on a map's colour bar.
type Level struct {
	// Value is the marked value, in the map's units.
	Value float64
	// Label names the value, such as "q_ad".
	Label string
}

// Marker is a labelled point on a map.
type Marker struct {
	// Lon and Lat are the position in degrees.
	Lon, Lat float64
	// Label is written beside the marker.
	Label string
}

// Map is a global map of a scalar field on the sphere with a diverging
// colour scale centred on a given value, a 30-degree graticule, outlines,
// labelled extrema, a colour bar and a title.
//
// Exactly one of Grid and Field gives the field. The zero value of every
// other field is a usable default.
type Map struct {
	// Title is written above the map.
	Title string
	// Subtitle is written under the title in smaller type, such as the
	// parameters of the build.
	Subtitle string
	// Grid is the field on a regular longitude-latitude grid, sampled by
	// bilinear interpolation.
	Grid *Grid
	// Field is the field as a function of longitude and latitude in
	// degrees; it is called once per map pixel, from one goroutine.
	Field func(lon, lat float64) float64
	// Projection is the map projection; the zero value is Mollweide
	// centred on DefaultCentralLon.
	Projection Projection
	// Center is the value drawn in the centre colour, usually the mean of
	// the field.
	Center float64
	// CenterLabel names Center in the colour-bar caption; empty means
	// "mean".
	CenterLabel string
	// HalfRange is the distance from Center to either colour limit; zero
	// means the largest |value - Center| on the map, so the scale is
	// symmetric and no value saturates. When values lie beyond a limit,
	// that end of the colour bar is drawn pointed.
	HalfRange float64
	// Label names the quantity, such as "CMB heat flux".
	Label string
	// Units are the units of the values, such as "mW/m²".
	Units string
	// Levels are reference values marked on the colour bar, such as the
	// adiabatic heat flux or zero.
	Levels []Level
	// Hatches mark where the field is below given values; at most two
	// are drawn.
	Hatches []Hatch
	// Outlines are drawn over the field, in order.
	Outlines []Outline
	// Markers are drawn over the field, after the extrema.
	Markers []Marker
	// NoExtrema leaves out the markers of the largest and smallest value.
	// The extrema marked are those of the grid values for a Grid and of
	// the values at the pixel centres for a Field.
	NoExtrema bool
	// Width and Height are the size in pixels (points in SVG); zero means
	// 900 x 540.
	Width, Height int
}

// WritePNG writes the map as a PNG image.
func (m *Map) WritePNG(w io.Writer) error { return m.write(w, false) }

// WriteSVG writes the map as an SVG document: the field is an embedded
// PNG image, the graticule, outlines, markers and text are vectors.
func (m *Map) WriteSVG(w io.Writer) error { return m.write(w, true) }

func (m *Map) size() (int, int) {
	w, h := m.Width, m.Height
	if w == 0 {
		w = 900
	}
	if h == 0 {
		h = 540
	}
	return w, h
}

// mapLayout is the placement of one map on the canvas, in points with the
// origin at the bottom left.
type mapLayout struct {
	proj       Projection
	cx, cy     float64 // centre of the map
	scale      float64 // points per unit of projected coordinates
	x0, y0     int     // bottom-left of the raster
	nx, ny     int     // raster size in pixels
	xmax, ymax float64
}

func (l *mapLayout) pt(x, y float64) vg.Point {
	return vg.Point{X: vg.Length(l.cx + x*l.scale), Y: vg.Length(l.cy + y*l.scale)}
}

// fitMap centres the largest whole map of projection p in the box with
// bottom-left corner (bx, by), width bw and height bh.
func fitMap(p Projection, bx, by, bw, bh float64) (*mapLayout, error) {
	l := &mapLayout{proj: p.resolved()}
	l.xmax, l.ymax = l.proj.Bounds()
	if bw < 40 || bh < 20 {
		return nil, fmt.Errorf("figure: map area %.0f x %.0f too small", bw, bh)
	}
	l.scale = math.Min(bw/(2*l.xmax), bh/(2*l.ymax))
	l.nx = int(math.Ceil(2 * l.xmax * l.scale))
	l.ny = int(math.Ceil(2 * l.ymax * l.scale))
	l.x0 = int(math.Round(bx + (bw-float64(l.nx))/2))
	l.y0 = int(math.Round(by + (bh-float64(l.ny))/2))
	l.cx = float64(l.x0) + float64(l.nx)/2
	l.cy = float64(l.y0) + float64(l.ny)/2
	return l, nil
}

// Bands of a figure with maps, in points.
const (
	mapSide       = 24.0 // left and right margins
	mapTitleBand  = 40.0 // title
	mapSubBand    = 16.0 // subtitle, when present
	mapBottomBand = 92.0 // colour bar, its caption and the legend
)

// headerHeight returns the height of the title and subtitle bands.
func headerHeight(title, subtitle string) float64 {
	h := 22.0
	if title != "" {
		h = mapTitleBand
	}
	if subtitle != "" {
		h += mapSubBand
	}
	return h
}

func (m *Map) layout(w, h int) (*mapLayout, error) {
	top := headerHeight(m.Title, m.Subtitle)
	l, err := fitMap(m.Projection, mapSide, mapBottomBand, float64(w)-2*mapSide, float64(h)-top-mapBottomBand)
	if err != nil {
		return nil, fmt.Errorf("figure: map size %d x %d too small", w, h)
	}
	return l, nil
}

// sampler returns the field as a function of (lon, lat) degrees.
func (m *Map) sampler() (func(lon, lat float64) float64, error) {
	switch {
	case m.Grid != nil && m.Field != nil:
		return nil, errors.New("figure: map has both Grid and Field, want one")
	case m.Grid != nil:
		if err := m.Grid.check(); err != nil {
			return nil, err
		}
		return m.Grid.at, nil
	case m.Field != nil:
		return m.Field, nil
	}
	return nil, errors.New("figure: map has neither Grid nor Field")
}

// extremum is a located value.
type extremum struct {
	lon, lat, v float64
	ok          bool
}

// sampled holds a map's field at the raster's pixel centres (NaN for
// missing data, +Inf outside the map) and its extrema.
type sampled struct {
	vals   []float64
	hi, lo extremum
	noData bool
}

// sample evaluates the field at every pixel centre of the raster. A Grid
// is sampled by several goroutines, a Field by one, as documented.
func (m *Map) sample(l *mapLayout) (*sampled, error) {
	f, err := m.sampler()
	if err != nil {
		return nil, err
	}
	s := &sampled{vals: make([]float64, l.nx*l.ny)}
	workers := 1
	if m.Grid != nil {
		workers = max(1, min(runtime.GOMAXPROCS(0), 8, l.ny/16))
	}
	parts := make([]sampled, workers)
	errs := make([]error, workers)
	var wg sync.WaitGroup
	for k := range workers {
		r0, r1 := k*l.ny/workers, (k+1)*l.ny/workers
		wg.Go(func() { errs[k] = sampleRows(l, f, s.vals, r0, r1, &parts[k]) })
	}
	wg.Wait()
	// Merge in row order: ties go to the first pixel in scan order, as
	// with one goroutine, so the result does not depend on the split.
	for k, p := range parts {
		if errs[k] != nil {
			return nil, errs[k]
		}
		s.noData = s.noData || p.noData
		if p.hi.ok && (!s.hi.ok || p.hi.v > s.hi.v) {
			s.hi = p.hi
		}
		if p.lo.ok && (!s.lo.ok || p.lo.v < s.lo.v) {
			s.lo = p.lo
		}
	}
	if m.Grid != nil {
		s.hi, s.lo = gridExtrema(m.Grid)
	}
	return s, nil
}

// sampleRows samples raster rows [r0, r1) into vals and records their
// extrema and missing data in p.
func sampleRows(l *mapLayout, f func(lon, lat float64) float64, vals []float64, r0, r1 int, p *sampled) error {
	for r := r0; r < r1; r++ {
		y := (float64(l.y0+l.ny-r) - 0.5 - l.cy) / l.scale
		for c := range l.nx {
			x := (float64(l.x0+c) + 0.5 - l.cx) / l.scale
			lon, lat, ok := l.proj.Inverse(x, y)
			v := math.Inf(1) // outside the map
			if ok {
				v = f(lon, lat)
				switch {
				case math.IsNaN(v):
					p.noData = true
				case math.IsInf(v, 0):
					return fmt.Errorf("figure: field is %v at (%g, %g)", v, lon, lat)
				default:
					if !p.hi.ok || v > p.hi.v {
						p.hi = extremum{lon, lat, v, true}
					}
					if !p.lo.ok || v < p.lo.v {
						p.lo = extremum{lon, lat, v, true}
					}
				}
			}
			vals[r*l.nx+c] = v
		}
	}
	return nil
}

// image colours the samples, hatched below the given values; pixels
// outside the map stay transparent.
func (s *sampled) image(l *mapLayout, sc Scale, hatches []Hatch) *image.RGBA {
	img := image.NewRGBA(image.Rect(0, 0, l.nx, l.ny))
	for i, v := range s.vals {
		if math.IsInf(v, 1) {
			continue
		}
		c := sc.Color(v)
		for k, h := range hatches[:min(len(hatches), 2)] {
			if v < h.Below && onHatch(k, i%l.nx, i/l.nx) {
				c = hatchInk(c)
			}
		}
		img.Pix[4*i], img.Pix[4*i+1], img.Pix[4*i+2], img.Pix[4*i+3] = c.R, c.G, c.B, c.A
	}
	return img
}

// hatchPeriod is the spacing of hatch lines in pixels along a row.
const hatchPeriod = 7

// onHatch reports whether pixel (col, row) lies on a line of hatch k:
// rising to the right for k = 0, falling for k = 1.
func onHatch(k, col, row int) bool {
	if k == 0 {
		return (col+row)%hatchPeriod == 0
	}
	return ((col-row)%hatchPeriod+hatchPeriod)%hatchPeriod == 0
}

// hatchInk returns the colour of a hatch line over c: c mixed two thirds
// of the way to white when c is dark, to near black when it is light.
func hatchInk(c color.RGBA) color.RGBA {
	mix := func(a, b uint8) uint8 { return uint8((int(a) + 2*int(b)) / 3) }
	t := uint8(0x18)
	if 299*int(c.R)+587*int(c.G)+114*int(c.B) < 128*1000 {
		t = 0xff
	}
	return color.RGBA{R: mix(c.R, t), G: mix(c.G, t), B: mix(c.B, t), A: 0xff}
}

// checkScale reports a centre or half range that cannot be used.
func checkScale(center, half float64) error {
	if math.IsNaN(center) || math.IsInf(center, 0) {
		return fmt.Errorf("figure: map centre value %v, want finite", center)
	}
	if half < 0 || math.IsNaN(half) || math.IsInf(half, 0) {
		return fmt.Errorf("figure: map half range %v, want positive or zero for automatic", half)
	}
	return nil
}

// autoScale returns the scale with the given centre and half range, the
// half range chosen to reach the farthest extremum when it is zero.
func autoScale(center, half float64, ss ...*sampled) Scale {
	if half == 0 {
		for _, s := range ss {
			if s.hi.ok {
				half = math.Max(half, math.Max(s.hi.v-center, center-s.lo.v))
			}
		}
	}
	if !(half > 0) {
		half = math.Max(math.Abs(center)*1e-3, 1e-12)
	}
	return Scale{Center: center, HalfRange: half}
}

func (m *Map) write(out io.Writer, svg bool) error {
	if err := checkScale(m.Center, m.HalfRange); err != nil {
		return err
	}
	w, h := m.size()
	l, err := m.layout(w, h)
	if err != nil {
		return err
	}
	s, err := m.sample(l)
	if err != nil {
		return err
	}
	sc := autoScale(m.Center, m.HalfRange, s)
	img := s.image(l, sc, m.Hatches)
	return render(out, svg, w, h, func(dc draw.Canvas) error {
		m.drawBody(dc, l, img, s, true)
		drawHeader(dc, float64(w), float64(h), m.Title, m.Subtitle)
		bar := colourBar{label: m.Label, units: m.Units, centerLabel: m.CenterLabel, levels: m.Levels, outlines: m.Outlines, hatches: m.Hatches, noData: s.noData}
		bar.beyond(sc, s)
		bar.draw(dc, float64(w), float64(l.y0)-22, sc)
		return nil
	})
}

// drawBody draws the raster and everything on it.
func (m *Map) drawBody(dc draw.Canvas, l *mapLayout, img image.Image, s *sampled, labels bool) {
	dc.DrawImage(vg.Rectangle{
		Min: vg.Point{X: vg.Length(l.x0), Y: vg.Length(l.y0)},
		Max: vg.Point{X: vg.Length(l.x0 + l.nx), Y: vg.Length(l.y0 + l.ny)},
	}, img)
	drawGraticule(dc, l, labels)
	drawOutlines(dc, l, m.Outlines)
	drawBoundary(dc, l)
	if !m.NoExtrema && s.hi.ok {
		drawMarker(dc, l, s.hi.lon, s.hi.lat, "max "+formatValue(s.hi.v), true, 1)
		drawMarker(dc, l, s.lo.lon, s.lo.lat, "min "+formatValue(s.lo.v), true, -1)
	}
	for _, mk := range m.Markers {
		drawMarker(dc, l, mk.Lon, mk.Lat, mk.Label, false, 0)
	}
}

// drawHeader writes the title and subtitle at the top of a w x h figure.
func drawHeader(dc draw.Canvas, w, h float64, title, subtitle string) {
	ty := h - 12
	if title != "" {
		dc.FillText(textStyle(17, true, inkText, draw.XCenter, draw.YTop),
			vg.Point{X: vg.Length(w) / 2, Y: vg.Length(ty)}, title)
		ty -= 22
	}
	if subtitle != "" {
		dc.FillText(textStyle(12, false, inkMuted, draw.XCenter, draw.YTop),
			vg.Point{X: vg.Length(w) / 2, Y: vg.Length(ty)}, subtitle)
	}
}

// gridExtrema returns the largest and smallest non-NaN grid values; a
// bilinear interpolant takes its extrema at grid nodes.
func gridExtrema(g *Grid) (hi, lo extremum) {
	for i := range g.NLat {
		for j := range g.NLon {
			v := g.Values[i*g.NLon+j]
			if math.IsNaN(v) {
				continue
			}
			if !hi.ok || v > hi.v {
				lon, lat := g.lonLat(i, j)
				hi = extremum{lon, lat, v, true}
			}
			if !lo.ok || v < lo.v {
				lon, lat := g.lonLat(i, j)
				lo = extremum{lon, lat, v, true}
			}
		}
	}
	return hi, lo
}

// projectLine projects a line of (lon, lat) points, densified to steps of
// at most one degree, and cuts it where it crosses the map edge (the
// meridian opposite the central one), so that no segment streaks across
// the map.
func projectLine(l *mapLayout, pts [][2]float64) [][]vg.Point {
	if len(pts) == 0 {
		return nil
	}
	lon0 := l.proj.CentralLon
	var out [][]vg.Point
	var cur []vg.Point
	u := relLon(pts[0][0], lon0) * 180 / math.Pi
	emit := func(u, lat float64) {
		x, y := l.proj.Forward(lon0+u, lat)
		cur = append(cur, l.pt(x, y))
	}
	emit(u, pts[0][1])
	for k := 1; k < len(pts); k++ {
		a, b := pts[k-1], pts[k]
		du := wrapLon(b[0] - a[0])
		dlat := b[1] - a[1]
		n := int(math.Ceil(math.Max(math.Abs(du), math.Abs(dlat))))
		if n < 1 {
			n = 1
		}
		for s := 1; s <= n; s++ {
			f0, f1 := float64(s-1)/float64(n), float64(s)/float64(n)
			ua := u
			ub := ua + du/float64(n)
			la, lb := a[1]+f0*dlat, a[1]+f1*dlat
			if ub > 180 || ub < -180 {
				edge := math.Copysign(180, ub)
				f := (edge - ua) / (ub - ua)
				lc := la + f*(lb-la)
				emit(edge, lc)
				if len(cur) > 1 {
					out = append(out, cur)
				}
				cur = nil
				emit(-edge, lc)
				ub -= 2 * edge
			}
			u = ub
			emit(u, lb)
		}
	}
	if len(cur) > 1 {
		out = append(out, cur)
	}
	return out
}

func drawBoundary(dc draw.Canvas, l *mapLayout) {
	var pts []vg.Point
	lon0 := l.proj.CentralLon
	for lat := -90.0; lat <= 90; lat++ {
		x, y := l.proj.Forward(lon0+180, lat)
		pts = append(pts, l.pt(x, y))
	}
	for lat := 90.0; lat >= -90; lat-- {
		x, y := l.proj.Forward(lon0-180, lat)
		pts = append(pts, l.pt(x, y))
	}
	dc.SetLineStyle(draw.LineStyle{Color: inkFrame, Width: 1.1})
	dc.Stroke(polyPath(pts, true))
}

func drawGraticule(dc draw.Canvas, l *mapLayout, labels bool) {
	sty := draw.LineStyle{Color: inkGrid, Width: 0.6}
	lon0 := l.proj.CentralLon
	for lon := -150.0; lon <= 180; lon += 30 {
		if math.Abs(math.Abs(relLon(lon, lon0))-math.Pi) < 1e-9 {
			continue // the edge is drawn as the boundary
		}
		var line [][2]float64
		for lat := -90.0; lat <= 90; lat += 2 {
			line = append(line, [2]float64{lon, lat})
		}
		for _, seg := range projectLine(l, line) {
			dc.StrokeLines(sty, seg)
		}
	}
	for lat := -60.0; lat <= 60; lat += 30 {
		line := [][2]float64{{lon0 - 180, lat}, {lon0 - 60, lat}, {lon0 + 60, lat}, {lon0 + 179.999999, lat}}
		for _, seg := range projectLine(l, line) {
			dc.StrokeLines(sty, seg)
		}
	}
	if !labels {
		return
	}
	// Labels: latitudes outside the west edge, longitudes just north of
	// the equator.
	ls := textStyle(9.5, false, inkMuted, draw.XRight, draw.YCenter)
	for lat := -60.0; lat <= 60; lat += 30 {
		x, y := l.proj.Forward(lon0-180, lat)
		p := l.pt(x, y)
		p.X -= 4
		dc.FillText(ls, p, latName(lat))
	}
	es := textStyle(9.5, false, inkMuted, draw.XLeft, draw.YBottom)
	for lon := -150.0; lon <= 180; lon += 30 {
		if math.Abs(math.Abs(relLon(lon, lon0))-math.Pi) < 1e-9 {
			continue
		}
		x, y := l.proj.Forward(lon, 0)
		p := l.pt(x, y)
		p.X += 3
		p.Y += 2
		haloText(dc, es, p, lonName(lon))
	}
}

// haloText writes s with a thin light halo so that it reads on any colour.
func haloText(dc draw.Canvas, sty draw.TextStyle, p vg.Point, s string) {
	halo := sty
	halo.Color = color.NRGBA{0xff, 0xff, 0xff, 0xb0}
	for _, d := range [][2]vg.Length{{-0.8, 0}, {0.8, 0}, {0, -0.8}, {0, 0.8}} {
		dc.FillText(halo, vg.Point{X: p.X + d[0], Y: p.Y + d[1]}, s)
	}
	dc.FillText(sty, p, s)
}

func latName(lat float64) string {
	switch {
	case lat > 0:
		return fmt.Sprintf("%g°N", lat)
	case lat < 0:
		return fmt.Sprintf("%g°S", -lat)
	}
	return "0°"
}

func lonName(lon float64) string {
	lon = wrapLon(lon)
	switch {
	case lon == 180:
		return "180°"
	case lon > 0:
		return fmt.Sprintf("%g°E", lon)
	case lon < 0:
		return fmt.Sprintf("%g°W", -lon)
	}
	return "0°"
}

func outlineDashes(s OutlineStyle) []vg.Length {
	switch s {
	case Dashed:
		return []vg.Length{7, 4}
	case Dotted:
		return []vg.Length{1.6, 2.6}
	}
	return nil
}

func drawOutlines(dc draw.Canvas, l *mapLayout, outlines []Outline) {
	for _, o := range outlines {
		var segs [][]vg.Point
		for _, ring := range o.Rings {
			segs = append(segs, projectLine(l, ring)...)
		}
		casing := draw.LineStyle{Color: color.NRGBA{0xff, 0xff, 0xff, 0xc0}, Width: 3.2}
		ink := draw.LineStyle{Color: color.RGBA{0x10, 0x10, 0x10, 0xff}, Width: 1.5, Dashes: outlineDashes(o.Style)}
		if o.Style == Dotted {
			ink.Width = 1.8
		}
		for _, s := range segs {
			dc.StrokeLines(casing, s)
		}
		for _, s := range segs {
			dc.StrokeLines(ink, s)
		}
	}
}

// drawMarker draws a labelled marker: an upward triangle for a maximum
// (dir > 0), a downward one for a minimum (dir < 0), a ringed dot else.
func drawMarker(dc draw.Canvas, l *mapLayout, lon, lat float64, label string, extreme bool, dir int) {
	x, y := l.proj.Forward(lon, lat)
	p := l.pt(x, y)
	const r = 5.5
	var path vg.Path
	switch {
	case dir > 0:
		path = polyPath([]vg.Point{{X: p.X, Y: p.Y + r}, {X: p.X - r*0.95, Y: p.Y - r*0.6}, {X: p.X + r*0.95, Y: p.Y - r*0.6}}, true)
	case dir < 0:
		path = polyPath([]vg.Point{{X: p.X, Y: p.Y - r}, {X: p.X - r*0.95, Y: p.Y + r*0.6}, {X: p.X + r*0.95, Y: p.Y + r*0.6}}, true)
	default:
		path.Move(vg.Point{X: p.X + 3.5, Y: p.Y})
		path.Arc(p, 3.5, 0, 2*math.Pi)
		path.Close()
	}
	dc.SetColor(white)
	dc.Fill(path)
	dc.SetLineStyle(draw.LineStyle{Color: inkText, Width: 1.2})
	dc.Stroke(path)
	if label == "" {
		return
	}
	// Put the label on the side of the marker nearer the map centre.
	sty := textStyle(10.5, extreme, inkText, draw.XLeft, draw.YCenter)
	q := vg.Point{X: p.X + 8, Y: p.Y}
	if x > 0 {
		sty.XAlign = draw.XRight
		q.X = p.X - 8
	}
	tw := sty.Width(label)
	th := sty.FontExtents().Height
	// Near the top or bottom of the map (a pole), keep the label inside.
	if top := vg.Length(l.cy + l.ymax*l.scale); q.Y > top-th {
		q.Y = top - th
	}
	if bottom := vg.Length(l.cy - l.ymax*l.scale); q.Y < bottom+th {
		q.Y = bottom + th
	}
	bx := q.X - 2
	if sty.XAlign == draw.XRight {
		bx = q.X - tw - 2
	}
	dc.SetColor(color.NRGBA{0xff, 0xff, 0xff, 0xd8})
	dc.Fill(rectPath(bx, q.Y-th/2-1, bx+tw+4, q.Y+th/2+1))
	dc.FillText(sty, q, label)
}

// colourBar is the content of the band under the maps: the colour bar with
// its ticks, reference levels and caption, and the legend of outlines.
type colourBar struct {
	label, units, centerLabel string
	levels                    []Level
	outlines                  []Outline
	hatches                   []Hatch
	noData                    bool
	below, above              bool // some values lie beyond the limits
}

// beyond records whether the samples reach past the scale's limits.
func (cb *colourBar) beyond(sc Scale, ss ...*sampled) {
	for _, s := range ss {
		if s.lo.ok && s.lo.v < sc.Center-sc.HalfRange {
			cb.below = true
		}
		if s.hi.ok && s.hi.v > sc.Center+sc.HalfRange {
			cb.above = true
		}
	}
}

// draw draws the band across a figure of width width, the bar's top at top.
func (cb *colourBar) draw(dc draw.Canvas, width, top float64, sc Scale) {
	const barH = 13.0
	barW := math.Min(480, width*0.55)
	hasLegend := cb.noData || len(cb.hatches) > 0
	for _, o := range cb.outlines {
		if o.Label != "" {
			hasLegend = true
		}
	}
	bx := (width - barW) / 2
	if hasLegend {
		bx = 40
	}
	// Several rows, so that a viewer smoothing the scaled image does not
	// blend the bar with the transparent surroundings.
	bar := image.NewRGBA(image.Rect(0, 0, 512, 8))
	for i := range 512 {
		c := Diverging(2*(float64(i)+0.5)/512 - 1)
		for y := range 8 {
			bar.SetRGBA(i, y, c)
		}
	}
	dc.DrawImage(vg.Rectangle{
		Min: vg.Point{X: vg.Length(bx), Y: vg.Length(top - barH)},
		Max: vg.Point{X: vg.Length(bx + barW), Y: vg.Length(top)},
	}, bar)
	dc.SetLineStyle(draw.LineStyle{Color: inkFrame, Width: 0.8})
	dc.Stroke(rectPath(vg.Length(bx), vg.Length(top-barH), vg.Length(bx+barW), vg.Length(top)))
	lo, hi := sc.Center-sc.HalfRange, sc.Center+sc.HalfRange
	// Values beyond the limits take the end colours: a pointed end on
	// that side of the bar says so.
	for _, e := range []struct {
		over bool
		x, d float64
		c    color.RGBA
	}{{cb.below, bx, -1, Diverging(-1)}, {cb.above, bx + barW, 1, Diverging(1)}} {
		if !e.over {
			continue
		}
		tri := polyPath([]vg.Point{
			{X: vg.Length(e.x), Y: vg.Length(top)},
			{X: vg.Length(e.x + e.d*barH), Y: vg.Length(top - barH/2)},
			{X: vg.Length(e.x), Y: vg.Length(top - barH)},
		}, true)
		dc.SetColor(e.c)
		dc.Fill(tri)
		dc.SetLineStyle(draw.LineStyle{Color: inkFrame, Width: 0.8})
		dc.Stroke(tri)
	}
	ts := textStyle(10.5, false, inkText, draw.XCenter, draw.YTop)
	tick := draw.LineStyle{Color: inkFrame, Width: 0.8}
	for _, v := range niceTicks(lo, hi, 6) {
		x := bx + (v-lo)/(hi-lo)*barW
		dc.StrokeLine2(tick, vg.Length(x), vg.Length(top-barH), vg.Length(x), vg.Length(top-barH-4))
		dc.FillText(ts, vg.Point{X: vg.Length(x), Y: vg.Length(top - barH - 6)}, formatValue(v))
	}
	// Reference levels: a line across the bar and a label above it.
	for _, lv := range cb.levels {
		if lv.Value < lo || lv.Value > hi || math.IsNaN(lv.Value) {
			continue
		}
		x := vg.Length(bx + (lv.Value-lo)/(hi-lo)*barW)
		dc.StrokeLine2(draw.LineStyle{Color: white, Width: 2.6}, x, vg.Length(top-barH), x, vg.Length(top+3))
		dc.StrokeLine2(draw.LineStyle{Color: inkText, Width: 1.2}, x, vg.Length(top-barH), x, vg.Length(top+3))
		if lv.Label != "" {
			dc.FillText(textStyle(10, false, inkText, draw.XCenter, draw.YBottom),
				vg.Point{X: x, Y: vg.Length(top + 4)}, lv.Label+" "+formatValue(lv.Value))
		}
	}
	// The centre: a small notch above the bar.
	cxp := bx + barW/2
	dc.SetColor(inkText)
	dc.Fill(polyPath([]vg.Point{{X: vg.Length(cxp), Y: vg.Length(top)}, {X: vg.Length(cxp - 4), Y: vg.Length(top + 5)}, {X: vg.Length(cxp + 4), Y: vg.Length(top + 5)}}, true))
	cl := cb.centerLabel
	if cl == "" {
		cl = "mean"
	}
	caption := cb.label
	if cb.units != "" {
		if caption != "" {
			caption += " "
		}
		caption += "(" + cb.units + ")"
	}
	if caption != "" {
		caption += ";  "
	}
	caption += "colour centre = " + cl + " " + formatValue(sc.Center)
	for _, lv := range cb.levels {
		switch name := strings.TrimSpace(lv.Label + " " + formatValue(lv.Value)); {
		case lv.Value < lo:
			caption += ";  " + name + " below the scale"
		case lv.Value > hi:
			caption += ";  " + name + " above the scale"
		}
	}
	dc.FillText(textStyle(11.5, false, inkText, draw.XCenter, draw.YTop),
		vg.Point{X: vg.Length(bx + barW/2), Y: vg.Length(top - barH - 22)}, caption)
	if !hasLegend {
		return
	}
	// Outline legend to the right of the colour bar.
	x := bx + barW + 40
	y := top - 4
	ls := textStyle(11, false, inkText, draw.XLeft, draw.YCenter)
	seen := map[string]bool{}
	for _, o := range cb.outlines {
		key := fmt.Sprint(o.Style, o.Label)
		if o.Label == "" || seen[key] {
			continue
		}
		seen[key] = true
		seg := []vg.Point{{X: vg.Length(x), Y: vg.Length(y)}, {X: vg.Length(x + 30), Y: vg.Length(y)}}
		ink := draw.LineStyle{Color: color.RGBA{0x10, 0x10, 0x10, 0xff}, Width: 1.5, Dashes: outlineDashes(o.Style)}
		dc.StrokeLines(ink, seg)
		dc.FillText(ls, vg.Point{X: vg.Length(x + 38), Y: vg.Length(y)}, o.Label)
		y -= 17
	}
	for k, h := range cb.hatches[:min(len(cb.hatches), 2)] {
		// A swatch of the low end of the scale under hatch k.
		sw := image.NewRGBA(image.Rect(0, 0, 14, 12))
		base := Diverging(-0.75)
		for r := range 12 {
			for c := range 14 {
				col := base
				if onHatch(k, c, r) {
					col = hatchInk(base)
				}
				sw.SetRGBA(c, r, col)
			}
		}
		dc.DrawImage(vg.Rectangle{Min: vg.Point{X: vg.Length(x + 8), Y: vg.Length(y - 6)}, Max: vg.Point{X: vg.Length(x + 22), Y: vg.Length(y + 6)}}, sw)
		label := h.Label
		if label == "" {
			label = "below " + formatValue(h.Below)
		}
		dc.FillText(ls, vg.Point{X: vg.Length(x + 38), Y: vg.Length(y)}, label)
		y -= 17
	}
	if cb.noData {
		dc.SetColor(NoDataColor)
		dc.Fill(rectPath(vg.Length(x+8), vg.Length(y-6), vg.Length(x+22), vg.Length(y+6)))
		dc.FillText(ls, vg.Point{X: vg.Length(x + 38), Y: vg.Length(y)}, "no data")
	}
}
