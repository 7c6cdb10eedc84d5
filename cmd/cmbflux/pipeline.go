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
	return fmt.Sprintf("in=%q demo=%v var=%q depth=%v:%g range=%v:%g:%g", sp.Input, sp.Demo, sp.Var,
		sp.HasDepth, sp.Depth, sp.HasRange, sp.DepthMin, sp.DepthMax)
}

func (c *cache) source(sp *config.Spec) (*source, error) {
	v, err := c.get("source "+sourceKey(sp), func() (any, error) {
		var g *tomo.Grid
		var err error
		if sp.Demo {
			g, err = demoGrid()
		} else {
			opts := tomo.ReadOptions{Var: sp.Var}
			if sp.Input == "-" {
				g, err = tomo.Read("<stdin>", stdin, opts)
			} else {
				g, err = tomo.ReadFile(sp.Input, opts)
			}
		}
		if err != nil {
			return nil, err
		}
		lo := tomo.LayerOptions{}
		switch {
		case sp.HasRange:
			lo.Top, lo.Bottom = sp.DepthMin, sp.DepthMax
		case sp.HasDepth:
			lo.Depth = sp.Depth
		}
		l, err := tomo.SelectLayer(g, lo)
		if err != nil {
			return nil, wrapInput(g.Source.Path, err)
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

// pattern is the tapered, truncated, rotated expansion of dlnVs, with the
// field of the pattern (degree 0 removed) on the diagnostic grid.
type pattern struct {
	dvs   *sh.Coeffs // canonical, degree 0 = layer mean
	grid  *sh.Grid
	field []float64 // dlnVs minus its mean on grid (fraction)
	area  []float64 // area weight per ring, summing to 1 over the grid
	pmin  float64
	pmax  float64
	imin  int // grid index of pmin
	imax  int
	rms   float64
}

func (c *cache) pattern(sp *config.Spec, src *source) (*pattern, error) {
	expKey := "expansion " + sourceKey(sp) + fmt.Sprintf(" lmax=%d", sp.LMax)
	v, err := c.get(expKey, func() (any, error) { return fitLayer(src.layer, sp.LMax) })
	if err != nil {
		return nil, err
	}
	raw := v.(*sh.Coeffs)
	key := expKey + fmt.Sprintf(" taper=%s rotate=%g grid=%s", sp.Taper, sp.Rotate, sp.Grid)
	v, err = c.get(key, func() (any, error) {
		tw, err := taperWeights(sp.Taper, sp.LMax)
		if err != nil {
			return nil, err
		}
		d := raw.Clone()
		for l := 0; l <= d.LMax; l++ {
			for m := 0; m <= l; m++ {
				i := sh.Index(l, m)
				d.C[i] *= tw[l]
				d.S[i] *= tw[l]
			}
		}
		if sp.Rotate != 0 {
			d = d.ShiftLongitude(sp.Rotate * math.Pi / 180)
		}
		g, err := parseGrid(sp.Grid)
		if err != nil {
			return nil, err
		}
		p := d.Clone()
		p.C[0] = 0
		tr := sh.NewTransform(sp.LMax, g)
		field := tr.Synthesis(nil, p)
		pt := &pattern{dvs: d, grid: g, field: field, area: ringAreas(g)}
		pt.pmin, pt.pmax = math.Inf(1), math.Inf(-1)
		var ss float64
		for i, f := range field {
			if f < pt.pmin {
				pt.pmin, pt.imin = f, i
			}
			if f > pt.pmax {
				pt.pmax, pt.imax = f, i
			}
			ss += pt.area[i/g.NLon] * f * f
		}
		pt.rms = math.Sqrt(ss)
		return pt, nil
	})
	if err != nil {
		return nil, err
	}
	return v.(*pattern), nil
}

// ringAreas returns the fraction of the sphere's area that each sample of
// ring i stands for (so that the sum over all samples is 1).
func ringAreas(g *sh.Grid) []float64 {
	w := g.AreaWeights()
	out := make([]float64, len(w))
	var s float64
	for _, x := range w {
		s += x * float64(g.NLon)
	}
	for i, x := range w {
		out[i] = x / s
	}
	return out
}

// lonlatOf returns the longitude and latitude in degrees of grid sample i.
func lonlatOf(g *sh.Grid, i int) (lon, lat float64) {
	r, j := i/g.NLon, i%g.NLon
	lon = math.Mod(g.Lon(j)*180/math.Pi, 360)
	lat = 90 - g.Colat[r]*180/math.Pi
	return round6(lon), round6(lat)
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
		if err != nil || !(step > 0) || step > 90 {
			return nil, bad("STEP must be a number of degrees from 0 to 90")
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

// field is a boundary condition: the output quantity's coefficients and the
// total heat flux on the diagnostic grid.
type field struct {
	out   *sh.Coeffs // canonical, in the output units
	units string
	what  string // quantity in words
	sign  string
	q0    float64 // mean flux W/m^2 (1 when not given: relative units)
	amp   float64 // W/m^2 of flux per unit of the pattern (fraction of dlnVs)
}

// amplitude turns the pattern into the requested quantity.
func amplitude(sp *config.Spec, pt *pattern) (*field, []string) {
	var warns []string
	q0 := 1.0
	if sp.HasQMean {
		q0 = sp.QMean
	}
	f := &field{q0: q0}
	span := pt.pmax - pt.pmin
	switch {
	case sp.Physical:
		// q = q0 - k dT / h with dT = dlnVs / (dlnVs/dT): a slow (hot)
		// mantle lowers the temperature contrast across the boundary layer.
		f.amp = -sp.Conductivity / (sp.Thickness * sp.DlnVsDT)
	case span > 0:
		// Linear form that keeps the mean and gives (q_max - q_min)/q_mean = q*
		// on the diagnostic grid (references sheet, [derived]).
		f.amp = q0 * sp.QStar / span
	}
	if span == 0 && sp.Quantity != "dvs" {
		warns = append(warns, "uniform pattern: the pattern is uniform up to lmax (no lateral variation in the input): the boundary condition is homogeneous")
	}
	sqrt4pi := math.Sqrt(4 * math.Pi) // degree-0 orthonormal coefficient of a unit mean
	scaled := func(scale, mean float64) *sh.Coeffs {
		c := pt.dvs.Clone()
		for i := range c.C {
			c.C[i] *= scale
			c.S[i] *= scale
		}
		c.C[0] = mean * sqrt4pi
		return c
	}
	fluxUnits := "mW/m^2"
	if !sp.HasQMean {
		fluxUnits = "q_mean"
	}
	mw := 1e3
	if !sp.HasQMean {
		mw = 1
	}
	f.sign = "positive = heat out of the core"
	switch sp.Quantity {
	case "flux":
		f.out, f.units, f.what = scaled(f.amp*mw, q0*mw), fluxUnits, "heat flux through the core-mantle boundary"
	case "anomaly":
		f.out, f.units, f.what = scaled(f.amp*mw, 0), fluxUnits, "heat flux anomaly (flux minus its mean)"
	case "relative":
		f.out, f.units, f.what = scaled(f.amp/q0, 0), "1", "relative heat flux anomaly (q - q_mean)/q_mean"
	case "superadiabatic":
		f.out, f.units, f.what = scaled(f.amp*mw, (q0-sp.QAd)*mw), fluxUnits, "super-adiabatic heat flux (q - q_ad)"
		f.sign = "positive = more heat out of the core than the adiabat carries"
	case "dtdr":
		f.out, f.units, f.what = scaled(-f.amp/sp.CoreConductivity, -q0/sp.CoreConductivity), "K/m", "radial temperature gradient on the core side dT/dr = -q/k_core"
		f.sign = "negative where heat flows out of the core (dT/dr = -q/k, r outward)"
	case "dvs":
		f.out = pt.dvs.Clone()
		for i := range f.out.C {
			f.out.C[i] *= 100
			f.out.S[i] *= 100
		}
		f.units, f.what, f.sign = "percent", "shear-wave velocity anomaly dlnVs of the input layer", "positive = faster than average"
	}
	return f, warns
}

// diagnose fills the flux diagnostics of s from the pattern and amplitude.
func diagnose(sp *config.Spec, pt *pattern, f *field, s *Summary) {
	g := pt.grid
	qmax := f.q0 + f.amp*pt.pmax
	qmin := f.q0 + f.amp*pt.pmin
	if f.amp < 0 {
		qmax, qmin = qmin, qmax
	}
	imax, imin := pt.imax, pt.imin
	if f.amp < 0 {
		imax, imin = imin, imax
	}
	s.QStar = (qmax - qmin) / f.q0
	s.RMSRatio = math.Abs(f.amp) * pt.rms / f.q0
	lon, lat := lonlatOf(g, imax)
	s.QMaxLonLat = [2]float64{lon, lat}
	lon, lat = lonlatOf(g, imin)
	s.QMinLonLat = [2]float64{lon, lat}
	if sp.HasQMean {
		s.QMean, s.QMax, s.QMin = ptr(f.q0*1e3), ptr(qmax*1e3), ptr(qmin*1e3)
		s.HeatFlowTW = ptr(f.q0 * config.CMBArea / 1e12)
	}
	var neg, sub float64
	for i, p := range pt.field {
		q := f.q0 + f.amp*p
		a := pt.area[i/g.NLon]
		if q < 0 {
			neg += a
		}
		if sp.HasQAd && q < sp.QAd {
			sub += a
		}
	}
	s.AreaNegative = neg
	if sp.HasQAd {
		s.QAd = ptr(sp.QAd * 1e3)
		s.AreaSubadiabatic = ptr(sub)
	}
	if sp.Physical {
		s.PhysicalDeltaTMaxK = ptr(math.Max(math.Abs(pt.pmax), math.Abs(pt.pmin)) / math.Abs(sp.DlnVsDT))
	}
}

// warnings returns what the user must know about the boundary condition.
// Each starts with a short class ("negative heat flux: ...") by which a
// sweep groups them.
func warnings(sp *config.Spec, src *source, s *Summary) []string {
	var w []string
	if s.AreaNegative > 0 {
		w = append(w, fmt.Sprintf("negative heat flux: the flux points into the core over %.1f %% of the CMB (q_min = %s); q* = %.3g is too large for this pattern and mean, lower it unless your simulation is meant to have this", 100*s.AreaNegative, fmtMW(s.QMin), s.QStar))
	}
	if s.AreaSubadiabatic != nil && *s.AreaSubadiabatic > 0 {
		w = append(w, fmt.Sprintf("sub-adiabatic heat flux: the flux is below the adiabatic flux over %.1f %% of the CMB; those regions are stably stratified at the top of the core", 100**s.AreaSubadiabatic))
	}
	if sp.LMax > src.safe.Lmax {
		w = append(w, fmt.Sprintf("lmax above the input's resolution: lmax %d is above degree %d, the most the input resolves (%s)", sp.LMax, src.safe.Lmax, src.safe.Reason))
	}
	if sp.Norm != "orthonormal" || sp.CondonShortley || sp.Form != "real" {
		w = append(w, fmt.Sprintf("non-default convention: coefficients are written %s, %s form; check that this is exactly the convention your simulation code's documentation states", s.Convention, sp.Form))
	}
	if sp.Quantity == "dtdr" {
		w = append(w, fmt.Sprintf("temperature gradient: dtdr is -q/k_core with k_core = %g W/m/K and is negative for heat leaving the core; check the sign and units your code expects", sp.CoreConductivity))
	}
	if !sp.HasQMean && sp.Quantity != "dvs" {
		w = append(w, "no mean flux: fluxes in summary.json are in units of the mean flux")
	}
	for _, lw := range src.layer.Warnings {
		w = append(w, "input: "+src.name+": "+lw)
	}
	sort.Strings(w)
	return w
}

func fmtMW(v *float64) string {
	if v == nil {
		return "below 0"
	}
	return fmt.Sprintf("%.3g mW/m^2", *v)
}

// produce runs the pipeline for one build and writes its files into st,
// manifest last.
func produce(ctx context.Context, c *cache, sp *config.Spec, set config.Set, st *outdir.Stage) (*Summary, error) {
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
	f, warns := amplitude(sp, pt)
	conv, err := outputConvention(sp)
	if err != nil {
		return nil, err
	}
	s := &Summary{
		Quantity: sp.Quantity, Units: f.units, Sign: f.sign, LMax: sp.LMax, LMaxResolved: src.safe.Lmax,
		Taper: sp.Taper, Rotate: sp.Rotate, Convention: conv.String(), Normalization: conv.Norm.String(),
		CondonShortley: conv.CondonShortley, Form: sp.Form, DiagnosticGrid: sp.Grid,
		Input: src.name, InputSHA256: src.sha256, Layer: src.layer.Description, Mode: "ratio",
		QStarDefinition: "(q_max - q_min) / q_mean of the total heat flux, extrema on the diagnostic grid",
	}
	if sp.Physical {
		s.Mode = "physical"
	} else if sp.HasQStar {
		s.QStarRequested = ptr(sp.QStar)
	}
	diagnose(sp, pt, f, s)
	s.Warnings = append(warnings(sp, src, s), warns...)
	sort.Strings(s.Warnings)
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
	params := map[string]string{}
	for k, v := range set {
		if k != "out" {
			params[k] = v.Raw
		}
	}
	man, err := buildManifest(st.Tmp, append(append([]string(nil), files...), "summary.json"), params,
		export.ManifestInput{Name: src.name, SHA256: src.sha256, Format: src.format}, s)
	if err != nil {
		return nil, err
	}
	if err := st.WriteFile("manifest.yaml", man); err != nil {
		return nil, err
	}
	return s, nil
}
