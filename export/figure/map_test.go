package figure

import (
	"bytes"
	"encoding/xml"
	"image"
	"image/png"
	"io"
	"math"
	"strings"
	"testing"
)

// TestGridAt checks the bilinear interpolation: exact for a field that is
// bilinear in longitude and latitude within a cell, exact at nodes, and
// periodic in longitude.
func TestGridAt(t *testing.T) {
	g := &Grid{NLon: 36, NLat: 19, Lon0: -180, Lat0: -90, DLat: 10}
	g.Values = make([]float64, g.NLon*g.NLat)
	for i := range g.NLat {
		for j := range g.NLon {
			g.Values[i*g.NLon+j] = float64(3*i + 7*j)
		}
	}
	// Inside the cell with corners (i, j) = (10, 20), (11, 21): lon -180 +
	// 10 j, lat -90 + 10 i; the values are linear in (i, j) there.
	for _, c := range [][2]float64{{25, 12}, {21.5, 19.9}, {29.99, 10.01}} {
		lon, lat := c[0], c[1]
		want := 3*(lat+90)/10 + 7*(lon+180)/10
		if got := g.At(lon, lat); math.Abs(got-want) > 1e-9 {
			t.Errorf("At(%v, %v) = %v, want %v", lon, lat, got, want)
		}
		if got := g.At(lon+360, lat); math.Abs(got-want) > 1e-9 {
			t.Errorf("At(%v + 360, %v) = %v, want %v", lon, lat, got, want)
		}
	}
	// Across the periodic seam: halfway between column 35 (lon 170) and
	// column 0 (lon -180 = 180).
	if got, want := g.At(175, -90), (7.0*35+0)/2; math.Abs(got-want) > 1e-9 {
		t.Errorf("At(175, -90) = %v, want %v", got, want)
	}
	if got := g.At(0, 95); got != g.At(0, 90) {
		t.Errorf("north of the last row: %v, want the last row's %v", got, g.At(0, 90))
	}
}

// TestGridCheck checks that malformed grids are reported.
func TestGridCheck(t *testing.T) {
	for _, g := range []*Grid{
		{NLon: 4, NLat: 3, DLat: 1, Values: make([]float64, 11)},
		{NLon: 1, NLat: 3, DLat: 1, Values: make([]float64, 3)},
		{NLon: 4, NLat: 3, DLat: 0, Values: make([]float64, 12)},
		{NLon: 4, NLat: 3, Lat0: 80, DLat: 10, Values: make([]float64, 12)},
	} {
		if err := g.check(); err == nil {
			t.Errorf("check(%+v) = nil, want an error", g)
		}
		m := &Map{Grid: g}
		if err := m.WritePNG(io.Discard); err == nil {
			t.Errorf("WritePNG with grid %+v: no error", g)
		}
	}
	if err := (&Map{}).WritePNG(io.Discard); err == nil {
		t.Error("map without a field: no error")
	}
	if err := (&Map{Grid: demoGrid(), Field: demoField}).WritePNG(io.Discard); err == nil {
		t.Error("map with both Grid and Field: no error")
	}
	if err := (&Map{Field: demoField, Center: math.NaN()}).WritePNG(io.Discard); err == nil {
		t.Error("map with NaN centre: no error")
	}
}

// TestProjectLineCutsAtEdge checks that a line crossing the meridian
// opposite the central one is cut into pieces that end on the map edge,
// with no segment spanning the map.
func TestProjectLineCutsAtEdge(t *testing.T) {
	for _, k := range []Kind{Mollweide, Hammer, Equirectangular} {
		m := &Map{Projection: Projection{Kind: k, CentralLon: 180}}
		l, err := m.layout(900, 540)
		if err != nil {
			t.Fatal(err)
		}
		ring := circleRing(0, 0, 20) // centred on the edge meridian
		segs := projectLine(l, ring)
		if len(segs) < 2 {
			t.Fatalf("%v: ring across the edge gave %d pieces, want at least 2", k, len(segs))
		}
		mapW := 2 * l.xmax * l.scale
		for _, s := range segs {
			for i := 1; i < len(s); i++ {
				if d := math.Abs(float64(s[i].X - s[i-1].X)); d > mapW/20 {
					t.Errorf("%v: segment jumps %.0f of %.0f points across the map", k, d, mapW)
				}
			}
			// Every piece ends on the east or west edge.
			for _, p := range []int{0, len(s) - 1} {
				x := (float64(s[p].X) - l.cx) / l.scale
				y := (float64(s[p].Y) - l.cy) / l.scale
				_, _, okIn := l.proj.Inverse(x*0.999, y)
				_, _, okOut := l.proj.Inverse(x*1.001+math.Copysign(1e-6, x), y)
				if !okIn || okOut {
					t.Errorf("%v: piece end (%.3f, %.3f) not on the edge", k, x, y)
				}
			}
		}
		// A ring away from the edge stays one closed piece.
		if segs := projectLine(l, circleRing(180, 10, 20)); len(segs) != 1 {
			t.Errorf("%v: ring off the edge gave %d pieces, want 1", k, len(segs))
		}
	}
}

