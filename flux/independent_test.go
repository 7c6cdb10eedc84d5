package flux

import (
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"cmbflux/flux/contour"
	"cmbflux/flux/sh"

	"gonum.org/v1/gonum/optimize"
)

// The checks in this file compare flux with routes that share none of its
// search, contouring or rotation code: gonum's Nelder-Mead optimiser
// (optimize, a general-purpose library) on the pointwise evaluator of
// flux/sh, closed forms, and Rodrigues' rotation formula written out here.

// unitVec returns the unit vector of (lon, lat) in degrees.
func unitVec(lon, lat float64) [3]float64 {
	sl, cl := math.Sincos(lat / rad2deg)
	so, co := math.Sincos(lon / rad2deg)
	return [3]float64{cl * co, cl * so, sl}
}

// vecLonLat returns (lon, lat) in degrees of a vector.
func vecLonLat(x [3]float64) (lon, lat float64) {
	return math.Atan2(x[1], x[0]) * rad2deg, math.Atan2(x[2], math.Hypot(x[0], x[1])) * rad2deg
}

// evalAt returns c at the unit vector x.
func evalAt(c *sh.Coeffs, x [3]float64) float64 {
	return c.Evaluate(math.Atan2(math.Hypot(x[0], x[1]), x[2]), math.Atan2(x[1], x[0]))
}

// nelderMeadPeak climbs from the unit vector x0 to a local maximum of s*f
// with gonum's Nelder-Mead in the chart y(u, v) = normalize(x0 + u e1 +
// v e2) (e1, e2 tangent at x0, so the poles need no care) and returns the
// peak's position and the value of f there.
func nelderMeadPeak(f func([3]float64) float64, x0 [3]float64, s float64) ([3]float64, float64) {
	// Tangent basis: e1 perpendicular to x0 and to the axis least aligned
	// with it, e2 = x0 x e1.
	a := [3]float64{1, 0, 0}
	if math.Abs(x0[0]) > 0.6 {
		a = [3]float64{0, 1, 0}
	}
	e1 := [3]float64{a[1]*x0[2] - a[2]*x0[1], a[2]*x0[0] - a[0]*x0[2], a[0]*x0[1] - a[1]*x0[0]}
	n := math.Sqrt(e1[0]*e1[0] + e1[1]*e1[1] + e1[2]*e1[2])
	e1 = [3]float64{e1[0] / n, e1[1] / n, e1[2] / n}
	e2 := [3]float64{x0[1]*e1[2] - x0[2]*e1[1], x0[2]*e1[0] - x0[0]*e1[2], x0[0]*e1[1] - x0[1]*e1[0]}
	chart := func(u []float64) [3]float64 {
		y := [3]float64{x0[0] + u[0]*e1[0] + u[1]*e2[0], x0[1] + u[0]*e1[1] + u[1]*e2[1], x0[2] + u[0]*e1[2] + u[1]*e2[2]}
		r := math.Sqrt(y[0]*y[0] + y[1]*y[1] + y[2]*y[2])
		return [3]float64{y[0] / r, y[1] / r, y[2] / r}
	}
	res, err := optimize.Minimize(optimize.Problem{Func: func(u []float64) float64 { return -s * f(chart(u)) }},
		[]float64{0, 0},
		&optimize.Settings{Converger: &optimize.FunctionConverge{Absolute: 1e-16, Relative: 0, Iterations: 100}, MajorIterations: 2000},
		&optimize.NelderMead{InitialVertices: nil, SimplexSize: 0.02})
	if res == nil {
		panic(err)
	}
	x := chart(res.X)
	return x, f(x)
}

// referenceExtremum returns the global maximum of s*c (times s, so the
// value of c) and its position, independently of flux: an equiangular grid
// of 6(L+1) x 12(L+1) cell centres evaluated pointwise, every grid point
// larger than its eight neighbours as a start, the 40 best refined with
// nelderMeadPeak.
func referenceExtremum(c *sh.Coeffs, s float64) (float64, [3]float64) {
	nlat, nlon := 6*(c.LMax+1), 12*(c.LMax+1)
	var colat, lon []float64
	for i := range nlat {
		for j := range nlon {
			colat = append(colat, (float64(i)+0.5)*math.Pi/float64(nlat))
			lon = append(lon, 2*math.Pi*float64(j)/float64(nlon))
		}
	}
	v := sh.EvaluatePoints(nil, c, colat, lon)
	at := func(i, j int) float64 { return s * v[i*nlon+(j+nlon)%nlon] }
	type cand struct {
		v float64
		k int
	}
	var cs []cand
	for i := range nlat {
		for j := range nlon {
			best := true
			for di := -1; di <= 1 && best; di++ {
				for dj := -1; dj <= 1; dj++ {
					ii := i + di
					if (di == 0 && dj == 0) || ii < 0 || ii >= nlat {
						continue
					}
					if at(ii, j+dj) > at(i, j) {
						best = false
						break
					}
				}
			}
			if best {
				cs = append(cs, cand{at(i, j), i*nlon + j})
			}
		}
	}
	sort.Slice(cs, func(a, b int) bool { return cs[a].v > cs[b].v })
	f := func(x [3]float64) float64 { return evalAt(c, x) }
	bestV, bestX := math.Inf(-1), [3]float64{}
	for q := 0; q < len(cs) && q < 40; q++ {
		k := cs[q].k
		x0 := point{colat[k], lon[k]}.vec()
		x, fv := nelderMeadPeak(f, x0, s)
		if s*fv > bestV {
			bestV, bestX = s*fv, x
		}
	}
	return s * bestV, bestX
}

