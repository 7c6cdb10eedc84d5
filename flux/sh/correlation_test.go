package sh

import (
	"math"
	"testing"
)

// TestCorrelation checks the total correlation over degrees 1..L against
// the Pearson correlation of the two fields over the sphere (their means
// removed), computed by exact quadrature, and the limiting cases of the
// degree correlation.
func TestCorrelation(t *testing.T) {
	lmax := 16
	a := randomCoeffs(lmax, Canonical, 21)
	b := randomCoeffs(lmax, Canonical, 22)
	for i := range b.C { // make b partly resemble a
		b.C[i] += 0.7 * a.C[i]
		b.S[i] += 0.7 * a.S[i]
	}
	a.C[0], b.C[0] = 0, 0 // means removed
	ea, eb := NewEvaluator(a), NewEvaluator(b)
	ab := sphereQuad(lmax, func(th, ph float64) float64 { return ea.Value(th, ph) * eb.Value(th, ph) })
	aa := sphereQuad(lmax, func(th, ph float64) float64 { v := ea.Value(th, ph); return v * v })
	bb := sphereQuad(lmax, func(th, ph float64) float64 { v := eb.Value(th, ph); return v * v })
	want := ab / math.Sqrt(aa*bb)
	// b stored in another convention: the correlation must not change.
	bs := b.MustConvert(Convention{Norm: Schmidt, CondonShortley: true})
	if got := TotalCorrelation(a, bs, 1, lmax); math.Abs(got-want) > 1e-13 {
		t.Errorf("TotalCorrelation = %.16g, Pearson by quadrature %.16g", got, want)
	}
	r := DegreeCorrelation(nil, a, bs)
	if len(r) != lmax+1 || !math.IsNaN(r[0]) {
		t.Errorf("DegreeCorrelation: len %d, r_0 = %v (want NaN: no power at degree 0)", len(r), r[0])
	}
	neg := a.Clone()
	for i := range neg.C {
		neg.C[i], neg.S[i] = -3*neg.C[i], -3*neg.S[i]
	}
	for l, v := range DegreeCorrelation(nil, a, neg)[1:] {
		if math.Abs(v+1) > 1e-15 {
			t.Errorf("r_%d(a, -3a) = %v, want -1", l+1, v)
		}
	}
	if v := TotalCorrelation(a, a, 1, lmax); math.Abs(v-1) > 1e-15 {
		t.Errorf("TotalCorrelation(a, a) = %v", v)
	}
	// One degree: r_l is the correlation of the degree-l parts.
	pa, pb := NewCoeffs(lmax, Canonical), NewCoeffs(lmax, Canonical)
	for m := 0; m <= 3; m++ {
		c1, s1 := a.At(3, m)
		c2, s2 := b.At(3, m)
		pa.Set(3, m, c1, s1)
		pb.Set(3, m, c2, s2)
	}
	e1, e2 := NewEvaluator(pa), NewEvaluator(pb)
	x := sphereQuad(lmax, func(th, ph float64) float64 { return e1.Value(th, ph) * e2.Value(th, ph) })
	y := sphereQuad(lmax, func(th, ph float64) float64 { v := e1.Value(th, ph); return v * v })
	z := sphereQuad(lmax, func(th, ph float64) float64 { v := e2.Value(th, ph); return v * v })
	if w := x / math.Sqrt(y*z); math.Abs(r[3]-w) > 1e-13 {
		t.Errorf("r_3 = %.16g, by quadrature %.16g", r[3], w)
	}
}
