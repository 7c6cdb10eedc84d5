package contour

import (
	"errors"
	"fmt"
	"math"
	"sync"
)

// Field is a scalar field sampled on a longitude-latitude grid that is
// periodic in longitude: Values[i*NLon + j] is the value at latitude Lat[i]
// and longitude Lon0 + 360*j/NLon (degrees east).
//
// When Lat does not reach a pole, the grid is closed there by a pole node
// whose value is the mean of the nearest row (common practice for polar
// gaps); give the pole row explicitly (Lat = +-90, all values equal) when the
// field's value there is known.
type Field struct {
	// Lon0 is the longitude of column 0 in degrees east.
	Lon0 float64
	// NLon is the number of columns (at least 3).
	NLon int
	// Lat holds the row latitudes in degrees north, strictly monotone
	// (either north to south or south to north), within [-90, 90].
	Lat []float64
	// Values holds len(Lat)*NLon samples, row-major.
	Values []float64
	// DLon and DLat optionally hold the derivatives of the field with
	// respect to longitude and latitude, per degree, at the nodes. When both
	// are set, crossings along grid lines are found on the cubic Hermite
	// interpolant of each grid edge (error O(h^4)) instead of on the linear
	// interpolant (error O(h^2)).
	DLon, DLat []float64
	// DLon2 and DLat2 optionally hold the second derivatives with respect
	// to longitude and latitude, per degree squared, beside DLon and DLat.
	// Crossings are then found on the quintic Hermite interpolant of each
	// edge (error O(h^6)).
	DLon2, DLat2 []float64
	// Lines, when set with the derivatives, gives the field exactly along
	// the grid lines; crossings are then located on it (to rounding) rather
	// than on the interpolants, and the interpolants only screen edges for
	// crossings.
	Lines Lines
}

// Lines evaluates a field exactly along the lines of its grid, for
// example from the Fourier series of a band-limited field along each
// parallel and each meridian (great circle). Implementations must be safe
// for concurrent use if the Surface is used concurrently.
type Lines interface {
	// Meridian returns the field and its derivative per degree of latitude
	// on column j at latitude lat.
	Meridian(j int, lat float64) (f, dfdlat float64)
	// Parallel returns the field and its derivative per degree of
	// longitude on row i (an index into Field.Lat) at longitude lon.
	Parallel(i int, lon float64) (f, dfdlon float64)
}

// Surface is a Field prepared for repeated contouring at many levels. Its
// methods are safe for concurrent use.
type Surface struct {
	n      int       // columns
	lon0   float64   // degrees
	dlon   float64   // degrees
	lat    []float64 // rows, north to south, poles included
	v      []float64 // values, (len(lat))*n
	dv     []float64 // derivative per degree along longitude (nil if absent)
	dp     []float64 // derivative per degree along latitude (nil if absent)
	d2v    []float64 // second derivatives per degree^2 (nil if absent)
	d2p    []float64
	herm   []bool // per band: Hermite crossings allowed on meridian edges
	sinLat []float64
	cosLat []float64
	sinLon []float64
	cosLon []float64
	bw, nb int
	cmin   []float64 // per cell: bounds of the interpolants on its edges
	cmax   []float64
	bmin   []float64 // per band and block
	bmax   []float64
	barea  []float64
	apex   [3]float64
	lines  Lines
	pool   sync.Pool // *scratch
	src    []int     // row of Field.Lat for each row, -1 for an added pole
}

// ErrField is wrapped by the errors NewSurface returns for malformed fields.
var ErrField = errors.New("contour: malformed field")

const blockWidth = 4