func TestExtremaAgainstGonumOptimize(t *testing.T) {
	// The promise: q_max and q_min of the continuous band-limited
	// field to 1e-8 relative. Reference: gonum's Nelder-Mead from every
	// local maximum of an independent dense sampling (referenceExtremum).
	// g is checked to 1e-9 of its range, and q_max, q_min at q* = 3 to
	// 1e-8 of q_mean (the scale of the field; q_min may be near zero).
	// Besides the tomography-like spectra, a white spectrum of degree 24
	// (equal power per coefficient: many peaks of similar height, the
	// hardest case for a search that refines a few grid candidates).
	white := func(seed uint64, lmax int) *sh.Coeffs {
		rng := rand.New(rand.NewPCG(seed, 9))
		c := sh.NewCoeffs(lmax, sh.Canonical)
		for l := 1; l <= lmax; l++ {
			for m := 0; m <= l; m++ {
				c.C[sh.Index(l, m)] = rng.NormFloat64()
				if m > 0 {
					c.S[sh.Index(l, m)] = rng.NormFloat64()
				}
			}
		}
		return c
	}
	for _, lmax := range []int{4, 8, 16, 24, 32} {
		for seed := uint64(21); seed <= 23; seed++ {
			in := randomDlnVs(seed, lmax)
			if lmax == 24 {
				in = white(seed, lmax)
			}
			p, err := NewPattern(in, nil)
			if err != nil {
				t.Fatal(err)
			}
			gmax, maxAt, gmin, minAt := p.Extrema()
			g := p.Coeffs()
			rmax, xmax := referenceExtremum(g, 1)
			rmin, xmin := referenceExtremum(g, -1)
			span := rmax - rmin
			if math.Abs(gmax-rmax) > 1e-9*span || math.Abs(gmin-rmin) > 1e-9*span {
				t.Errorf("lmax %d seed %d: g in [%.15g, %.15g], Nelder-Mead [%.15g, %.15g] (differences %.3g, %.3g of the range)",
					lmax, seed, gmin, gmax, rmin, rmax, (gmax-rmax)/span, (gmin-rmin)/span)
			}
			// Positions: within 1e-3 degrees (the value is flat at a peak,
			// so positions are far less precise than values).
			lo, la := vecLonLat(xmax)
			if d := angle(point{(90 - la) / rad2deg, lo / rad2deg}, point{(90 - maxAt[1]) / rad2deg, maxAt[0] / rad2deg}) * rad2deg; d > 1e-3 {
				t.Errorf("lmax %d seed %d: maximum at %v, Nelder-Mead at (%g, %g), %g deg apart", lmax, seed, maxAt, lo, la, d)
			}
			lo, la = vecLonLat(xmin)
			if d := angle(point{(90 - la) / rad2deg, lo / rad2deg}, point{(90 - minAt[1]) / rad2deg, minAt[0] / rad2deg}) * rad2deg; d > 1e-3 {
				t.Errorf("lmax %d seed %d: minimum at %v, Nelder-Mead at (%g, %g), %g deg apart", lmax, seed, minAt, lo, la, d)
			}
			const qm, qs = 0.07, 3.0
			r, err := p.WithQStar(qs, Reference{QMean: qm})
			if err != nil {
				t.Fatal(err)
			}
			a := qs / span
			wantMax, wantMin := 1e3*qm*(1+a*rmax), 1e3*qm*(1+a*rmin)
			d := r.Diagnostics
			if math.Abs(d.QMax-wantMax) > 1e-8*d.QMean || math.Abs(d.QMin-wantMin) > 1e-8*d.QMean {
				t.Errorf("lmax %d seed %d: q_max, q_min = %.12g, %.12g mW/m^2, Nelder-Mead %.12g, %.12g", lmax, seed, d.QMax, d.QMin, wantMax, wantMin)
			}
		}
	}
}

