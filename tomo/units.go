package tomo

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// Units of velocity anomalies and velocities understood by Normalize.
const (
	// UnitPercent: relative anomaly 100*dlnVs, in percent.
	UnitPercent = "percent"
	// UnitFraction: relative anomaly dlnVs = dVs/Vs, dimensionless.
	UnitFraction = "fraction"
	// UnitKmPerS: absolute shear velocity in km/s.
	UnitKmPerS = "km/s"
	// UnitMPerS: absolute shear velocity in m/s.
	UnitMPerS = "m/s"
)

// DefaultMaxAbs is the plausibility limit on |dlnVs| used when
// UnitOptions.MaxAbs is zero: 0.20 (20 %). Lowermost-mantle shear-velocity
// anomalies are a few percent (about +-2-3 % at 2800 km depth, common
// practice; Hernlund & Houser 2008, EPSL 265, 423), so 20 % means wrong
// units or corrupt data.
const DefaultMaxAbs = 0.20

// UnitOptions controls the conversion of a grid's values to dlnVs.
// The zero value guesses the units and applies the 20 % plausibility limit.
type UnitOptions struct {
	// Units of the values: "" guesses them (see Normalize), or one of
	// UnitPercent, UnitFraction, UnitKmPerS, UnitMPerS.
	Units string
	// RefVelocity is the reference shear velocity v_ref in km/s used for
	// absolute velocities: dlnVs = (v - v_ref)/v_ref.
	RefVelocity float64
	// RefLayerMean takes v_ref, at each depth, as the area-weighted mean of
	// the valid velocities of that depth instead of RefVelocity.
	RefLayerMean bool
	// MaxAbs is the largest plausible |dlnVs| as a fraction; 0 means
	// DefaultMaxAbs.
	MaxAbs float64
	// Force accepts values beyond MaxAbs, with a warning, instead of
	// failing.
	Force bool
}

// UnitReport says how Normalize read the values.
type UnitReport struct {
	From    string // units converted from: UnitPercent, UnitFraction, UnitKmPerS or UnitMPerS
	Guessed bool   // true when From was guessed rather than given
	Reason  string // how From was decided, for the user
	// RefVelocity holds v_ref in km/s per depth level for absolute
	// velocities (one entry per level), nil otherwise.
	RefVelocity []float64
	// Min and Max are the extreme dlnVs (fractions) over valid points.
	Min, Max float64
	// Mean is the area-weighted mean dlnVs (fraction) over all valid
	// points of all levels; it is reported, never removed.
	Mean float64
	// Warnings lists what the conversion found suspicious (an unused
	// reference velocity, values beyond the plausible range accepted
	// because forced).
	Warnings []string
}

