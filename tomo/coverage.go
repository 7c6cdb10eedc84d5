package tomo

import (
	"fmt"
	"math"
)

// rowWeights returns, for each latitude row of an evenly spaced grid, the
// fraction of the sphere's area in one cell of the row when the row's
// nlon cells share the band between lat-dlat/2 and lat+dlat/2 (clipped to
// the poles): (sin(north) - sin(south)) / 2 per row, to be divided by the
// number of longitudes. The area of a latitude band between phi1 and phi2
// on the unit sphere is 2*pi*(sin phi2 - sin phi1) (common practice).
func rowWeights(lat []float64) []float64 {
	w := make([]float64, len(lat))
	d := 180.0
	if len(lat) > 1 {
		d = (lat[len(lat)-1] - lat[0]) / float64(len(lat)-1)
	}
	rad := math.Pi / 180
	for j, v := range lat {
		n := math.Min(90, v+d/2)
		s := math.Max(-90, v-d/2)
		w[j] = (math.Sin(n*rad) - math.Sin(s*rad)) / 2
	}
	return w
}

// weightedMean returns the area-weighted mean of a lat-major plane of
// values over the valid points (valid nil: all), and false when none is
// valid.
func weightedMean(vals []float64, valid []bool, lat []float64, nlon int) (float64, bool) {
	w := rowWeights(lat)
	var sum, wsum float64
	for j := range lat {
		for i := 0; i < nlon; i++ {
			s := j*nlon + i
			if valid == nil || valid[s] {
				sum += w[j] * vals[s]
				wsum += w[j]
			}
		}
	}
	if wsum == 0 {
		return 0, false
	}
	return sum / wsum, true
}

// Coverage returns the fraction of the sphere's area covered by the valid
// points of the layer, each point standing for its cell (between
// lat -+ dlat/2, clipped to the poles, and lon -+ dlon/2). Parts of the
// sphere outside the grid's latitude range count as uncovered. The result
// is in [0, 1]. A regional grid (longitudes not all round the globe) is
// measured against the whole sphere too.
func (l *Layer) Coverage() float64 {
	w := rowWeights(l.Lat)
	nlon := len(l.Lon)
	cell := lonStep(l.Lon) / 360 // fraction of a band in one longitude cell
	var c float64
	for j := range l.Lat {
		n := 0
		for i := 0; i < nlon; i++ {
			if l.Valid == nil || l.Valid[j*nlon+i] {
				n++
			}
		}
		c += w[j] * float64(n) * cell
	}
	return math.Min(1, c)
}

// DegreeLimit is an estimate of the largest spherical-harmonic degree a
// layer's sampling and coverage support.
type DegreeLimit struct {
	// Lmax is the smaller of Nyquist and GapLimit.
	Lmax int
	// Nyquist is floor(180/Delta) with Delta the coarser of the longitude
	// and latitude spacings in degrees: a degree-l harmonic has a
	// half-wavelength of 180/l degrees, which needs at least one sample
	// (the sampling theorem; common practice).
	Nyquist int
	// Gap is the angular diameter in degrees of the largest region without
	// data (twice the largest distance from a point without data, or from
	// an uncovered polar cap, to the nearest valid point), 0 when the grid
	// has no gaps.
	Gap float64
	// GapLimit is floor(180/Gap): structure smaller than the largest gap
	// is not constrained by the data (common practice). It equals Nyquist
	// when there is no gap.
	GapLimit int
	// Reason explains which limit applies, for the user.
	Reason string
}

// maxGapWork bounds the work (pairs of points) of the gap search; larger
// grids are searched on a coarser copy.
const maxGapWork = 20_000_000

// SafeDegree estimates the largest spherical-harmonic degree the layer
// supports, from its grid spacing and from its largest gap in coverage;
// see DegreeLimit. The gap is measured on the global grid that extends the
// layer's latitude lattice to the poles and its longitude lattice round the
// globe, so uncovered polar caps and the outside of a regional grid count.
// Large grids with many missing points are searched on a coarser copy
// (a coarse cell is valid when any of its points is) and the coarse cell's
// diagonal is added to the gap, which errs towards a lower degree.
// SafeDegree panics if the layer's Lon, Lat and Values do not form a grid
// or Lat does not ascend.
func SafeDegree(l *Layer) DegreeLimit {
	if len(l.Lon) == 0 || len(l.Lat) == 0 || len(l.Values) != len(l.Lon)*len(l.Lat) {
		panic("tomo: SafeDegree of a layer without a complete grid")
	}
	dlon := lonStep(l.Lon)
	dlat := 180.0
	if len(l.Lat) > 1 {
		dlat = (l.Lat[len(l.Lat)-1] - l.Lat[0]) / float64(len(l.Lat)-1)
	}
	if !(dlat > 0) {
		panic("tomo: SafeDegree needs ascending latitudes")
	}
	delta := math.Max(dlon, dlat)
	lim := DegreeLimit{Nyquist: int(math.Floor(180/delta + 1e-9))}

	// Extend the latitude lattice to the poles.
	var lats []float64
	for v := l.Lat[0]; v >= -90-1e-9; v -= dlat {
		lats = append([]float64{v}, lats...)
	}
	lats = lats[:len(lats)-1]
	south := len(lats)
	lats = append(lats, l.Lat...)
	for v := l.Lat[len(l.Lat)-1] + dlat; v <= 90+1e-9; v += dlat {
		lats = append(lats, v)
	}
	// Extend the longitude lattice round the globe (for regional grids).
	lnlon := len(l.Lon)
	nlon := max(lnlon, int(math.Round(360/dlon)))
	lonDeg := make([]float64, nlon)
	for i := range lonDeg {
		lonDeg[i] = l.Lon[0] + float64(i)*dlon
	}
	valid := make([]bool, len(lats)*nlon)
	for j := range l.Lat {
		for i := 0; i < lnlon; i++ {
			valid[(south+j)*nlon+i] = l.Valid == nil || l.Valid[j*lnlon+i]
		}
	}
	pad := 0.0
	holes, edges := gapCounts(valid, len(lats), nlon)
	gapped := holes > 0
	// Coarsen until the search is affordable.
	for f := 2; float64(holes)*float64(edges) > maxGapWork && f <= 64; f *= 2 {
		lats, lonDeg, valid, _ = coarsen(lats, lonDeg, valid, 2)
		pad = math.Hypot(dlat*float64(f), dlon*float64(f))
		holes, edges = gapCounts(valid, len(lats), len(lonDeg))
	}
	gap := largestGap(lats, lonDeg, valid)
	if gapped {
		gap += pad
	}
	lim.Gap = gap
	lim.GapLimit = lim.Nyquist
	if gap > 0 {
		lim.GapLimit = int(math.Floor(180 / gap))
	}
	lim.Lmax = min(lim.Nyquist, lim.GapLimit)
	if gap > 0 && lim.GapLimit < lim.Nyquist {
		lim.Reason = fmt.Sprintf("the largest gap in coverage is about %.3g degrees across, which limits the degree to 180/%.3g = %d (the grid spacing alone would allow %d)", gap, gap, lim.GapLimit, lim.Nyquist)
	} else {
		lim.Reason = fmt.Sprintf("the grid spacing of %g degrees limits the degree to 180/%g = %d", delta, delta, lim.Nyquist)
	}
	return lim
}