// rodrigues returns the matrix of the right-handed rotation by angle
// (degrees) about the unit vector k: R = cos a I + sin a [k]x + (1 - cos a)
// k k^T (Rodrigues' formula, closed form; written out here so that the
// test shares nothing with sh.AxisAngle).
func rodrigues(k [3]float64, angle float64) [3][3]float64 {
	s, c := math.Sincos(angle / rad2deg)
	kx := [3][3]float64{{0, -k[2], k[1]}, {k[2], 0, -k[0]}, {-k[1], k[0], 0}}
	var r [3][3]float64
	for i := range 3 {
		for j := range 3 {
			r[i][j] = (1-c)*k[i]*k[j] + s*kx[i][j]
			if i == j {
				r[i][j] += c
			}
		}
	}
	return r
}

func mul(r [3][3]float64, x [3]float64) [3]float64 {
	return [3]float64{
		r[0][0]*x[0] + r[0][1]*x[1] + r[0][2]*x[2],
		r[1][0]*x[0] + r[1][1]*x[1] + r[1][2]*x[2],
		r[2][0]*x[0] + r[2][1]*x[1] + r[2][2]*x[2],
	}
}

func transpose(r [3][3]float64) [3][3]float64 {
	var t [3][3]float64
	for i := range 3 {
		for j := range 3 {
			t[i][j] = r[j][i]
		}
	}
	return t
}

// randomUnit returns n random unit vectors (fixed seed, uniform on the
// sphere: normalised Gaussian triples, common practice).
func randomUnit(seed uint64, n int) [][3]float64 {
	rng := rand.New(rand.NewPCG(seed, 2))
	out := make([][3]float64, n)
	for k := range out {
		x := [3]float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		r := math.Sqrt(x[0]*x[0] + x[1]*x[1] + x[2]*x[2])
		out[k] = [3]float64{x[0] / r, x[1] / r, x[2] / r}
	}
	return out
}

func TestRotateAgainstInverseRotatedPoints(t *testing.T) {
	// A pattern turned by R is the field f'(x) = f(R^-1 x): evaluate the
	// original at the inversely rotated points (R^-1 = R^T from the
	// Rodrigues matrix above) and compare with the rotated boundary
	// condition, for an oblique pole and for both geographic poles (the
	// exact longitude-shift paths). Extrema keep their values and move to
	// R x; area fractions are unchanged; outline vertices are R times the
	// original vertices and lie on the level (q = 0) of the rotated field.
	p, err := NewPattern(randomDlnVs(31, 12), nil)
	if err != nil {
		t.Fatal(err)
	}
	ref := Reference{QMean: 0.06, QAd: 0.045}
	const qs = 3.5
	r0, err := p.WithQStar(qs, ref)
	if err != nil {
		t.Fatal(err)
	}
	c0, _ := r0.Coeffs(HeatFlux)
	o0 := r0.Outlines()
	if len(o0.Negative) == 0 {
		t.Fatal("the test pattern needs a negative region")
	}
	pts := randomUnit(5, 300)
	for _, tc := range []struct{ lon, lat, angle float64 }{
		{37, 52, 73}, {-140, -12, -200}, {0, 90, 41}, {10, -90, 41}, {200, 0, 90},
	} {
		q, err := p.Rotate(tc.lon, tc.lat, tc.angle)
		if err != nil {
			t.Fatal(err)
		}
		r, err := q.WithQStar(qs, ref)
		if err != nil {
			t.Fatal(err)
		}
		c, _ := r.Coeffs(HeatFlux)
		R := rodrigues(unitVec(tc.lon, tc.lat), tc.angle)
		Rt := transpose(R)
		for _, x := range pts {
			got, want := evalAt(c, x), evalAt(c0, mul(Rt, x))
			if math.Abs(got-want) > 1e-11*ref.QMean {
				t.Fatalf("pole (%g, %g) angle %g: q(x) = %.15g, original at R^-1 x = %.15g", tc.lon, tc.lat, tc.angle, got, want)
			}
		}
		d, d0 := r.Diagnostics, r0.Diagnostics
		if !near(d.QMax, d0.QMax, 1e-12) || !near(d.QMin, d0.QMin, 1e-12) || d.AreaFractionNegative != d0.AreaFractionNegative ||
			*d.AreaFractionSubadiabatic != *d0.AreaFractionSubadiabatic || !near(d.MinToSlowestDeg, d0.MinToSlowestDeg, 1e-9) {
			t.Errorf("pole (%g, %g): diagnostics changed by a rigid rotation: %+v vs %+v", tc.lon, tc.lat, d, d0)
		}
		for _, e := range []struct {
			got, orig [2]float64
		}{{d.QMaxLonLat, d0.QMaxLonLat}, {d.QMinLonLat, d0.QMinLonLat}, {d.SlowestLonLat, d0.SlowestLonLat}} {
			wl, wa := vecLonLat(mul(R, unitVec(e.orig[0], e.orig[1])))
			if ang := angle(point{(90 - wa) / rad2deg, wl / rad2deg}, point{(90 - e.got[1]) / rad2deg, e.got[0] / rad2deg}) * rad2deg; ang > 1e-9 {
				t.Errorf("pole (%g, %g): point %v moved to %v, want (%g, %g)", tc.lon, tc.lat, e.orig, e.got, wl, wa)
			}
		}
		o := r.Outlines()
		if len(o.Negative) != len(o0.Negative) {
			t.Fatalf("pole (%g, %g): %d negative rings, unrotated %d", tc.lon, tc.lat, len(o.Negative), len(o0.Negative))
		}
		for k, ring := range o.Negative {
			for m, v := range ring {
				wl, wa := vecLonLat(mul(R, unitVec(o0.Negative[k][m][0], o0.Negative[k][m][1])))
				if ang := angle(point{(90 - wa) / rad2deg, wl / rad2deg}, point{(90 - v[1]) / rad2deg, v[0] / rad2deg}) * rad2deg; ang > 1e-9 {
					t.Fatalf("pole (%g, %g): outline vertex %v, want R times the original (%g, %g)", tc.lon, tc.lat, v, wl, wa)
				}
				if qv := evalAt(c, unitVec(v[0], v[1])); math.Abs(qv) > 1e-6*ref.QMean {
					t.Fatalf("pole (%g, %g): q = %g at an outline vertex of q = 0", tc.lon, tc.lat, qv)
				}
			}
		}
	}
}

