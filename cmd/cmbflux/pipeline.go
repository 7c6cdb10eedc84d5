package main

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"sync"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/export"
	"cmbflux/flux"
	"cmbflux/flux/sh"
	"cmbflux/tomo"
)

// cache holds the results of the expensive stages of the pipeline, keyed by
// the parameters each depends on, so that sweep points that differ only in
// amplitude or output convention share one transform. It is safe for
// concurrent use; a stage computed by one goroutine is waited for by the
// others.
type cache struct {
	mu sync.Mutex
	m  map[string]*cacheEntry
}

type cacheEntry struct {
	once sync.Once
	v    any
	err  error
}

func newCache() *cache { return &cache{m: map[string]*cacheEntry{}} }

// get returns the value for key, computing it with fn once.
func (c *cache) get(key string, fn func() (any, error)) (any, error) {
	c.mu.Lock()
	e, ok := c.m[key]
	if !ok {
		e = &cacheEntry{}
		c.m[key] = e
	}
	c.mu.Unlock()
	e.once.Do(func() { e.v, e.err = fn() })
	return e.v, e.err
}

// source is the lowermost-mantle layer of the input.
type source struct {
	layer  *tomo.Layer
	safe   tomo.DegreeLimit
	name   string // what the summary calls the input
	sha256 string
	format string
}

func sourceKey(sp *config.Spec) string {
	return fmt.Sprintf("in=%q demo=%v var=%q depth=%v:%g range=%v:%g:%g read=%q/%q/%q/%q/%v units=%q vref=%g/%v force=%v", sp.Input, sp.Demo, sp.Var,
		sp.HasDepth, sp.Depth, sp.HasRange, sp.DepthMin, sp.DepthMax,
		sp.LonName, sp.LatName, sp.DepthName, sp.Vertical, sp.Missing, sp.Units, sp.VRef, sp.VRefMean, sp.ForceAmplitude)
}

func (c *cache) source(sp *config.Spec) (*source, error) {
	if sp.Pattern != nil {
		return idealSource(sp), nil
	}
	v, err := c.get("source "+sourceKey(sp), func() (any, error) {
		var g *tomo.Grid
		var err error
		if sp.Demo {
			g, err = demoGrid()
		} else {
			opts := readOptions(sp)
			if sp.Input == "-" {
				g, err = tomo.Read("<stdin>", stdin, opts)
			} else {
				g, err = tomo.ReadFile(sp.Input, opts)
			}
		}
		if err != nil {
			return nil, withFlagHints(err)
		}
		lo := tomo.LayerOptions{Units: unitOptions(sp)}
		switch {
		case sp.HasRange:
			lo.Top, lo.Bottom = sp.DepthMin, sp.DepthMax
		case sp.HasDepth:
			lo.Depth = sp.Depth
		}
		l, err := tomo.SelectLayer(g, lo)
		if err != nil {
			return nil, withFlagHints(wrapInput(g.Source.Path, err))
		}
		s := &source{layer: l, safe: tomo.SafeDegree(l), name: g.Source.Path, sha256: g.Source.SHA256, format: g.Source.Format}
		if sp.Demo {
			s.name = "demo"
		}
		return s, nil
	})
	if err != nil {
		return nil, err
	}
	return v.(*source), nil
}

// wrapInput makes an error about an input file map to exit status 2 while
// keeping its text.
func wrapInput(file string, err error) error {
	if _, ok := err.(*tomo.InputError); ok {
		return err
	}
	return &tomo.InputError{File: file, Err: err}
}

// pattern is the flux pattern of one input layer, degree, taper and
// rotation: everything that does not depend on the amplitude.
type pattern struct {
	flux  *flux.Pattern
	mean  float64  // area mean of dlnVs of the layer (fraction), degree 0 of the fit
	notes []string // what the fit reported (seam column, coverage, conditioning)

	// frame places the pattern in a time sequence; nil outside one.
	frame *sequenceFrame
}

// expansion is the fit of a layer to one degree, with the fit's notes.
type expansion struct {
	c     *sh.Coeffs
	notes []string
}