// gapCounts returns the number of points without data and the number of
// valid points next to one (the only candidates for a nearest valid point).
func gapCounts(valid []bool, nlat, nlon int) (holes, edges int) {
	for j := 0; j < nlat; j++ {
		for i := 0; i < nlon; i++ {
			if !valid[j*nlon+i] {
				holes++
			} else if isEdge(valid, nlat, nlon, j, i) {
				edges++
			}
		}
	}
	return holes, edges
}

// isEdge reports whether the point (j, i) has a neighbour without data
// (longitude wraps around; rows beyond the poles do not exist).
func isEdge(valid []bool, nlat, nlon, j, i int) bool {
	for _, d := range [4][2]int{{0, 1}, {0, -1}, {1, 0}, {-1, 0}} {
		jj, ii := j+d[0], (i+d[1]+nlon)%nlon
		if jj >= 0 && jj < nlat && !valid[jj*nlon+ii] {
			return true
		}
	}
	return false
}

// lonStep returns the longitude spacing of an evenly spaced axis in
// degrees, or 360 for a single longitude.
func lonStep(lon []float64) float64 {
	if len(lon) < 2 {
		return 360
	}
	return (lon[len(lon)-1] - lon[0]) / float64(len(lon)-1)
}

// coarsen merges f x f blocks of points; a block is valid when any of its
// points is, and sits at the mean coordinates of its points.
func coarsen(lat, lon []float64, valid []bool, f int) ([]float64, []float64, []bool, int) {
	nlat, nlon := len(lat), len(lon)
	cl, cn := (nlat+f-1)/f, (nlon+f-1)/f
	clat := make([]float64, cl)
	for J := range clat {
		s, n := 0.0, 0
		for j := J * f; j < min(nlat, J*f+f); j++ {
			s += lat[j]
			n++
		}
		clat[J] = s / float64(n)
	}
	clon := make([]float64, cn)
	for I := range clon {
		s, n := 0.0, 0
		for i := I * f; i < min(nlon, I*f+f); i++ {
			s += lon[i]
			n++
		}
		clon[I] = s / float64(n)
	}
	cv := make([]bool, cl*cn)
	nv := 0
	for j := 0; j < nlat; j++ {
		for i := 0; i < nlon; i++ {
			if valid[j*nlon+i] {
				c := (j/f)*cn + i/f
				if !cv[c] {
					cv[c] = true
					nv++
				}
			}
		}
	}
	return clat, clon, cv, nv
}

// largestGap returns twice the largest angular distance (degrees) from a
// point without data to the nearest valid point, or 0 when every point is
// valid. Only valid points next to a point without data can be nearest, so
// only those are searched.
func largestGap(lat, lon []float64, valid []bool) float64 {
	nlat, nlon := len(lat), len(lon)
	type vec struct{ x, y, z float64 }
	unit := func(j, i int) vec {
		p, l := lat[j]*math.Pi/180, lon[i]*math.Pi/180
		return vec{math.Cos(p) * math.Cos(l), math.Cos(p) * math.Sin(l), math.Sin(p)}
	}
	var edge, holes []vec
	for j := 0; j < nlat; j++ {
		for i := 0; i < nlon; i++ {
			if !valid[j*nlon+i] {
				holes = append(holes, unit(j, i))
				continue
			}
			if isEdge(valid, nlat, nlon, j, i) {
				edge = append(edge, unit(j, i))
			}
		}
	}
	if len(holes) == 0 {
		return 0
	}
	if len(edge) == 0 {
		return 360 // no valid point at all
	}
	worst := -1.0 // largest over holes of the smallest 1 - cos(distance)
	for _, h := range holes {
		best := math.Inf(1)
		for _, e := range edge {
			if c := 1 - (h.x*e.x + h.y*e.y + h.z*e.z); c < best {
				best = c
			}
		}
		worst = math.Max(worst, best)
	}
	cos := math.Max(-1, math.Min(1, 1-worst))
	return 2 * math.Acos(cos) * 180 / math.Pi
}
