package sh

import (
	"fmt"
	"math"
)

// GridKind says how the rings of a Grid were placed and whether an exact
// quadrature exists on it.
type GridKind int

const (
	// GaussLegendre rings sit at the zeros of the Legendre polynomial
	// P_nlat(cos theta); with nlat > lmax and nlon > 2 lmax the ring weights
	// integrate every product of two harmonics of degree <= lmax exactly.
	GaussLegendre GridKind = iota
	// DriscollHealy rings are equiangular, theta_i = pi i / N for
	// i = 0..N-1 (north pole included, south pole not), with the weights of
	// Driscoll & Healy (1994, Adv. Appl. Math. 15, Theorem 3); exact for
	// lmax <= N/2 - 1.
	DriscollHealy
	// Rings is any other set of rings (regular longitude-latitude grids,
	// partial coverage). No exact quadrature is known; coefficients come
	// from a least-squares fit (FitGrid).
	Rings
)

var gridKindNames = [...]string{"gauss-legendre", "driscoll-healy", "rings"}

// String returns "gauss-legendre", "driscoll-healy" or "rings".
func (k GridKind) String() string {
	if k < 0 || int(k) >= len(gridKindNames) {
		return fmt.Sprintf("GridKind(%d)", int(k))
	}
	return gridKindNames[k]
}

// Grid is a set of NLat rings of constant colatitude with NLon equally spaced
// longitudes each. The field on a grid is stored ring by ring from north to
// south: field[i*NLon + j] is the value at colatitude Colat[i] and east
// longitude Lon0 + 2*pi*j/NLon.
//
// Weight, when not nil, holds quadrature weights in cos(colatitude):
// the integral over the sphere of f is approximated by
//
//	sum_i Weight[i] * (2*pi/NLon) * sum_j f[i*NLon+j],
//
// so the weights sum to 2. Grids without an exact quadrature carry area
// weights (AreaWeights) for fitting and leave Weight nil.
type Grid struct {
	Kind   GridKind
	Colat  []float64 // ring colatitudes in radians, ascending, in [0, pi]
	Weight []float64 // exact quadrature weights in cos(colatitude), or nil
	NLon   int       // longitudes per ring
	Lon0   float64   // longitude of the first point of each ring, radians
}

// NLat returns the number of rings.
func (g *Grid) NLat() int { return len(g.Colat) }

// Len returns the number of points, NLat*NLon.
func (g *Grid) Len() int { return len(g.Colat) * g.NLon }

// Lon returns the east longitude in radians of column j,
// Lon0 + 2*pi*j/NLon.
func (g *Grid) Lon(j int) float64 { return g.Lon0 + 2*math.Pi*float64(j)/float64(g.NLon) }

// MaxDegree returns the largest degree that the grid can carry without
// aliasing for its kind: nlat-1 for Gauss-Legendre, N/2-1 for Driscoll-Healy,
// and for other rings the sampling limit min(nlat-1, (nlon-1)/2), where
// nlat counts the distinct rings away from the poles plus one if a pole is
// present (a pole ring only constrains the order m = 0).
func (g *Grid) MaxDegree() int {
	lon := (g.NLon - 1) / 2
	switch g.Kind {
	case GaussLegendre:
		return min(g.NLat()-1, lon)
	case DriscollHealy:
		return min(g.NLat()/2-1, lon)
	}
	n, pole := 0, false
	for _, c := range g.Colat {
		if c < 1e-12 || c > math.Pi-1e-12 {
			pole = true
		} else {
			n++
		}
	}
	if pole {
		n++
	}
	return min(n-1, lon)
}

