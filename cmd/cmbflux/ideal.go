package main

import (
	"fmt"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/flux"
	"cmbflux/tomo"
)

// idealSource stands for an idealised --pattern where the pipeline expects
// a tomography layer: no file, no velocities, any degree.
func idealSource(sp *config.Spec) *source {
	text := config.PatternText(sp.Pattern)
	top := 1
	for _, t := range sp.Pattern {
		top = max(top, t.L)
	}
	// The pattern holds structure up to its highest degree, exactly.
	return &source{
		layer: &tomo.Layer{Description: "idealised pattern " + text + " (orthonormal harmonics without Condon-Shortley phase; no tomography)"},
		safe:  tomo.DegreeLimit{Lmax: top, Nyquist: top, GapLimit: top, Reason: "the highest degree of the idealised pattern"},
		name:  "pattern " + text,
	}
}

// idealPattern makes the flux pattern of --pattern: the sum of the terms,
// truncated at --lmax and tapered like a tomographic pattern, turned by
// --rotate.
func (c *cache) idealPattern(sp *config.Spec) (*pattern, error) {
	key := fmt.Sprintf("ideal %s lmax=%d taper=%s rotate=%g", config.PatternText(sp.Pattern), sp.LMax, sp.Taper, sp.Rotate)
	if sp.QStarOnGrid {
		key += " qstar-on=" + sp.Grid
	}
	v, err := c.get(key, func() (any, error) {
		tp, err := parseTaper(sp.Taper)
		if err != nil {
			return nil, err
		}
		opt := &flux.PatternOptions{LMax: sp.LMax, Taper: tp}
		top := 0
		for _, t := range sp.Pattern {
			top = max(top, t.L)
		}
		var fp *flux.Pattern
		if sp.LMax <= top {
			// Ideal warns about the terms above lmax.
			fp, err = flux.Ideal(opt, sp.Pattern...)
		} else {
			// Zero-padded to lmax: a higher lmax adds nothing, but it
			// is no fault of an exact pattern, so it draws no warning.
			h, herr := flux.Harmonics(sp.Pattern...)
			if herr != nil {
				return nil, &config.Error{Key: "pattern", Err: herr}
			}
			fp, err = flux.NewPattern(h.Truncate(sp.LMax), opt)
		}
		if err != nil {
			return nil, &config.Error{Key: "pattern", Err: err}
		}
		if sp.Rotate != 0 {
			if fp, err = fp.Rotate(0, 90, sp.Rotate); err != nil {
				return nil, &config.Error{Key: "rotate", Err: err}
			}
		}
		if sp.QStarOnGrid {
			g, err := parseGrid(sp.Grid)
			if err != nil {
				return nil, err
			}
			if fp, err = fp.MeasuredOn(flux.SampleGridOf(sp.Grid, g)); err != nil {
				return nil, &config.Error{Key: "qstar-on", Err: err}
			}
		}
		return &pattern{flux: fp}, nil
	})
	if err != nil {
		return nil, err
	}
	return v.(*pattern), nil
}