// NewSurface validates f and prepares it for contouring. It copies what it
// keeps, so f may be reused afterwards.
func NewSurface(f Field) (*Surface, error) {
	n := f.NLon
	if n < 3 {
		return nil, fmt.Errorf("%w: NLon = %d, need at least 3 columns", ErrField, n)
	}
	nr := len(f.Lat)
	if nr < 1 {
		return nil, fmt.Errorf("%w: no latitude rows", ErrField)
	}
	if len(f.Values) != nr*n {
		return nil, fmt.Errorf("%w: %d values for %d rows x %d columns", ErrField, len(f.Values), nr, n)
	}
	herm := f.DLon != nil && f.DLat != nil
	if herm && (len(f.DLon) != nr*n || len(f.DLat) != nr*n) {
		return nil, fmt.Errorf("%w: derivative arrays must have %d values like Values", ErrField, nr*n)
	}
	quint := herm && f.DLon2 != nil && f.DLat2 != nil
	if quint && (len(f.DLon2) != nr*n || len(f.DLat2) != nr*n) {
		return nil, fmt.Errorf("%w: second-derivative arrays must have %d values like Values", ErrField, nr*n)
	}
	for i, la := range f.Lat {
		if !(la >= -90 && la <= 90) {
			return nil, fmt.Errorf("%w: latitude %g of row %d outside [-90, 90]", ErrField, la, i)
		}
		if i > 0 && !((f.Lat[1] < f.Lat[0]) == (la < f.Lat[i-1]) && la != f.Lat[i-1]) {
			return nil, fmt.Errorf("%w: latitudes must be strictly monotone (rows %d and %d)", ErrField, i-1, i)
		}
	}
	for i, x := range f.Values {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, fmt.Errorf("%w: value %d is %g; fill gaps before contouring", ErrField, i, x)
		}
	}
	// Rows north to south.
	order := make([]int, nr)
	for i := range order {
		order[i] = i
		if nr > 1 && f.Lat[1] > f.Lat[0] {
			order[i] = nr - 1 - i
		}
	}
	s := &Surface{n: n, lon0: f.Lon0, dlon: 360 / float64(n)}
	const poleTol = 1e-9
	var addRow func(lat float64, src int, pole bool)
	addRow = func(lat float64, src int, pole bool) {
		s.lat = append(s.lat, lat)
		if pole {
			s.src = append(s.src, -1)
		} else {
			s.src = append(s.src, src)
		}
		if pole {
			mean := 0.0
			for j := 0; j < n; j++ {
				mean += f.Values[src*n+j]
			}
			mean /= float64(n)
			for j := 0; j < n; j++ {
				s.v = append(s.v, mean)
				if herm {
					s.dv = append(s.dv, 0)
					s.dp = append(s.dp, 0)
				}
				if quint {
					s.d2v = append(s.d2v, 0)
					s.d2p = append(s.d2p, 0)
				}
			}
			return
		}
		if math.Abs(math.Abs(lat)-90) <= poleTol {
			// All columns of a pole row are one point: use one value so
			// that no contour crosses the degenerate edges of the pole.
			s.lat = s.lat[:len(s.lat)-1]
			s.src = s.src[:len(s.src)-1]
			addRow(lat, src, true)
			s.src[len(s.src)-1] = src
			if herm {
				copy(s.dp[len(s.dp)-n:], f.DLat[src*n:(src+1)*n])
			}
			if quint {
				copy(s.d2p[len(s.d2p)-n:], f.DLat2[src*n:(src+1)*n])
			}
			return
		}
		s.v = append(s.v, f.Values[src*n:(src+1)*n]...)
		if herm {
			s.dv = append(s.dv, f.DLon[src*n:(src+1)*n]...)
			s.dp = append(s.dp, f.DLat[src*n:(src+1)*n]...)
		}
		if quint {
			s.d2v = append(s.d2v, f.DLon2[src*n:(src+1)*n]...)
			s.d2p = append(s.d2p, f.DLat2[src*n:(src+1)*n]...)
		}
	}
	northAdded := f.Lat[order[0]] < 90-poleTol
	if northAdded {
		addRow(90, order[0], true)
	}
	for _, i := range order {
		addRow(f.Lat[i], i, false)
	}
	southAdded := f.Lat[order[nr-1]] > -90+poleTol
	if southAdded {
		addRow(-90, order[nr-1], true)
	}
	rows := len(s.lat)
	s.herm = make([]bool, rows-1)
	for i := range s.herm {
		s.herm[i] = herm && !(northAdded && i == 0) && !(southAdded && i == rows-2)
	}
	if !herm {
		s.dv, s.dp = nil, nil
	} else {
		s.lines = f.Lines
	}
	s.sinLat = make([]float64, rows)
	s.cosLat = make([]float64, rows)
	for i, la := range s.lat {
		s.sinLat[i], s.cosLat[i] = math.Sincos(la * deg)
	}
	s.sinLon = make([]float64, n)
	s.cosLon = make([]float64, n)
	for j := range n {
		s.sinLon[j], s.cosLon[j] = math.Sincos((s.lon0 + float64(j)*s.dlon) * deg)
	}
	// Per-cell bounds of the edge interpolants, to skip cells no contour
	// can enter.
	s.cmin = make([]float64, (rows-1)*n)
	s.cmax = make([]float64, (rows-1)*n)
	for i := 0; i < rows-1; i++ {
		for j := 0; j < n; j++ {
			j1 := (j + 1) % n
			e := math.Max(math.Max(s.slack(i, i, j, false), s.slack(i, i, j1, false)),
				math.Max(s.slack(i, i, j, true), s.slack(i+1, i, j, true)))
			lo := math.Min(math.Min(s.v[i*n+j], s.v[i*n+j1]), math.Min(s.v[(i+1)*n+j], s.v[(i+1)*n+j1]))
			hi := math.Max(math.Max(s.v[i*n+j], s.v[i*n+j1]), math.Max(s.v[(i+1)*n+j], s.v[(i+1)*n+j1]))
			s.cmin[i*n+j], s.cmax[i*n+j] = lo-e, hi+e
		}
	}
	s.bw = blockWidth
	s.nb = (n + s.bw - 1) / s.bw
	s.bmin = make([]float64, (rows-1)*s.nb)
	s.bmax = make([]float64, (rows-1)*s.nb)
	s.barea = make([]float64, (rows-1)*s.nb)
	for i := 0; i < rows-1; i++ {
		cell := (s.sinLat[i] - s.sinLat[i+1]) * s.dlon * deg
		for b := 0; b < s.nb; b++ {
			lo, hi := math.Inf(1), math.Inf(-1)
			j1 := min((b+1)*s.bw, n)
			for j := b * s.bw; j <= j1; j++ {
				jj := j % n
				for _, r := range [2]int{i, i + 1} {
					x, e := s.v[r*n+jj], s.slack(r, i, jj, j < j1)
					lo = math.Min(lo, x-e)
					hi = math.Max(hi, x+e)
				}
			}
			k := i*s.nb + b
			s.bmin[k], s.bmax[k] = lo, hi
			s.barea[k] = cell * float64(j1-b*s.bw)
		}
	}
	// An apex direction no grid line or symmetry axis passes near, so that
	// no contour is likely to come close to its antipode.
	a := [3]float64{0.3141592653589793, 0.2718281828459045, 0.9100000000000000}
	r := norm(a)
	s.apex = [3]float64{a[0] / r, a[1] / r, a[2] / r}
	return s, nil
}

