package main

// Adapters between the command and the numerical packages, for what those
// packages do not (yet) offer in the form the command needs.

import (
	"fmt"
	"math"
	"strconv"
	"strings"

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

// taperWeights parses none, cos:L1:L2 or gauss:DEG and returns the weight of
// each degree 0..lmax.
//
// cos:L1:L2 keeps degrees up to L1, removes degrees from L2 on and rolls off
// in between as (1 + cos(pi (l - L1)/(L2 - L1)))/2. gauss:DEG multiplies
// degree l by exp(-l(l+1) s^2 / 2) with s = DEG in radians, the spectral
// form of a Gaussian smoothing of angular width DEG (common practice).
func taperWeights(spec string, lmax int) ([]float64, error) {
	w := make([]float64, lmax+1)
	for i := range w {
		w[i] = 1
	}
	bad := func(why string) error {
		return &config.Error{Key: "taper", Err: fmt.Errorf("%q: %s; want none, cos:L1:L2 (0 <= L1 < L2) or gauss:DEG (DEG > 0)", spec, why)}
	}
	parts := strings.Split(strings.TrimSpace(spec), ":")
	switch parts[0] {
	case "none", "":
		if len(parts) != 1 {
			return nil, bad("none takes no arguments")
		}
	case "cos":
		if len(parts) != 3 {
			return nil, bad("cos needs two degrees")
		}
		l1, e1 := strconv.Atoi(parts[1])
		l2, e2 := strconv.Atoi(parts[2])
		if e1 != nil || e2 != nil || l1 < 0 || l2 <= l1 {
			return nil, bad("the degrees must be integers with 0 <= L1 < L2")
		}
		for l := range w {
			switch {
			case l <= l1:
			case l >= l2:
				w[l] = 0
			default:
				w[l] = 0.5 * (1 + math.Cos(math.Pi*float64(l-l1)/float64(l2-l1)))
			}
		}
	case "gauss":
		if len(parts) != 2 {
			return nil, bad("gauss needs one width in degrees")
		}
		d, err := strconv.ParseFloat(parts[1], 64)
		if err != nil || !(d > 0) || d > 180 {
			return nil, bad("the width must be a number of degrees from 0 to 180")
		}
		s := d * math.Pi / 180
		for l := range w {
			w[l] = math.Exp(-float64(l*(l+1)) * s * s / 2)
		}
	default:
		return nil, bad("unknown taper")
	}
	return w, nil
}
