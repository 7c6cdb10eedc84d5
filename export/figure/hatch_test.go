package figure

import (
	"math"
	"testing"
)

// TestHatch checks that hatching changes exactly the pixels on hatch
// lines where the field is below the value, and that the hatch ink stands
// out from every colour of the scale by at least 25 in CIELAB lightness
// (ten times the CIE76 difference of about 2.3 that is just noticeable,
// Sharma 2003, Digital Color Imaging Handbook, from memory).
func TestHatch(t *testing.T) {
	m := &Map{Field: demoField}
	l, err := fitMap(m.Projection, 0, 0, 400, 200)
	if err != nil {
		t.Fatal(err)
	}
	s, err := m.sample(l)
	if err != nil {
		t.Fatal(err)
	}
	sc := Scale{Center: 65, HalfRange: 40}
	hs := []Hatch{{Below: 45}, {Below: 30}}
	img := s.image(l, sc, hs)
	var hatched, plain int
	for i, v := range s.vals {
		if math.IsInf(v, 1) {
			if img.Pix[4*i+3] != 0 {
				t.Fatalf("pixel %d outside the map is not transparent", i)
			}
			continue
		}
		want := sc.Color(v)
		c, r := i%l.nx, i/l.nx
		for k, h := range hs {
			if v < h.Below && onHatch(k, c, r) {
				want = hatchInk(want)
			}
		}
		got := img.RGBAAt(c, r)
		if got != want {
			t.Fatalf("pixel (%d, %d), value %v: %v, want %v", c, r, v, got, want)
		}
		if got != sc.Color(v) {
			hatched++
		} else {
			plain++
		}
	}
	if hatched < 100 || plain < 1000 {
		t.Errorf("%d hatched and %d plain pixels", hatched, plain)
	}
	for i := -50; i <= 50; i++ {
		c := Diverging(float64(i) / 50)
		if d := math.Abs(labOf(c).L - labOf(hatchInk(c)).L); d < 25 {
			t.Errorf("t = %v: hatch ink only %.1f L* from the colour", float64(i)/50, d)
		}
	}
}

// TestBeyondLimits checks that the colour bar is told when values lie
// beyond either limit of the scale.
func TestBeyondLimits(t *testing.T) {
	s := &sampled{hi: extremum{v: 90, ok: true}, lo: extremum{v: 30, ok: true}}
	for _, c := range []struct {
		half         float64
		below, above bool
	}{{40, false, false}, {30, true, false}, {20, true, true}} {
		var cb colourBar
		cb.beyond(Scale{Center: 65, HalfRange: c.half}, s)
		if cb.below != c.below || cb.above != c.above {
			t.Errorf("half range %v: below %v above %v, want %v %v", c.half, cb.below, cb.above, c.below, c.above)
		}
	}
}
