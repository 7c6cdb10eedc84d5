package flux

import (
	"math"
	"sort"

	"cmbflux/flux/contour"
	"cmbflux/flux/sh"
)

const rad2deg = 180 / math.Pi

// maxLocal caps the local extrema of each kind refined for the area
// fractions (extrema with every). A region hidden inside one cell has at
// most the cell's area, about pi / (4 nr^2) of the sphere for nr rings. A
// white spectrum of degree L has about L^2/5 local minima, tomography-like
// red spectra far fewer (measured), so the cap binds only above degree
// about 45; with the default 6x oversampling cells are then already below
// minCellFraction, and no extra extremum is refined at all.
const maxLocal = 400

// minCellFraction is the largest cell, as a fraction of the sphere, below
// which hidden regions are too small to matter (well under the 1e-4 promised
// for the area fractions) and only the extrema near the global ones are
// refined.
const minCellFraction = 1e-5

// point is a position on the sphere: colatitude and east longitude, radians.
type point struct{ colat, lon float64 }

// lonLat returns the point in degrees, longitude in [-180, 180).
func (p point) lonLat() [2]float64 {
	lon := math.Mod(p.lon*rad2deg+180, 360)
	if lon < 0 {
		lon += 360
	}
	return [2]float64{lon - 180, 90 - p.colat*rad2deg}
}

func (p point) vec() [3]float64 {
	st, ct := math.Sincos(p.colat)
	sp, cp := math.Sincos(p.lon)
	return [3]float64{st * cp, st * sp, ct}
}

func fromVec(x [3]float64) point {
	lon := math.Atan2(x[1], x[0])
	if lon < 0 {
		lon += 2 * math.Pi
	}
	return point{math.Atan2(math.Hypot(x[0], x[1]), x[2]), lon}
}

// angle returns the great-circle angle between two points in radians.
func angle(a, b point) float64 {
	x, y := a.vec(), b.vec()
	c := [3]float64{x[1]*y[2] - x[2]*y[1], x[2]*y[0] - x[0]*y[2], x[0]*y[1] - x[1]*y[0]}
	return math.Atan2(math.Sqrt(c[0]*c[0]+c[1]*c[1]+c[2]*c[2]), x[0]*y[0]+x[1]*y[1]+x[2]*y[2])
}

// denseGrid is a field sampled on the north pole, nr Gauss-Legendre rings and
// the south pole, nlon longitudes from 0, with its derivatives.
type denseGrid struct {
	nlon  int
	colat []float64 // radians, 0 first and pi last
	v     []float64 // values, len(colat)*nlon
	dth   []float64 // df/dcolat per radian (nil unless derivatives asked)
	dph   []float64 // df/dlon per radian
	// ringA, ringB hold the Fourier coefficients of each ring,
	// f = sum_m A_m cos(m lon) + B_m sin(m lon) (with derivatives only).
	ringA, ringB [][]float64
}

// newDenseGrid samples the canonical expansion c on nr Gauss-Legendre rings
// (plus the poles) and 2 nr longitudes. The nodes are those of
// sh.NewGaussLegendre; each ring costs one Legendre recursion and the
// longitudes a direct Fourier sum (the grids here are small).
func newDenseGrid(c *sh.Coeffs, nr int, deriv bool) *denseGrid {
	gl := sh.NewGaussLegendre(nr, 2*nr)
	g := &denseGrid{nlon: 2 * nr}
	g.colat = append(append([]float64{0}, gl.Colat...), math.Pi)
	n := len(g.colat) * g.nlon
	if !deriv {
		// Values only: the fast transform of flux/sh for the rings, the
		// evaluator for the poles.
		g.v = make([]float64, n)
		sh.NewTransform(c.LMax, gl).Synthesis(g.v[g.nlon:n-g.nlon], c)
		ev := sh.NewEvaluator(c)
		north, south := ev.Value(0, 0), ev.Value(math.Pi, 0)
		for j := 0; j < g.nlon; j++ {
			g.v[j], g.v[n-g.nlon+j] = north, south
		}
		return g
	}
	g.v = make([]float64, n)
	if deriv {
		g.dth = make([]float64, n)
		g.dph = make([]float64, n)
	}
	L := c.LMax
	cosm := make([]float64, (L+1)*g.nlon)
	sinm := make([]float64, (L+1)*g.nlon)
	for m := 0; m <= L; m++ {
		for j := 0; j < g.nlon; j++ {
			s, co := math.Sincos(float64(m) * 2 * math.Pi * float64(j) / float64(g.nlon))
			cosm[m*g.nlon+j], sinm[m*g.nlon+j] = co, s
		}
	}
	var p, dp []float64
	a, b := make([]float64, L+1), make([]float64, L+1)
	da, db := make([]float64, L+1), make([]float64, L+1)
	for i, th := range g.colat {
		p, dp = sh.LegendreDeriv(p, dp, L, th, sh.Canonical)
		for m := 0; m <= L; m++ {
			a[m], b[m], da[m], db[m] = 0, 0, 0, 0
			for l := m; l <= L; l++ {
				k := sh.Index(l, m)
				a[m] += c.C[k] * p[k]
				b[m] += c.S[k] * p[k]
				da[m] += c.C[k] * dp[k]
				db[m] += c.S[k] * dp[k]
			}
		}
		if deriv {
			g.ringA = append(g.ringA, append([]float64(nil), a...))
			g.ringB = append(g.ringB, append([]float64(nil), b...))
		}
		row := i * g.nlon
		for j := 0; j < g.nlon; j++ {
			f, ft, fp := 0.0, 0.0, 0.0
			for m := 0; m <= L; m++ {
				co, s := cosm[m*g.nlon+j], sinm[m*g.nlon+j]
				f += a[m]*co + b[m]*s
				if deriv {
					ft += da[m]*co + db[m]*s
					fp += float64(m) * (b[m]*co - a[m]*s)
				}
			}
			g.v[row+j] = f
			if deriv {
				g.dth[row+j], g.dph[row+j] = ft, fp
			}
		}
	}
	return g
}