func decodePNG(t *testing.T, b []byte) image.Image {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	return img
}

// TestMapPixels checks that the raster shows the field: pixels away from
// the graticule, outlines and text have the scale's colour of the field
// value at the inverse-projected pixel centre.
func TestMapPixels(t *testing.T) {
	m := &Map{Field: demoField, Center: 65, HalfRange: 40, NoExtrema: true}
	b, err := PNG(m)
	if err != nil {
		t.Fatal(err)
	}
	img := decodePNG(t, b)
	if w, h := img.Bounds().Dx(), img.Bounds().Dy(); w != 900 || h != 540 {
		t.Fatalf("size %d x %d, want 900 x 540", w, h)
	}
	l, _ := m.layout(900, 540)
	sc := Scale{Center: 65, HalfRange: 40}
	for _, ll := range [][2]float64{{195, 15}, {15, -8}, {100, 40}, {-75, 10}, {-165, -5}, {140, -50}} {
		x, y := l.proj.Forward(ll[0], ll[1])
		// Pixel (column, row from the top) containing the point.
		col := int(math.Floor(l.cx + x*l.scale))
		row := 540 - 1 - int(math.Floor(l.cy+y*l.scale))
		px := (float64(col) + 0.5 - l.cx) / l.scale
		py := (float64(540-row) - 0.5 - l.cy) / l.scale
		lon, lat, ok := l.proj.Inverse(px, py)
		if !ok {
			t.Fatalf("pixel of %v outside the map", ll)
		}
		want := sc.Color(demoField(lon, lat))
		r, g, bb, _ := img.At(col, row).RGBA()
		got := [3]int{int(r >> 8), int(g >> 8), int(bb >> 8)}
		for i, w := range [3]uint8{want.R, want.G, want.B} {
			if d := got[i] - int(w); d < -2 || d > 2 {
				t.Errorf("pixel at %v: %v, want %v", ll, got, want)
				break
			}
		}
	}
	// Outside the ellipse, at the corners, the background is white.
	if r, g, bb, _ := img.At(l.x0+2, 540-l.y0-2).RGBA(); r>>8 != 255 || g>>8 != 255 || bb>>8 != 255 {
		t.Errorf("corner pixel (%d, %d, %d), want white", r>>8, g>>8, bb>>8)
	}
}

// TestDeterministic renders every figure twice in both formats and checks
// that the bytes are identical.
func TestDeterministic(t *testing.T) {
	figs := map[string]Figure{
		"map":         demoMap(),
		"spectrum":    &Spectrum{Series: []Series{{Label: "a", Y: []float64{1, 2, 3, 0.5}}}},
		"correlation": &Correlation{Series: []Series{{Label: "a", Y: []float64{1, 0.5, -0.2}}}},
		"panel":       &Panel{Maps: []*Map{{Field: demoField}, {Grid: demoGrid()}}, Center: 65},
		"sweep":       &Sweep{XLabel: "q*", Panels: []SweepPanel{{YLabel: "y", Series: []XYSeries{{X: []float64{1, 2}, Y: []float64{1, 3}}}}}},
	}
	for name, f := range figs {
		for _, enc := range []func(Figure) ([]byte, error){PNG, SVG} {
			a, err := enc(f)
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			b, _ := enc(f)
			if !bytes.Equal(a, b) {
				t.Errorf("%s: two renderings differ", name)
			}
			if len(a) < 1000 {
				t.Errorf("%s: only %d bytes", name, len(a))
			}
		}
	}
}

// TestSVGWellFormed checks that the SVG output is well-formed XML with the
// raster embedded as an image and the title as text (W3C SVG 1.1: image
// and text elements).
func TestSVGWellFormed(t *testing.T) {
	b, err := SVG(demoMap())
	if err != nil {
		t.Fatal(err)
	}
	d := xml.NewDecoder(bytes.NewReader(b))
	count := map[string]int{}
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG not well-formed: %v", err)
		}
		if se, ok := tok.(xml.StartElement); ok {
			count[se.Name.Local]++
		}
	}
	if count["svg"] != 1 || count["image"] < 2 || count["path"] < 10 || count["text"] < 10 {
		t.Errorf("element counts %v", count)
	}
	if !strings.Contains(string(b), `xlink:href="data:image/png;base64,`) || strings.Contains(string(b), "image/jpg") {
		t.Error("embedded raster not labelled image/png")
	}
	if strings.Contains(string(b), "font-family:Liberation Sans;") || !strings.Contains(string(b), "sans-serif") {
		t.Error("SVG text has no sans-serif fallback font")
	}
	if !strings.Contains(string(b), "invented demo scenario") {
		t.Error("title missing from the SVG")
	}
}

