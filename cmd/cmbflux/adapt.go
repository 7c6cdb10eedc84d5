package main

// Adapters between the command and the numerical packages, for what those
// packages do not (yet) offer in the form the command needs.

import (
	"errors"
	"fmt"
	"strings"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/flux/sh"
	"cmbflux/tomo"
)

func demoGrid() (*tomo.Grid, error) { return tomo.Demo(), nil }

// fitLayer expands the layer's dlnVs up to lmax in the canonical convention
// by the area-weighted least-squares fit of flux/sh (sh.FitLonLat: missing
// points left out, a seam column at lon[0] + 360 dropped, a regional
// longitude range masked rather than stretched round the circle). It
// returns what the fit found worth telling the user (dropped seam column,
// partial coverage, condition number). A degree the samples cannot
// determine is refused with the largest safe degree.
func fitLayer(l *tomo.Layer, lmax int) (*sh.Coeffs, []string, error) {
	nlat, nlon := len(l.Lat), len(l.Lon)
	if nlat < 2 || nlon < 3 {
		return nil, nil, &tomo.InputError{File: l.Source.Path, Err: fmt.Errorf("the grid has %d x %d points; need at least 2 latitudes and 3 longitudes", nlat, nlon)}
	}
	c, rep, err := sh.FitLonLat(lmax, l.Lat, l.Lon, l.Values, &sh.FitOptions{Valid: l.Valid})
	if err != nil {
		var fe *sh.FitError
		if errors.As(err, &fe) {
			return nil, nil, &tomo.InputError{File: l.Source.Path, Err: fmt.Errorf("%v; the limit is the conditioning of the fit on the valid points (--lmax)", err)}
		}
		return nil, nil, &tomo.InputError{File: l.Source.Path, Err: err}
	}
	var notes []string
	for _, w := range rep.Warnings {
		// The ring order is internal bookkeeping, not news for the user.
		if strings.HasPrefix(w, "latitudes ascend") {
			continue
		}
		notes = append(notes, "fit: "+w)
	}
	return c, notes, nil
}

// checkLMax refuses an lmax above the largest degree the layer's sampling
// supports (tomo.SafeDegree) unless forced, naming the one limit that
// applies: the grid's Nyquist degree or the largest gap in coverage.
func checkLMax(file string, lmax int, safe tomo.DegreeLimit, force bool) error {
	if force || lmax <= safe.Lmax {
		return nil
	}
	why := fmt.Sprintf("its grid spacing limits it to the Nyquist degree %d, 180 degrees over the spacing (common practice)", safe.Nyquist)
	if safe.GapLimit < safe.Nyquist {
		why = fmt.Sprintf("its largest gap in coverage, %.3g degrees across, leaves structure smaller than that unconstrained (180 degrees over the gap, common practice)", safe.Gap)
	}
	return &tomo.InputError{File: file, Err: fmt.Errorf("lmax %d is above degree %d, the largest the input supports: %s; lower --lmax to %d or less, or give --force-lmax to fit the unsupported degrees anyway", lmax, safe.Lmax, why, safe.Lmax)}
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
