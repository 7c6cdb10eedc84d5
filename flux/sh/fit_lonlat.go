package sh

import (
	"fmt"
	"math"
)

// maxRingLen bounds the number of longitudes of a full ring built from a
// table (360/step), against absurd steps in input files.
const maxRingLen = 1 << 20

// LonLatLayout describes how the samples of a longitude-latitude table
// (values[j*len(lon) + i] at latitude lat[j], longitude lon[i], degrees)
// map onto a Grid of full rings: see NewLonLatLayout.
type LonLatLayout struct {
	Grid *Grid
	// Index[j*len(lon)+i] is the grid point of table sample (j, i), or -1
	// for a sample of the seam column lon[0] + 360, dropped as the
	// duplicate of the first column.
	Index []int
	// Partial is true when the longitudes cover only part of each ring
	// (the grid's other points get no data).
	Partial bool
	// Notes say what was normalised (dropped seam column, reversed
	// latitudes, embedding of a partial longitude range).
	Notes []string
}

// NewLonLatLayout maps a regular table of latitudes lat (degrees north,
// ascending or descending, strictly monotonic, within [-90, 90]) and
// longitudes lon (degrees east, strictly ascending, equally spaced) onto a
// Grid of full rings north to south. The longitude step must divide 360
// to within 1e-9 of a degree; a last column at lon[0] + 360 duplicates the
// first and is dropped; a range shorter than the full circle is embedded
// in full rings (Partial). Latitude spacing may be irregular. It returns an
// error that says what is wrong for tables that do not fit this
// description; use FitPoints for those.
func NewLonLatLayout(lat, lon []float64) (*LonLatLayout, error) {
	nlat, nlon := len(lat), len(lon)
	if nlat < 1 || nlon < 2 {
		return nil, fmt.Errorf("sh: a longitude-latitude table needs at least 1 latitude and 2 longitudes, got %d and %d", nlat, nlon)
	}
	for j, v := range lat {
		if !(v >= -90 && v <= 90) {
			return nil, fmt.Errorf("sh: latitude %d is %v, outside [-90, 90]", j, v)
		}
	}
	desc := nlat == 1 || lat[1] < lat[0]
	for j := 1; j < nlat; j++ {
		if (desc && !(lat[j] < lat[j-1])) || (!desc && !(lat[j] > lat[j-1])) {
			return nil, fmt.Errorf("sh: latitudes are not strictly monotonic at index %d (%v after %v)", j, lat[j], lat[j-1])
		}
	}
	step := lon[1] - lon[0]
	if !(step > 0) {
		return nil, fmt.Errorf("sh: longitudes must ascend (lon[1] = %v after lon[0] = %v)", lon[1], lon[0])
	}
	const tol = 1e-9 // degrees
	for i := 2; i < nlon; i++ {
		if !(math.Abs(lon[i]-lon[i-1]-step) <= tol*math.Max(1, math.Abs(lon[i]))) {
			return nil, fmt.Errorf("sh: longitudes are not equally spaced at index %d (step %v, expected %v); use FitPoints", i, lon[i]-lon[i-1], step)
		}
	}
	full := 360 / step
	if !(full <= maxRingLen) {
		return nil, fmt.Errorf("sh: longitude step %v degrees is finer than 360/%d; resample the table", step, maxRingLen)
	}
	nfull := int(math.Round(full))
	if math.Abs(full-float64(nfull)) > 1e-9*full || nfull < 2 {
		return nil, fmt.Errorf("sh: longitude step %v degrees does not divide 360; use FitPoints", step)
	}
	ly := &LonLatLayout{}
	ncol := nlon
	if nlon == nfull+1 && math.Abs(lon[nlon-1]-lon[0]-360) < tol*360 {
		ncol = nlon - 1
		ly.Notes = append(ly.Notes, fmt.Sprintf("the last longitude column (%v) repeats the first (%v) and was dropped", lon[nlon-1], lon[0]))
	} else if nlon > nfull {
		return nil, fmt.Errorf("sh: %d longitudes at a step of %v degrees cover more than 360 degrees", nlon, step)
	}
	if ncol < nfull {
		ly.Partial = true
		ly.Notes = append(ly.Notes, fmt.Sprintf("longitudes %v to %v cover %d of %d columns of the full circle", lon[0], lon[ncol-1], ncol, nfull))
	}
	if !desc {
		ly.Notes = append(ly.Notes, "latitudes ascend; rings are ordered north to south")
	}
	colat := make([]float64, nlat)
	for k := range colat {
		j := k
		if !desc {
			j = nlat - 1 - k
		}
		colat[k] = (90 - lat[j]) * math.Pi / 180
	}
	ly.Grid = &Grid{Kind: Rings, Colat: colat, NLon: nfull, Lon0: lon[0] * math.Pi / 180}
	ly.Index = make([]int, nlat*nlon)
	for j := range nlat {
		k := j
		if !desc {
			k = nlat - 1 - j
		}
		for i := range nlon {
			if i >= ncol {
				ly.Index[j*nlon+i] = -1
				continue
			}
			ly.Index[j*nlon+i] = k*nfull + i
		}
	}
	return ly, nil
}

// FitLonLat fits coefficients of degree <= lmax to a longitude-latitude
// table as it comes from a tomography file: values[j*len(lon)+i] at
// latitude lat[j] and longitude lon[i] (degrees), valid marking the samples
// with data (nil: all; NaN values are left out in any case). The table is
// mapped onto full rings by NewLonLatLayout (seam column dropped, partial
// longitude ranges masked) and fitted by FitGrid, whose area weights then
// follow the ring spacing; opt.Valid and opt.Weights, if set, are per table
// sample and are mapped the same way. The layout notes are added to the
// report's warnings.
func FitLonLat(lmax int, lat, lon, values []float64, opt *FitOptions) (*Coeffs, *FitReport, error) {
	ly, err := NewLonLatLayout(lat, lon)
	if err != nil {
		return nil, nil, err
	}
	if len(values) != len(lat)*len(lon) {
		panic(fmt.Sprintf("sh: FitLonLat with %d values for %d x %d samples", len(values), len(lat), len(lon)))
	}
	g := ly.Grid
	field := make([]float64, g.Len())
	valid := make([]bool, g.Len())
	var w []float64
	if opt != nil && opt.Weights != nil {
		w = make([]float64, g.Len())
	}
	for s, k := range ly.Index {
		if k < 0 {
			continue
		}
		field[k] = values[s]
		valid[k] = opt == nil || opt.Valid == nil || opt.Valid[s]
		if w != nil {
			w[k] = opt.Weights[s]
		}
	}
	o := FitOptions{}
	if opt != nil {
		o = *opt
	}
	o.Valid, o.Weights = valid, w
	c, rep, err := FitGrid(lmax, g, field, &o)
	if rep != nil {
		rep.Points = len(values)
		rep.Warnings = append(ly.Notes, rep.Warnings...)
	}
	return c, rep, err
}