// Normalize returns a copy of g with its values converted to dlnVs as a
// fraction (Units == UnitFraction), and a report of the conversion:
//
//	percent:   dlnVs = value / 100
//	fraction:  dlnVs = value
//	km/s, m/s: dlnVs = (v - v_ref) / v_ref, v_ref from opts
//
// When opts.Units is "", the units are guessed, in this order, from
// g.Units (e.g. "%", "percent", "km/s", "m s-1"), from g.Name ("...pct",
// "...percent", "vs"), and from the range of the valid values: all within
// 1000..10000 is m/s, all within 1..10 is km/s, a largest magnitude up to
// 0.2 is a fraction (as percent that would be an implausibly weak model),
// anything else is percent. The guess and its reason are in the report.
//
// Values with |dlnVs| > opts.MaxAbs (default 20 %) make Normalize fail
// with an *InputError naming the largest one, unless opts.Force is set.
// A grid already in UnitFraction is checked the same way.
func Normalize(g *Grid, opts UnitOptions) (*Grid, *UnitReport, error) {
	rep := &UnitReport{}
	fail := func(format string, args ...any) error {
		return &InputError{File: g.Source.Path, Var: g.Name, Err: fmt.Errorf(format, args...)}
	}
	from := opts.Units
	if from != "" {
		u, ok := parseUnits(from)
		if !ok {
			return nil, nil, fail("units %q not understood: use %s, %s, %s or %s", from, UnitPercent, UnitFraction, UnitKmPerS, UnitMPerS)
		}
		from = u
		rep.Reason = "units given by the user"
	} else {
		var reason string
		var err error
		from, reason, err = guessUnits(g)
		if err != nil {
			return nil, nil, fail("%v", err)
		}
		rep.Guessed, rep.Reason = true, reason
		if w := ambiguousGuess(g, from); w != "" {
			rep.Warnings = append(rep.Warnings, w)
		}
	}
	rep.From = from

	out := *g
	out.Values = make([]float64, len(g.Values))
	out.Units = UnitFraction
	out.Warnings = append([]string(nil), g.Warnings...)
	nlat, nlon := g.NLat(), g.NLon()
	plane := nlat * nlon
	if (from == UnitPercent || from == UnitFraction) && (opts.RefVelocity != 0 || opts.RefLayerMean) {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("a reference velocity was given, but the values are relative anomalies (%s): it was not used", from))
	}
	switch from {
	case UnitPercent:
		for s, v := range g.Values {
			out.Values[s] = v / 100
		}
	case UnitFraction:
		copy(out.Values, g.Values)
	case UnitKmPerS, UnitMPerS:
		scale := 1.0
		if from == UnitMPerS {
			scale = 1e-3
		}
		rep.RefVelocity = make([]float64, g.NDepth())
		for k := range rep.RefVelocity {
			ref := opts.RefVelocity
			if opts.RefLayerMean {
				m, ok := weightedMean(g.Values[k*plane:(k+1)*plane], validSlice(g.Valid, k*plane, plane), g.Lat, nlon)
				if !ok {
					return nil, nil, fail("depth level %d has no valid velocity to take a mean from", k+1)
				}
				ref = m * scale
			}
			if !(ref > 0) {
				return nil, nil, fail("absolute velocities (%s) need a reference velocity: give v_ref in km/s, or take each depth's mean velocity as the reference", from)
			}
			rep.RefVelocity[k] = ref
			for s := k * plane; s < (k+1)*plane; s++ {
				out.Values[s] = (g.Values[s]*scale - ref) / ref
			}
		}
	}

	// Range, plausibility and mean.
	limit := opts.MaxAbs
	if limit == 0 {
		limit = DefaultMaxAbs
	}
	rep.Min, rep.Max = math.Inf(1), math.Inf(-1)
	worst, nbad := -1, 0
	for s, v := range out.Values {
		if g.Valid != nil && !g.Valid[s] {
			continue
		}
		rep.Min, rep.Max = math.Min(rep.Min, v), math.Max(rep.Max, v)
		if math.Abs(v) > limit {
			nbad++
			if worst < 0 || math.Abs(v) > math.Abs(out.Values[worst]) {
				worst = s
			}
		}
	}
	if nbad > 0 {
		k, j, i := worst/plane, (worst/nlon)%nlat, worst%nlon
		where := fmt.Sprintf("lon %g, lat %g", g.Lon[i], g.Lat[j])
		if g.Depth != nil {
			where += fmt.Sprintf(", depth %g km", g.Depth[k])
		}
		msg := fmt.Sprintf("%d values exceed the plausible %g %% in magnitude when read as %s (largest %.4g %% at %s); lowermost-mantle anomalies are a few percent",
			nbad, 100*limit, from, 100*out.Values[worst], where)
		raw := g.Values[worst]
		repeats := 0
		for s, v := range g.Values {
			if v == raw && (g.Valid == nil || g.Valid[s]) {
				repeats++
			}
		}
		if repeats > 1 {
			msg += fmt.Sprintf("; the value %g occurs %d times: if it marks missing data, declare it as a missing-value sentinel (a '# missing: %g' line in a text or CSV file)", raw, repeats, raw)
		}
		if !opts.Force {
			hint := ""
			switch {
			case rep.Guessed && strings.HasPrefix(rep.Reason, "from the file's units"):
				hint = "; the units were taken " + rep.Reason + ", so give them explicitly if the file's are wrong"
			case rep.Guessed:
				hint = "; the units were guessed (" + rep.Reason + "), so give them explicitly if the guess is wrong"
			}
			return nil, nil, fail("%s%s; force the values if they are real", msg, hint)
		}
		rep.Warnings = append(rep.Warnings, msg+" (accepted because forced)")
	}
	var sum, wsum float64
	w := rowWeights(g.Lat)
	for k := 0; k < g.NDepth(); k++ {
		for j := 0; j < nlat; j++ {
			for i := 0; i < nlon; i++ {
				s := (k*nlat+j)*nlon + i
				if g.Valid == nil || g.Valid[s] {
					sum += w[j] * out.Values[s]
					wsum += w[j]
				}
			}
		}
	}
	if wsum > 0 {
		rep.Mean = sum / wsum
	}
	out.Warnings = append(out.Warnings, rep.Warnings...)
	return &out, rep, nil
}

