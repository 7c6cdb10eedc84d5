package main

// Adapters between the command and the numerical packages, for what those
// packages do not (yet) offer in the form the command needs.

import (
	"fmt"
	"math"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/flux/sh"
	"cmbflux/tomo"
)

func demoGrid() (*tomo.Grid, error) { return tomo.Demo(), nil }

// fitLayer expands the layer's dlnVs up to lmax in the canonical convention
// by the area-weighted least-squares fit of flux/sh (missing points left
// out). A degree the samples cannot determine is refused with the largest
// safe degree.
func fitLayer(l *tomo.Layer, lmax int) (*sh.Coeffs, error) {
	nlat, nlon := len(l.Lat), len(l.Lon)
	if nlat < 2 || nlon < 3 {
		return nil, &tomo.InputError{File: l.Source.Path, Err: fmt.Errorf("the grid has %d x %d points; need at least 2 latitudes and 3 longitudes", nlat, nlon)}
	}
	colat := make([]float64, nlat)
	for j := range colat {
		colat[j] = (90 - l.Lat[nlat-1-j]) * math.Pi / 180 // north to south
	}
	g := sh.NewRings(colat, nlon, l.Lon[0]*math.Pi/180)
	field := make([]float64, nlat*nlon)
	var valid []bool
	if l.Valid != nil {
		valid = make([]bool, nlat*nlon)
	}
	for j := 0; j < nlat; j++ {
		src := nlat - 1 - j
		for i := 0; i < nlon; i++ {
			v, ok := l.At(src, i)
			field[j*nlon+i] = v
			if valid != nil {
				valid[j*nlon+i] = ok
			}
		}
	}
	c, _, err := sh.FitGrid(lmax, g, field, &sh.FitOptions{Valid: valid})
	if err != nil {
		return nil, &tomo.InputError{File: l.Source.Path, Err: fmt.Errorf("%v (--lmax)", err)}
	}
	return c, nil
}

// parseTaper reads --taper with sh.ParseTaper (none, cut:L, cos:L1:L2,
// gauss:DEG), naming the parameter in the error.
func parseTaper(spec string) (sh.Taper, error) {
	t, err := sh.ParseTaper(spec)
	if err != nil {
		return sh.Taper{}, &config.Error{Key: "taper", Err: err}
	}
	return t, nil
}

// taperWeights returns the weight of each degree 0..lmax of --taper.
func taperWeights(spec string, lmax int) ([]float64, error) {
	t, err := parseTaper(spec)
	if err != nil {
		return nil, err
	}
	return t.Weights(nil, lmax), nil
}