func TestSpinSequenceAgainstInverseRotatedPoints(t *testing.T) {
	// Frame t of a spin at rate w about pole k is the original turned by
	// w t: its field at x is the original's at R(k, -w t) x (Rodrigues),
	// with the same q* in every frame.
	p, err := NewPattern(randomDlnVs(32, 8), nil)
	if err != nil {
		t.Fatal(err)
	}
	ref := Reference{HeatFlow: 11 * TW}
	r0, _ := p.WithQStar(2, ref)
	c0, _ := r0.Coeffs(HeatFlux)
	spin := Spin{PoleLon: 120, PoleLat: -30, Rate: 2.5}
	times := []float64{0, 3, 10, 144.4}
	frames, err := SpinSequence(p, spin, times, func(q *Pattern) (*Result, error) { return q.WithQStar(2, ref) })
	if err != nil {
		t.Fatal(err)
	}
	pts := randomUnit(6, 100)
	for k, f := range frames {
		if f.Time != times[k] || !near(f.Result.Diagnostics.QStar, 2, 1e-12) {
			t.Errorf("frame %d: time %g, q* %g; want %g, 2", k, f.Time, f.Result.Diagnostics.QStar, times[k])
		}
		c, _ := f.Result.Coeffs(HeatFlux)
		back := rodrigues(unitVec(spin.PoleLon, spin.PoleLat), -spin.Rate*f.Time)
		for _, x := range pts {
			if got, want := evalAt(c, x), evalAt(c0, mul(back, x)); math.Abs(got-want) > 1e-11*r0.QMean {
				t.Fatalf("t = %g: q(x) = %.15g, original at R(-w t) x = %.15g", f.Time, got, want)
			}
		}
	}
}

func TestBlendPointwise(t *testing.T) {
	// A blend is (1 - w) g_a + w g_b point by point (definition), here of
	// patterns of different degrees; its frames keep the requested q*, and
	// their extrema are those of the blended field (gonum reference, see
	// TestExtremaAgainstGonumOptimize).
	a, _ := NewPattern(randomDlnVs(41, 6), nil)
	b, _ := NewPattern(randomDlnVs(42, 10), nil)
	ref := Reference{QMean: 0.05}
	frames, err := BlendSequence(a, b, 0, 4, []float64{0, 1, 3, 4}, func(p *Pattern) (*Result, error) { return p.WithQStar(2.5, ref) })
	if err != nil {
		t.Fatal(err)
	}
	ga, gb := a.Coeffs(), b.Coeffs()
	for _, f := range frames {
		w := f.Time / 4
		g := f.Result.Pattern.Coeffs()
		for _, x := range randomUnit(7, 50) {
			if got, want := evalAt(g, x), (1-w)*evalAt(ga, x)+w*evalAt(gb, x); math.Abs(got-want) > 1e-15 {
				t.Fatalf("t = %g: blend %g, want %g", f.Time, got, want)
			}
		}
		rmax, _ := referenceExtremum(g, 1)
		rmin, _ := referenceExtremum(g, -1)
		d := f.Result.Diagnostics
		if !near(d.QStar, 2.5, 1e-12) || !near((d.QMax-d.QMin)/d.QMean, 2.5, 1e-9) {
			t.Errorf("t = %g: q* %g, (q_max - q_min)/q_mean %g, want 2.5", f.Time, d.QStar, (d.QMax-d.QMin)/d.QMean)
		}
		gmax, _, gmin, _ := f.Result.Pattern.Extrema()
		if math.Abs(gmax-rmax) > 1e-9*(rmax-rmin) || math.Abs(gmin-rmin) > 1e-9*(rmax-rmin) {
			t.Errorf("t = %g: extrema [%g, %g], Nelder-Mead [%g, %g]", f.Time, gmin, gmax, rmin, rmax)
		}
	}
}

