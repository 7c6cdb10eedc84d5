package tomo

import (
	"fmt"
	"math"
	"strings"
)

// Layer is one lowermost-mantle field of dlnVs on a regular
// longitude-latitude grid: a single depth level of a Grid, or a weighted
// average of several.
//
// Values[j*len(Lon) + i] is dlnVs (a fraction, not percent) at Lat[j],
// Lon[i]; Lon ascends in [0, 360) and is evenly spaced (the text and CSV
// readers accept only global longitudes; a netCDF grid may be regional,
// with a warning), Lat ascends (south to north) and is evenly spaced.
type Layer struct {
	Lon, Lat []float64 // degrees east and north
	Values   []float64 // dlnVs as a fraction
	// Valid marks the points with data; nil means every point is valid.
	Valid []bool
	// Reg is the registration of the grid the layer came from.
	Reg Registration
	// Depths lists the depth levels used (km) and Weights their weights,
	// which sum to 1. A grid without a depth axis gives Depths == nil and
	// Weights == []float64{1}.
	Depths, Weights []float64
	// Description says in words which layers were used and how.
	Description string
	// Mean is the area-weighted mean dlnVs (fraction) over the valid
	// points. It is reported, never removed.
	Mean float64
	// Min and Max are the extreme dlnVs (fractions) over the valid points
	// of the layer (Units.Min and Units.Max are over the whole grid).
	Min, Max float64
	// Units reports how the values were converted to dlnVs.
	Units *UnitReport
	// Source records where the grid came from.
	Source Provenance
	// Title is the grid's title, if any.
	Title string
	// Warnings collects the grid's warnings and those of the selection.
	Warnings []string
}

// At returns the value and validity at latitude index j, longitude index i.
func (l *Layer) At(j, i int) (v float64, ok bool) {
	s := j*len(l.Lon) + i
	return l.Values[s], l.Valid == nil || l.Valid[s]
}

// LayerOptions chooses the depth levels of a Layer. The zero value takes
// the deepest level (the one nearest the core-mantle boundary) and guesses
// the units.
type LayerOptions struct {
	// Depth selects the level nearest to this depth in km (a tie goes to
	// the deeper level). 0 means the deepest level, unless Top and Bottom
	// choose an average.
	Depth float64
	// Top and Bottom, when Bottom > Top, average every level with
	// Top <= depth <= Bottom (km), weighted by r^2 times the level's
	// trapezoidal thickness (see SelectLayer). Top == Bottom is an error
	// unless both are 0; Bottom > Top takes precedence over Depth.
	Top, Bottom float64
	// Units converts the grid's values to dlnVs (see Normalize).
	Units UnitOptions
}

// nearWarnKm: a nearest level farther than this from the requested depth
// is reported.
const nearWarnKm = 50

