package sh

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"testing"
)

// trRandCoeffs returns canonical coefficients with entries uniform in
// [-1, 1) (S at m = 0 zero), from a fixed seed.
func trRandCoeffs(lmax int, seed uint64) *Coeffs {
	r := rand.New(rand.NewPCG(seed, 1))
	c := NewCoeffs(lmax, Canonical)
	for l := 0; l <= lmax; l++ {
		for m := 0; m <= l; m++ {
			i := Index(l, m)
			c.C[i] = 2*r.Float64() - 1
			if m > 0 {
				c.S[i] = 2*r.Float64() - 1
			}
		}
	}
	return c
}

// trMaxRel returns max |a - b| / max |b| over both C and S.
func trMaxRel(a, b *Coeffs) float64 {
	var d, n float64
	for i := range b.C {
		d = math.Max(d, math.Max(math.Abs(a.C[i]-b.C[i]), math.Abs(a.S[i]-b.S[i])))
		n = math.Max(n, math.Max(math.Abs(b.C[i]), math.Abs(b.S[i])))
	}
	return d / n
}

// TestTransformRoundTrip checks analysis(synthesis(c)) = c: Gauss-Legendre
// quadrature with n nodes is exact for polynomials of degree 2n-1
// (Abramowitz & Stegun 25.4.29), and the discrete Fourier sums over nlon
// equally spaced longitudes are exact for orders |m +- m'| < nlon, so a
// grid with nlat > lmax and nlon > 2 lmax reproduces the coefficients up
// to rounding. The same holds for the Driscoll-Healy grid with N = 2L+2
// (Driscoll & Healy 1994, Theorem 3).
func TestTransformRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name string
		lmax int
		g    *Grid
		tol  float64
	}{
		{"GL/lmax=0", 0, NewGaussLegendre(1, 1), 1e-14},
		{"GL/lmax=1", 1, NewGaussLegendre(2, 4), 1e-14},
		{"GL/lmax=7/odd-nlon", 7, NewGaussLegendre(8, 15), 1e-14},
		{"GL/lmax=8/odd-nlat", 8, NewGaussLegendre(9, 18), 1e-14},
		{"GL/lmax=31/lon0", 31, &Grid{Kind: GaussLegendre, Colat: NewGaussLegendre(32, 64).Colat, Weight: NewGaussLegendre(32, 64).Weight, NLon: 64, Lon0: 0.3}, 1e-13},
		{"GL/lmax=63/oversampled", 63, NewGaussLegendre(80, 160), 1e-13},
		{"GL/lmax=127", 127, NewGaussLegendre(128, 256), 1e-13},
		// nlon = 2 lmax + 1 = 467, a prime: the odd-length FFT path with the
		// generic radix (gonum's FFTPACK port, once used here, is off by
		// 1e-12 at this length, and the round trip by 6.6e-12; see
		// TestRealFFTAllLengths).
		{"GL/lmax=233/prime-nlon", 233, NewGaussLegendre(234, 467), 2e-13},
		{"DH/lmax=7", 7, NewDriscollHealy(16), 1e-13},
		{"DH/lmax=64", 64, NewDriscollHealy(130), 1e-13},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := trRandCoeffs(tc.lmax, 7)
			tr := NewTransform(tc.lmax, tc.g)
			f := tr.Synthesis(nil, c)
			got := tr.Analysis(nil, f)
			if d := trMaxRel(got, c); d > tc.tol {
				t.Errorf("round trip max relative error %.3g > %.1g", d, tc.tol)
			}
		})
	}
}

// TestTransformRoundTrip511 is the round trip at lmax 511 on the Gauss-Legendre grid
// 512 x 1024 (the exactness argument of TestTransformRoundTrip), required to 1e-12.
func TestTransformRoundTrip511(t *testing.T) {
	if testing.Short() {
		t.Skip("lmax 511 in -short mode")
	}
	const lmax, tol = 511, 1e-12
	c := trRandCoeffs(lmax, 11)
	tr := NewTransform(lmax, NewGaussLegendre(lmax+1, 2*lmax+2))
	got := tr.Analysis(nil, tr.Synthesis(nil, c))
	d := trMaxRel(got, c)
	t.Logf("lmax 511 round trip max relative error %.3g", d)
	if d > tol {
		t.Errorf("round trip max relative error %.3g > %.1g", d, tol)
	}
}