func TestDegree2PowerFractionMixed(t *testing.T) {
	// Orthonormal harmonics: the power of a sum of terms is the sum of the
	// squared weights (Parseval), so weights 1 (degree 1), 2 (degree 2) and
	// 2 (degree 3) put 4/9 of the power in degree 2.
	p, err := Ideal(nil, Term{L: 1, M: 0, Weight: 1}, Term{L: 2, M: 2, Weight: 2}, Term{L: 3, M: 1, Sin: true, Weight: 2})
	if err != nil {
		t.Fatal(err)
	}
	r, _ := p.WithQStar(1, Reference{QMean: 0.05})
	if got := r.Diagnostics.Degree2PowerFraction; !near(got, 4.0/9, 1e-14) {
		t.Errorf("degree-2 fraction %g, want 4/9", got)
	}
}

func TestMinToSlowestOffset(t *testing.T) {
	// With the pattern truncated to degree 1, g = N (c . x) with
	// c = (C11, S11, C10) (canonical Y_1 are N x, N y, N z, N =
	// sqrt(3/(4 pi)), closed form), so the flux minimum lies at -c/|c|.
	// The slowest point of the full degree-6 input comes from gonum's
	// Nelder-Mead (referenceExtremum). The reported offset must be the
	// angle between the two.
	in := randomDlnVs(51, 6)
	p, err := NewPattern(in, &PatternOptions{LMax: 1})
	if err != nil {
		t.Fatal(err)
	}
	r, _ := p.WithQStar(1, Reference{QMean: 0.05})
	d := r.Diagnostics
	c := [3]float64{in.C[sh.Index(1, 1)], in.S[sh.Index(1, 1)], in.C[sh.Index(1, 0)]}
	n := math.Sqrt(c[0]*c[0] + c[1]*c[1] + c[2]*c[2])
	minLon, minLat := vecLonLat([3]float64{-c[0] / n, -c[1] / n, -c[2] / n})
	full := in.Clone()
	full.C[0] = 0
	_, xs := referenceExtremum(full, -1)
	slowLon, slowLat := vecLonLat(xs)
	deg := func(lo1, la1, lo2, la2 float64) float64 {
		return angle(point{(90 - la1) / rad2deg, lo1 / rad2deg}, point{(90 - la2) / rad2deg, lo2 / rad2deg}) * rad2deg
	}
	if e := deg(d.QMinLonLat[0], d.QMinLonLat[1], minLon, minLat); e > 1e-4 {
		t.Errorf("flux minimum at %v, want (%g, %g)", d.QMinLonLat, minLon, minLat)
	}
	if e := deg(d.SlowestLonLat[0], d.SlowestLonLat[1], slowLon, slowLat); e > 1e-3 {
		t.Errorf("slowest point at %v, Nelder-Mead (%g, %g)", d.SlowestLonLat, slowLon, slowLat)
	}
	want := deg(minLon, minLat, slowLon, slowLat)
	if want < 1 {
		t.Fatalf("test input: offset %g deg is too small to test", want)
	}
	if math.Abs(d.MinToSlowestDeg-want) > 1e-3 {
		t.Errorf("offset %g deg, want %g", d.MinToSlowestDeg, want)
	}
}

