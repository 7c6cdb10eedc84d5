package contour

import (
	"errors"
	"fmt"
	"math"
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
	herm   []bool    // per band: Hermite crossings allowed on meridian edges
	sinLat []float64
	cosLat []float64
	sinLon []float64
	cosLon []float64
	bw, nb int
	bmin   []float64 // per band and block
	bmax   []float64
	barea  []float64
	apex   [3]float64
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
			}
			return
		}
		if math.Abs(math.Abs(lat)-90) <= poleTol {
			// All columns of a pole row are one point: use one value so
			// that no contour crosses the degenerate edges of the pole.
			s.lat = s.lat[:len(s.lat)-1]
			addRow(lat, src, true)
			if herm {
				copy(s.dp[len(s.dp)-n:], f.DLat[src*n:(src+1)*n])
			}
			return
		}
		s.v = append(s.v, f.Values[src*n:(src+1)*n]...)
		if herm {
			s.dv = append(s.dv, f.DLon[src*n:(src+1)*n]...)
			s.dp = append(s.dp, f.DLat[src*n:(src+1)*n]...)
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
				for _, x := range [2]float64{s.v[i*n+jj], s.v[(i+1)*n+jj]} {
					lo = math.Min(lo, x)
					hi = math.Max(hi, x)
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

// crossing is a contour vertex on a grid edge.
type crossing struct {
	lon, lat float64
	x        [3]float64
	// ge, gn: gradient east and north (per degree of arc), interpolated
	// along the edge; zero when derivatives are absent or near a pole.
	ge, gn float64
}

// hermiteRoot returns t in [0, 1] where the cubic Hermite interpolant of
// (f0, d0) at 0 and (f1, d1) at 1 equals zero, given f0 and f1 of opposite
// sign (or f0 == 0): safeguarded Newton from the linear estimate.
func hermiteRoot(f0, f1, d0, d1 float64) float64 {
	lo, hi := 0.0, 1.0
	t := f0 / (f0 - f1)
	up := f1 > f0 // the interpolant rises from 0 to 1
	for range 20 {
		t2, t3 := t*t, t*t*t
		p := (2*t3-3*t2+1)*f0 + (t3-2*t2+t)*d0 + (-2*t3+3*t2)*f1 + (t3-t2)*d1
		dp := (6*t2-6*t)*f0 + (3*t2-4*t+1)*d0 + (-6*t2+6*t)*f1 + (3*t2-2*t)*d1
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

// meridianCrossing returns the crossing of level c on the edge of column j
// between rows i and i+1.
func (s *Surface) meridianCrossing(i, j int, c float64) crossing {
	k0, k1 := i*s.n+j, (i+1)*s.n+j
	f0, f1 := s.v[k0]-c, s.v[k1]-c
	var t float64
	dl := s.lat[i+1] - s.lat[i]
	if s.herm[i] {
		t = hermiteRoot(f0, f1, s.dp[k0]*dl, s.dp[k1]*dl)
	} else {
		t = f0 / (f0 - f1)
	}
	lat := s.lat[i] + t*dl
	sp, cp := math.Sincos(lat * deg)
	x := crossing{lon: s.lon0 + float64(j)*s.dlon, lat: lat,
		x: [3]float64{cp * s.cosLon[j], cp * s.sinLon[j], sp}}
	if s.dv != nil && cp > 1e-3 {
		x.gn = s.dp[k0] + t*(s.dp[k1]-s.dp[k0])
		x.ge = (s.dv[k0] + t*(s.dv[k1]-s.dv[k0])) / cp
	}
	return x
}

// parallelCrossing returns the crossing of level c on the edge of row i
// between columns j and j+1 (periodic).
func (s *Surface) parallelCrossing(i, j int, c float64) crossing {
	j1 := (j + 1) % s.n
	k0, k1 := i*s.n+j, i*s.n+j1
	f0, f1 := s.v[k0]-c, s.v[k1]-c
	var t float64
	if s.dv != nil && s.cosLat[i] > 1e-12 {
		t = hermiteRoot(f0, f1, s.dv[k0]*s.dlon, s.dv[k1]*s.dlon)
	} else {
		t = f0 / (f0 - f1)
	}
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

// segment is an oriented piece of contour with the region below the level on
// its left, from the crossing on grid edge from to the one on grid edge to.
type segment struct {
	from, to int
	a, b     crossing
}

// cellSegments stores the segments of cell (i, j) at level c in out and
// returns their number (0, 1 or 2).
func (s *Surface) cellSegments(out *[2]segment, memo *edgeMemo, i, j int, c float64) int {
	n := s.n
	j1 := j + 1
	if j1 == n {
		j1 = 0
	}
	// Corners counter-clockwise seen from outside (east = right, north = up):
	// BL, BR, TR, TL.
	v := [4]float64{s.v[(i+1)*n+j], s.v[(i+1)*n+j1], s.v[i*n+j1], s.v[i*n+j]}
	var below [4]bool
	nb := 0
	for k, x := range v {
		below[k] = x < c
		if below[k] {
			nb++
		}
	}
	if nb == 0 || nb == 4 {
		return 0
	}
	var ks [4]int // crossed edges in counter-clockwise order
	nk := 0
	for k := range 4 {
		if below[k] != below[(k+1)&3] {
			ks[nk] = k
			nk++
		}
	}
	centreBelow := (v[0]+v[1]+v[2]+v[3])/4 < c
	ns := 0
	for q := 0; q < nk; q++ {
		k := ks[q]
		if !below[k] { // not a below -> above transition
			continue
		}
		var r int
		if nk == 2 || centreBelow {
			r = ks[(q+1)%nk]
		} else {
			r = ks[(q+nk-1)%nk]
		}
		g := &out[ns]
		g.from, g.a = s.cachedCrossing(memo, k, i, j, j1, c)
		g.to, g.b = s.cachedCrossing(memo, r, i, j, j1, c)
		ns++
	}
	return ns
}

// edgeMemo remembers the crossing on the right edge of the last cell, which
// is the left edge of the next cell in the same band.
type edgeMemo struct {
	id int
	x  crossing
}

func (s *Surface) cachedCrossing(memo *edgeMemo, k, i, j, j1 int, c float64) (int, crossing) {
	if k == 3 && memo.id == 2*(i*s.n+j) {
		return memo.id, memo.x
	}
	id, x := s.edgeCrossing(k, i, j, j1, c)
	if k == 1 {
		memo.id, memo.x = id, x
	}
	return id, x
}

// edgeCrossing returns the identifier and crossing of edge k (0 bottom,
// 1 right, 2 top, 3 left) of cell (i, j); j1 is the next column.
func (s *Surface) edgeCrossing(k, i, j, j1 int, c float64) (int, crossing) {
	n := s.n
	switch k {
	case 0:
		return 2*((i+1)*n+j) + 1, s.parallelCrossing(i+1, j, c)
	case 1:
		return 2 * (i*n + j1), s.meridianCrossing(i, j1, c)
	case 2:
		return 2*(i*n+j) + 1, s.parallelCrossing(i, j, c)
	}
	return 2 * (i*n + j), s.meridianCrossing(i, j, c)
}

// visit calls fn for every contour segment at level c and returns an
// estimate of the area below c (exact when there are no segments).
func (s *Surface) visit(c float64, fn func(g *segment)) (est float64, count int) {
	var out [2]segment
	memo := edgeMemo{id: -1}
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
				ns := s.cellSegments(&out, &memo, i, j, c)
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
// about four; the rings from Rings are the plain polygons.
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
