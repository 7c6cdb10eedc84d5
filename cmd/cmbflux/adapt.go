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

// readKeys are the build parameters that say how an input file is read
// and its values converted to dlnVs (readOptions, unitOptions).
var readKeys = []string{"units", "vref", "force-amplitude", "missing", "lon-name", "lat-name", "depth-name", "vertical"}

// readOptions returns the reading options of a resolved build.
func readOptions(sp *config.Spec) tomo.ReadOptions {
	return tomo.ReadOptions{Var: sp.Var, LonName: sp.LonName, LatName: sp.LatName, DepthName: sp.DepthName,
		Vertical: sp.Vertical, Missing: sp.Missing}
}

// unitOptions returns the unit conversion of a resolved build.
func unitOptions(sp *config.Spec) tomo.UnitOptions {
	return tomo.UnitOptions{Units: sp.Units, RefVelocity: sp.VRef, RefLayerMean: sp.VRefMean, Force: sp.ForceAmplitude}
}

// flagHintReplacements turn the tomo package's hints, which name its
// options in words, into the flags of the command.
var flagHintReplacements = []struct{ old, new string }{
	{"name it with the longitude-variable option", "name it with --lon-name"},
	{"name it with the latitude-variable option", "name it with --lat-name"},
	{"name the one to read with the variable option", "name the one to read with --var"},
	{"force the values if they are real", "give --force-amplitude if they are real"},
	{"so give them explicitly if", "so give --units if"},
	{"give the units explicitly", "give the units with --units"},
	{"give v_ref in km/s, or take each depth's mean velocity as the reference", "give --vref KMS, or --vref mean to take each depth's mean velocity as the reference"},
	{"declare the units (a '# units:' line in a text or CSV file, the units attribute in netCDF)", "declare the units (--units, a '# units:' line in a text or CSV file, the units attribute in netCDF)"},
}

// flagHint rewrites a message of the tomo package so that its hints name
// the command's flags (--units, --vref, --force-amplitude, --var,
// --lon-name, --lat-name, --depth-name).
func flagHint(msg string) string {
	for _, r := range flagHintReplacements {
		msg = strings.ReplaceAll(msg, r.old, r.new)
	}
	for _, c := range []struct{ what, flag string }{
		{"longitude", "--lon-name"}, {"latitude", "--lat-name"}, {"depth or radius", "--depth-name"},
	} {
		if strings.Contains(msg, "no "+c.what+" column (") {
			msg = strings.Replace(msg, "name it or choose it explicitly", "rename it or choose it with "+c.flag, 1)
		}
		msg = strings.ReplaceAll(msg, "both look like the "+c.what+"; choose one explicitly", "both look like the "+c.what+"; choose one with "+c.flag)
	}
	if strings.Contains(msg, "candidate value columns") {
		msg = strings.Replace(msg, "choose one explicitly", "choose one with --var", 1)
	}
	return msg
}

// hinted is an error whose text names the command's flags (flagHint); it
// unwraps to the original, so its exit status is unchanged.
type hinted struct {
	msg string
	err error
}

// Error implements the error interface.
func (h *hinted) Error() string { return h.msg }

// Unwrap returns the original error.
func (h *hinted) Unwrap() error { return h.err }

// withFlagHints returns err with its hints rewritten by flagHint; nil stays
// nil and an error without such hints is returned as it is.
func withFlagHints(err error) error {
	if err == nil {
		return nil
	}
	if msg := flagHint(err.Error()); msg != err.Error() {
		return &hinted{msg: msg, err: err}
	}
	return err
}