// slack returns how far the Hermite interpolants of the edges at node
// (r, j) can leave the node values: 4/27 of the derivative terms (the
// largest magnitude of the Hermite basis functions h10 and h11), summed over
// the meridian edge of band i and, when par, the parallel edge eastward.
func (s *Surface) slack(r, i, j int, par bool) float64 {
	if s.dv == nil {
		return 0
	}
	n := s.n
	e := 0.0
	if s.herm[i] {
		dl := math.Abs(s.lat[i+1] - s.lat[i])
		e += 4.0 / 27 * dl * (math.Abs(s.dp[i*n+j]) + math.Abs(s.dp[(i+1)*n+j]))
	}
	if par && s.cosLat[r] > 1e-12 {
		j1 := (j + 1) % n
		e = math.Max(e, 4.0/27*s.dlon*(math.Abs(s.dv[r*n+j])+math.Abs(s.dv[r*n+j1])))
	}
	return e
}

// crossing is a contour vertex on a grid edge.
type crossing struct {
	lon, lat float64
	x        [3]float64
	// ge, gn: gradient east and north (per degree of arc), interpolated
	// along the edge; zero when derivatives are absent or near a pole.
	ge, gn float64
}

// hermite evaluates the cubic Hermite interpolant of (f0, d0) at 0 and
// (f1, d1) at 1, and its derivative, at t.
func hermite(f0, f1, d0, d1, t float64) (p, dp float64) {
	t2, t3 := t*t, t*t*t
	p = (2*t3-3*t2+1)*f0 + (t3-2*t2+t)*d0 + (-2*t3+3*t2)*f1 + (t3-t2)*d1
	dp = (6*t2-6*t)*f0 + (3*t2-4*t+1)*d0 + (-6*t2+6*t)*f1 + (3*t2-2*t)*d1
	return p, dp
}

// hermiteRoot returns t in [lo, hi] where the cubic Hermite interpolant is
// zero, given values of opposite sign (or zero) at lo and hi: safeguarded
// Newton from the linear estimate.
func hermiteRoot(f0, f1, d0, d1, lo, hi, tol float64) float64 {
	plo, phi := f0, f1
	if lo != 0 {
		plo, _ = hermite(f0, f1, d0, d1, lo)
	}
	if hi != 1 {
		phi, _ = hermite(f0, f1, d0, d1, hi)
	}
	up := phi > plo
	t := lo + (hi-lo)*plo/(plo-phi)
	if !(t >= lo && t <= hi) {
		t = 0.5 * (lo + hi)
	}
	for range 30 {
		p, dp := hermite(f0, f1, d0, d1, t)
		if p == 0 {
			return t
		}
		if (p < 0) == up {
			lo = t
		} else {
			hi = t
		}
		nt := t - p/dp
		if !(nt >= lo && nt <= hi) {
			nt = 0.5 * (lo + hi)
		}
		if math.Abs(nt-t) < tol {
			return nt
		}
		t = nt
	}
	return t
}

// edgeRoots returns the parameters (ascending) where the interpolant of an
// edge with values f0, f1 (level subtracted) and derivatives d0, d1 (per
// unit parameter) crosses zero, with "below" meaning negative: one root when
// the ends are on opposite sides, and two when both ends are on one side but
// the cubic dips across between them (a thin band or small region between
// grid nodes). herm false means linear interpolation.
func edgeRoots(f0, f1, d0, d1 float64, herm bool, tol float64) (n int, t [2]float64, split float64) {
	b0, b1 := f0 < 0, f1 < 0
	if b0 != b1 {
		if herm {
			return 1, [2]float64{hermiteRoot(f0, f1, d0, d1, 0, 1, tol)}, 1
		}
		return 1, [2]float64{f0 / (f0 - f1)}, 1
	}
	if !herm {
		return 0, t, 0
	}
	// Both ends on one side: can the cubic reach the other side?
	e := 4.0 / 27 * (math.Abs(d0) + math.Abs(d1))
	if b0 && math.Max(f0, f1)+e < 0 || !b0 && math.Min(f0, f1)-e >= 0 {
		return 0, t, 0
	}
	// Critical points: p'(t) = a t^2 + b t + c.
	a := 6*f0 + 3*d0 - 6*f1 + 3*d1
	b := -6*f0 - 4*d0 + 6*f1 - 2*d1
	c := d0
	var cr [2]float64
	nc := 0
	if math.Abs(a) < 1e-300 {
		if b != 0 {
			cr[0], nc = -c/b, 1
		}
	} else if disc := b*b - 4*a*c; disc >= 0 {
		q := -0.5 * (b + math.Copysign(math.Sqrt(disc), b))
		cr[0], nc = q/a, 1
		if q != 0 {
			cr[1], nc = c/q, 2
		}
	}
	for k := 0; k < nc; k++ {
		tc := cr[k]
		if !(tc > 0 && tc < 1) {
			continue
		}
		if p, _ := hermite(f0, f1, d0, d1, tc); (p < 0) != b0 {
			return 2, [2]float64{hermiteRoot(f0, f1, d0, d1, 0, tc, tol), hermiteRoot(f0, f1, d0, d1, tc, 1, tol)}, tc
		}
	}
	return 0, t, 0
}

