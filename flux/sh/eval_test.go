package sh

import (
	"math"
	"math/rand/v2"
	"testing"
)

const (
	tolEval = 1e-13 // evaluation against a direct sum, relative to the field's scale
	tolFD   = 1e-7  // central differences, step 1e-5 (error ~ h^2 f''')
)

// randomCoeffs returns coefficients with a red spectrum, fixed seed.
func randomCoeffs(lmax int, conv Convention, seed uint64) *Coeffs {
	r := rand.New(rand.NewPCG(seed, 7))
	c := NewCoeffs(lmax, conv)
	for l := 0; l <= lmax; l++ {
		amp := 1 / float64(1+l)
		for m := 0; m <= l; m++ {
			s := 0.0
			if m > 0 {
				s = amp * r.NormFloat64()
			}
			c.Set(l, m, amp*r.NormFloat64(), s)
		}
	}
	return c
}

// directSum evaluates sum C P cos + S P sin with Legendre in c's convention.
func directSum(c *Coeffs, colat, lon float64) float64 {
	p := Legendre(nil, c.LMax, colat, c.Conv)
	f := 0.0
	for l := 0; l <= c.LMax; l++ {
		for m := 0; m <= l; m++ {
			i := Index(l, m)
			f += p[i] * (c.C[i]*math.Cos(float64(m)*lon) + c.S[i]*math.Sin(float64(m)*lon))
		}
	}
	return f
}

func TestEvaluateClosedForm(t *testing.T) {
	// Y_21^c orthonormal without phase: sqrt(5/(12 pi)) * 3 cos t sin t cos p
	// (A&S 8.6.6 for P_2^1 with the normalization of references.md).
	c := NewCoeffs(3, Canonical)
	c.Set(2, 1, 1, 0.5)
	for _, pt := range [][2]float64{{0.3, 1}, {1e-6, 2}, {math.Pi / 2, -1}, {3, 5}} {
		th, ph := pt[0], pt[1]
		n := math.Sqrt(5 / (12 * math.Pi))
		want := n * 3 * math.Cos(th) * math.Sin(th) * (math.Cos(ph) + 0.5*math.Sin(ph))
		if got := c.Evaluate(th, ph); math.Abs(got-want) > 1e-15 {
			t.Errorf("Evaluate(%v, %v) = %.17g, want %.17g", th, ph, got, want)
		}
	}
}

func TestEvaluatorAgainstDirectSum(t *testing.T) {
	for _, conv := range []Convention{Canonical, {Norm: Schmidt, CondonShortley: true}, {Norm: FourPi}, {Norm: Unnormalized, CondonShortley: true}} {
		lmax := 40
		c := randomCoeffs(lmax, conv, 1)
		if conv.Norm == Unnormalized {
			// Keep the field of order 1 with unnormalized coefficients.
			c = randomCoeffs(lmax, Canonical, 1).MustConvert(Canonical)
			var err error
			if c, err = c.Convert(conv); err != nil {
				t.Fatal(err)
			}
		}
		e := NewEvaluator(c)
		for _, pt := range [][2]float64{{0, 0}, {1e-6, 1}, {0.4, 2}, {1.5, 3}, {2.9, 4}, {math.Pi, 0.5}} {
			want := directSum(c, pt[0], pt[1])
			if got := e.Value(pt[0], pt[1]); math.Abs(got-want) > tolEval*10 {
				t.Errorf("%v at %v: Value = %.17g, direct sum %.17g", conv, pt, got, want)
			}
		}
	}
}

// TestGradFiniteDifference checks Grad against central differences of Value
// (common practice), including points near and at the poles.
func TestGradFiniteDifference(t *testing.T) {
	c := randomCoeffs(30, Canonical, 2)
	e := NewEvaluator(c)
	const h = 1e-5
	for _, pt := range [][2]float64{{0, 1}, {1e-6, 1}, {0.2, 0.3}, {1.1, 4}, {math.Pi - 1e-6, 2}, {math.Pi, 3}} {
		th, ph := pt[0], pt[1]
		f, dth, dph := e.Grad(th, ph)
		if v := e.Value(th, ph); math.Abs(f-v) > 1e-14 {
			t.Errorf("Grad value %v != Value %v", f, v)
		}
		wth := (e.Value(th+h, ph) - e.Value(th-h, ph)) / (2 * h)
		wph := (e.Value(th, ph+h) - e.Value(th, ph-h)) / (2 * h)
		if math.Abs(dth-wth) > tolFD || math.Abs(dph-wph) > tolFD {
			t.Errorf("at %v: grad (%.12g, %.12g), finite differences (%.12g, %.12g)", pt, dth, dph, wth, wph)
		}
	}
}

func BenchmarkEvaluator(b *testing.B) {
	for _, lmax := range []int{20, 100} {
		e := NewEvaluator(randomCoeffs(lmax, Canonical, 3))
		b.Run("Value/lmax="+itoa(lmax), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				e.Value(0.7, 1.2)
			}
		})
		b.Run("Grad/lmax="+itoa(lmax), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				e.Grad(0.7, 1.2)
			}
		})
	}
}

func itoa(n int) string {
	if n == 0 {
		return "0"
	}
	var b []byte
	for ; n > 0; n /= 10 {
		b = append([]byte{byte('0' + n%10)}, b...)
	}
	return string(b)
}

// TestTrigRecurrence compares the angle-sum recurrence with math.Sincos of
// the product m*lon (whose own rounding, about m |lon| ulp, dominates).
func TestTrigRecurrence(t *testing.T) {
	for _, lon := range []float64{0, 1e-7, 0.3, 2, math.Pi, -4, 6.2} {
		var tr trig
		tr.start(lon)
		for m := 1; m <= 2700; m++ {
			c, s := tr.next(m)
			ws, wc := math.Sincos(float64(m) * lon)
			tol := 4.5e-16 * (float64(trigReseed) + float64(m)*math.Abs(lon)) // both within about one ulp of m*lon
			if math.Abs(c-wc) > tol || math.Abs(s-ws) > tol {
				t.Fatalf("lon %v m %d: (%v, %v), Sincos (%v, %v)", lon, m, c, s, wc, ws)
			}
		}
	}
}
