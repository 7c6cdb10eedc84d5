package sh

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Tolerances named once, used below.
const (
	tolClosed = 1e-14 // closed forms at low degree: a few ulp
	tolUnsold = 1e-12 // sum of 2l+1 squares up to degree 2700, relative
	tolOrtho  = 1e-13 // Gauss-Legendre orthonormality, absolute
)

var fourPi = Convention{Norm: FourPi}

// TestLegendreClosedForms checks degrees 0-3 against closed forms.
func TestLegendreClosedForms(t *testing.T) {
	// Ferrers functions without phase, P_l^m = (1-x^2)^(m/2) d^m P_l/dx^m
	// (Abramowitz & Stegun 1964, ch. 8, sec. 8.6, equation numbers from
	// memory), applied to the Legendre polynomials P_0..P_3 (A&S 22.3.8 and
	// Table 22.9, from memory); the 4-pi
	// normalized forms P10 = sqrt(3) cos, P11 = sqrt(3) sin,
	// P20 = sqrt(5)(3cos^2-1)/2, P21 = sqrt(15) sin cos, P22 = sqrt(15)/2 sin^2
	// are listed in references.md (derived from A&S ch. 8).
	// The closed forms are written in x = cos(colat) and s = sin(colat)
	// (signed, so that they continue through the poles like Legendre).
	ferrers := func(l, m int, colat float64) float64 {
		s, x := math.Sincos(colat)
		switch 10*l + m {
		case 0:
			return 1
		case 10:
			return x
		case 11:
			return s
		case 20:
			return (3*x*x - 1) / 2
		case 21:
			return 3 * x * s
		case 22:
			return 3 * s * s
		case 30:
			return (5*x*x*x - 3*x) / 2
		case 31:
			return 1.5 * (5*x*x - 1) * s
		case 32:
			return 15 * x * s * s
		case 33:
			return 15 * s * s * s
		}
		panic("no closed form")
	}
	fact := func(n int) float64 {
		f := 1.0
		for k := 2; k <= n; k++ {
			f *= float64(k)
		}
		return f
	}
	norm := func(l, m int, n Normalization) float64 {
		d := 2.0
		if m == 0 {
			d = 1
		}
		r := fact(l-m) / fact(l+m)
		switch n {
		case Orthonormal:
			return math.Sqrt(d * float64(2*l+1) / (4 * math.Pi) * r)
		case FourPi:
			return math.Sqrt(d * float64(2*l+1) * r)
		case Schmidt:
			return math.Sqrt(d * r)
		}
		return 1
	}
	for _, colat := range []float64{0, 1e-6, 0.3, 1, math.Pi / 2, 2, 3, math.Pi - 1e-6, math.Pi, -0.4} {
		for _, cs := range []bool{false, true} {
			for _, n := range []Normalization{Orthonormal, FourPi, Schmidt, Unnormalized} {
				conv := Convention{Norm: n, CondonShortley: cs}
				p, dp := LegendreDeriv(nil, nil, 3, colat, conv)
				for l := 0; l <= 3; l++ {
					for m := 0; m <= l; m++ {
						want := norm(l, m, n) * ferrers(l, m, colat)
						if cs && m&1 == 1 {
							want = -want
						}
						got := p[Index(l, m)]
						if math.Abs(got-want) > tolClosed*math.Max(1, math.Abs(want)) {
							t.Errorf("%v colat %v: P(%d,%d) = %.17g, want %.17g", conv, colat, l, m, got, want)
						}
						// Derivative by central difference of the closed form
						// (common practice), step 1e-6: error ~1e-12.
						hh := 1e-6
						fp := norm(l, m, n) * ferrers(l, m, colat+hh)
						fmn := norm(l, m, n) * ferrers(l, m, colat-hh)
						wantD := (fp - fmn) / (2 * hh)
						if cs && m&1 == 1 {
							wantD = -wantD
						}
						if math.Abs(dp[Index(l, m)]-wantD) > 1e-8*math.Max(1, math.Abs(wantD)) {
							t.Errorf("%v colat %v: dP(%d,%d) = %.17g, want %.17g", conv, colat, l, m, dp[Index(l, m)], wantD)
						}
					}
				}
			}
		}
	}
}