func (c *cache) pattern(sp *config.Spec, src *source) (*pattern, error) {
	if sp.Pattern != nil {
		return c.idealPattern(sp)
	}
	fitDeg := max(sp.LMax, 1)
	expKey := "expansion " + sourceKey(sp) + fmt.Sprintf(" lmax=%d", fitDeg)
	if err := checkLMax(src.name, sp.LMax, src.safe, sp.ForceLMax); err != nil {
		return nil, err
	}
	v, err := c.get(expKey, func() (any, error) {
		c, notes, err := fitLayer(src.layer, fitDeg)
		if err != nil {
			return nil, err
		}
		return &expansion{c: c, notes: notes}, nil
	})
	if err != nil {
		return nil, err
	}
	raw, notes := v.(*expansion).c, v.(*expansion).notes
	key := expKey + fmt.Sprintf(" taper=%s rotate=%g", sp.Taper, sp.Rotate)
	if sp.QStarOnGrid {
		key += " qstar-on=" + sp.Grid
	}
	v, err = c.get(key, func() (any, error) {
		tp, err := parseTaper(sp.Taper)
		if err != nil {
			return nil, err
		}
		d := raw
		if sp.Rotate != 0 {
			d = d.ShiftLongitude(sp.Rotate * math.Pi / 180)
		}
		fp, err := flux.NewPattern(d, &flux.PatternOptions{LMax: sp.LMax, Taper: tp, ResolvedLMax: src.safe.Lmax})
		if err != nil {
			return nil, wrapInput(src.name, err)
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
		return &pattern{flux: fp, mean: d.C[0] / math.Sqrt(4*math.Pi), notes: notes}, nil
	})
	if err != nil {
		return nil, err
	}
	return v.(*pattern), nil
}

func round6(x float64) float64 {
	v := math.Round(x*1e6) / 1e6
	if v == 0 {
		return 0
	}
	return v
}

// parseGrid reads gauss:NLAT, equiangular:N or lonlat:STEP.
func parseGrid(s string) (*sh.Grid, error) {
	kind, arg, _ := strings.Cut(s, ":")
	bad := func(why string) error {
		return &config.Error{Key: "grid", Err: fmt.Errorf("%q: %s; want gauss:NLAT, equiangular:N (even) or lonlat:STEP (degrees dividing 180)", s, why)}
	}
	switch kind {
	case "gauss":
		n, err := strconv.Atoi(arg)
		if err != nil || n < 2 || n > 4000 {
			return nil, bad("NLAT must be an integer from 2 to 4000")
		}
		return sh.NewGaussLegendre(n, 2*n), nil
	case "equiangular":
		n, err := strconv.Atoi(arg)
		if err != nil || n < 4 || n%2 != 0 || n > 8000 {
			return nil, bad("N must be an even integer from 4 to 8000")
		}
		return sh.NewDriscollHealy(n), nil
	case "lonlat":
		step, err := strconv.ParseFloat(arg, 64)
		if err != nil || !(step >= 0.05) || step > 90 {
			return nil, bad("STEP must be a number of degrees from 0.05 to 90")
		}
		nlat := 180/step + 1
		if math.Abs(nlat-math.Round(nlat)) > 1e-9 {
			return nil, bad("STEP must divide 180")
		}
		return sh.NewLonLat(int(math.Round(nlat)), 2*(int(math.Round(nlat))-1), sh.NodeRegistered), nil
	}
	return nil, bad("unknown grid kind")
}

// validateSpec checks what config.Resolve leaves to the numerical packages,
// so that a sweep refuses a bad point before it starts.
func validateSpec(sp *config.Spec) error {
	if _, err := taperWeights(sp.Taper, sp.LMax); err != nil {
		return err
	}
	if _, err := parseGrid(sp.Grid); err != nil {
		return err
	}
	conv, err := outputConvention(sp)
	if err != nil {
		return err
	}
	if err := conv.CheckDegree(sp.LMax); err != nil {
		return &config.Error{Key: "norm", Err: fmt.Errorf("%v; use another --norm or a lower --lmax", err)}
	}
	return nil
}

func outputConvention(sp *config.Spec) (sh.Convention, error) {
	n, err := sh.ParseNormalization(sp.Norm)
	if err != nil {
		return sh.Convention{}, &config.Error{Key: "norm", Err: fmt.Errorf("%q is not orthonormal, fully-normalized, schmidt or unnormalized", sp.Norm)}
	}
	return sh.Convention{Norm: n, CondonShortley: sp.CondonShortley}, nil
}

// field is a boundary condition: the flux package's result and the output
// quantity's coefficients in the units written.
type field struct {
	res   *flux.Result // nil for --quantity dvs
	out   *sh.Coeffs   // canonical, in the output units
	units string
	what  string // quantity in words
	sign  string
}

// quantities maps the names of --quantity to the flux package's.
var quantities = map[string]flux.Quantity{
	"flux": flux.HeatFlux, "anomaly": flux.FluxAnomaly, "relative": flux.FluxRelative,
	"superadiabatic": flux.SuperAdiabatic, "dtdr": flux.CoreGradient,
}

var quantityWords = map[string]string{
	"flux": "heat flux through the core-mantle boundary", "anomaly": "heat flux anomaly q - q_mean",
	"relative": "relative heat flux q / q_mean", "superadiabatic": "normalised super-adiabatic heat flux (q - q_ad) / (q_mean - q_ad)",
	"dtdr": "radial temperature gradient on the core side, dT/dr = -q / k_core",
	"dvs":  "shear-wave velocity anomaly dlnVs of the input layer, truncated and tapered",
}

// amplitude builds the boundary condition and the output quantity.
func amplitude(sp *config.Spec, pt *pattern) (*field, error) {
	f := &field{what: quantityWords[sp.Quantity]}
	if sp.Quantity == "dvs" {
		c := pt.flux.Coeffs()
		c.C[0] = pt.mean * math.Sqrt(4*math.Pi)
		for i := range c.C {
			c.C[i] *= 100
			c.S[i] *= 100
		}
		f.out, f.units, f.sign = c, "percent", "positive = faster than average"
		return f, nil
	}
	ref := flux.Reference{QMean: sp.QMean, QAd: sp.QAd, KCore: sp.CoreConductivity}
	var err error
	if sp.Physical {
		f.res, err = pt.flux.WithPhysical(flux.Physical{Conductivity: sp.Conductivity, Thickness: sp.Thickness, DlnVsDT: sp.DlnVsDT}, ref)
	} else {
		f.res, err = pt.flux.WithMeasure(sp.Measure, sp.QStar, ref)
	}
	if err != nil {
		return nil, &config.Error{Key: "qstar", Err: err}
	}
	q := quantities[sp.Quantity]
	c, err := f.res.Coeffs(q)
	if err != nil {
		return nil, &config.Error{Key: "quantity", Err: err}
	}
	info := q.Info()
	for i := range c.C {
		c.C[i] *= info.EdgeScale
		c.S[i] *= info.EdgeScale
	}
	f.out, f.units, f.sign = c, info.EdgeUnits, info.Sign
	return f, nil
}

// diagnose copies the flux package's diagnostics into the summary.
func diagnose(f *field, s *Summary) {
	if f.res == nil {
		return
	}
	d := f.res.Diagnostics
	s.QStar, s.QStarMeasuredOn, s.QStarContinuous = d.QStar, d.QStarMeasuredOn, d.QStarContinuous
	s.QStarSuperadiabatic = d.QStarSuperadiabatic
	s.QMean, s.QMax, s.QMin = ptr(d.QMean), ptr(d.QMax), ptr(d.QMin)
	s.QMaxLonLat, s.QMinLonLat = lon360(d.QMaxLonLat), lon360(d.QMinLonLat)
	s.HeatFlowTW = ptr(d.HeatFlowTW)
	s.QAd, s.AdiabaticHeatFlowTW = d.QAd, d.AdiabaticHeatFlowTW
	s.RMSRatio = d.RMSOverMean
	s.AreaNegative, s.AreaSubadiabatic = d.AreaFractionNegative, d.AreaFractionSubadiabatic
	s.Amplitude, s.AmplitudeSetBy = d.Amplitude, d.AmplitudeSetBy
	s.SlowestLonLat, s.MinToSlowestDeg = lon360(d.SlowestLonLat), d.MinToSlowestDeg
	s.Degree2PowerFraction = d.Degree2PowerFraction
	if d.Mode == "physical" {
		s.PhysicalDeltaTMaxK, s.PhysicalDeltaTMinK = ptr(d.TemperatureMax), ptr(d.TemperatureMin)
	}
}

// lon360 returns a position with the longitude in [0, 360), as in the rest
// of cmbflux's outputs, rounded to 1e-6 degree.
func lon360(p [2]float64) [2]float64 {
	lon := math.Mod(p[0], 360)
	if lon < 0 {
		lon += 360
	}
	return [2]float64{round6(lon), round6(p[1])}
}

// warnings returns what the user must know about the boundary condition:
// the flux package's warnings and the command's own. Each starts with a
// short class ("negative heat flux: ...") by which a sweep groups them.
func warnings(sp *config.Spec, src *source, pt *pattern, f *field, s *Summary) []string {
	var w []string
	if f.res != nil {
		w = append(w, f.res.Warnings...)
	} else {
		w = append(w, pt.flux.Warnings()...)
	}
	if sp.NoDegree0 && sp.Quantity != "anomaly" {
		w = append(w, fmt.Sprintf("degree 0 left out: the coefficient tables lack the mean (%s); the simulation must add it itself", meanText(s)))
	}
	if sp.Norm != "orthonormal" || sp.CondonShortley || sp.Form != "real" {
		w = append(w, fmt.Sprintf("non-default convention: coefficients are written %s, %s form; check that this is exactly the convention your simulation code's documentation states", s.Convention, sp.Form))
	}
	if f.res != nil && sp.Quantity != "flux" && sp.Quantity != "dtdr" {
		extra := ""
		if s.QStarSuperadiabatic != nil {
			extra = fmt.Sprintf("; over the mean super-adiabatic flux it is (q_max - q_min)/(q_mean - q_ad) = %.4g", *s.QStarSuperadiabatic)
		}
		w = append(w, fmt.Sprintf("q* of another field: q* = %.4g is (q_max - q_min)/q_mean of the total heat flux, not of the %s written%s; make sure your simulation's q* is defined the same way", s.QStar, sp.Quantity, extra))
	}
	if sp.Quantity == "dtdr" {
		w = append(w, fmt.Sprintf("temperature gradient: dtdr is -q/k_core with k_core = %g W/m/K, in K/km, negative where heat leaves the core; check the sign and units your code expects", sp.CoreConductivity))
	}
	for _, lw := range src.layer.Warnings {
		w = append(w, "input: "+src.name+": "+flagHint(lw))
	}
	for _, n := range pt.notes {
		w = append(w, "input: "+src.name+": "+n)
	}
	sort.Strings(w)
	return w
}

func meanText(s *Summary) string {
	if s.QMean != nil && s.Quantity == "flux" {
		return fmt.Sprintf("%.4g mW/m^2", *s.QMean)
	}
	return "degree 0 of the " + s.Quantity
}

func fmtMW(v *float64) string {
	if v == nil {
		return "below 0"
	}
	return fmt.Sprintf("%.3g mW/m^2", *v)
}

// produce runs the pipeline for one build and writes its files into st,
// manifest last.
func produce(ctx context.Context, c *cache, sp *config.Spec, set config.Set, st *outdir.Stage, command string) (*Summary, error) {
	src, err := c.source(sp)
	if err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	pt, err := c.pattern(sp, src)
	if err != nil {
		return nil, err
	}
	return produceFrom(ctx, sp, set, st, command, src, pt)
}

// produceFrom is produce for a given source and pattern (the frames of a
// sequence turn or blend the pattern).
func produceFrom(ctx context.Context, sp *config.Spec, set config.Set, st *outdir.Stage, command string, src *source, pt *pattern) (*Summary, error) {
	f, err := amplitude(sp, pt)
	if err != nil {
		return nil, err
	}
	conv, err := outputConvention(sp)
	if err != nil {
		return nil, err
	}
	s := &Summary{
		Quantity: sp.Quantity, Units: f.units, Sign: f.sign, LMax: sp.LMax, LMaxResolved: src.safe.Lmax,
		Taper: sp.Taper, Rotate: sp.Rotate, Convention: conv.String(), Normalization: conv.Norm.String(),
		CondonShortley: conv.CondonShortley, Form: sp.Form, OutputGrid: sp.Grid,
		Input: src.name, InputSHA256: src.sha256, Layer: src.layer.Description, Mode: "ratio",
		QStarDefinition: "(q_max - q_min) / q_mean of the total heat flux, extrema of the continuous band-limited field",
	}
	if sp.QStarOnGrid {
		s.QStarDefinition = "(q_max - q_min) / q_mean of the total heat flux, extrema on the points of grid " + sp.Grid
	}
	s.Sequence = pt.frame
	if sp.Physical {
		s.Mode = "physical"
	} else if sp.HasQStar {
		s.AmplitudeMeasure = sp.Measure.String()
		if sp.Measure == flux.PeakToPeak {
			s.QStarRequested = ptr(sp.QStar)
		}
	}
	diagnose(f, s)
	s.Warnings = warnings(sp, src, pt, f, s)
	files, err := writeOutputs(ctx, sp, src, pt, f, conv, s, st)
	if err != nil {
		return nil, err
	}
	s.Files = append(append([]string(nil), files...), "summary.json", "manifest.yaml")
	sort.Strings(s.Files)
	js, err := marshalJSON(s)
	if err != nil {
		return nil, err
	}
	if err := st.WriteFile("summary.json", js); err != nil {
		return nil, err
	}
	params := manifestParams(sp, set, src)
	man, err := buildManifest(st.Tmp, append(append([]string(nil), files...), "summary.json"), params,
		export.ManifestInput{Name: src.name, SHA256: src.sha256, Format: src.format}, s, command)
	if err != nil {
		return nil, err
	}
	if err := st.WriteFile("manifest.yaml", man); err != nil {
		return nil, err
	}
	return s, nil
}