// TestSynthesisPointwise compares the fast synthesis with the pointwise
// evaluator (Coeffs.Evaluate, an independent route through the
// Holmes & Featherstone 2002 recursion, one point at a time) on grids with
// poles, an equator ring, unpaired rings and an offset longitude origin.
func TestSynthesisPointwise(t *testing.T) {
	const tol = 1e-12
	for _, tc := range []struct {
		name string
		lmax int
		g    *Grid
	}{
		{"GL", 20, NewGaussLegendre(21, 42)},
		{"node-registered/poles", 20, NewLonLat(19, 36, NodeRegistered)},
		{"cell-registered", 25, NewLonLat(18, 36, CellRegistered)},
		{"aliased/nlon<2L", 30, NewLonLat(7, 16, NodeRegistered)},
		{"rings/unpaired", 40, NewRings([]float64{0.01, 0.5, 1.2, 1.3, 2.9, math.Pi}, 9, -2.5)},
		{"high-degree/near-pole", 700, NewRings([]float64{1e-3, 0.05, 1.0, math.Pi - 1e-3}, 8, 0.1)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := trRandCoeffs(tc.lmax, 3)
			f := NewTransform(tc.lmax, tc.g).Synthesis(nil, c)
			var scale, worst float64
			for i, th := range tc.g.Colat {
				for j := range tc.g.NLon {
					want := c.Evaluate(th, tc.g.Lon(j))
					scale = math.Max(scale, math.Abs(want))
					worst = math.Max(worst, math.Abs(f[i*tc.g.NLon+j]-want))
				}
			}
			if worst > tol*scale {
				t.Errorf("max |fast - pointwise| = %.3g, %.3g relative to max |f| > %.1g", worst, worst/scale, tol)
			}
		})
	}
}

// TestTransformOrthonormality synthesizes single harmonics and analyses them: the
// Gram matrix of the real orthonormal harmonics is the identity
// (definition of the orthonormal convention, see Normalization), and the
// Gauss-Legendre quadrature reproduces it exactly for degree <= nlat-1.
func TestTransformOrthonormality(t *testing.T) {
	const lmax, tol = 12, 1e-14
	tr := NewTransform(lmax, NewGaussLegendre(lmax+1, 2*lmax+1))
	c := NewCoeffs(lmax, Canonical)
	for l := 0; l <= lmax; l++ {
		for m := 0; m <= l; m++ {
			for s := 0; s < 2; s++ {
				if s == 1 && m == 0 {
					continue
				}
				clear(c.C)
				clear(c.S)
				if s == 0 {
					c.C[Index(l, m)] = 1
				} else {
					c.S[Index(l, m)] = 1
				}
				got := tr.Analysis(nil, tr.Synthesis(nil, c))
				if d := trMaxRel(got, c); d > tol {
					t.Fatalf("Y_%d%d (sine %v): Gram row off the identity by %.3g", l, m, s == 1, d)
				}
			}
		}
	}
}