// TestUnsold checks Unsold's addition theorem, sum_m Y_lm^2 = (2l+1)/(4 pi)
// for orthonormal real harmonics (Unsold 1927, Ann. Phys. 82, 355; listed in
// references.md for all normalizations). Since cos^2 + sin^2 = 1 for m > 0,
// it reads sum_m P_lm^2 = (2l+1)/(4 pi) in the orthonormal convention, 2l+1
// for 4 pi and 1 for Schmidt. The identity is checked at every degree up to
// 2700 at colatitudes that include points 1e-6 rad from the poles.
func TestUnsold(t *testing.T) {
	lmax := 2700
	if testing.Short() {
		lmax = 800
	}
	var p []float64
	for _, colat := range []float64{1e-6, 1e-3, 0.1, 0.7, math.Pi / 3, 1.3, math.Pi / 2, 2.2, math.Pi - 0.01, math.Pi - 1e-6} {
		for _, n := range []Normalization{Orthonormal, FourPi, Schmidt} {
			conv := Convention{Norm: n}
			p = Legendre(p, lmax, colat, conv)
			worst := 0.0
			for l := 0; l <= lmax; l++ {
				s := 0.0
				for m := 0; m <= l; m++ {
					v := p[Index(l, m)]
					s += v * v
				}
				var want float64
				switch n {
				case Orthonormal:
					want = float64(2*l+1) / (4 * math.Pi)
				case FourPi:
					want = float64(2*l + 1)
				case Schmidt:
					want = 1
				}
				worst = math.Max(worst, math.Abs(s/want-1))
			}
			if worst > tolUnsold {
				t.Errorf("%v colat %v: Unsold relative error %.3g > %g", conv, colat, worst, tolUnsold)
			}
		}
	}
}

// TestOrthonormality integrates products of orthonormal associated Legendre
// functions of the same order with Gauss-Legendre quadrature of n nodes,
// exact for polynomials of degree 2n-1 (Abramowitz & Stegun 25.4.29; nodes
// from gonum's quad.Legendre). With the longitude factor integrating to pi
// (m > 0) or 2 pi (m = 0), 2 pi int P_lm P_km dx / (2 - delta_m0) = delta_lk.
func TestOrthonormality(t *testing.T) {
	for _, lmax := range []int{8, 40, 120} {
		n := lmax + 1
		x := make([]float64, n)
		w := make([]float64, n)
		quad.Legendre{}.FixedLocations(x, w, -1, 1)
		gram := make([]float64, NumCoeffs(lmax)*(lmax+1))
		_ = gram
		ps := make([][]float64, n)
		for i := range x {
			ps[i] = Legendre(nil, lmax, math.Acos(x[i]), Canonical)
		}
		worst := 0.0
		for m := 0; m <= lmax; m++ {
			lon := math.Pi
			if m == 0 {
				lon = 2 * math.Pi
			}
			for l := m; l <= lmax; l++ {
				for k := m; k <= l; k++ {
					s := 0.0
					for i := range x {
						s += w[i] * ps[i][Index(l, m)] * ps[i][Index(k, m)]
					}
					s *= lon
					want := 0.0
					if k == l {
						want = 1
					}
					worst = math.Max(worst, math.Abs(s-want))
				}
			}
		}
		if worst > tolOrtho {
			t.Errorf("lmax %d: orthonormality error %.3g > %g", lmax, worst, tolOrtho)
		}
	}
}

func TestCheckDegree(t *testing.T) {
	un := Convention{Norm: Unnormalized, CondonShortley: true}
	if err := un.CheckDegree(UnnormalizedMaxDegree); err != nil {
		t.Errorf("CheckDegree(%d) = %v, want nil", UnnormalizedMaxDegree, err)
	}
	err := un.CheckDegree(UnnormalizedMaxDegree + 1)
	if _, ok := err.(*DegreeError); !ok {
		t.Fatalf("CheckDegree(%d) = %v, want *DegreeError", UnnormalizedMaxDegree+1, err)
	}
	if err := Canonical.CheckDegree(100000); err != nil {
		t.Errorf("Canonical.CheckDegree: %v", err)
	}
	// At the representable limit every unnormalized value is finite.
	for _, colat := range []float64{1e-6, 0.5, math.Pi / 2} {
		p, dp := LegendreDeriv(nil, nil, UnnormalizedMaxDegree, colat, un)
		for i := range p {
			if math.IsInf(p[i], 0) || math.IsNaN(p[i]) || math.IsInf(dp[i], 0) || math.IsNaN(dp[i]) {
				t.Fatalf("colat %v: non-finite value at index %d: %v %v", colat, i, p[i], dp[i])
			}
		}
	}
	defer func() {
		if recover() == nil {
			t.Error("Legendre beyond UnnormalizedMaxDegree did not panic")
		}
	}()
	Legendre(nil, UnnormalizedMaxDegree+1, 1, un)
}

