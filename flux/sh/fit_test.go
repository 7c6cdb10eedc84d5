package sh

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// sampleGrid evaluates c on g with the pointwise evaluator (Evaluator,
// the independent route of legendre.go), so the fit is not checked against
// its own synthesis.
func sampleGrid(c *Coeffs, g *Grid) []float64 {
	f := make([]float64, g.Len())
	ev := NewEvaluator(c)
	for i, th := range g.Colat {
		for j := range g.NLon {
			f[i*g.NLon+j] = ev.Value(th, g.Lon(j))
		}
	}
	return f
}

// TestFitBandLimited: a field of degree <= L sampled without noise lies in
// the range of the design matrix, so any well-posed weighted least-squares
// fit returns its coefficients up to rounding (normal equations,
// common practice). The 2-degree cell-registered grid (90 x 180) is the
// usual tomography layout.
func TestFitBandLimited(t *testing.T) {
	for _, tc := range []struct {
		name   string
		lmax   int
		g      *Grid
		method string
		tol    float64
	}{
		{"2deg-cell/lmax=20", 20, NewLonLat(90, 180, CellRegistered), "per-order QR", 1e-10},
		{"2deg-cell/lmax=60", 60, NewLonLat(90, 180, CellRegistered), "per-order QR", 1e-10},
		{"1deg-node/lmax=40", 40, NewLonLat(181, 360, NodeRegistered), "per-order QR", 1e-10},
		{"partial-latitudes/lmax=6", 6, NewRings([]float64{0.6, 0.8, 1.0, 1.2, 1.4, 1.6, 1.8, 2.0, 2.2, 2.4}, 36, 0), "per-order QR", 1e-8},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := trRandCoeffs(tc.lmax, 21)
			got, rep, err := FitGrid(tc.lmax, tc.g, sampleGrid(c, tc.g), nil)
			if err != nil {
				t.Fatal(err)
			}
			if rep.Method != tc.method {
				t.Errorf("method %q, want %q", rep.Method, tc.method)
			}
			if d := trMaxRel(got, c); d > tc.tol {
				t.Errorf("recovered coefficients off by %.3g (relative) > %.1g; condition %.3g", d, tc.tol, rep.Condition)
			}
			if rep.RMS > 1e-10 || rep.Used != tc.g.Len() {
				t.Errorf("report: rms %.3g, used %d of %d", rep.RMS, rep.Used, tc.g.Len())
			}
		})
	}
}

// TestFitMaskedCap removes a polar cap (and a few NaN cells) from the
// 2-degree grid: at low degree the remaining 90 % of the sphere still
// determines the coefficients (normal equations, common practice), now
// through the conjugate-gradient path.
func TestFitMaskedCap(t *testing.T) {
	const lmax, tol = 12, 1e-8
	g := NewLonLat(90, 180, CellRegistered)
	c := trRandCoeffs(lmax, 22)
	f := sampleGrid(c, g)
	valid := make([]bool, len(f))
	capped := 0
	for i, th := range g.Colat {
		for j := range g.NLon {
			valid[i*g.NLon+j] = th > 30*math.Pi/180
			if th <= 30*math.Pi/180 {
				capped++
			}
		}
	}
	f[5000], f[7000] = math.NaN(), math.NaN()
	got, rep, err := FitGrid(lmax, g, f, &FitOptions{Valid: valid})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Method != "conjugate gradients" || rep.NaN != 2 || rep.Used != len(f)-capped-2 || len(rep.Warnings) < 2 {
		t.Errorf("report %+v", rep)
	}
	// The cap above 30 degrees colatitude is (1 - cos 30deg)/2 = 6.7 % of
	// the sphere (spherical cap area, common practice).
	if want := 1 - (1-math.Cos(math.Pi/6))/2; math.Abs(rep.Coverage-want) > 1e-3 {
		t.Errorf("coverage %.4f, want %.4f", rep.Coverage, want)
	}
	if d := trMaxRel(got, c); d > tol {
		t.Errorf("recovered coefficients off by %.3g > %.1g (condition %.3g, %d iterations)", d, tol, rep.Condition, rep.Iter)
	}
}

