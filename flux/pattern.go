package flux

import (
	"errors"
	"fmt"
	"math"

	"cmbflux/flux/contour"
	"cmbflux/flux/sh"
)

// PatternOptions sets how a Pattern is made from dlnVs coefficients. The
// zero value means: keep the input's degree, no taper, default search grid.
type PatternOptions struct {
	// LMax is the truncation degree of the boundary condition; 0 means the
	// input's LMax.
	LMax int
	// Taper multiplies degree l by the taper's weight w_l (sh.ParseTaper
	// reads "none", "cut:L", "cos:L1:L2", "gauss:DEG"); the zero value is no
	// taper.
	Taper sh.Taper
	// Weights, instead of Taper, holds custom weights w_l for degrees
	// 0..LMax (at least LMax+1 entries, none negative); nil means none.
	Weights []float64
	// TaperName describes custom Weights in Diagnostics (default "custom");
	// a Taper is described by its String form.
	TaperName string
	// ResolvedLMax is the highest degree the input resolves (known to the
	// fit upstream, e.g. from the grid spacing); 0 means the input's LMax.
	// LMax above it draws a warning.
	ResolvedLMax int
	// Oversample sets the search grid: Oversample*(LMax+1) Gauss-Legendre
	// rings (at least 48) and twice as many longitudes. 0 means
	// DefaultOversample.
	Oversample int
}

// DefaultOversample is the default PatternOptions.Oversample. The extrema
// need far less (3 already gives them to 1e-13), but the area fractions
// do not: measured against an independent ring quadrature at degrees 16 and
// 32, 3x oversampling errs by up to 3e-4 of the sphere for flat spectra
// (equal power per coefficient, or falling as 1/l) and by up to 7e-5 for
// power per coefficient falling as l^-2, where the contour passes close to
// saddles; 6x keeps all of them below 2e-5, inside the 1e-4 promised.
const DefaultOversample = 6

// Pattern is the band-limited shape of the flux anomaly: the input dlnVs
// truncated to degree LMax, tapered, with degree 0 removed,
//
//	g(colat, lon) = sum_{l=1}^{LMax} w_l sum_m (C_lm Y_lm^c + S_lm Y_lm^s),
//
// (canonical harmonics), so that the boundary flux is q = q_mean (1 + a g)
// with a > 0: high flux over fast (cold) mantle, low flux over slow (hot)
// mantle. A Pattern holds everything that does not depend on the amplitude
// (extrema of g, the search grid, contour surface, spectrum), so that builds
// for many amplitudes (WithQStar, WithPhysical) are cheap. A Pattern is
// immutable and safe for concurrent use.
type Pattern struct {
	g       *sh.Coeffs // canonical, degree 0 zero
	input   *sh.Coeffs // canonical input, full degree (for the slowest region)
	opts    PatternOptions
	nr      int // Gauss-Legendre rings of the search grid
	max     extremum
	min     extremum
	maxs    []extremum // refined local maxima, highest first
	mins    []extremum // refined local minima, lowest first
	slow    point      // minimum of the input dlnVs
	surf    *contour.Surface
	rot     *sh.Rotation // nil, or the rotation applied to the base surface
	rms     float64      // root mean square of g over the sphere
	deg2    float64      // fraction of the power of g in degree 2
	refMax  float64      // extremes used for the amplitude (continuous or on a grid)
	refMin  float64
	refOn   string // "" for the continuous field, else the grid's name
	refGrid *SampleGrid
	warn    []string
}

// ErrPattern is wrapped by errors about unusable pattern input.
var ErrPattern = errors.New("flux: unusable pattern")