// NewGaussLegendre returns the Gauss-Legendre grid with nlat rings at the
// zeros of P_nlat(cos theta), north to south, and nlon longitudes from 0.
// The nodes are found by Newton iteration on the three-term recurrence of
// P_n started from x_k ~ cos(pi (k - 1/4)/(n + 1/2)) (Abramowitz & Stegun
// 22.16.6), the weights are w_k = 2 / ((1 - x_k^2) P_n'(x_k)^2)
// (Abramowitz & Stegun 25.4.29). It panics if nlat < 1 or nlon < 1.
//
// For exact transforms up to degree lmax use nlat >= lmax+1 and
// nlon >= 2*lmax+1.
func NewGaussLegendre(nlat, nlon int) *Grid {
	if nlat < 1 || nlon < 1 {
		panic(fmt.Sprintf("sh: Gauss-Legendre grid %d x %d: both sizes must be positive", nlat, nlon))
	}
	x, w := gaussLegendre(nlat)
	g := &Grid{Kind: GaussLegendre, Colat: make([]float64, nlat), Weight: w, NLon: nlon}
	for i, xi := range x {
		g.Colat[i] = math.Acos(xi)
	}
	// Make the mirror symmetry exact, so ring pairs share Legendre values.
	for i := 0; i < nlat/2; i++ {
		g.Colat[nlat-1-i] = math.Pi - g.Colat[i]
	}
	if nlat%2 == 1 {
		g.Colat[nlat/2] = math.Pi / 2
	}
	return g
}

// gaussLegendre returns the nodes, descending from near 1 to near -1, and
// weights of the n-point Gauss-Legendre rule on [-1, 1].
func gaussLegendre(n int) (x, w []float64) {
	x = make([]float64, n)
	w = make([]float64, n)
	fn := float64(n)
	for k := 0; k < (n+1)/2; k++ {
		// Initial guess, Abramowitz & Stegun 22.16.6 with the usual
		// quarter-period shift; converges in a handful of Newton steps.
		z := math.Cos(math.Pi * (float64(k) + 0.75) / (fn + 0.5))
		var dp float64
		for it := 0; it < 100; it++ {
			p, d := legendreP(n, z)
			dz := p / d
			z -= dz
			dp = d
			if math.Abs(dz) <= 1e-16*math.Max(1, math.Abs(z)) {
				_, dp = legendreP(n, z)
				break
			}
		}
		x[k] = z
		x[n-1-k] = -z
		w[k] = 2 / ((1 - z*z) * dp * dp)
		w[n-1-k] = w[k]
	}
	if n%2 == 1 {
		x[n/2] = 0
	}
	return x, w
}

// legendreP returns P_n(x) and P_n'(x) by the three-term recurrence
// (k+1) P_{k+1} = (2k+1) x P_k - k P_{k-1} (Abramowitz & Stegun 8.5.3) and
// (1-x^2) P_n' = n (P_{n-1} - x P_n) (Abramowitz & Stegun 8.5.4).
func legendreP(n int, x float64) (p, dp float64) {
	p0, p1 := 1.0, x
	if n == 0 {
		return 1, 0
	}
	for k := 1; k < n; k++ {
		fk := float64(k)
		p0, p1 = p1, ((2*fk+1)*x*p1-fk*p0)/(fk+1)
	}
	return p1, float64(n) * (p0 - x*p1) / (1 - x*x)
}

// NewDriscollHealy returns the equiangular grid of Driscoll & Healy (1994,
// Adv. Appl. Math. 15, 202-250) with n rings theta_i = pi i / n,
// i = 0..n-1 (north pole included, south pole excluded) and n longitudes
// from 0. The weights, written in cos(colatitude) so that they sum to 2, are
// (their Theorem 3, rescaled)
//
//	w_i = (4/n) sin(theta_i) sum_{k=0}^{n/2-1} sin((2k+1) theta_i) / (2k+1),
//
// and integrate exactly every product of two harmonics of degree
// <= n/2 - 1. It panics unless n is even and positive. For degree lmax use
// n = 2*lmax + 2.
func NewDriscollHealy(n int) *Grid {
	if n < 2 || n%2 != 0 {
		panic(fmt.Sprintf("sh: Driscoll-Healy grid with n = %d: n must be even and positive (n = 2*lmax+2)", n))
	}
	g := &Grid{Kind: DriscollHealy, Colat: make([]float64, n), Weight: make([]float64, n), NLon: n}
	for i := range n {
		th := math.Pi * float64(i) / float64(n)
		g.Colat[i] = th
		var s float64
		for k := 0; k < n/2; k++ {
			s += math.Sin(float64(2*k+1)*th) / float64(2*k+1)
		}
		g.Weight[i] = 4 / float64(n) * math.Sin(th) * s
	}
	return g
}

// Registration says where the samples of a regular longitude-latitude grid
// sit relative to the cells of the grid.
type Registration int