func TestTransformConcurrent(t *testing.T) {
	// Several goroutines share one plan; each must get its own result
	// (the identity of TestTransformRoundTrip).
	const lmax = 40
	tr := NewTransform(lmax, NewGaussLegendre(lmax+1, 2*lmax+2))
	errs := make(chan error, 4)
	for k := range 4 {
		go func() {
			c := trRandCoeffs(lmax, uint64(100+k))
			var err error
			for range 5 {
				got := tr.Analysis(nil, tr.Synthesis(nil, c))
				if d := trMaxRel(got, c); d > 1e-13 {
					err = fmt.Errorf("goroutine %d: round trip error %.3g", k, d)
				}
			}
			errs <- err
		}()
	}
	for range 4 {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
}

// TestPoints compares synthesis at scattered points with the pointwise
// evaluator (Coeffs.Evaluate, an independent implementation), and checks
// that Adjoint is the transpose of Synthesis: <Y c, v> = <c, Y^T v>
// (definition of the adjoint).
func TestPoints(t *testing.T) {
	const lmax, n, tol = 60, 300, 1e-12
	r := rand.New(rand.NewPCG(5, 6))
	colat, lon := make([]float64, n), make([]float64, n)
	for i := range colat {
		colat[i] = math.Acos(2*r.Float64() - 1)
		lon[i] = 2*math.Pi*r.Float64() - math.Pi
	}
	colat[0], colat[1], colat[2] = 0, math.Pi, math.Pi/2
	colat[3], colat[4] = 0.3, math.Pi-0.3 // a mirrored pair
	c := trRandCoeffs(lmax, 9)
	p := NewPoints(lmax, colat, lon)
	f := p.Synthesis(nil, c)
	var worst, scale float64
	for i := range f {
		want := c.Evaluate(colat[i], lon[i])
		worst = math.Max(worst, math.Abs(f[i]-want))
		scale = math.Max(scale, math.Abs(want))
	}
	if worst > tol*scale {
		t.Errorf("points: max |fast - pointwise| %.3g (relative %.3g)", worst, worst/scale)
	}
	v := make([]float64, n)
	for i := range v {
		v[i] = r.NormFloat64()
	}
	a := p.Adjoint(nil, v)
	var lhs, rhs float64
	for i := range f {
		lhs += f[i] * v[i]
	}
	for i := range c.C {
		rhs += c.C[i]*a.C[i] + c.S[i]*a.S[i]
	}
	if math.Abs(lhs-rhs) > 1e-12*math.Abs(lhs)+1e-12 {
		t.Errorf("<Yc, v> = %.15g but <c, Y^T v> = %.15g", lhs, rhs)
	}
}

// TestTransformWorkers checks that a call split over several goroutines
// gives the single-goroutine result (the same sums in another order of
// orders; the per-order arithmetic is identical, so the results agree
// exactly).
func TestTransformWorkers(t *testing.T) {
	const lmax = 50
	g := NewGaussLegendre(lmax+1, 2*lmax+2)
	one := NewTransform(lmax, g)
	three := NewTransform(lmax, g)
	three.Workers = 3
	c := trRandCoeffs(lmax, 12)
	f1 := one.Synthesis(nil, c)
	f3 := three.Synthesis(nil, c)
	for i := range f1 {
		if f1[i] != f3[i] {
			t.Fatalf("synthesis point %d: %v with 1 worker, %v with 3", i, f1[i], f3[i])
		}
	}
	a1 := one.Analysis(nil, f1)
	a3 := three.Analysis(nil, f1)
	if d := trMaxRel(a3, a1); d != 0 {
		t.Errorf("analysis with 3 workers differs by %.3g", d)
	}
}

// TestHighDegree synthesizes a degree-2700 expansion on rings down to 1e-4
// rad from the poles and compares with the pointwise evaluator
// (Coeffs.Evaluate, whose recursion is checked against 50-digit
// references in legendre_test.go). Without the scaled start values the
// sectoral terms underflow (sin(1e-4)^2700 = 1e-10800) and the recursion
// never reaches the values near the turning point that dominate the sums
// (Holmes & Featherstone 2002: scaled recursions are stable to about degree
// 2700 at all latitudes).
func TestHighDegree(t *testing.T) {
	if testing.Short() {
		t.Skip("lmax 2700 in -short mode")
	}
	const lmax, tol = 2700, 1e-10
	c := trRandCoeffs(lmax, 13)
	// Spectrum decaying like 1/(l+1) keeps all degrees visible in f.
	for l := 0; l <= lmax; l++ {
		for m := 0; m <= l; m++ {
			c.C[Index(l, m)] /= float64(l + 1)
			c.S[Index(l, m)] /= float64(l + 1)
		}
	}
	colat := []float64{1e-4, 0.003, 0.1, 1.0, math.Pi / 2, math.Pi - 0.02}
	g := NewRings(colat, 5, 0.7)
	f := NewTransform(lmax, g).Synthesis(nil, c)
	ev := NewEvaluator(c)
	var worst, scale float64
	for i, th := range colat {
		for j := range g.NLon {
			want := ev.Value(th, g.Lon(j))
			scale = math.Max(scale, math.Abs(want))
			worst = math.Max(worst, math.Abs(f[i*g.NLon+j]-want))
		}
	}
	if worst > tol*scale {
		t.Errorf("lmax 2700: max |fast - pointwise| %.3g, relative %.3g > %.1g", worst, worst/scale, tol)
	}
	t.Logf("lmax 2700: max difference %.3g relative to max |f| = %.3g", worst/scale, scale)
}

// TestSynthesisDegreeMismatch: coefficients of lower degree than the plan
// count as zero above their degree, higher ones are truncated (definition
// of the truncated expansion).
func TestSynthesisDegreeMismatch(t *testing.T) {
	g := NewGaussLegendre(30, 60)
	c := trRandCoeffs(10, 14)
	small := NewTransform(10, g).Synthesis(nil, c)
	big := NewTransform(25, g).Synthesis(nil, c)
	trunc := NewTransform(6, g).Synthesis(nil, c)
	want6 := NewTransform(10, g).Synthesis(nil, c.Truncate(6))
	for i := range small {
		if math.Abs(small[i]-big[i]) > 1e-13 || math.Abs(trunc[i]-want6[i]) > 1e-13 {
			t.Fatalf("point %d: lmax-10 plan %v, lmax-25 plan %v; truncated %v, want %v", i, small[i], big[i], trunc[i], want6[i])
		}
	}
}

// TestPointsOnRings gives the points of a regular grid as a list in
// shuffled order: points sharing a colatitude share their Legendre sums,
// and the result must equal synthesis on the grid (same expansion,
// independent summation order) and the adjoint the transposed synthesis
// (TestPoints' identity).
func TestPointsOnRings(t *testing.T) {
	const lmax, tol = 30, 1e-12
	g := NewLonLat(24, 48, CellRegistered)
	c := trRandCoeffs(lmax, 15)
	want := NewTransform(lmax, g).Synthesis(nil, c)
	r := rand.New(rand.NewPCG(3, 4))
	perm := r.Perm(g.Len())
	colat, lon := make([]float64, g.Len()), make([]float64, g.Len())
	for k, s := range perm {
		colat[k], lon[k] = g.Colat[s/g.NLon], g.Lon(s%g.NLon)
	}
	p := NewPoints(lmax, colat, lon)
	if got := len(p.ringStart) - 1; got != g.NLat() {
		t.Errorf("%d distinct rings, want %d", got, g.NLat())
	}
	f := p.Synthesis(nil, c)
	for k, s := range perm {
		if math.Abs(f[k]-want[s]) > tol {
			t.Fatalf("point %d: %v, grid synthesis %v", k, f[k], want[s])
		}
	}
}

// TestAnalysisMemory511 checks the memory target of the issue for one
// analysis at lmax 511 on the Gauss-Legendre grid 512 x 1024, plan
// included: under 64 MiB allocated in total (runtime.MemStats.TotalAlloc,
// bytes allocated by this goroutine's calls; nothing else runs meanwhile).
// A table growing like L^3 would need 512^3/6 doubles = 180 MB, and one
// like nlat L^2 even more, so the check fails for either.
func TestAnalysisMemory511(t *testing.T) {
	if testing.Short() {
		t.Skip("lmax 511 in -short mode")
	}
	const lmax, limit = 511, 64 << 20
	g := NewGaussLegendre(lmax+1, 2*lmax+2)
	f := NewTransform(lmax, g).Synthesis(nil, trRandCoeffs(lmax, 2))
	runtime.GC()
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	c := NewTransform(lmax, g).Analysis(nil, f)
	runtime.ReadMemStats(&after)
	got := after.TotalAlloc - before.TotalAlloc
	t.Logf("plan and analysis at lmax 511 allocated %.1f MiB", float64(got)/(1<<20))
	if got >= limit {
		t.Errorf("plan and analysis at lmax 511 allocated %d bytes, want < 64 MiB", got)
	}
	if c.LMax != lmax {
		t.Fatalf("analysis returned lmax %d", c.LMax)
	}
}