// surface returns the grid of the expansion c as a contour.Surface
// (latitudes and derivatives per degree), with second derivatives along the
// grid lines from their exact Fourier series (gridLines), so that contour
// crossings come from quintic Hermite interpolants (error O(h^6)).
func (g *denseGrid) surface(c *sh.Coeffs) (*contour.Surface, error) {
	f := contour.Field{NLon: g.nlon, Values: g.v}
	if g.ringA != nil {
		lines, err := newGridLines(g, c.LMax)
		if err != nil {
			return nil, err
		}
		f.DLon2, f.DLat2 = lines.secondDerivatives()
	}
	f.Lat = make([]float64, len(g.colat))
	for i, th := range g.colat {
		f.Lat[i] = 90 - th*rad2deg
	}
	f.Lat[0], f.Lat[len(f.Lat)-1] = 90, -90
	if g.dth != nil {
		f.DLon = make([]float64, len(g.v))
		f.DLat = make([]float64, len(g.v))
		for k := range g.v {
			f.DLon[k] = g.dph[k] / rad2deg
			f.DLat[k] = -g.dth[k] / rad2deg
		}
	}
	return contour.NewSurface(f)
}

// candidates returns up to k grid points that are local maxima of s*f
// (s = +1 for maxima, -1 for minima) over their eight neighbours, best
// first, and (when near) within a third of the grid range of the best. The
// poles are candidates against the nearest ring.
func (g *denseGrid) candidates(s float64, k int, near bool) []point {
	n := g.nlon
	nr := len(g.colat)
	type cand struct {
		v float64
		p point
	}
	var cs []cand
	at := func(i, j int) float64 { return s * g.v[i*n+((j%n)+n)%n] }
	// Poles.
	for _, i := range []int{0, nr - 1} {
		nb := 1
		if i == nr-1 {
			nb = nr - 2
		}
		v := at(i, 0)
		best := true
		for j := 0; j < n; j++ {
			if at(nb, j) > v {
				best = false
				break
			}
		}
		if best {
			cs = append(cs, cand{v, point{g.colat[i], 0}})
		}
	}
	for i := 1; i < nr-1; i++ {
		for j := 0; j < n; j++ {
			v := at(i, j)
			best := true
			for di := -1; di <= 1 && best; di++ {
				ii := i + di
				if ii == 0 || ii == nr-1 {
					if at(ii, 0) > v {
						best = false
					}
					continue
				}
				for dj := -1; dj <= 1; dj++ {
					if (di != 0 || dj != 0) && at(ii, j+dj) > v {
						best = false
						break
					}
				}
			}
			if best {
				// Rank by the peak of parabolas through the neighbours
				// along the ring and along the meridian, a far better
				// estimate of a narrow peak than the sample itself.
				est := v + parabolaGain(at(i, j-1), v, at(i, j+1))
				if i > 1 && i < nr-2 {
					est += parabolaGain(at(i-1, j), v, at(i+1, j))
				}
				cs = append(cs, cand{est, point{g.colat[i], 2 * math.Pi * float64(j) / float64(n)}})
			}
		}
	}
	sort.Slice(cs, func(a, b int) bool { return cs[a].v > cs[b].v })
	// A peak narrower than the grid may sample low: keep every candidate
	// within a third of the grid's range of the best one (at least two, at
	// most k).
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range g.v {
		lo, hi = math.Min(lo, s*v), math.Max(hi, s*v)
	}
	var out []point
	for q := 0; q < len(cs) && q < k; q++ {
		if near && q >= 2 && cs[q].v < cs[0].v-(hi-lo)/3 {
			break
		}
		out = append(out, cs[q].p)
	}
	return out
}

// parabolaGain returns how far the peak of the parabola through three
// equally spaced samples (a, b, c), b the largest, rises above b:
// (a - c)^2 / (8 (2b - a - c)).
func parabolaGain(a, b, c float64) float64 {
	d := 2*b - a - c
	if d <= 0 {
		return 0
	}
	return (a - c) * (a - c) / (8 * d)
}