// SelectLayer converts g to dlnVs with Normalize and reduces it to one
// Layer by the choice in opts:
//
//   - Bottom > Top: a depth average over the levels d_k in [Top, Bottom],
//     with weights w_k proportional to r_k^2 * t_k, where r_k = 6371 km - d_k
//     (PREM, see EarthRadiusKm) and t_k is the trapezoidal thickness of the
//     level among the levels used, (d_{k+1} - d_{k-1})/2 inside and half the
//     neighbouring interval at the two ends; this is the trapezoidal rule
//     for the volume average (1/V) * integral of f r^2 dr over the shell.
//     A point is valid when it is valid at every level used;
//   - Depth > 0: the level nearest to Depth;
//   - otherwise: the deepest level.
//
// A grid without a depth axis gives its only level; asking it for a depth
// or range adds a warning. An error is returned for a grid that fails
// Check, when no level falls in the range, and for the errors of Normalize.
func SelectLayer(g *Grid, opts LayerOptions) (*Layer, error) {
	if opts.Bottom < opts.Top || (opts.Top == opts.Bottom && opts.Top != 0) || opts.Depth < 0 {
		return nil, fmt.Errorf("tomo: depth range %g..%g km (depth %g km) is not valid: a range needs top < bottom, a single level a depth > 0", opts.Top, opts.Bottom, opts.Depth)
	}
	if err := g.Check(); err != nil {
		return nil, err
	}
	ng, rep, err := Normalize(g, opts.Units)
	if err != nil {
		return nil, err
	}
	nlat, nlon := g.NLat(), g.NLon()
	plane := nlat * nlon
	l := &Layer{
		Lon: append([]float64(nil), g.Lon...), Lat: append([]float64(nil), g.Lat...),
		Values: make([]float64, plane), Reg: g.Reg, Units: rep, Source: g.Source, Title: g.Title,
		Warnings: append([]string(nil), ng.Warnings...),
	}
	if dl := lonStep(g.Lon); len(g.Lon) > 1 && math.Abs(float64(len(g.Lon))*dl-360) > 1e-6*dl {
		l.Warnings = append(l.Warnings, fmt.Sprintf("the grid is regional: longitudes %g..%g cover %g of 360 degrees; the rest of the sphere counts as missing data",
			g.Lon[0], g.Lon[len(g.Lon)-1], float64(len(g.Lon))*dl))
	}
	var levels []int
	switch {
	case g.Depth == nil:
		levels = []int{0}
		l.Weights = []float64{1}
		l.Description = "the only level (the grid has no depth axis)"
		if opts.Depth > 0 || opts.Bottom > opts.Top {
			l.Warnings = append(l.Warnings, "the grid has no depth axis: the depth choice was ignored")
		}
	case opts.Bottom > opts.Top:
		for k, d := range g.Depth {
			if d >= opts.Top-1e-6 && d <= opts.Bottom+1e-6 {
				levels = append(levels, k)
			}
		}
		if len(levels) == 0 {
			return nil, &InputError{File: g.Source.Path, Var: g.Name, Err: fmt.Errorf(
				"no depth level lies in %g..%g km; the levels are %s km", opts.Top, opts.Bottom, joinFloats(g.Depth))}
		}
		l.Weights = shellWeights(g.Depth, levels)
		l.Depths = make([]float64, len(levels))
		parts := make([]string, len(levels))
		for n, k := range levels {
			l.Depths[n] = g.Depth[k]
			parts[n] = fmt.Sprintf("%g km (weight %.4f)", g.Depth[k], l.Weights[n])
		}
		if len(levels) == 1 {
			l.Description = fmt.Sprintf("the single level in %g..%g km: %g km", opts.Top, opts.Bottom, g.Depth[levels[0]])
			l.Warnings = append(l.Warnings, fmt.Sprintf("only one depth level (%g km) lies in %g..%g km: no averaging was done", g.Depth[levels[0]], opts.Top, opts.Bottom))
		} else {
			l.Description = fmt.Sprintf("average over %g..%g km of %d levels, weights r^2 x trapezoidal thickness: %s",
				opts.Top, opts.Bottom, len(levels), strings.Join(parts, ", "))
			lo, hi := l.Depths[0], l.Depths[len(l.Depths)-1]
			if lo > opts.Top+1e-6 || hi < opts.Bottom-1e-6 {
				l.Warnings = append(l.Warnings, fmt.Sprintf("the levels used span %g..%g km, less than the requested %g..%g km", lo, hi, opts.Top, opts.Bottom))
			}
		}
	default:
		k := len(g.Depth) - 1
		if opts.Depth > 0 {
			for n, d := range g.Depth {
				if math.Abs(d-opts.Depth) <= math.Abs(g.Depth[k]-opts.Depth) {
					k = n
				}
			}
			l.Description = fmt.Sprintf("the level nearest to %g km: %g km (level %d of %d)", opts.Depth, g.Depth[k], k+1, len(g.Depth))
			if dist := math.Abs(g.Depth[k] - opts.Depth); dist > nearWarnKm {
				l.Warnings = append(l.Warnings, fmt.Sprintf("the nearest level (%g km) is %g km from the requested %g km", g.Depth[k], dist, opts.Depth))
			}
		} else {
			l.Description = fmt.Sprintf("the deepest level: %g km (level %d of %d)", g.Depth[k], k+1, len(g.Depth))
		}
		levels = []int{k}
		l.Weights = []float64{1}
		l.Depths = []float64{g.Depth[k]}
	}

	// Weighted sum; a point needs data at every level used.
	dropped := 0
	if ng.Valid != nil {
		l.Valid = make([]bool, plane)
	}
	for s := 0; s < plane; s++ {
		ok := true
		v := 0.0
		nok := 0
		for n, k := range levels {
			if ng.Valid != nil && !ng.Valid[k*plane+s] {
				ok = false
				continue
			}
			nok++
			v += l.Weights[n] * ng.Values[k*plane+s]
		}
		if !ok {
			v = math.NaN()
			if nok > 0 {
				dropped++
			}
		}
		l.Values[s] = v
		if l.Valid != nil {
			l.Valid[s] = ok
		}
	}
	if dropped > 0 {
		l.Warnings = append(l.Warnings, fmt.Sprintf("%d points have data at some but not all of the levels used and are treated as missing", dropped))
	}
	m, ok := weightedMean(l.Values, l.Valid, l.Lat, nlon)
	if !ok {
		return nil, &InputError{File: g.Source.Path, Var: g.Name, Err: fmt.Errorf("the selected layer (%s) has no valid points", l.Description)}
	}
	l.Mean = m
	l.Min, l.Max = math.Inf(1), math.Inf(-1)
	for s, v := range l.Values {
		if l.Valid == nil || l.Valid[s] {
			l.Min, l.Max = math.Min(l.Min, v), math.Max(l.Max, v)
		}
	}
	if l.Valid != nil {
		all := true
		for _, v := range l.Valid {
			all = all && v
		}
		if all {
			l.Valid = nil
		}
	}
	return l, nil
}

// shellWeights returns the normalised weights r_k^2 * t_k of the levels
// (indices into depth, ascending) described on SelectLayer.
func shellWeights(depth []float64, levels []int) []float64 {
	w := make([]float64, len(levels))
	if len(levels) == 1 {
		w[0] = 1
		return w
	}
	sum := 0.0
	for n, k := range levels {
		var t float64
		switch n {
		case 0:
			t = (depth[levels[1]] - depth[k]) / 2
		case len(levels) - 1:
			t = (depth[k] - depth[levels[n-1]]) / 2
		default:
			t = (depth[levels[n+1]] - depth[levels[n-1]]) / 2
		}
		r := RadiusOfDepth(depth[k])
		w[n] = r * r * t
		sum += w[n]
	}
	for n := range w {
		w[n] /= sum
	}
	return w
}

// joinFloats formats a list of numbers as "a, b, c".
func joinFloats(v []float64) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = fmt.Sprintf("%g", x)
	}
	return strings.Join(s, ", ")
}