func BenchmarkLegendre(b *testing.B) {
	for _, lmax := range []int{255, 1023, 2700} {
		for _, colat := range []float64{1e-6, 1.0} {
			b.Run(fmt.Sprintf("lmax=%d/colat=%g", lmax, colat), func(b *testing.B) {
				b.ReportAllocs()
				p := make([]float64, NumCoeffs(lmax))
				for b.Loop() {
					p = Legendre(p, lmax, colat, Canonical)
				}
			})
			b.Run(fmt.Sprintf("deriv/lmax=%d/colat=%g", lmax, colat), func(b *testing.B) {
				b.ReportAllocs()
				p := make([]float64, NumCoeffs(lmax))
				dp := make([]float64, NumCoeffs(lmax))
				for b.Loop() {
					p, dp = LegendreDeriv(p, dp, lmax, colat, Canonical)
				}
			})
			b.Run(fmt.Sprintf("schmidt-cs/lmax=%d/colat=%g", lmax, colat), func(b *testing.B) {
				b.ReportAllocs()
				p := make([]float64, NumCoeffs(lmax))
				conv := Convention{Norm: Schmidt, CondonShortley: true}
				for b.Loop() {
					p = Legendre(p, lmax, colat, conv)
				}
			})
		}
	}
}

// TestUnsoldGradient checks the gradient form of the addition theorem for
// orthonormal real harmonics,
//
//	sum_m [ (dP_lm/dtheta)^2 + (m P_lm / sin theta)^2 ] = l(l+1)(2l+1)/(4 pi),
//
// (the sum of |grad Y_lm|^2 over m, obtained by applying the surface
// gradient at both points of the addition theorem and letting them meet;
// from memory), at every degree up to 2700, near the poles included. It
// tests all derivatives of LegendreDeriv at once.
func TestUnsoldGradient(t *testing.T) {
	lmax := 2700
	if testing.Short() {
		lmax = 600
	}
	var p, dp []float64
	for _, colat := range []float64{1e-6, 1e-3, 0.4, math.Pi / 2, 2.5, math.Pi - 1e-6} {
		p, dp = LegendreDeriv(p, dp, lmax, colat, Canonical)
		s := math.Sin(colat)
		worst := 0.0
		for l := 1; l <= lmax; l++ {
			sum := 0.0
			for m := 0; m <= l; m++ {
				i := Index(l, m)
				g := float64(m) * p[i] / s
				sum += dp[i]*dp[i] + g*g
			}
			fl := float64(l)
			want := fl * (fl + 1) * (2*fl + 1) / (4 * math.Pi)
			worst = math.Max(worst, math.Abs(sum/want-1))
		}
		if worst > tolUnsold {
			t.Errorf("colat %v: gradient addition theorem, relative error %.3g > %g", colat, worst, tolUnsold)
		}
		t.Logf("colat %v: worst relative error %.2g up to degree %d", colat, worst, lmax)
	}
}

// TestLegendrePrefix checks that values do not depend on lmax: the first
// NumCoeffs(100) values at lmax 2000 equal those at lmax 100 bit for bit.
func TestLegendrePrefix(t *testing.T) {
	for _, colat := range []float64{1e-6, 0.9, 2} {
		a := Legendre(nil, 100, colat, Canonical)
		b := Legendre(nil, 2000, colat, Canonical)
		for i := range a {
			if a[i] != b[i] {
				t.Fatalf("colat %v index %d: %v at lmax 100, %v at lmax 2000", colat, i, a[i], b[i])
			}
		}
	}
}