// exactRoot returns the zero of the exact edge function at(t) (value minus
// level and derivative per unit parameter) in [lo, hi], starting from the
// interpolant's estimate t. The estimate is fourth-order accurate, so one
// Newton step leaves an error of order its square; further steps are taken
// only while the step exceeds 1e-4 of the edge (poor starts, as in dips).
func exactRoot(at func(t float64) (f, df float64), t, lo, hi float64) float64 {
	for range 6 {
		f, df := at(t)
		if f == 0 || df == 0 {
			return t
		}
		nt := math.Min(hi, math.Max(lo, t-f/df))
		if math.Abs(nt-t) < 1e-4 {
			return nt
		}
		t = nt
	}
	return t
}

// exactCut turns the interpolant's roots ts (n of them, the two of a dip
// split at split) into roots of the exact edge function at. A dip that the
// exact function does not make (its value at the split is on the side of
// the ends) is dropped.
func exactCut(at func(t float64) (f, df float64), n int, ts [2]float64, split float64) (int, [2]float64) {
	switch n {
	case 1:
		ts[0] = exactRoot(at, ts[0], 0, 1)
	case 2:
		f0, _ := at(0)
		fs, _ := at(split)
		if (fs < 0) == (f0 < 0) {
			return 0, ts
		}
		ts[0], ts[1] = exactRoot(at, ts[0], 0, split), exactRoot(at, ts[1], split, 1)
	}
	return n, ts
}

// rootTol is the tolerance in edge parameter of the interpolant's roots:
// loose when Lines refines them, to rounding otherwise.
func (s *Surface) rootTol() float64 {
	if s.lines != nil || s.d2v != nil {
		return 1e-5 // refined afterwards (quintic or exact lines)
	}
	return 1e-12
}

// quintic holds the polynomial coefficients c0..c5 of the quintic Hermite
// interpolant of (f, f', f”) at both ends of [0, 1]:
//
//	c3 = -10 f0 - 6 d0 - 3/2 s0 + 10 f1 - 4 d1 + 1/2 s1
//	c4 =  15 f0 + 8 d0 + 3/2 s0 - 15 f1 + 7 d1 - s1
//	c5 =  -6 f0 - 3 d0 - 1/2 s0 +  6 f1 - 3 d1 + 1/2 s1
//
// (c0 = f0, c1 = d0, c2 = s0/2), from the basis functions
// 1 - 10t^3 + 15t^4 - 6t^5, t - 6t^3 + 8t^4 - 3t^5, (t^2 - 3t^3 + 3t^4 - t^5)/2
// and their mirror images (common practice).
type quintic [6]float64

func newQuintic(f0, f1, d0, d1, s0, s1 float64) quintic {
	return quintic{f0, d0, s0 / 2,
		-10*f0 - 6*d0 - 1.5*s0 + 10*f1 - 4*d1 + 0.5*s1,
		15*f0 + 8*d0 + 1.5*s0 - 15*f1 + 7*d1 - s1,
		-6*f0 - 3*d0 - 0.5*s0 + 6*f1 - 3*d1 + 0.5*s1}
}

func (q *quintic) at(t float64) (p, dp float64) {
	p = q[0] + t*(q[1]+t*(q[2]+t*(q[3]+t*(q[4]+t*q[5]))))
	dp = q[1] + t*(2*q[2]+t*(3*q[3]+t*(4*q[4]+t*5*q[5])))
	return p, dp
}

// root returns the zero of q in [lo, hi], where q has opposite signs (or
// zero) at the ends: Newton's method from t safeguarded by bisection.
func (q *quintic) root(t, lo, hi float64) float64 {
	plo, _ := q.at(lo)
	up := plo < 0
	for range 30 {
		p, dp := q.at(t)
		if p == 0 {
			return t
		}
		if (p < 0) == up {
			lo = t
		} else {
			hi = t
		}
		nt := t - p/dp
		if !(nt >= lo && nt <= hi) {
			nt = 0.5 * (lo + hi)
		}
		if math.Abs(nt-t) < 1e-12 {
			return nt
		}
		t = nt
	}
	return t
}