// refine climbs from start to the nearest local maximum of s*f by Newton's
// method in a tangent-plane chart, x(u, v) = normalize(x0 + u e_east +
// v e_north), re-centred at every step, with the gradient and Hessian from
// central differences of step delta = 1e-4 rad (truncation error O(delta^2)
// in the gradient; the value at the optimum is then exact to far better
// than 1e-8 relative). Steps are limited to maxStep radians and halved until
// the value improves; non-concave models fall back to gradient ascent.
func refine(ev *sh.Evaluator, start point, s, maxStep float64) (point, float64, float64) {
	const delta = 1e-4
	x := start.vec()
	f := func(y [3]float64) float64 {
		p := fromVec(y)
		return s * ev.Value(p.colat, p.lon)
	}
	chart := func(x, e1, e2 [3]float64, u, v float64) [3]float64 {
		y := [3]float64{x[0] + u*e1[0] + v*e2[0], x[1] + u*e1[1] + v*e2[1], x[2] + u*e1[2] + v*e2[2]}
		r := math.Sqrt(y[0]*y[0] + y[1]*y[1] + y[2]*y[2])
		return [3]float64{y[0] / r, y[1] / r, y[2] / r}
	}
	f0 := f(x)
	det := 0.0
	for range 40 {
		p := fromVec(x)
		st, ct := math.Sincos(p.colat)
		sp, cp := math.Sincos(p.lon)
		e1 := [3]float64{-sp, cp, 0}
		e2 := [3]float64{-ct * cp, -ct * sp, st}
		fu1, fu0 := f(chart(x, e1, e2, delta, 0)), f(chart(x, e1, e2, -delta, 0))
		fv1, fv0 := f(chart(x, e1, e2, 0, delta)), f(chart(x, e1, e2, 0, -delta))
		fpp := f(chart(x, e1, e2, delta, delta))
		fmm := f(chart(x, e1, e2, -delta, -delta))
		gu, gv := (fu1-fu0)/(2*delta), (fv1-fv0)/(2*delta)
		huu := (fu1 - 2*f0 + fu0) / (delta * delta)
		hvv := (fv1 - 2*f0 + fv0) / (delta * delta)
		huv := (fpp - fu1 - fv1 + 2*f0 - fu0 - fv0 + fmm) / (2 * delta * delta)
		// Newton step for a maximum: solve H d = -g with H negative definite.
		det = huu*hvv - huv*huv
		var du, dv float64
		if huu < 0 && det > 0 {
			du = -(hvv*gu - huv*gv) / det
			dv = -(-huv*gu + huu*gv) / det
		} else {
			gn := math.Hypot(gu, gv)
			if gn == 0 {
				break
			}
			du, dv = maxStep*gu/gn/4, maxStep*gv/gn/4
		}
		if l := math.Hypot(du, dv); l > maxStep {
			du, dv = du*maxStep/l, dv*maxStep/l
		}
		accepted := false
		for range 30 {
			y := chart(x, e1, e2, du, dv)
			if fy := f(y); fy >= f0 {
				x, f0 = y, fy
				accepted = true
				break
			}
			du, dv = du/2, dv/2
		}
		if !accepted || math.Hypot(du, dv) < 1e-10 {
			break
		}
	}
	return fromVec(x), s * f0, det
}

// extremum is a refined extremum of a field: its position, value and the
// determinant of its Hessian on the unit sphere (per radian^2; positive at a
// strict extremum).
type extremum struct {
	at    point
	value float64
	det   float64
}

// extrema returns the global maximum and minimum of the canonical expansion
// c and refined local extrema of each kind (distinct, most extreme first): a
// dense grid search (the rings of g) and Newton refinement from the best
// grid candidates of each kind. With every, all local extrema of the grid
// (up to maxLocal of each kind) are refined too, not only those near the
// global ones, so that fractionBelow can add the small regions around any
// of them that hide inside one grid cell; without it (a position search
// only) the few best suffice.
func extrema(c *sh.Coeffs, g *denseGrid, every bool) (max, min extremum, maxs, mins []extremum) {
	ev := sh.NewEvaluator(c)
	maxStep := math.Pi / float64(len(g.colat)-1)
	const starts = 12
	all := func(s float64) []extremum {
		var es []extremum
		add := func(ps []point) {
			for _, p := range ps {
				q, v, det := refine(ev, p, s, maxStep)
				dup := false
				for k := range es {
					if angle(es[k].at, q) < 1e-6 {
						dup = true
						break
					}
				}
				if !dup {
					es = append(es, extremum{q, v, det})
				}
			}
		}
		best := g.candidates(s, starts, true)
		add(best)
		if nr := len(g.colat) - 2; every && math.Pi/(4*float64(nr*nr)) > minCellFraction {
			if rest := g.candidates(s, maxLocal, false); len(rest) > len(best) {
				// The first len(best) are the same points, best first.
				add(rest[len(best):])
			}
		}
		sort.Slice(es, func(a, b int) bool { return s*es[a].value > s*es[b].value })
		return es
	}
	maxs, mins = all(1), all(-1)
	return maxs[0], mins[0], maxs, mins
}
