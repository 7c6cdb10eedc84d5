package sh

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// sphereQuad integrates f over the unit sphere with (L+1) Gauss-Legendre
// nodes in cos(colat) (exact for polynomials of degree 2L+1, A&S 25.4.29;
// nodes from gonum's quad.Legendre) times 2L+1 equally spaced longitudes
// (the trapezoidal rule, exact for trigonometric polynomials of degree 2L):
// exact for products of two fields of degree L.
func sphereQuad(lmax int, f func(colat, lon float64) float64) float64 {
	n := lmax + 1
	x, w := make([]float64, n), make([]float64, n)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	nlon := 2*lmax + 1
	s := 0.0
	for i := range x {
		th := math.Acos(x[i])
		r := 0.0
		for j := 0; j < nlon; j++ {
			r += f(th, 2*math.Pi*float64(j)/float64(nlon))
		}
		s += w[i] * r * 2 * math.Pi / float64(nlon)
	}
	return s
}

// TestPowerSpectrumParseval checks that the spectrum sums to the integral of
// f^2 over the sphere (Parseval's theorem for orthonormal harmonics), by
// exact quadrature, for expansions stored in every convention.
func TestPowerSpectrumParseval(t *testing.T) {
	lmax := 24
	base := randomCoeffs(lmax, Canonical, 11)
	e := NewEvaluator(base)
	want := sphereQuad(lmax, func(th, ph float64) float64 { v := e.Value(th, ph); return v * v })
	for _, conv := range allConventions {
		c := base.MustConvert(conv)
		s := c.PowerSpectrum(nil)
		got := 0.0
		for _, v := range s {
			got += v
		}
		if math.Abs(got/want-1) > 1e-13 {
			t.Errorf("%v: sum S_l = %.16g, integral of f^2 = %.16g", conv, got, want)
		}
		if r, w := c.RMS(0, lmax), math.Sqrt(want/(4*math.Pi)); math.Abs(r/w-1) > 1e-13 {
			t.Errorf("%v: RMS = %.16g, want %.16g", conv, r, w)
		}
	}
	// One degree alone: S_l is the integral of the square of its part.
	one := NewCoeffs(lmax, Canonical)
	for m := 0; m <= 5; m++ {
		cc, ss := base.At(5, m)
		one.Set(5, m, cc, ss)
	}
	eo := NewEvaluator(one)
	w5 := sphereQuad(lmax, func(th, ph float64) float64 { v := eo.Value(th, ph); return v * v })
	if s := base.PowerSpectrum(nil)[5]; math.Abs(s/w5-1) > 1e-13 {
		t.Errorf("S_5 = %.16g, integral of the degree-5 part squared = %.16g", s, w5)
	}
}

// TestMeanSquareSpectrum checks S_l/(4 pi) against the sum of squared 4-pi
// normalized coefficients (whose harmonics integrate to 4 pi, references.md).
func TestMeanSquareSpectrum(t *testing.T) {
	c := randomCoeffs(15, Convention{Norm: Schmidt, CondonShortley: true}, 41)
	g := c.MustConvert(Convention{Norm: FourPi})
	ms := c.MeanSquareSpectrum(nil)
	for l := 0; l <= 15; l++ {
		want := 0.0
		for m := 0; m <= l; m++ {
			a, b := g.At(l, m)
			want += a*a + b*b
		}
		if math.Abs(ms[l]/want-1) > 1e-14 {
			t.Errorf("l = %d: %v, want %v", l, ms[l], want)
		}
	}
}
