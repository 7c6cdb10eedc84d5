package figure

import (
	"image/color"
	"math"
	"testing"
)

// TestLabConversion checks the CIELAB conversion against reference
// values of sRGB colours under D65 (common practice; the values for pure
// red from memory of published colour calculators: L* = 53.24, a* = 80.09,
// b* = 67.20).
func TestLabConversion(t *testing.T) {
	for _, c := range []struct {
		rgb     color.RGBA
		L, A, B float64
	}{
		{color.RGBA{255, 255, 255, 255}, 100, 0, 0}, // white point: CIE 15:2004 definition
		{color.RGBA{0, 0, 0, 255}, 0, 0, 0},
		{color.RGBA{255, 0, 0, 255}, 53.24, 80.09, 67.20},
	} {
		got := labOf(c.rgb)
		if math.Abs(got.L-c.L) > 0.02 || math.Abs(got.A-c.A) > 0.05 || math.Abs(got.B-c.B) > 0.05 {
			t.Errorf("Lab(%v) = %+v, want (%v, %v, %v)", c.rgb, got, c.L, c.A, c.B)
		}
	}
	// Round trip Lab -> sRGB -> Lab for the scale's control colours.
	for _, s := range divergingStops {
		r, g, b := s.linearRGB()
		back := labFromLinear(r, g, b)
		if math.Abs(back.L-s.L)+math.Abs(back.A-s.A)+math.Abs(back.B-s.B) > 1e-4 {
			t.Errorf("round trip %+v -> %+v", s, back)
		}
	}
}

// TestDivergingInGamut checks that no colour of the scale is clipped in
// sRGB, so its lightness is the designed one.
func TestDivergingInGamut(t *testing.T) {
	for i := -100; i <= 100; i++ {
		r, g, b := divergingLab(float64(i) / 100).linearRGB()
		for _, v := range []float64{r, g, b} {
			if v < -1e-9 || v > 1+1e-9 {
				t.Fatalf("t = %v: linear sRGB (%v, %v, %v) out of gamut", float64(i)/100, r, g, b)
			}
		}
	}
}

// machado are the colour-vision-deficiency simulation matrices of Machado,
// Oliveira & Fernandes 2009 (IEEE TVCG 15, 1291), severity 1, applied to
// linear sRGB. Numbers from memory; each row sums to 1, which the test
// checks.
var machado = map[string][3][3]float64{
	"protanopia":   {{0.152286, 1.052583, -0.204868}, {0.114503, 0.786281, 0.099216}, {-0.003882, -0.048116, 1.051998}},
	"deuteranopia": {{0.367322, 0.860646, -0.227968}, {0.280085, 0.672501, 0.047413}, {-0.011820, 0.042940, 0.968881}},
	"tritanopia":   {{1.255528, -0.076749, -0.178779}, {-0.078411, 0.930809, 0.147602}, {0.004733, 0.691367, 0.303900}},
}

func simulate(m [3][3]float64, c color.RGBA) lab {
	r, g, b := decodeSRGB(float64(c.R)/255), decodeSRGB(float64(c.G)/255), decodeSRGB(float64(c.B)/255)
	cl := func(v float64) float64 { return math.Max(0, math.Min(1, v)) }
	return labFromLinear(
		cl(m[0][0]*r+m[0][1]*g+m[0][2]*b),
		cl(m[1][0]*r+m[1][1]*g+m[1][2]*b),
		cl(m[2][0]*r+m[2][1]*g+m[2][2]*b))
}

func deltaE(a, b lab) float64 { return math.Sqrt(sq(a.L-b.L) + sq(a.A-b.A) + sq(a.B-b.B)) }
func sq(x float64) float64    { return x * x }

// TestDivergingPerceptualOrder checks that the scale is ordered by
// lightness for normal and simulated deficient colour vision: L* falls
// monotonically from the centre to either end, the two arms have the same
// lightness at the same distance from the centre (so neither side looks
// stronger), and the two arms stay apart in colour (CIE76 difference of at
// least 20 at |t| >= 0.3; a difference of about 2.3 is just noticeable,
// Sharma 2003, Digital Color Imaging Handbook, from memory).
func TestDivergingPerceptualOrder(t *testing.T) {
	for name, m := range machado {
		for i, row := range m {
			if s := row[0] + row[1] + row[2]; math.Abs(s-1) > 2e-6 {
				t.Fatalf("%s row %d sums to %v", name, i, s)
			}
		}
	}
	views := map[string]func(color.RGBA) lab{"normal": labOf}
	for name, m := range machado {
		views[name] = func(c color.RGBA) lab { return simulate(m, c) }
	}
	const n = 50
	for name, view := range views {
		for _, side := range []float64{-1, 1} {
			prev := view(Diverging(0)).L
			for i := 1; i <= n; i++ {
				L := view(Diverging(side * float64(i) / n)).L
				if L > prev+0.3 {
					t.Errorf("%s: lightness rises from %.2f to %.2f at t = %v", name, prev, L, side*float64(i)/n)
				}
				prev = L
			}
		}
		for i := 15; i <= n; i++ {
			tt := float64(i) / n
			a, b := view(Diverging(-tt)), view(Diverging(tt))
			if name == "normal" && math.Abs(a.L-b.L) > 1 {
				t.Errorf("t = ±%v: lightness %.2f and %.2f differ", tt, a.L, b.L)
			}
			if d := deltaE(a, b); d < 20 {
				t.Errorf("%s: colours at t = ±%v only %.1f apart", name, tt, d)
			}
		}
		if d := view(Diverging(0)).L - view(Diverging(1)).L; d < 50 {
			t.Errorf("%s: centre only %.1f L* lighter than the end", name, d)
		}
	}
}

// TestScale checks the mapping of values onto the scale.
func TestScale(t *testing.T) {
	s := Scale{Center: 65, HalfRange: 20}
	if s.Color(65) != Diverging(0) || s.Color(85) != Diverging(1) || s.Color(45) != Diverging(-1) {
		t.Error("Scale does not put centre and limits at t = 0, ±1")
	}
	if s.Color(500) != Diverging(1) || s.Color(-500) != Diverging(-1) {
		t.Error("values beyond the limits do not take the end colours")
	}
	if s.Color(math.NaN()) != NoDataColor {
		t.Error("NaN is not drawn in the no-data colour")
	}
	if math.Abs(s.T(75)-0.5) > 1e-15 {
		t.Errorf("T(75) = %v, want 0.5", s.T(75))
	}
}