// TestFitDamping: on a Gauss-Legendre grid the area weights are the exact
// quadrature, Y^T W Y = I, so the damped normal equations give
// c_lm / (1 + lambda l(l+1)) exactly (the documented behaviour, derived in
// fit.go from the normal equations). Both solver paths are checked.
func TestFitDamping(t *testing.T) {
	const lmax, lambda, tol = 10, 0.01, 1e-10
	g := NewGaussLegendre(lmax+1, 2*lmax+2)
	c := trRandCoeffs(lmax, 23)
	f := sampleGrid(c, g)
	want := c.Clone()
	for l := 0; l <= lmax; l++ {
		for m := 0; m <= l; m++ {
			want.C[Index(l, m)] /= 1 + lambda*float64(l*(l+1))
			want.S[Index(l, m)] /= 1 + lambda*float64(l*(l+1))
		}
	}
	// Weights that differ along a ring only by a constant factor force
	// the conjugate-gradient path; weight 1 everywhere except one point set
	// to 1 (but through the Weights slice) keeps the per-order path.
	uneven := make([]float64, len(f))
	for i := range uneven {
		uneven[i] = 1
	}
	for _, tc := range []struct {
		name string
		opt  *FitOptions
	}{
		{"per-order", &FitOptions{Damping: lambda}},
		{"cg", &FitOptions{Damping: lambda, Weights: uneven, Valid: make([]bool, len(f))}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if tc.opt.Valid != nil {
				for i := range tc.opt.Valid {
					tc.opt.Valid[i] = true
				}
				// Equal weights but a jittered one to leave the per-order path.
				tc.opt.Weights[3] = 1 + 1e-300
				tc.opt.Weights[4] = 1 - 1e-16
			}
			got, rep, err := FitGrid(lmax, g, f, tc.opt)
			if err != nil {
				t.Fatal(err)
			}
			if d := trMaxRel(got, want); d > tol {
				t.Errorf("%s: damped coefficients off by %.3g > %.1g", rep.Method, d, tol)
			}
			wantMethod := map[string]string{"per-order": "per-order QR", "cg": "conjugate gradients"}[tc.name]
			if rep.Method != wantMethod {
				t.Errorf("solver %q, want %q", rep.Method, wantMethod)
			}
		})
	}
}

// TestFitRefuses: the checks of fit.go. 180 longitudes resolve m < 90 only
// (sampling theorem, common practice); a cap missing half the sphere cannot
// carry degree 40 without damping.
func TestFitRefuses(t *testing.T) {
	g := NewLonLat(90, 180, CellRegistered)
	f := make([]float64, g.Len())
	_, _, err := FitGrid(100, g, f, nil)
	var fe *FitError
	if !errors.As(err, &fe) || !errors.Is(err, ErrIllPosed) {
		t.Fatalf("lmax 100 on 180 longitudes: got %v, want a *FitError", err)
	}
	if fe.SafeLMax != 89 {
		t.Errorf("safe degree %d, want 89", fe.SafeLMax)
	}
	// Southern hemisphere only, per-order path: rings missing.
	f2 := make([]float64, g.Len())
	valid := make([]bool, g.Len())
	for i := 45 * 180; i < len(valid); i++ {
		valid[i] = true
	}
	c := trRandCoeffs(40, 4)
	copy(f2, sampleGrid(c, g))
	_, _, err = FitGrid(40, g, f2, &FitOptions{Valid: valid})
	if !errors.As(err, &fe) {
		t.Fatalf("hemisphere at lmax 40: got %v, want a *FitError", err)
	}
	t.Logf("hemisphere: %v", err)
	if fe.SafeLMax < 0 || fe.SafeLMax >= 40 {
		t.Errorf("safe degree %d not in [0, 40)", fe.SafeLMax)
	}
	// Damping makes it well-posed.
	if _, rep, err := FitGrid(40, g, f2, &FitOptions{Valid: valid, Damping: 1e-4}); err != nil {
		t.Errorf("damped hemisphere fit refused: %v", err)
	} else if rep.Coverage < 0.49 || rep.Coverage > 0.51 {
		t.Errorf("hemisphere coverage %.3f", rep.Coverage)
	}
}

// TestFitPoints recovers a degree-8 field from 2000 random points
// (band-limited data, common practice as in TestFitBandLimited).
func TestFitPoints(t *testing.T) {
	const lmax, n, tol = 8, 2000, 1e-8
	r := rand.New(rand.NewPCG(8, 9))
	colat, lon, v := make([]float64, n), make([]float64, n), make([]float64, n)
	c := trRandCoeffs(lmax, 24)
	for i := range colat {
		colat[i] = math.Acos(2*r.Float64() - 1)
		lon[i] = 2 * math.Pi * r.Float64()
		v[i] = c.Evaluate(colat[i], lon[i])
	}
	got, rep, err := FitPoints(lmax, colat, lon, v, nil)
	if err != nil {
		t.Fatal(err)
	}
	if d := trMaxRel(got, c); d > tol {
		t.Errorf("recovered coefficients off by %.3g > %.1g", d, tol)
	}
	if rep.Coverage < 0.5 {
		t.Errorf("coverage %.3f of random points over the sphere", rep.Coverage)
	}
	if _, _, err := FitPoints(50, colat, lon, v, nil); err == nil {
		t.Errorf("2000 points accepted for 2601 coefficients")
	}
}