// NewPattern makes the flux pattern from the coefficients of dlnVs (a
// fraction, any convention; converted to canonical). See PatternOptions.
func NewPattern(dlnvs *sh.Coeffs, opt *PatternOptions) (*Pattern, error) {
	if dlnvs == nil {
		return nil, fmt.Errorf("%w: no coefficients", ErrPattern)
	}
	var o PatternOptions
	if opt != nil {
		o = *opt
	}
	in, err := dlnvs.Convert(sh.Canonical)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrPattern, err)
	}
	for k := range in.C {
		if math.IsNaN(in.C[k]) || math.IsInf(in.C[k], 0) || math.IsNaN(in.S[k]) || math.IsInf(in.S[k], 0) {
			return nil, fmt.Errorf("%w: coefficient %d is not finite; check the fit of the input layer", ErrPattern, k)
		}
	}
	if o.LMax == 0 {
		o.LMax = in.LMax
	}
	if o.LMax < 1 {
		return nil, fmt.Errorf("%w: lmax %d: a pattern needs degree 1 or more", ErrPattern, o.LMax)
	}
	var weights []float64
	switch {
	case o.Weights != nil && o.Taper.Kind != sh.NoTaper:
		return nil, fmt.Errorf("%w: both a taper (%s) and custom weights are set; give one", ErrPattern, o.Taper)
	case o.Weights != nil:
		if len(o.Weights) < o.LMax+1 {
			return nil, fmt.Errorf("%w: taper has %d weights, need LMax+1 = %d", ErrPattern, len(o.Weights), o.LMax+1)
		}
		weights = o.Weights
		if o.TaperName == "" {
			o.TaperName = "custom"
		}
	case o.Taper.Kind != sh.NoTaper:
		weights = o.Taper.Weights(nil, o.LMax)
		o.TaperName = o.Taper.String()
	default:
		o.TaperName = "none"
	}
	for l, w := range weights {
		if math.IsNaN(w) || w < 0 {
			return nil, fmt.Errorf("%w: taper weight %g at degree %d: weights must be 0 or more (a negative weight flips that degree of the pattern)", ErrPattern, w, l)
		}
	}
	if o.ResolvedLMax == 0 {
		o.ResolvedLMax = in.LMax
	}
	g := in.Truncate(o.LMax)
	g.C[0] = 0
	if weights != nil {
		for l := 0; l <= o.LMax; l++ {
			for m := 0; m <= l; m++ {
				k := sh.Index(l, m)
				g.C[k] *= weights[l]
				g.S[k] *= weights[l]
			}
		}
	}
	var warn []string
	if o.LMax > in.LMax {
		warn = append(warn, fmt.Sprintf("lmax above the input: lmax %d is above the input's degree %d: degrees %d-%d are zero, so the boundary condition carries no more detail than the input; lower lmax to %d or refit the layer to a higher degree", o.LMax, in.LMax, in.LMax+1, o.LMax, in.LMax))
	} else if o.LMax > o.ResolvedLMax {
		warn = append(warn, fmt.Sprintf("lmax above the resolution: lmax %d is above degree %d, the highest the input grid resolves: degrees above %d are fitting artefacts, not structure; lower lmax or taper them", o.LMax, o.ResolvedLMax, o.ResolvedLMax))
	}
	return newPattern(g, in, o, warn)
}

// newPattern finishes a pattern from its band-limited coefficients g.
func newPattern(g, in *sh.Coeffs, o PatternOptions, warn []string) (*Pattern, error) {
	p := &Pattern{g: g, input: in, opts: o, warn: warn}
	var pow, pow2 float64
	for l := 1; l <= g.LMax; l++ {
		for m := 0; m <= l; m++ {
			k := sh.Index(l, m)
			e := g.C[k]*g.C[k] + g.S[k]*g.S[k]
			pow += e
			if l == 2 {
				pow2 += e
			}
		}
	}
	if !(pow > 0) {
		return nil, fmt.Errorf("%w: no power in degrees 1-%d after truncation and taper; check the input layer, lmax and taper", ErrPattern, g.LMax)
	}
	p.rms = math.Sqrt(pow / (4 * math.Pi)) // Parseval for orthonormal harmonics
	p.deg2 = pow2 / pow
	os, slowOS := o.Oversample, o.Oversample
	if os <= 0 {
		os, slowOS = DefaultOversample, 3
	}
	p.nr = max(os*(g.LMax+1), 48)
	grid := newDenseGrid(g, p.nr, true)
	p.max, p.min, p.maxs, p.mins = extrema(g, grid, true)
	surf, err := grid.surface(g)
	if err != nil {
		return nil, fmt.Errorf("flux: internal error contouring the pattern: %v", err)
	}
	p.surf = surf
	p.refMax, p.refMin = p.max.value, p.min.value
	if in != nil {
		// The slowest point of the input, searched up to degree 128 (enough
		// to place a province; higher degrees would only cost time).
		inp := in.Truncate(min(in.LMax, 128))
		inp.C[0] = 0
		// A position only: 3x oversampling and Newton refinement suffice.
		ig := newDenseGrid(inp, max(slowOS*(inp.LMax+1), 48), false)
		_, mn, _, _ := extrema(inp, ig, false)
		p.slow = mn.at
	}
	return p, nil
}