const (
	// NodeRegistered grids have samples on the cell corners: with nlat rings
	// the colatitudes are pi i/(nlat-1), i = 0..nlat-1, both poles included,
	// and longitudes 2 pi j/nlon.
	NodeRegistered Registration = iota
	// CellRegistered grids have samples at cell centres: colatitudes
	// pi (i + 1/2)/nlat, no pole, and longitudes 2 pi (j + 1/2)/nlon.
	CellRegistered
)

// NewLonLat returns the regular global longitude-latitude grid with nlat
// rings and nlon longitudes in the given registration. Such grids have no
// exact quadrature (Weight is nil); use FitGrid to obtain coefficients.
// It panics if nlat < 1 (nlat < 2 for node registration) or nlon < 1.
func NewLonLat(nlat, nlon int, reg Registration) *Grid {
	if nlon < 1 || nlat < 1 || (reg == NodeRegistered && nlat < 2) {
		panic(fmt.Sprintf("sh: longitude-latitude grid %d x %d is too small", nlat, nlon))
	}
	g := &Grid{Kind: Rings, Colat: make([]float64, nlat), NLon: nlon}
	for i := range nlat {
		if reg == NodeRegistered {
			g.Colat[i] = math.Pi * float64(i) / float64(nlat-1)
		} else {
			g.Colat[i] = math.Pi * (float64(i) + 0.5) / float64(nlat)
		}
	}
	for i := 0; i < nlat/2; i++ {
		g.Colat[nlat-1-i] = math.Pi - g.Colat[i]
	}
	if nlat%2 == 1 {
		g.Colat[nlat/2] = math.Pi / 2
	}
	if reg == CellRegistered {
		g.Lon0 = math.Pi / float64(nlon)
	}
	return g
}

// NewRings returns a grid of rings at the given colatitudes (radians,
// ascending, in [0, pi]) with nlon longitudes each starting at lon0. It
// describes partial coverage in latitude and export grids at any step.
// It panics if the colatitudes are not ascending or out of range, or if
// nlon < 1; the slice is copied.
func NewRings(colat []float64, nlon int, lon0 float64) *Grid {
	if nlon < 1 || len(colat) == 0 {
		panic("sh: NewRings needs at least one ring and one longitude")
	}
	for i, c := range colat {
		if !(c >= 0 && c <= math.Pi) {
			panic(fmt.Sprintf("sh: ring %d colatitude %v outside [0, pi]", i, c))
		}
		if i > 0 && !(c > colat[i-1]) {
			panic(fmt.Sprintf("sh: ring colatitudes must be strictly ascending (ring %d: %v after %v)", i, c, colat[i-1]))
		}
	}
	return &Grid{Kind: Rings, Colat: append([]float64(nil), colat...), NLon: nlon, Lon0: lon0}
}

// AreaWeights returns, for each ring, the area on the unit sphere of the
// band of colatitudes it represents divided by NLon (the area of one
// sample's cell): the band runs from the midpoint with the previous ring to
// the midpoint with the next one, and to the pole (or to the ring itself,
// for a ring at a pole, half a cell beyond it otherwise) at the ends. For a
// cell-registered global grid this is the exact cell area
// (cos(theta_top) - cos(theta_bottom)) * 2 pi / nlon, the cos-latitude
// weighting that keeps a regular grid from over-weighting the poles.
func (g *Grid) AreaWeights() []float64 {
	n := g.NLat()
	w := make([]float64, n)
	for i := range n {
		var top, bot float64
		if i == 0 {
			if n > 1 {
				top = math.Max(0, g.Colat[0]-(g.Colat[1]-g.Colat[0])/2)
			}
			if g.Colat[0] < 1e-12 {
				top = 0
			}
		} else {
			top = (g.Colat[i-1] + g.Colat[i]) / 2
		}
		if i == n-1 {
			bot = math.Pi
			if n > 1 {
				bot = math.Min(math.Pi, g.Colat[n-1]+(g.Colat[n-1]-g.Colat[n-2])/2)
			}
			if g.Colat[n-1] > math.Pi-1e-12 {
				bot = math.Pi
			}
		} else {
			bot = (g.Colat[i] + g.Colat[i+1]) / 2
		}
		w[i] = (math.Cos(top) - math.Cos(bot)) * 2 * math.Pi / float64(g.NLon)
	}
	return w
}