// cut turns the cubic's roots ts (n of them, a dip split at split) into
// roots of the quintic; a dip the quintic does not make is dropped.
func (q *quintic) cut(n int, ts [2]float64, split float64) (int, [2]float64) {
	switch n {
	case 1:
		ts[0] = q.root(ts[0], 0, 1)
	case 2:
		fs, _ := q.at(split)
		if (fs < 0) == (q[0] < 0) {
			return 0, ts
		}
		ts[0], ts[1] = q.root(ts[0], 0, split), q.root(ts[1], split, 1)
	}
	return n, ts
}

// meridianAt returns the crossing at parameter t on the edge of column j
// between rows i (t = 0) and i+1 (t = 1).
func (s *Surface) meridianAt(i, j int, t float64) crossing {
	k0, k1 := i*s.n+j, (i+1)*s.n+j
	lat := s.lat[i] + t*(s.lat[i+1]-s.lat[i])
	sp, cp := math.Sincos(lat * deg)
	x := crossing{lon: s.lon0 + float64(j)*s.dlon, lat: lat,
		x: [3]float64{cp * s.cosLon[j], cp * s.sinLon[j], sp}}
	if s.dv != nil && cp > 1e-3 {
		x.gn = s.dp[k0] + t*(s.dp[k1]-s.dp[k0])
		x.ge = (s.dv[k0] + t*(s.dv[k1]-s.dv[k0])) / cp
	}
	return x
}

// next returns the column east of j (periodic).
func (s *Surface) next(j int) int {
	if j+1 == s.n {
		return 0
	}
	return j + 1
}

// parallelAt returns the crossing at parameter t on the edge of row i
// between columns j (t = 0) and j+1 (t = 1, periodic).
func (s *Surface) parallelAt(i, j int, t float64) crossing {
	j1 := s.next(j)
	k0, k1 := i*s.n+j, i*s.n+j1
	lon := s.lon0 + (float64(j)+t)*s.dlon
	sl, cl := math.Sincos(lon * deg)
	x := crossing{lon: lon, lat: s.lat[i],
		x: [3]float64{s.cosLat[i] * cl, s.cosLat[i] * sl, s.sinLat[i]}}
	if s.dv != nil && s.cosLat[i] > 1e-3 {
		x.gn = s.dp[k0] + t*(s.dp[k1]-s.dp[k0])
		x.ge = (s.dv[k0] + t*(s.dv[k1]-s.dv[k0])) / s.cosLat[i]
	}
	return x
}

// edgeCut holds the crossings of one grid edge, in ascending parameter.
type edgeCut struct {
	id int // base identifier of the edge
	n  int
	x  [2]crossing
}

// meridianCut returns the crossings of level c on the edge of column j
// between rows i and i+1.
func (s *Surface) meridianCut(i, j int, c float64) edgeCut {
	k0, k1 := i*s.n+j, (i+1)*s.n+j
	e := edgeCut{id: 2 * (i*s.n + j)}
	var d0, d1 float64
	if s.herm[i] {
		dl := s.lat[i+1] - s.lat[i]
		d0, d1 = s.dp[k0]*dl, s.dp[k1]*dl
	}
	f0, f1 := s.v[k0]-c, s.v[k1]-c
	var n int
	var ts [2]float64
	var split float64
	if s.d2p != nil && s.herm[i] && (f0 < 0) != (f1 < 0) {
		// One crossing: the quintic's root directly, from the linear
		// estimate (the cubic's root would only be a better start).
		dl := s.lat[i+1] - s.lat[i]
		q := newQuintic(f0, f1, d0, d1, s.d2p[k0]*dl*dl, s.d2p[k1]*dl*dl)
		n, ts[0], split = 1, q.root(f0/(f0-f1), 0, 1), 1
	} else {
		n, ts, split = edgeRoots(f0, f1, d0, d1, s.herm[i], s.rootTol())
		if s.d2p != nil && s.herm[i] && n > 0 {
			dl := s.lat[i+1] - s.lat[i]
			q := newQuintic(f0, f1, d0, d1, s.d2p[k0]*dl*dl, s.d2p[k1]*dl*dl)
			n, ts = q.cut(n, ts, split)
		}
	}
	e.n = n
	if s.lines != nil && n > 0 {
		dl := s.lat[i+1] - s.lat[i]
		n, ts = exactCut(func(t float64) (float64, float64) {
			v, dlat := s.lines.Meridian(j, s.lat[i]+t*dl)
			return v - c, dlat * dl
		}, n, ts, split)
	}
	for q := 0; q < n; q++ {
		e.x[q] = s.meridianAt(i, j, ts[q])
	}
	return e
}