func TestPhysicalFromHeatFlow(t *testing.T) {
	// references.md [derived]: k = 10 W/m/K, dT = 1000 K, h = 200 km give
	// 50 mW/m^2, 7.6 TW over the CMB (PREM radius 3480 km, Dziewonski &
	// Anderson 1981). With the mean set by that heat flow and a Y_1^0 layer
	// of +1 % at the north pole (dT = -1000 K at dlnVs/dT = -1e-5 /K), the
	// flux there is q_mean + 50 mW/m^2 and q* = 100 / q_mean.
	if tw := HeatFlowFromFlux(mWm2(50)) / TW; math.Abs(tw-7.6) > 0.05 {
		t.Fatalf("50 mW/m^2 over the CMB = %g TW, want 7.6", tw)
	}
	c := sh.NewCoeffs(1, sh.Canonical)
	c.C[sh.Index(1, 0)] = 0.01 / math.Sqrt(3/(4*math.Pi))
	p, _ := NewPattern(c, nil)
	r, err := p.WithPhysical(Physical{Conductivity: 10, Thickness: 200e3, DlnVsDT: -1e-5}, Reference{HeatFlow: 7.6 * TW})
	if err != nil {
		t.Fatal(err)
	}
	d := r.Diagnostics
	qm := 7.6e12 / (4 * math.Pi * 3480e3 * 3480e3) * 1e3 // mW/m^2
	if !near(d.QMean, qm, 1e-12) || !near(d.QMax-d.QMean, 50, 1e-9) || !near(d.QStar, 100/qm, 1e-9) || d.Mode != "physical" {
		t.Errorf("q_mean %g (want %g), q_max - q_mean %g (want 50), q* %g (want %g), mode %q", d.QMean, qm, d.QMax-d.QMean, d.QStar, 100/qm, d.Mode)
	}
}

// ringFractions holds a band-limited field ring by ring for
// referenceFractionBelow: nx rings at the midpoints of equal steps in
// x = cos(colat), each as its trigonometric polynomial in longitude,
// f(lon) = sum_m A_m cos(m lon) + B_m sin(m lon), with A_m, B_m from
// sh.Legendre (the pointwise Legendre functions, not the transforms or the
// contouring of flux).
type ringFractions struct {
	l    int
	a, b [][]float64
	cs   [][2][]float64 // per sample longitude: cos and sin of m lon
}

func newRingFractions(c *sh.Coeffs, nx int) *ringFractions {
	r := &ringFractions{l: c.LMax}
	var p []float64
	for i := range nx {
		x := -1 + (float64(i)+0.5)*2/float64(nx)
		p = sh.Legendre(p, c.LMax, math.Acos(x), sh.Canonical)
		a, b := make([]float64, c.LMax+1), make([]float64, c.LMax+1)
		for m := 0; m <= c.LMax; m++ {
			for l := m; l <= c.LMax; l++ {
				k := sh.Index(l, m)
				a[m] += c.C[k] * p[k]
				b[m] += c.S[k] * p[k]
			}
		}
		r.a, r.b = append(r.a, a), append(r.b, b)
	}
	ns := 16 * (c.LMax + 1)
	for j := range ns {
		lon := 2 * math.Pi * float64(j) / float64(ns)
		co, si := make([]float64, c.LMax+1), make([]float64, c.LMax+1)
		for m := range co {
			si[m], co[m] = math.Sincos(float64(m) * lon)
		}
		r.cs = append(r.cs, [2][]float64{co, si})
	}
	return r
}

// below returns the fraction of the sphere where the field is below level:
// (1/(4 pi)) times the midpoint sum over the rings of dx times the length
// of {lon : f < level}, whose ends are bracketed on 16(L+1) samples and
// bisected to 1e-14 rad (dA = dx dlon on the unit sphere, Archimedes).
func (r *ringFractions) below(level float64) float64 {
	ns := len(r.cs)
	dx := 2 / float64(len(r.a))
	total := 0.0
	for i := range r.a {
		a, b := r.a[i], r.b[i]
		f := func(lon float64) float64 {
			v := 0.0
			for m := range a {
				s, c := math.Sincos(float64(m) * lon)
				v += a[m]*c + b[m]*s
			}
			return v - level
		}
		vals := make([]float64, ns)
		for j, cs := range r.cs {
			v := 0.0
			for m := range a {
				v += a[m]*cs[0][m] + b[m]*cs[1][m]
			}
			vals[j] = v - level
		}
		length := 0.0
		for j := range ns {
			lo, hi := 2*math.Pi*float64(j)/float64(ns), 2*math.Pi*float64(j+1)/float64(ns)
			f0, f1 := vals[j], vals[(j+1)%ns]
			switch {
			case f0 < 0 && f1 < 0:
				length += hi - lo
			case (f0 < 0) != (f1 < 0):
				x0, x1 := lo, hi
				for x1-x0 > 1e-14 {
					m := 0.5 * (x0 + x1)
					if (f(m) < 0) == (f0 < 0) {
						x0 = m
					} else {
						x1 = m
					}
				}
				if f0 < 0 {
					length += x0 - lo
				} else {
					length += hi - x0
				}
			}
		}
		total += length * dx
	}
	return total / (4 * math.Pi)
}

