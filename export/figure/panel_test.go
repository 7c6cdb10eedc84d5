package figure

import (
	"bytes"
	"image/color"
	"io"
	"math"
	"runtime"
	"testing"
)

// TestPanelSharedScale checks that the maps of a panel share one colour
// scale: two maps of fields that differ only by scaling about the centre
// show the stronger one with darker ends, and a pixel whose value is the
// same in both maps has the same colour.
func TestPanelSharedScale(t *testing.T) {
	weak := func(lon, lat float64) float64 { return 65 + 0.5*(demoField(lon, lat)-65) }
	p := &Panel{Maps: []*Map{{Field: weak, NoExtrema: true}, {Field: demoField, NoExtrema: true}}, Center: 65, Width: 900}
	b, err := PNG(p)
	if err != nil {
		t.Fatal(err)
	}
	img := decodePNG(t, b)
	cols, rows, _ := p.grid()
	w, h, cellW, cellH := p.size(cols, rows)
	if img.Bounds().Dx() != w || img.Bounds().Dy() != h {
		t.Fatalf("size %v, want %d x %d", img.Bounds(), w, h)
	}
	top := float64(h) - headerHeight("", "")
	// The centre of the low near (15 E, 8 S) in each map.
	var dark [2]float64
	for i := range 2 {
		bx := mapSide + float64(i)*(cellW+panelGapX)
		by := top - (cellH + panelCaption + panelGapY) + panelGapY
		l, err := fitMap(p.Projection, bx, by, cellW, cellH)
		if err != nil {
			t.Fatal(err)
		}
		x, y := l.proj.Forward(-165, -5)
		col, row := int(l.cx+x*l.scale), h-1-int(l.cy+y*l.scale)
		r, g, bb, _ := img.At(col, row).RGBA()
		dark[i] = labOf(rgba8(r, g, bb)).L
	}
	if !(dark[1] < dark[0]-10) {
		t.Errorf("lightness at the low: weak map %.1f, strong map %.1f; want the strong map darker on a shared scale", dark[0], dark[1])
	}
	if err := (&Panel{}).WritePNG(io.Discard); err == nil {
		t.Error("panel without maps: no error")
	}
	if err := (&Panel{Maps: []*Map{{}}}).WritePNG(io.Discard); err == nil {
		t.Error("panel with a map without a field: no error")
	}
	if err := (&Panel{Maps: []*Map{{Field: demoField}}, Center: math.Inf(1)}).WritePNG(io.Discard); err == nil {
		t.Error("panel with infinite centre: no error")
	}
}

// rgba8 returns the 8-bit colour of 16-bit premultiplied components as
// returned by color.Color.RGBA, for opaque colours.
func rgba8(r, g, b uint32) color.RGBA {
	return color.RGBA{R: uint8(r >> 8), G: uint8(g >> 8), B: uint8(b >> 8), A: 0xff}
}

// TestDeterministicAcrossProcs checks that the parallel sampling of grids
// gives the same bytes whatever the number of processors.
func TestDeterministicAcrossProcs(t *testing.T) {
	m := demoMap()
	prev := runtime.GOMAXPROCS(1)
	one, err := PNG(m)
	runtime.GOMAXPROCS(4)
	four, err2 := PNG(m)
	runtime.GOMAXPROCS(prev)
	if err != nil || err2 != nil {
		t.Fatal(err, err2)
	}
	if !bytes.Equal(one, four) {
		t.Error("map differs between GOMAXPROCS 1 and 4")
	}
}