// TestFitRefusesSparseCap: inside a 60-degree polar cap only every 7th
// longitude has data, 26 per ring, which cannot carry orders m >= 13 there
// (sampling theorem, common practice): degree 40 is refused by the
// iterative path, degree 20 passes with the preconditioner in a few tens of
// iterations and recovers the field.
func TestFitRefusesSparseCap(t *testing.T) {
	if testing.Short() {
		t.Skip("bisection over degrees in -short mode")
	}
	g := NewLonLat(90, 180, CellRegistered)
	mask := func() []bool {
		v := make([]bool, g.Len())
		for i, th := range g.Colat {
			for j := range g.NLon {
				v[i*g.NLon+j] = th > math.Pi/3 || j%7 == 0
			}
		}
		return v
	}
	c := trRandCoeffs(40, 41)
	f := sampleGrid(c, g)
	_, _, err := FitGrid(40, g, f, &FitOptions{Valid: mask(), MaxIter: 200})
	var fe *FitError
	if !errors.As(err, &fe) || fe.SafeLMax < 13 || fe.SafeLMax >= 40 {
		t.Fatalf("sparse cap at lmax 40: got %v, want a FitError with a safe degree in [13, 40)", err)
	}
	c20 := trRandCoeffs(20, 42)
	got, rep, err := FitGrid(20, g, sampleGrid(c20, g), &FitOptions{Valid: mask()})
	if err != nil {
		t.Fatal(err)
	}
	if d := trMaxRel(got, c20); d > 1e-9 || rep.Iter > 100 {
		t.Errorf("lmax 20: error %.3g after %d iterations", d, rep.Iter)
	}
}

// denseDampedFit solves the damped weighted least-squares problem of fit.go,
// minimise sum_p w_p (f_p - (Y c)_p)^2 + lambda sum_lm l(l+1) (C_lm^2 + S_lm^2),
// by a dense QR factorization (gonum/mat) of the stacked matrix
// [W^(1/2) Y; (lambda D)^(1/2)] (Tikhonov regularization written as an
// ordinary least-squares problem; Golub & Van Loan, Matrix Computations,
// 4th ed., sec. 6.1, from memory), with Y built column by column from the
// pointwise Legendre functions (Legendre, checked against mpmath in
// legendre_ref_test.go). It shares nothing with the fast operators or the
// per-order solver of fit.go.
func denseDampedFit(t *testing.T, lmax int, colat, lon, f, w []float64, lambda float64) *Coeffs {
	t.Helper()
	type col struct{ l, m, s int }
	var cols []col
	for l := 0; l <= lmax; l++ {
		for m := 0; m <= l; m++ {
			cols = append(cols, col{l, m, 0})
			if m > 0 {
				cols = append(cols, col{l, m, 1})
			}
		}
	}
	var rows []int
	for p, v := range w {
		if v > 0 {
			rows = append(rows, p)
		}
	}
	nr, nc := len(rows), len(cols)
	A := mat.NewDense(nr+nc, nc, nil)
	b := mat.NewDense(nr+nc, 1, nil)
	for r, p := range rows {
		pl := Legendre(nil, lmax, colat[p], Canonical)
		sw := math.Sqrt(w[p])
		for k, c := range cols {
			s, co := math.Sincos(float64(c.m) * lon[p])
			v := co
			if c.s == 1 {
				v = s
			}
			A.Set(r, k, sw*pl[Index(c.l, c.m)]*v)
		}
		b.Set(r, 0, sw*f[p])
	}
	for k, c := range cols {
		A.Set(nr+k, k, math.Sqrt(lambda*float64(c.l*(c.l+1))))
	}
	var qr mat.QR
	qr.Factorize(A)
	var x mat.Dense
	if err := qr.SolveTo(&x, false, b); err != nil {
		t.Fatal(err)
	}
	out := NewCoeffs(lmax, Canonical)
	for k, c := range cols {
		if c.s == 0 {
			out.C[Index(c.l, c.m)] = x.At(k, 0)
		} else {
			out.S[Index(c.l, c.m)] = x.At(k, 0)
		}
	}
	return out
}

