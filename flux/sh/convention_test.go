package sh

import (
	"math"
	"testing"
)

var allConventions = []Convention{
	{Orthonormal, false}, {Orthonormal, true},
	{FourPi, false}, {FourPi, true},
	{Schmidt, false}, {Schmidt, true},
	{Unnormalized, false}, {Unnormalized, true},
}

// TestConversionFactorClosedForm checks the factors against the
// normalizations of references.md written with factorials (A&S 6.1.6 for
// n!): N_lm(4pi) = sqrt((2 - delta_m0)(2l+1)(l-m)!/(l+m)!), Schmidt without
// (2l+1), orthonormal = 4pi / sqrt(4 pi), unnormalized 1.
func TestConversionFactorClosedForm(t *testing.T) {
	fact := func(n int) float64 { return math.Gamma(float64(n + 1)) }
	norm := func(l, m int, c Convention) float64 {
		d := 2.0
		if m == 0 {
			d = 1
		}
		r := fact(l-m) / fact(l+m)
		var n float64
		switch c.Norm {
		case Orthonormal:
			n = math.Sqrt(d * float64(2*l+1) / (4 * math.Pi) * r)
		case FourPi:
			n = math.Sqrt(d * float64(2*l+1) * r)
		case Schmidt:
			n = math.Sqrt(d * r)
		case Unnormalized:
			n = 1
		}
		if c.CondonShortley && m&1 == 1 {
			n = -n
		}
		return n
	}
	for _, from := range allConventions {
		for _, to := range allConventions {
			for l := 0; l <= 20; l++ {
				for m := 0; m <= l; m++ {
					want := norm(l, m, from) / norm(l, m, to)
					got := ConversionFactor(l, m, from, to)
					if math.Abs(got/want-1) > 1e-13 {
						t.Errorf("%v -> %v (%d,%d): %.17g, want %.17g", from, to, l, m, got, want)
					}
				}
			}
		}
	}
}

// TestConvertPreservesField converts a random expansion into every
// convention and evaluates it there with Legendre in that convention (whose
// values are checked against closed forms and mpmath elsewhere); the field
// must not change. Round trips restore the coefficients.
func TestConvertPreservesField(t *testing.T) {
	lmax := 60
	c := randomCoeffs(lmax, Canonical, 5)
	pts := [][2]float64{{1e-6, 0.1}, {0.5, 1}, {2, 4}, {math.Pi - 1e-3, 6}}
	ref := make([]float64, len(pts))
	for i, pt := range pts {
		ref[i] = directSum(c, pt[0], pt[1])
	}
	for _, to := range allConventions {
		d, err := c.Convert(to)
		if err != nil {
			t.Fatal(err)
		}
		if d.Conv != to {
			t.Errorf("Convert(%v).Conv = %v", to, d.Conv)
		}
		for i, pt := range pts {
			if got := directSum(d, pt[0], pt[1]); math.Abs(got-ref[i]) > 1e-12 {
				t.Errorf("%v at %v: field %.17g, want %.17g", to, pt, got, ref[i])
			}
		}
		for _, via := range allConventions {
			e := d.MustConvert(via).MustConvert(to)
			for i := range d.C {
				if !closeRel(e.C[i], d.C[i], 1e-14) || !closeRel(e.S[i], d.S[i], 1e-14) {
					t.Fatalf("%v -> %v -> %v: coefficient %d changed: %g, %g -> %g, %g", to, via, to, i, d.C[i], d.S[i], e.C[i], e.S[i])
				}
			}
		}
	}
	// Beyond the representable degree of the unnormalized convention.
	big := NewCoeffs(UnnormalizedMaxDegree+1, Canonical)
	if _, err := big.Convert(Convention{Norm: Unnormalized}); err == nil {
		t.Error("Convert to unnormalized at degree 151: no error")
	}
}

func closeRel(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(math.Abs(a), math.Abs(b))
}

func TestParseNormalization(t *testing.T) {
	for _, n := range []Normalization{Orthonormal, FourPi, Schmidt, Unnormalized} {
		got, err := ParseNormalization(n.String())
		if err != nil || got != n {
			t.Errorf("ParseNormalization(%q) = %v, %v", n.String(), got, err)
		}
	}
	for in, want := range map[string]Normalization{"4pi": FourPi, " Schmidt-Semi ": Schmidt, "ortho": Orthonormal, "none": Unnormalized} {
		if got, err := ParseNormalization(in); err != nil || got != want {
			t.Errorf("ParseNormalization(%q) = %v, %v; want %v", in, got, err, want)
		}
	}
	if _, err := ParseNormalization("quasi"); err == nil {
		t.Error(`ParseNormalization("quasi"): no error`)
	}
}

func FuzzParseNormalization(f *testing.F) {
	for _, s := range []string{"orthonormal", "4pi", "schmidt", "unnormalized", "geodesy", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		n, err := ParseNormalization(s)
		if err != nil {
			return
		}
		if back, err := ParseNormalization(n.String()); err != nil || back != n {
			t.Fatalf("%q -> %v -> %q -> %v, %v", s, n, n.String(), back, err)
		}
	})
}