// parallelCut returns the crossings of level c on the edge of row i between
// columns j and j+1.
func (s *Surface) parallelCut(i, j int, c float64) edgeCut {
	j1 := s.next(j)
	k0, k1 := i*s.n+j, i*s.n+j1
	e := edgeCut{id: 2*(i*s.n+j) + 1}
	herm := s.dv != nil && s.cosLat[i] > 1e-12
	var d0, d1 float64
	if herm {
		d0, d1 = s.dv[k0]*s.dlon, s.dv[k1]*s.dlon
	}
	f0, f1 := s.v[k0]-c, s.v[k1]-c
	var n int
	var ts [2]float64
	var split float64
	if s.d2v != nil && herm && (f0 < 0) != (f1 < 0) {
		q := newQuintic(f0, f1, d0, d1, s.d2v[k0]*s.dlon*s.dlon, s.d2v[k1]*s.dlon*s.dlon)
		n, ts[0], split = 1, q.root(f0/(f0-f1), 0, 1), 1
	} else {
		n, ts, split = edgeRoots(f0, f1, d0, d1, herm, s.rootTol())
		if s.d2v != nil && herm && n > 0 {
			q := newQuintic(f0, f1, d0, d1, s.d2v[k0]*s.dlon*s.dlon, s.d2v[k1]*s.dlon*s.dlon)
			n, ts = q.cut(n, ts, split)
		}
	}
	e.n = n
	if s.lines != nil && herm && n > 0 && s.src[i] >= 0 {
		r := s.src[i]
		n, ts = exactCut(func(t float64) (float64, float64) {
			v, dlon := s.lines.Parallel(r, s.lon0+(float64(j)+t)*s.dlon)
			return v - c, dlon * s.dlon
		}, n, ts, split)
	}
	for q := 0; q < n; q++ {
		e.x[q] = s.parallelAt(i, j, ts[q])
	}
	return e
}

// edgeValue returns the interpolant of the field at parameter t of the
// meridian edge of column j between rows i and i+1, or of the parallel edge
// of row i between columns j and j+1 (par).
func (s *Surface) edgeValue(par bool, i, j int, t float64) float64 {
	n := s.n
	var k0, k1 int
	var d0, d1 float64
	herm := false
	if par {
		k0, k1 = i*n+j, i*n+(j+1)%n
		if s.dv != nil && s.cosLat[i] > 1e-12 {
			herm, d0, d1 = true, s.dv[k0]*s.dlon, s.dv[k1]*s.dlon
		}
	} else {
		k0, k1 = i*n+j, (i+1)*n+j
		if s.herm[i] {
			dl := s.lat[i+1] - s.lat[i]
			herm, d0, d1 = true, s.dp[k0]*dl, s.dp[k1]*dl
		}
	}
	if !herm {
		return s.v[k0] + t*(s.v[k1]-s.v[k0])
	}
	p, _ := hermite(s.v[k0], s.v[k1], d0, d1, t)
	return p
}

// coons returns the Coons patch of cell (i, j) (bilinearly blended edge
// interpolants, Coons 1967) at cell coordinates u (west 0 to east 1) and
// v (south 0 to north 1).
func (s *Surface) coons(i, j, j1 int, u, v float64) float64 {
	n := s.n
	bl, br, tr, tl := s.v[(i+1)*n+j], s.v[(i+1)*n+j1], s.v[i*n+j1], s.v[i*n+j]
	pb := s.edgeValue(true, i+1, j, u)
	pt := s.edgeValue(true, i, j, u)
	pl := s.edgeValue(false, i, j, 1-v)
	pr := s.edgeValue(false, i, j1, 1-v)
	b := (1-u)*(1-v)*bl + u*(1-v)*br + u*v*tr + (1-u)*v*tl
	return (1-v)*pb + v*pt + (1-u)*pl + u*pr - b
}

// segment is an oriented piece of contour with the region below the level on
// its left, from the crossing with identifier from to the one with
// identifier to (identifiers are 2*edge + index of the crossing on the edge).
type segment struct {
	from, to int
	a, b     crossing
}

// scratch holds the cuts of the bottom edges of the previous and current
// band, so that each parallel edge is cut once per level. Stamps carry a
// per-call generation so that stale entries never match.
type scratch struct {
	gen   int64
	cut   [2][]edgeCut
	stamp [2][]int64
}

var scratchGen struct {
	sync.Mutex
	n int64
}

func (s *Surface) getScratch() *scratch {
	sc, _ := s.pool.Get().(*scratch)
	if sc == nil {
		sc = &scratch{}
		for k := range 2 {
			sc.cut[k] = make([]edgeCut, s.n)
			sc.stamp[k] = make([]int64, s.n)
		}
	}
	scratchGen.Lock()
	scratchGen.n += int64(len(s.lat)) + 2
	sc.gen = scratchGen.n
	scratchGen.Unlock()
	return sc
}

// edgeMemo remembers the cut of the right edge of the last cell, which is
// the left edge of the next cell in the same band.
type edgeMemo struct {
	ok  bool
	cut edgeCut
}