func TestAreaFractionsAgainstRingQuadrature(t *testing.T) {
	// Area fractions of random tomography-like patterns, for which no
	// closed form exists, against ringFractions: a midpoint rule in
	// cos(colat) with exact root finding along each ring, sharing no code
	// with the contouring. The midpoint rule converges as h^1.5 where a
	// ring touches the level (common practice for square-root end points),
	// so 8000 rings leave an error of a few 1e-6 of the sphere; the
	// promise is 1e-4 of the sphere, checked here at 2e-5.
	for _, tc := range []struct {
		seed uint64
		lmax int
	}{{61, 8}, {62, 16}} {
		p, err := NewPattern(randomDlnVs(tc.seed, tc.lmax), nil)
		if err != nil {
			t.Fatal(err)
		}
		rf := newRingFractions(p.Coeffs(), 8000)
		gmax, _, gmin, _ := p.Extrema()
		for _, qs := range []float64{2.3, 4, 7} {
			const qm, qad = 0.06, 0.042
			r, err := p.WithQStar(qs, Reference{QMean: qm, QAd: qad})
			if err != nil {
				t.Fatal(err)
			}
			a := qs / (gmax - gmin)
			neg := rf.below(-1 / a)
			sub := rf.below((qad/qm - 1) / a)
			d := r.Diagnostics
			if math.Abs(d.AreaFractionNegative-neg) > 2e-5 || math.Abs(*d.AreaFractionSubadiabatic-sub) > 2e-5 {
				t.Errorf("lmax %d q* %g: negative %.7f, sub-adiabatic %.7f; ring quadrature %.7f, %.7f",
					tc.lmax, qs, d.AreaFractionNegative, *d.AreaFractionSubadiabatic, neg, sub)
			}
			t.Logf("lmax %d q* %g: differences %.2g, %.2g", tc.lmax, qs, d.AreaFractionNegative-neg, *d.AreaFractionSubadiabatic-sub)
			// The outlines are the plain polygons of the search grid (chords
			// between edge crossings): their areas converge at second order,
			// within 1e-3 of the sphere here.
			o := r.Outlines()
			on, os := contour.RegionArea(o.Negative)/(4*math.Pi), contour.RegionArea(o.Subadiabatic)/(4*math.Pi)
			if math.Abs(on-neg) > 1e-3 || math.Abs(os-sub) > 1e-3 {
				t.Errorf("lmax %d q* %g: outline areas %.6f, %.6f; ring quadrature %.6f, %.6f", tc.lmax, qs, on, os, neg, sub)
			}
			t.Logf("lmax %d q* %g: outline differences %.2g, %.2g", tc.lmax, qs, on-neg, os-sub)
		}
	}
}

func TestRotateTwice(t *testing.T) {
	// Two turns compose: R1 then R2 moves x to R2 R1 x (Rodrigues matrices
	// above), so the field at x is the original's at R1^T R2^T x, and the
	// minimum and the outline vertices move by R2 R1.
	p, _ := NewPattern(randomDlnVs(33, 10), nil)
	ref := Reference{QMean: 0.06}
	r0, _ := p.WithQStar(3.2, ref)
	c0, _ := r0.Coeffs(HeatFlux)
	q1, _ := p.Rotate(37, 52, 73)
	q2, err := q1.Rotate(-100, 10, 140)
	if err != nil {
		t.Fatal(err)
	}
	r, _ := q2.WithQStar(3.2, ref)
	c, _ := r.Coeffs(HeatFlux)
	R1, R2 := rodrigues(unitVec(37, 52), 73), rodrigues(unitVec(-100, 10), 140)
	for _, x := range randomUnit(8, 100) {
		if got, want := evalAt(c, x), evalAt(c0, mul(transpose(R1), mul(transpose(R2), x))); math.Abs(got-want) > 1e-11*ref.QMean {
			t.Fatalf("q(x) = %.15g, original at R1^T R2^T x = %.15g", got, want)
		}
	}
	move := func(v [2]float64) (float64, float64) { return vecLonLat(mul(R2, mul(R1, unitVec(v[0], v[1])))) }
	sep := func(a [2]float64, lon, lat float64) float64 {
		return angle(point{(90 - a[1]) / rad2deg, a[0] / rad2deg}, point{(90 - lat) / rad2deg, lon / rad2deg}) * rad2deg
	}
	if lon, lat := move(r0.Diagnostics.QMinLonLat); sep(r.Diagnostics.QMinLonLat, lon, lat) > 1e-9 {
		t.Errorf("minimum at %v, want (%g, %g)", r.Diagnostics.QMinLonLat, lon, lat)
	}
	o0, o := r0.Outlines(), r.Outlines()
	if len(o0.Negative) == 0 || len(o.Negative) != len(o0.Negative) {
		t.Fatalf("%d and %d negative rings", len(o0.Negative), len(o.Negative))
	}
	for k := range o.Negative {
		for m, v := range o.Negative[k] {
			if lon, lat := move(o0.Negative[k][m]); sep(v, lon, lat) > 1e-9 {
				t.Fatalf("outline vertex %v, want (%g, %g)", v, lon, lat)
			}
		}
	}
}