// TestFitDampedAgainstDense compares damped fits with the dense solution of
// the same objective (denseDampedFit): on a regular cell-registered grid
// (no poles) with a polar cap and a patch masked out (conjugate gradients),
// on a node-registered grid (poles present) restricted to a band of
// latitudes (whole rings, per-order QR), and at scattered points with
// relative weights, fewer points than coefficients (only the damping makes
// that well-posed). The data are not band-limited (degree 18 signal fitted at
// degree 10, plus noise), so the damping changes the answer everywhere.
func TestFitDampedAgainstDense(t *testing.T) {
	const lmax, tol = 10, 1e-8
	truth := trRandCoeffs(18, 51)
	noise := rand.New(rand.NewPCG(52, 53))
	gridPts := func(g *Grid) (colat, lon []float64) {
		for _, th := range g.Colat {
			for j := range g.NLon {
				colat, lon = append(colat, th), append(lon, g.Lon(j))
			}
		}
		return colat, lon
	}
	check := func(t *testing.T, got, want *Coeffs, rep *FitReport, method string) {
		t.Helper()
		if rep.Method != method {
			t.Errorf("method %q, want %q", rep.Method, method)
		}
		d := trMaxRel(got, want)
		t.Logf("%s: max |fit - dense| / max |coefficient| = %.3g", rep.Method, d)
		if d > tol {
			t.Errorf("damped fit differs from the dense solution by %.3g relative > %g (condition %.3g, %d iterations)", d, tol, rep.Condition, rep.Iter)
		}
	}
	t.Run("cell-registered/masked/cg", func(t *testing.T) {
		const lambda = 2e-3
		g := NewLonLat(36, 72, CellRegistered)
		f := sampleGrid(truth, g)
		valid := make([]bool, g.Len())
		w := make([]float64, g.Len())
		for i, th := range g.Colat {
			// Cell area (cos top - cos bottom) 2 pi / nlon (spherical zone,
			// common practice).
			area := (math.Cos(th-math.Pi/72) - math.Cos(th+math.Pi/72)) * 2 * math.Pi / 72
			for j := range g.NLon {
				k := i*g.NLon + j
				f[k] += 0.05 * noise.NormFloat64()
				lon := g.Lon(j)
				valid[k] = th > 0.5 && !(th > 1.5 && th < 2.0 && lon > 1 && lon < 2)
				if valid[k] {
					w[k] = area
				}
			}
		}
		colat, lon := gridPts(g)
		want := denseDampedFit(t, lmax, colat, lon, f, w, lambda)
		got, rep, err := FitGrid(lmax, g, f, &FitOptions{Valid: valid, Damping: lambda})
		if err != nil {
			t.Fatal(err)
		}
		check(t, got, want, rep, "conjugate gradients")
	})
	t.Run("node-registered/band/per-order", func(t *testing.T) {
		const lambda = 5e-3
		g := NewLonLat(37, 72, NodeRegistered)
		f := sampleGrid(truth, g)
		valid := make([]bool, g.Len())
		w := make([]float64, g.Len())
		aw := g.AreaWeights() // checked in TestAreaWeights
		for i, th := range g.Colat {
			for j := range g.NLon {
				k := i*g.NLon + j
				f[k] += 0.05 * noise.NormFloat64()
				valid[k] = th < 2.3 // pole ring at colatitude 0 included
				if valid[k] {
					w[k] = aw[i]
				}
			}
		}
		colat, lon := gridPts(g)
		want := denseDampedFit(t, lmax, colat, lon, f, w, lambda)
		got, rep, err := FitGrid(lmax, g, f, &FitOptions{Valid: valid, Damping: lambda})
		if err != nil {
			t.Fatal(err)
		}
		check(t, got, want, rep, "per-order QR")
	})
	t.Run("points/weighted/underdetermined", func(t *testing.T) {
		const lambda, n = 1e-2, 100 // 100 points, 121 coefficients
		r := rand.New(rand.NewPCG(54, 55))
		colat, lon, f, rw, w := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
		ev := NewEvaluator(truth)
		for i := range colat {
			colat[i] = math.Acos(2*r.Float64() - 1)
			lon[i] = 2 * math.Pi * r.Float64()
			f[i] = ev.Value(colat[i], lon[i]) + 0.05*r.NormFloat64()
			rw[i] = 0.5 + r.Float64()
			w[i] = rw[i] * 4 * math.Pi / n // FitPoints: 4 pi / n per point
		}
		want := denseDampedFit(t, lmax, colat, lon, f, w, lambda)
		got, rep, err := FitPoints(lmax, colat, lon, f, &FitOptions{Weights: rw, Damping: lambda})
		if err != nil {
			t.Fatal(err)
		}
		check(t, got, want, rep, "conjugate gradients")
	})
}