// cellSegments stores the segments of cell (i, j) at level c in out and
// returns their number (0 to 4).
func (s *Surface) cellSegments(out *[4]segment, memo *edgeMemo, sc *scratch, i, j int, c float64) int {
	n := s.n
	j1 := j + 1
	if j1 == n {
		j1 = 0
	}
	// Corners counter-clockwise seen from outside (east = right, north = up):
	// BL, BR, TR, TL; edge k joins corner k to corner k+1.
	v := [4]float64{s.v[(i+1)*n+j], s.v[(i+1)*n+j1], s.v[i*n+j1], s.v[i*n+j]}
	var cuts [4]edgeCut
	cur, prev := i&1, 1-i&1
	cuts[0] = s.parallelCut(i+1, j, c)
	sc.cut[cur][j], sc.stamp[cur][j] = cuts[0], sc.gen+int64(i)+1
	cuts[1] = s.meridianCut(i, j1, c)
	if sc.stamp[prev][j] == sc.gen+int64(i) {
		cuts[2] = sc.cut[prev][j] // the bottom edge of the cell above
	} else {
		cuts[2] = s.parallelCut(i, j, c)
	}
	if memo.ok && memo.cut.id == 2*(i*n+j) {
		cuts[3] = memo.cut
	} else {
		cuts[3] = s.meridianCut(i, j, c)
	}
	memo.ok, memo.cut = true, cuts[1]
	// Crossings in counter-clockwise order. Edges 1 (BR -> TR) and 2
	// (TR -> TL) run against their parameter.
	type cx struct {
		id   int
		x    *crossing
		down bool // below -> above when walking counter-clockwise
	}
	var ring [8]cx
	nr := 0
	uc, vc := 0.0, 0.0 // mean crossing position in cell coordinates
	for k := 0; k < 4; k++ {
		e := &cuts[k]
		below := v[k] < c
		for q := 0; q < e.n; q++ {
			r := q
			if k == 1 || k == 2 {
				r = e.n - 1 - q
			}
			ring[nr] = cx{2*e.id + r, &e.x[r], below}
			below = !below
			nr++
			if k == 0 || k == 2 {
				uc += (e.x[r].lon - s.lon0 - float64(j)*s.dlon) / s.dlon
				if k == 2 {
					vc++
				}
			} else {
				if k == 1 {
					uc++
				}
				vc += (e.x[r].lat - s.lat[i+1]) / (s.lat[i] - s.lat[i+1])
			}
		}
	}
	if nr == 0 {
		return 0
	}
	// Two or four crossings in the usual cases; with four or more the
	// pairing follows the side of the cell's interpolant at the mean of the
	// crossings (the centre for an ordinary saddle, the middle of a thin
	// band that dips between the nodes).
	centreBelow := true
	if nr > 2 {
		centreBelow = s.coons(i, j, j1, uc/float64(nr), vc/float64(nr)) < c
	}
	ns := 0
	for q := 0; q < nr; q++ {
		if !ring[q].down {
			continue
		}
		var r int
		if nr == 2 || centreBelow {
			if r = q + 1; r == nr {
				r = 0
			}
		} else {
			if r = q - 1; r < 0 {
				r = nr - 1
			}
		}
		out[ns] = segment{from: ring[q].id, to: ring[r].id, a: *ring[q].x, b: *ring[r].x}
		ns++
	}
	return ns
}

// visit calls fn for every contour segment at level c and returns an
// estimate of the area below c (exact when there are no segments).
func (s *Surface) visit(c float64, fn func(g *segment)) (est float64, count int) {
	var out [4]segment
	var memo edgeMemo
	sc := s.getScratch()
	defer s.pool.Put(sc)
	for i := 0; i < len(s.lat)-1; i++ {
		for b := 0; b < s.nb; b++ {
			k := i*s.nb + b
			if s.bmax[k] < c {
				est += s.barea[k]
				continue
			}
			if s.bmin[k] >= c {
				continue
			}
			est += 0.5 * s.barea[k]
			for j := b * s.bw; j < min((b+1)*s.bw, s.n); j++ {
				if k := i*s.n + j; s.cmax[k] < c || s.cmin[k] >= c {
					continue
				}
				ns := s.cellSegments(&out, &memo, sc, i, j, c)
				for q := 0; q < ns; q++ {
					fn(&out[q])
				}
				count += ns
			}
		}
	}
	return est, count
}

// AreaBelow returns the area, in steradians on the unit sphere, of the region
// where the interpolated field is below level. The boundary is the contour
// with straight (geodesic) pieces across each cell and crossings on the grid
// edges; the area is the signed sum of the geodesic triangles fanned from a
// fixed apex over the oriented pieces, so no rings need assembling. With
// derivatives, each piece also gets the area between its chord and the
// curved contour (see Field), which raises the order of accuracy from two to
// about four, and edges are screened for a pair of crossings (a band or
// region that dips between two nodes); with Lines the crossings are exact.
// A region inside one cell that cuts none of its edges is not seen (see
// CellBelow). The rings from Rings are the plain polygons.
func (s *Surface) AreaBelow(level float64) float64 {
	sum := 0.0
	est, count := s.visit(level, func(g *segment) {
		sum += triangle(s.apex, g.a.x, g.b.x) + bulge(g)
	})
	if count == 0 {
		if est > 2*math.Pi {
			return 4 * math.Pi
		}
		return 0
	}
	r := mod4pi(sum)
	// Resolve the 0 / 4 pi ambiguity of the modulus with the coarse estimate.
	if r > 2*math.Pi && est < math.Pi {
		return 0
	}
	if r < 2*math.Pi && est > 3*math.Pi {
		return 4 * math.Pi
	}
	return r
}