// LMax returns the truncation degree.
func (p *Pattern) LMax() int { return p.g.LMax }

// Coeffs returns a copy of the pattern coefficients g (canonical, degree 0
// zero, the sign of dlnVs).
func (p *Pattern) Coeffs() *sh.Coeffs { return p.g.Clone() }

// Extrema returns the maximum and minimum of the continuous band-limited
// pattern g with their positions (lon, lat in degrees).
func (p *Pattern) Extrema() (gmax float64, maxAt [2]float64, gmin float64, minAt [2]float64) {
	return p.max.value, p.max.at.lonLat(), p.min.value, p.min.at.lonLat()
}

// Warnings returns the warnings found while making the pattern.
func (p *Pattern) Warnings() []string { return append([]string(nil), p.warn...) }

// SampleGrid is a named set of points on which q* may be measured instead
// of on the continuous field (for codes that see only a grid).
type SampleGrid struct {
	// Name identifies the grid in Diagnostics and warnings.
	Name string
	// Lon and Lat are the grid's coordinates in degrees; every combination
	// (Lat[i], Lon[j]) is a point.
	Lon, Lat []float64
}

// SampleGridOf returns the points of an sh.Grid (ring colatitudes and
// longitudes in radians) as a SampleGrid named name, for MeasuredOn.
func SampleGridOf(name string, g *sh.Grid) *SampleGrid {
	sg := &SampleGrid{Name: name}
	for _, th := range g.Colat {
		sg.Lat = append(sg.Lat, 90-th*rad2deg)
	}
	for j := 0; j < g.NLon; j++ {
		sg.Lon = append(sg.Lon, g.Lon(j)*rad2deg)
	}
	return sg
}

// MeasuredOn returns a copy of p whose amplitude control uses the extremes
// of g sampled on grid instead of those of the continuous field. Results
// built from it say so in Diagnostics.QStarMeasuredOn and warn that the
// exported continuous field has a larger q* (Diagnostics.QStarContinuous).
func (p *Pattern) MeasuredOn(grid *SampleGrid) (*Pattern, error) {
	if grid == nil || len(grid.Lon) == 0 || len(grid.Lat) == 0 {
		return nil, fmt.Errorf("flux: measuring q* on a grid needs longitudes and latitudes")
	}
	name := grid.Name
	if name == "" {
		name = fmt.Sprintf("%d x %d grid", len(grid.Lat), len(grid.Lon))
	}
	ev := sh.NewEvaluator(p.g)
	hi, lo := math.Inf(-1), math.Inf(1)
	for _, la := range grid.Lat {
		if !(la >= -90 && la <= 90) {
			return nil, fmt.Errorf("flux: grid %q: latitude %g outside [-90, 90]", name, la)
		}
		for _, lo1 := range grid.Lon {
			v := ev.Value((90-la)/rad2deg, lo1/rad2deg)
			hi, lo = math.Max(hi, v), math.Min(lo, v)
		}
	}
	if !(hi > lo) {
		return nil, fmt.Errorf("flux: the pattern is constant on grid %q: q* cannot be set there; use a finer grid or the continuous field", name)
	}
	q := *p
	q.refMax, q.refMin, q.refOn, q.refGrid = hi, lo, name, grid
	return &q, nil
}