// TestPNGNotBlank checks that each figure draws many colours, so a figure
// that silently drew nothing fails.
func TestPNGNotBlank(t *testing.T) {
	for name, f := range map[string]Figure{
		"map":      demoMap(),
		"spectrum": &Spectrum{Title: "s", Series: []Series{{Label: "a", Y: []float64{5, 4, 3, 2, 1}}, {Label: "b", Y: []float64{5, 1, 2, 3, 4}}}},
	} {
		b, err := PNG(f)
		if err != nil {
			t.Fatal(err)
		}
		img := decodePNG(t, b)
		seen := map[[3]uint32]bool{}
		nonWhite := 0
		for y := img.Bounds().Min.Y; y < img.Bounds().Max.Y; y += 2 {
			for x := img.Bounds().Min.X; x < img.Bounds().Max.X; x += 2 {
				r, g, b, _ := img.At(x, y).RGBA()
				seen[[3]uint32{r >> 8, g >> 8, b >> 8}] = true
				if r>>8 < 250 || g>>8 < 250 || b>>8 < 250 {
					nonWhite++
				}
			}
		}
		if len(seen) < 20 || nonWhite < 500 {
			t.Errorf("%s: %d colours, %d non-white samples: looks blank", name, len(seen), nonWhite)
		}
	}
}

// TestPlotErrors checks the errors for unusable plot data.
func TestPlotErrors(t *testing.T) {
	for name, f := range map[string]Figure{
		"no series":       &Spectrum{},
		"no positive":     &Spectrum{Series: []Series{{Y: []float64{1, 0, -1}}}},
		"r out of range":  &Correlation{Series: []Series{{Y: []float64{1, 1.5}}}},
		"no panels":       &Sweep{},
		"length mismatch": &Sweep{Panels: []SweepPanel{{Series: []XYSeries{{X: []float64{1}, Y: []float64{1, 2}}}}}},
	} {
		if err := f.WritePNG(io.Discard); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

// TestLogTicks checks the labels of the logarithmic axis.
func TestLogTicks(t *testing.T) {
	labels := func(lo, hi float64) (s []string) {
		for _, tk := range (logTicks{}).Ticks(lo, hi) {
			if tk.Label != "" {
				s = append(s, tk.Label)
			}
		}
		return s
	}
	if got := strings.Join(labels(0.5, 9), " "); got != "0.5 1 2 5" {
		t.Errorf("labels on [0.5, 9]: %q", got)
	}
	if got := strings.Join(labels(0.03, 2000), " "); got != "0.1 1 10 100 1000" {
		t.Errorf("labels on [0.03, 2000]: %q", got)
	}
}

// TestFormatting checks value labels and tick choice.
func TestFormatting(t *testing.T) {
	for v, want := range map[float64]string{65: "65", 27.0512: "27.05", -0.25: "−0.25", 1234.6: "1235", -1.5e-5: "−1.5e-05", 0: "0", 1.5e-5: "1.5e-05"} {
		if got := formatValue(v); got != want {
			t.Errorf("formatValue(%v) = %q, want %q", v, got, want)
		}
	}
	ticks := niceTicks(27, 103, 6)
	want := []float64{40, 60, 80, 100}
	if len(ticks) != len(want) {
		t.Fatalf("niceTicks(27, 103) = %v, want %v", ticks, want)
	}
	for i := range want {
		if ticks[i] != want[i] {
			t.Fatalf("niceTicks(27, 103) = %v, want %v", ticks, want)
		}
	}
}

// BenchmarkMap measures rendering a 900 x 500 map; the target is well
// under 0.5 s per map.
func BenchmarkMap(b *testing.B) {
	for _, c := range []struct {
		name string
		m    *Map
	}{
		{"grid", &Map{Grid: demoGrid(), Center: 65, Width: 900, Height: 500}},
		{"func", &Map{Field: demoField, Center: 65, Width: 900, Height: 500}},
	} {
		for _, f := range []struct {
			name string
			enc  func(io.Writer) error
		}{{"png", c.m.WritePNG}, {"svg", c.m.WriteSVG}} {
			b.Run(c.name+"/"+f.name, func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					if err := f.enc(io.Discard); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