// bulge returns the area between the chord of a segment and the contour it
// approximates, s^2 * dpsi / 12 for an arc of length s that turns by dpsi
// (the circular-segment area R^2 (theta - sin theta) / 2 to leading order),
// positive when the contour bends towards the region below. The turning is
// the change of the contour direction, perpendicular to the interpolated
// gradient, relative to the east-north frame, plus the frame's own turning
// dlon * sin(lat) along the path (the geodesic curvature of a parallel is
// tan(lat)). It is zero where derivatives are absent.
func bulge(g *segment) float64 {
	a, b := &g.a, &g.b
	if (a.ge == 0 && a.gn == 0) || (b.ge == 0 && b.gn == 0) {
		return 0
	}
	// Tangents (east, north) = (-gn, ge); turning angle from a to b.
	d := math.Atan2(a.ge*b.gn-a.gn*b.ge, a.gn*b.gn+a.ge*b.ge)
	dlon := b.lon - a.lon
	if dlon > 180 {
		dlon -= 360
	} else if dlon < -180 {
		dlon += 360
	}
	dlon *= deg
	d += dlon * 0.5 * (a.x[2] + b.x[2]) // sin(lat) at the middle, to O(h^2)
	dx := [3]float64{b.x[0] - a.x[0], b.x[1] - a.x[1], b.x[2] - a.x[2]}
	return dot(dx, dx) * d / 12
}

// FractionBelow returns AreaBelow(level) / (4 pi), the fraction of the
// sphere below level.
func (s *Surface) FractionBelow(level float64) float64 {
	return s.AreaBelow(level) / (4 * math.Pi)
}

// Rings returns the closed contour rings at level, oriented with the region
// below the level on their left (exterior rings counter-clockwise seen from
// outside the sphere, holes clockwise). Longitudes lie in
// [Lon0, Lon0 + 360]; a ring that crosses the seam jumps by about 360
// degrees between two consecutive vertices, and a ring around a pole runs
// once through all longitudes. Consecutive duplicate vertices are removed and
// rings left with fewer than three vertices are dropped.
func (s *Surface) Rings(level float64) [][][2]float64 {
	type link struct {
		from, to int
		lon, lat float64
	}
	segs := make([]link, 0, 256)
	s.visit(level, func(g *segment) { segs = append(segs, link{g.from, g.to, g.a.lon, g.a.lat}) })
	next := make(map[int]int, len(segs))
	for k, g := range segs {
		next[g.from] = k
	}
	used := make([]bool, len(segs))
	var rings [][][2]float64
	for k0 := range segs {
		if used[k0] {
			continue
		}
		var ring [][2]float64
		k := k0
		for !used[k] {
			used[k] = true
			p := [2]float64{segs[k].lon, segs[k].lat}
			if m := len(ring); m == 0 || math.Abs(ring[m-1][0]-p[0]) > 1e-12 || math.Abs(ring[m-1][1]-p[1]) > 1e-12 {
				ring = append(ring, p)
			}
			nk, ok := next[segs[k].to]
			if !ok {
				break // cannot happen on a closed grid; keep what we have
			}
			k = nk
		}
		if m := len(ring); m > 1 && ring[0] == ring[m-1] {
			ring = ring[:m-1]
		}
		if len(ring) >= 3 {
			rings = append(rings, ring)
		}
	}
	return rings
}

// Below returns the rings of the region where f is below level; see
// Surface.Rings.
func Below(f Field, level float64) ([][][2]float64, error) {
	s, err := NewSurface(f)
	if err != nil {
		return nil, err
	}
	return s.Rings(level), nil
}

// cellAt returns the band and column of the grid cell containing (lon, lat)
// in degrees.
func (s *Surface) cellAt(lon, lat float64) (i, j int) {
	x := math.Mod(lon-s.lon0, 360)
	if x < 0 {
		x += 360
	}
	j = min(int(x/s.dlon), s.n-1)
	lo, hi := 0, len(s.lat)-2 // rows north to south; find lat[i] >= lat >= lat[i+1]
	for lo < hi {
		m := (lo + hi) / 2
		if s.lat[m+1] > lat {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo, j
}

// CellBelow reports, for the grid cell that contains (lon, lat) in degrees,
// how many of its four corners are below level and whether the contour at
// level crosses one of its edges (as screened by the edge interpolants). A
// region smaller than a cell that cuts none of its edges (a cell with no
// corner below and no cut around a minimum) is invisible to AreaBelow and
// Rings; callers that know such a region's extremum (position, value,
// curvature) can add it themselves.
func (s *Surface) CellBelow(lon, lat, level float64) (corners int, cut bool) {
	i, j := s.cellAt(lon, lat)
	j1 := (j + 1) % s.n
	for _, k := range [4]int{i*s.n + j, i*s.n + j1, (i+1)*s.n + j, (i+1)*s.n + j1} {
		if s.v[k] < level {
			corners++
		}
	}
	cut = s.parallelCut(i+1, j, level).n > 0 || s.parallelCut(i, j, level).n > 0 ||
		s.meridianCut(i, j, level).n > 0 || s.meridianCut(i, j1, level).n > 0
	return corners, cut
}

// CellArea returns the area in steradians of the grid cell that contains
// (lon, lat) in degrees.
func (s *Surface) CellArea(lon, lat float64) float64 {
	i, _ := s.cellAt(lon, lat)
	return (s.sinLat[i] - s.sinLat[i+1]) * s.dlon * deg
}