func TestHiddenRegionAwayFromGlobalMinimum(t *testing.T) {
	// g = -Y_2^0 - eps K, K a smooth zonal kernel centred on a search-grid
	// cell centre on the equator (the addition theorem, sum_m Y_lm(x)
	// Y_lm(x0) = (2l+1)/(4 pi) P_l(x . x0), gives its coefficients
	// w_l Y_lm(x0); closed form): a local minimum well above the global
	// minima at the poles, so far above them that a search for the global
	// extrema alone does not refine it. Just above its value the region
	// below the level lies inside one cell, cutting no grid edge; it must
	// still be counted (ring quadrature reference, see ringFractions).
	const L = 12 // 48 search rings, 96 longitudes: cells 3.75 deg wide
	lon0 := (1.875 + 3.75*10) / rad2deg
	pl := sh.Legendre(nil, L, math.Pi/2, sh.Canonical)
	for _, tc := range []struct {
		eps float64
		d   []float64 // levels above the local minimum
	}{{0.05, []float64{3e-4, 1e-3}}, {0.1, []float64{1e-3, 3e-3}}} {
		eps := tc.eps
		c := sh.NewCoeffs(L, sh.Canonical)
		for l := 1; l <= L; l++ {
			w := math.Exp(-float64(l*(l+1)) / 60)
			for m := 0; m <= l; m++ {
				k := sh.Index(l, m)
				s, co := math.Sincos(float64(m) * lon0)
				c.C[k] -= eps * w * pl[k] * co
				c.S[k] -= eps * w * pl[k] * s
			}
		}
		c.C[sh.Index(2, 0)] -= 1
		p, err := NewPattern(c, &PatternOptions{Oversample: 3}) // the grid assumed above
		if err != nil {
			t.Fatal(err)
		}
		m := c.Evaluate(math.Pi/2, lon0)
		_, _, gmin, _ := p.Extrema()
		rf := newRingFractions(p.Coeffs(), 8000)
		for _, d := range tc.d {
			lev := m + d
			if n, cut := p.surf.CellBelow(lon0*rad2deg, 0, lev); n != 0 || cut {
				t.Fatalf("eps %g, level m + %g: the test needs a region inside the cell (corners %d, cut %v)", eps, d, n, cut)
			}
			if !(m-gmin > 0.4) {
				t.Fatalf("eps %g: local minimum %g too close to the global %g", eps, m, gmin)
			}
			// Through the public route: q_ad such that q < q_ad is g < lev.
			const qm, qs = 0.05, 2.0
			a := qs / func() float64 { x, _, n, _ := p.Extrema(); return x - n }()
			r, _ := p.WithQStar(qs, Reference{QMean: qm, QAd: qm * (1 + a*lev)})
			if got, want := *r.Diagnostics.AreaFractionSubadiabatic, rf.below(lev); math.Abs(got-want) > 3e-5 {
				t.Errorf("eps %g, level m + %g: fraction %.7f, ring quadrature %.7f (difference %.2g)", eps, d, got, want, got-want)
			}
		}
	}
}

func TestAreaFractionsFlatSpectrum(t *testing.T) {
	// A flat spectrum (power per coefficient falling as 1/l, about half the
	// power above degree LMax/2) has many saddles near every level, the
	// hard case for contouring; DefaultOversample was chosen for it. Ring
	// quadrature reference as in TestAreaFractionsAgainstRingQuadrature;
	// the promise is 1e-4 of the sphere, checked at 4e-5 (3x oversampling
	// erred by up to 2.9e-4 here).
	const lmax = 16
	rng := rand.New(rand.NewPCG(5, 9))
	c := sh.NewCoeffs(lmax, sh.Canonical)
	for l := 1; l <= lmax; l++ {
		a := 1 / math.Sqrt(float64(l))
		for m := 0; m <= l; m++ {
			c.C[sh.Index(l, m)] = a * rng.NormFloat64()
			if m > 0 {
				c.S[sh.Index(l, m)] = a * rng.NormFloat64()
			}
		}
	}
	p, err := NewPattern(c, nil)
	if err != nil {
		t.Fatal(err)
	}
	rf := newRingFractions(p.Coeffs(), 8000)
	gmax, _, gmin, _ := p.Extrema()
	for _, f := range []float64{0.2, 0.35, 0.5, 0.65, 0.8} {
		lev := gmin + f*(gmax-gmin)
		if got, want := p.fractionBelow(lev), rf.below(lev); math.Abs(got-want) > 4e-5 {
			t.Errorf("level at %g of the range: fraction %.7f, ring quadrature %.7f (difference %.2g)", f, got, want, got-want)
		}
	}
}