// parseUnits maps a units string to one of the Unit constants.
func parseUnits(s string) (string, bool) {
	t := strings.ToLower(strings.TrimSpace(s))
	t = strings.NewReplacer("**", "", "^", "", ".", " ", "_", " ").Replace(t)
	t = strings.Join(strings.Fields(t), " ")
	switch t {
	case "%", "percent", "per cent", "pct", "percentage":
		return UnitPercent, true
	case "fraction", "1", "dimensionless", "dlnvs", "ratio", "fractional":
		return UnitFraction, true
	case "km/s", "km s-1", "kms-1", "km per s", "km/sec", "km per second", "kilometres per second", "kilometers per second":
		return UnitKmPerS, true
	case "m/s", "m s-1", "ms-1", "m per s", "m/sec", "m per second", "metres per second", "meters per second":
		return UnitMPerS, true
	}
	return "", false
}

var errNoValid = errors.New("the grid has no valid values")

// guessUnits implements the guessing rule documented on Normalize.
func guessUnits(g *Grid) (units, reason string, err error) {
	if g.Units != "" {
		if u, ok := parseUnits(g.Units); ok {
			return u, fmt.Sprintf("from the file's units %q", g.Units), nil
		}
		return "", "", fmt.Errorf("the file's units %q are not understood: give the units explicitly (%s, %s, %s or %s)", g.Units, UnitPercent, UnitFraction, UnitKmPerS, UnitMPerS)
	}
	name := strings.ToLower(g.Name)
	if strings.Contains(name, "pct") || strings.Contains(name, "percent") || strings.HasSuffix(name, "%") {
		return UnitPercent, fmt.Sprintf("from the column name %q", g.Name), nil
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for s, v := range g.Values {
		if g.Valid == nil || g.Valid[s] {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	if lo > hi {
		return "", "", errNoValid
	}
	big := math.Max(math.Abs(lo), math.Abs(hi))
	switch {
	case lo >= 1000 && hi <= 10000:
		return UnitMPerS, fmt.Sprintf("from the value range %g..%g (absolute velocities in m/s)", lo, hi), nil
	case lo >= 1 && hi <= 10:
		return UnitKmPerS, fmt.Sprintf("from the value range %g..%g (absolute velocities in km/s)", lo, hi), nil
	case name == "vs" || name == "vsv" || name == "vsh":
		return "", "", fmt.Errorf("column %q looks like absolute velocity but the range %g..%g fits neither km/s nor m/s: give the units explicitly", g.Name, lo, hi)
	case big <= 0.2:
		return UnitFraction, fmt.Sprintf("from the value range %g..%g (largest magnitude %g <= 0.2: a fraction; as percent it would be implausibly weak)", lo, hi, big), nil
	}
	return UnitPercent, fmt.Sprintf("from the value range %g..%g (largest magnitude %g > 0.2: percent)", lo, hi, big), nil
}

// validSlice returns valid[off:off+n], or nil when valid is nil.
func validSlice(valid []bool, off, n int) []bool {
	if valid == nil {
		return nil
	}
	return valid[off : off+n]
}

// ambiguousFraction is the largest magnitude above which values guessed to
// be fractions are suspicious either way: above 5 % as fractions, below
// 0.2 % as percent, while lowermost-mantle shear-velocity anomalies are
// typically 1 to 3 % (common practice; references.md, Hernlund & Houser
// 2008).
const ambiguousFraction = 0.05

// ambiguousGuess returns a warning when the units were guessed as a
// fraction from values whose largest magnitude lies between
// ambiguousFraction and the 0.2 limit of the guess: read as percent they
// would be weak, read as fractions strong, and the two readings differ by
// a factor 100 in every amplitude derived from them.
func ambiguousGuess(g *Grid, from string) string {
	if from != UnitFraction {
		return ""
	}
	big := 0.0
	for s, v := range g.Values {
		if g.Valid == nil || g.Valid[s] {
			big = math.Max(big, math.Abs(v))
		}
	}
	if !(big > ambiguousFraction) {
		return ""
	}
	return fmt.Sprintf("the units were guessed as a fraction, but the largest magnitude %g is unusual either way (%g %% as a fraction, %g %% as percent; lowermost-mantle anomalies are typically 1 to 3 %%): declare the units (a '# units:' line in a text or CSV file, the units attribute in netCDF) so that amplitudes are not off by a factor 100",
		big, 100*big, big)
}
