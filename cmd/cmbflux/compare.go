package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/compare"
	"cmbflux/export"
	"cmbflux/export/figure"
	htmlreport "cmbflux/export/report"
	"cmbflux/flux/contour"
	"cmbflux/flux/sh"
	"cmbflux/tomo"
)

const compareHelp = `Usage: cmbflux compare MODEL MODEL [MODEL...] [--out DIR] [flags]
       cmbflux compare --demo [MODEL...] [--out DIR] [flags]

Compares two or more tomography models at the core-mantle boundary. Each
MODEL is a grid file (text, CSV or netCDF, as for build --input), or demo for
the embedded demo scenario; --demo adds the demo scenario brindle and its
three invented variants merle (turned 12 degrees east), roan (smoother) and
dapple (other small-scale structure). Every model is reduced to the same
layer (its deepest level, --depth KM or --depth-range KM:KM) and expanded in
spherical harmonics to --lmax by the fit build uses (points without data
left out). Names come from the file names, or from --names a,b,c.

For every pair: the degree correlation r_l for l = 1..lmax (Becker & Boschi
2002) with the one-sided confidence that it is positive (Student's t with
2l - 1 degrees of freedom, Eckhardt 1984), and the total correlation over
degrees 1..lmax. For every model and for the mean model: the degree power,
the rms, the slow regions below --level (area, centroid) and the angle
between the centroids of the two largest (180 = antipodal). Across models:
maps of the mean, the spread, the votes (models placing a point in their
slowest --vote-fraction of the area) and the k-means cluster votes (Lekic
et al. 2012), on depth profiles with --profiles.

Without --out the comparison is printed. With --out DIR, DIR receives
correlation.tsv (columns a b l r defined confidence r_crit_95 r_crit_99, one
row per pair and degree, then l = total), spectra.tsv, regions.tsv,
mean.nc, spread.nc, votes.nc, clusters.nc, outlines.geojson,
correlation.png, spectra.png, models.png, spread.png, votes.png,
summary.json, report.html and manifest.yaml; with --points FILE also
points.tsv (each point's distance to the nearest slow-region outline of the
mean model and a Monte Carlo test of whether the points lie closer to the
outlines than random points); with --consensus mean|votes also consensus/,
the boundary condition built from the mean model (or the vote map as
dVs = -2 % x votes / models) exactly as build builds one, with build's flags
(--qstar, --qmean, --qad, --taper, --norm, --formats, ...). DIR must not
exist or be empty (or give --force); a failed comparison leaves no DIR.
`

const compareExample = `
Example (the demo scenario and its three invented variants at degree 8,
points from a file, and the consensus boundary condition with q* = 1):

  printf '15 -5 first\n195 8 second\n100 -30\n' > points.txt
  cmbflux compare --demo --lmax 8 --points points.txt \
      --consensus mean --qstar 1 --qmean 80 --qad 60 --out cmp

Two files compared at a depth of 2800 km:

  cmbflux compare a.nc b.txt --depth 2800 --lmax 12 --out cmp-ab
`

// compareOnlyConsensus are build parameters that only the consensus
// boundary condition uses.
var compareOnlyConsensus = []string{"qstar", "measure", "amplitude", "qmean", "heatflow", "qad", "adiabatic-heatflow", "physical", "dlnvs-dt",
	"conductivity", "thickness", "core-conductivity", "quantity", "norm", "condon-shortley", "form", "grid", "formats",
	"taper", "rotate"}

// voteDVs is the dlnVs (fraction) given to a point on which every model
// votes, when the vote map becomes a consensus layer: -2 %, the size of the
// slow provinces in the lowermost mantle (common practice; slow provinces
// are typically 1 % or more below average).
const voteDVs = -0.02

// compareOpts are compare's own flags.
type compareOpts struct {
	names, points, consensus string
	level, areaFraction      string
	voteFraction, step       string
	trials, clusters         int
	profiles, force, quiet   bool
	json                     bool
}

// cmpModel is one model of a comparison as read.
type cmpModel struct {
	name   string
	file   string // path as given, or the demo scenario's name
	grid   *tomo.Grid
	layer  *tomo.Layer
	safe   tomo.DegreeLimit
	coeffs *sh.Coeffs
}

// cmpInput is a model's entry in summary.json.
type cmpInput struct {
	Name         string  `json:"name"`
	File         string  `json:"file"`
	SHA256       string  `json:"sha256"`
	Format       string  `json:"format"`
	Layer        string  `json:"layer"`
	LMaxResolved int     `json:"lmax_resolved_by_input"`
	MeanPercent  float64 `json:"layer_mean_percent"`
	// ProfileDepths are the depths (km) of the profile layers (--profiles).
	ProfileDepths []float64 `json:"profile_depths_km,omitempty"`
}

// cmpPoint is a point of --points in summary.json.
type cmpPoint struct {
	Lon         float64 `json:"lon"`
	Lat         float64 `json:"lat"`
	Label       string  `json:"label,omitempty"`
	DistanceDeg float64 `json:"distance_deg"`
	DistanceKm  float64 `json:"distance_km"`
	MeanPercent float64 `json:"mean_dvs_percent"`
	Inside      bool    `json:"inside_slow_region"`
}

// cmpPoints is the --points part of summary.json.
type cmpPoints struct {
	File   string     `json:"file"`
	SHA256 string     `json:"sha256"`
	Points []cmpPoint `json:"points"`
	// The Monte Carlo test (compare.TestProximity) against points drawn
	// uniformly on the sphere.
	MeanDistanceDeg float64 `json:"mean_distance_deg"`
	RandomMeanDeg   float64 `json:"random_mean_distance_deg"`
	RandomStdDeg    float64 `json:"random_std_distance_deg"`
	PValue          float64 `json:"p_value"`
	Trials          int     `json:"trials"`
	Seed            uint64  `json:"seed"`
}

// cmpConsensus is the --consensus part of summary.json.
type cmpConsensus struct {
	Kind   string   `json:"kind"`
	Folder string   `json:"folder"`
	QStar  float64  `json:"qstar"`
	QMin   *float64 `json:"q_min"`
	QMax   *float64 `json:"q_max"`
}

// cmpSummary is summary.json: compare.Result's members plus the inputs.
type cmpSummary struct {
	Command string     `json:"command"`
	Inputs  []cmpInput `json:"inputs"`
	// LevelPercent is the outline level of the slow regions in percent
	// (when not chosen per model by --area-fraction).
	LevelPercent float64 `json:"level_percent"`
	*compare.Result
	Points    *cmpPoints    `json:"points,omitempty"`
	Consensus *cmpConsensus `json:"consensus,omitempty"`
	Warnings  []string      `json:"warnings"`
	Files     []string      `json:"files"`
}

func runCompare(stdout, stderr io.Writer, args []string) error {
	p := newParser("compare", stdout, compareHelp, compareExample)
	p.buildKeys()
	o := compareOpts{trials: 1000, clusters: 2, level: "-1", voteFraction: "0.3", step: "2"}
	p.stringVar(&o.names, "names", "A,B,...", "names of the models, comma-separated, in order (default: the file names)")
	p.stringVar(&o.level, "level", "PCT", "dVs (percent) outlining the slow regions (default -1, common practice)")
	p.stringVar(&o.areaFraction, "area-fraction", "X", "instead of --level, outline each model where its slowest fraction X of the area lies")
	p.stringVar(&o.voteFraction, "vote-fraction", "X", "a model votes for the points in its slowest fraction X of the area (default 0.3)")
	p.intVar(&o.clusters, "clusters", "K", "number of k-means clusters (default 2)")
	p.boolVar(&o.profiles, "profiles", "cluster on depth profiles: every depth level (in --depth-range, if given)")
	p.stringVar(&o.step, "step", "DEG", "spacing of the map grid in degrees (default 2)")
	p.stringVar(&o.points, "points", "FILE", "lon lat [label] per line (# comments): distances to the mean model's slow regions, with a Monte Carlo test")
	p.intVar(&o.trials, "trials", "N", "Monte Carlo trials of the --points test (default 1000, fixed seed)")
	p.stringVar(&o.consensus, "consensus", "KIND", "mean or votes: build a boundary condition from the consensus into DIR/consensus/")
	p.boolVar(&o.force, "force", "replace a non-empty output folder")
	p.boolVar(&o.quiet, "quiet", "print nothing but warnings and errors")
	p.boolVar(&o.json, "json", "print summary.json's content instead of the table")
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	set := p.keys

	// Options, checked before anything is read.
	level, err := cmpFloat("level", o.level)
	if err != nil {
		return err
	}
	if level >= 0 {
		return usagef("compare", "--level %g: the outline of slow regions needs a negative dVs in percent, e.g. -1", level)
	}
	var areaFrac float64
	if o.areaFraction != "" {
		if areaFrac, err = cmpFloat("area-fraction", o.areaFraction); err != nil {
			return err
		}
		if !(areaFrac > 0 && areaFrac < 1) {
			return usagef("compare", "--area-fraction %g: want a fraction between 0 and 1, e.g. 0.2", areaFrac)
		}
	}
	voteFrac, err := cmpFloat("vote-fraction", o.voteFraction)
	if err != nil {
		return err
	}
	if !(voteFrac > 0 && voteFrac < 1) {
		return usagef("compare", "--vote-fraction %g: want a fraction between 0 and 1, e.g. 0.3", voteFrac)
	}
	step, err := cmpFloat("step", o.step)
	if err != nil {
		return err
	}
	if !(step >= 0.25 && step <= 10) || math.Abs(180/step-math.Round(180/step)) > 1e-9 {
		return usagef("compare", "--step %g: want a spacing from 0.25 to 10 degrees that divides 180", step)
	}
	if o.clusters < 2 || o.clusters > 10 {
		return usagef("compare", "--clusters %d: want 2 to 10", o.clusters)
	}
	if o.trials < 1 || o.trials > 1000000 {
		return usagef("compare", "--trials %d: want 1 to 1000000", o.trials)
	}
	if o.consensus != "" && o.consensus != "mean" && o.consensus != "votes" {
		return usagef("compare", "--consensus %q: want mean or votes", o.consensus)
	}
	out := ""
	if v, ok := set["out"]; ok {
		out = v.Raw
	}
	if _, ok := set["pattern"]; ok {
		return usagef("compare", "--pattern is an idealised pattern, not a tomography model; compare takes models (build and sequence take --pattern)")
	}
	if o.consensus == "" {
		for _, k := range compareOnlyConsensus {
			if _, ok := set[k]; ok {
				return usagef("compare", "--%s is a setting of the consensus boundary condition; give --consensus mean or --consensus votes with it", k)
			}
		}
	} else if out == "" {
		return usagef("compare", "--consensus writes a boundary condition: give --out DIR")
	}

	// The layer every model is reduced to, and the consensus build.
	sel, err := cmpSelection(set)
	if err != nil {
		return err
	}
	var csp *config.Spec
	var cset config.Set
	if o.consensus != "" {
		cset = set.Clone()
		delete(cset, "input")
		delete(cset, "demo")
		delete(cset, "out")
		if err := cset.SetFlag("input", "consensus:"+o.consensus); err != nil {
			return err
		}
		if csp, err = config.Resolve(cset); err != nil {
			return err
		}
		if err := validateSpec(csp); err != nil {
			return err
		}
	}

	// Points, read before any model so that a bad file costs nothing.
	var pts []userPoint
	var ptsSHA string
	if o.points != "" {
		data, name, err := readInput(o.points)
		if err != nil {
			return err
		}
		if pts, err = parsePoints(name, data); err != nil {
			return err
		}
		sum := sha256.Sum256(data)
		ptsSHA = hex.EncodeToString(sum[:])
	}

	// The models.
	var specs []string // file paths, or "" for an in-memory demo grid
	var grids []*tomo.Grid
	if v, ok := set["demo"]; ok && v.Raw == "true" {
		grids = append(grids, tomo.Demo())
		grids = append(grids, tomo.DemoVariants()...)
		for range grids {
			specs = append(specs, "")
		}
	}
	if v, ok := set["input"]; ok {
		specs, grids = append(specs, v.Raw), append(grids, nil)
	}
	for _, a := range pos {
		specs, grids = append(specs, a), append(grids, nil)
	}
	if len(specs) < 2 {
		return usagef("compare", "give at least two models (grid files, demo for the embedded scenario, or --demo for it and its variants)")
	}
	names, err := cmpNames(specs, grids, o.names)
	if err != nil {
		return err
	}
	var warns []string
	var models []*cmpModel
	for k, s := range specs {
		m, w, err := cmpLoad(names[k], s, grids[k], sel)
		if err != nil {
			return err
		}
		warns = append(warns, w...)
		models = append(models, m)
	}
	cms := make([]compare.Model, len(models))
	inputs := make([]cmpInput, len(models))
	for k, m := range models {
		cms[k] = compare.Model{Name: m.name, Coeffs: m.coeffs}
		inputs[k] = cmpInput{Name: m.name, File: m.file, SHA256: m.grid.Source.SHA256, Format: m.grid.Source.Format,
			Layer: m.layer.Description, LMaxResolved: m.safe.Lmax, MeanPercent: round6(100 * m.layer.Mean)}
		if o.profiles {
			prof, depths, err := cmpProfile(m, sel)
			if err != nil {
				return err
			}
			cms[k].Profile = prof
			inputs[k].ProfileDepths = depths
		}
	}
	res, err := compare.Analyze(cms, compare.Options{LMax: sel.LMax, Step: step, Level: level / 100, AreaFraction: areaFrac,
		VoteFraction: voteFrac, K: o.clusters, Confidence: []float64{0.95, 0.99}, Seed: 1})
	if err != nil {
		return err
	}
	meanC := sh.NewCoeffs(sel.LMax, sh.Canonical)
	for _, m := range models {
		for i := range meanC.C {
			meanC.C[i] += m.coeffs.C[i] / float64(len(models))
			meanC.S[i] += m.coeffs.S[i] / float64(len(models))
		}
	}
	sum := &cmpSummary{Command: "compare", Inputs: inputs, LevelPercent: level, Result: res}

	if pts != nil {
		ps, w, err := cmpProximity(pts, res, meanC, o.trials)
		if err != nil {
			return err
		}
		if ps != nil {
			ps.File, ps.SHA256 = o.points, ptsSHA
		}
		sum.Points = ps
		warns = append(warns, w...)
	}

	if out == "" {
		sum.Warnings = nonNilStrings(warns)
		for _, w := range sum.Warnings {
			fmt.Fprintln(stderr, "cmbflux: warning: "+w)
		}
		return cmpOutput(stdout, "", sum, models, o)
	}

	st, err := outdir.New(out, o.force)
	if err != nil {
		return err
	}
	defer st.Abort()
	params := cmpParams(sel, names, o, level, areaFrac, voteFrac, step)
	m := &export.Meta{Version: version, Params: params, Units: "percent", Sign: "positive = faster than average"}
	for _, in := range inputs {
		m.Inputs = append(m.Inputs, export.Input{Name: in.File, SHA256: in.SHA256})
	}
	files, err := cmpWriteData(st, sum, models, meanC, m)
	if err != nil {
		return err
	}
	if o.consensus != "" {
		cs, cfiles, w, err := cmpConsensusBuild(st, o.consensus, csp, cset, res, models, meanC)
		if err != nil {
			return err
		}
		sum.Consensus = cs
		files = append(files, cfiles...)
		warns = append(warns, w...)
	}
	sum.Warnings = nonNilStrings(warns)
	sum.Files = append(append([]string(nil), files...), "summary.json", "report.html", "manifest.yaml")
	sort.Strings(sum.Files)
	js, err := marshalJSON(sum)
	if err != nil {
		return err
	}
	if err := st.WriteFile("summary.json", js); err != nil {
		return err
	}
	files = append(files, "summary.json")
	html, err := cmpReport(st.Tmp, sum, models, files)
	if err != nil {
		return err
	}
	if err := st.WriteFile("report.html", html); err != nil {
		return err
	}
	files = append(files, "report.html")
	man := &export.Manifest{Version: version, Command: "compare", Params: params,
		Diagnostics: map[string]any{"lmax": res.LMax, "models": len(models)}}
	for _, in := range inputs {
		man.Inputs = append(man.Inputs, export.ManifestInput{Name: in.File, SHA256: in.SHA256, Format: in.Format})
	}
	totals := map[string]float64{}
	for _, pr := range res.Pairs {
		totals[pr.Names[0]+" "+pr.Names[1]] = pr.Total
	}
	man.Diagnostics["total_correlation"] = totals
	if sum.Points != nil {
		man.Diagnostics["points_p_value"] = sum.Points.PValue
	}
	for _, f := range files {
		if err := man.AddFile(st.Tmp, f); err != nil {
			return err
		}
	}
	var mb bytes.Buffer
	if err := man.Encode(&mb); err != nil {
		return err
	}
	if err := st.WriteFile(export.ManifestName, mb.Bytes()); err != nil {
		return err
	}
	if err := st.Commit(); err != nil {
		return err
	}
	for _, w := range sum.Warnings {
		fmt.Fprintln(stderr, "cmbflux: warning: "+w)
	}
	return cmpOutput(stdout, out, sum, models, o)
}

// cmpOutput prints the table, or the summary as JSON with --json.
func cmpOutput(stdout io.Writer, out string, sum *cmpSummary, models []*cmpModel, o compareOpts) error {
	if o.json {
		js, err := marshalJSON(sum)
		if err != nil {
			return err
		}
		_, err = stdout.Write(js)
		return err
	}
	if !o.quiet {
		cmpPrint(stdout, out, sum, models)
	}
	return nil
}

func nonNilStrings(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

// cmpFloat parses the value of one of compare's number flags.
func cmpFloat(name, s string) (float64, error) {
	x, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, usagef("compare", "--%s %q is not a number", name, s)
	}
	return x, nil
}

// cmpSelection resolves the layer and degree shared by every model from
// build's parameters (--depth, --depth-range, --var, --lmax, --force-lmax
// and the reading options readKeys).
func cmpSelection(set config.Set) (*config.Spec, error) {
	s := config.Set{}
	for _, k := range append([]string{"depth", "depth-range", "var", "lmax", "force-lmax"}, readKeys...) {
		if v, ok := set[k]; ok {
			s[k] = v
		}
	}
	if err := s.SetFlag("demo", "true"); err != nil {
		return nil, err
	}
	if err := s.SetFlag("quantity", "dvs"); err != nil {
		return nil, err
	}
	return config.Resolve(s)
}

// cmpLayerOptions is the layer choice of a resolved build (see
// cache.source).
func cmpLayerOptions(sp *config.Spec) tomo.LayerOptions {
	lo := tomo.LayerOptions{Units: unitOptions(sp)}
	switch {
	case sp.HasRange:
		lo.Top, lo.Bottom = sp.DepthMin, sp.DepthMax
	case sp.HasDepth:
		lo.Depth = sp.Depth
	}
	return lo
}

// cmpNames returns the models' names: from --names, else from the file
// names without extension (with the extension when two would clash), the
// demo scenario and its variants by their own names.
func cmpNames(specs []string, grids []*tomo.Grid, given string) ([]string, error) {
	names := make([]string, len(specs))
	if given != "" {
		names = strings.Split(given, ",")
		if len(names) != len(specs) {
			return nil, usagef("compare", "--names gives %d names for %d models", len(names), len(specs))
		}
		for i := range names {
			names[i] = strings.TrimSpace(names[i])
		}
	} else {
		base := func(s string, ext bool) string {
			if s == "demo" {
				return tomo.DemoName
			}
			b := filepath.Base(s)
			if !ext {
				b = strings.TrimSuffix(b, ".gz")
				b = strings.TrimSuffix(b, filepath.Ext(b))
			}
			return b
		}
		count := map[string]int{}
		for i, s := range specs {
			if grids[i] != nil {
				names[i] = grids[i].Source.Path
				if names[i] == "demo" {
					names[i] = tomo.DemoName
				}
			} else {
				names[i] = base(s, false)
			}
			count[names[i]]++
		}
		for i, s := range specs {
			if grids[i] == nil && s != "demo" && count[names[i]] > 1 {
				names[i] = base(s, true)
			}
		}
	}
	seen := map[string]bool{}
	for _, n := range names {
		switch {
		case n == "":
			return nil, usagef("compare", "an empty model name; give every model a name with --names a,b,c")
		case strings.ContainsAny(n, "\t\n\r"):
			return nil, usagef("compare", "model name %q holds a tab or line break", n)
		case n == "mean":
			return nil, usagef("compare", "the name mean is kept for the mean model; rename the model with --names")
		case seen[n]:
			return nil, usagef("compare", "two models are called %q; give distinct names with --names a,b,c", n)
		}
		seen[n] = true
	}
	return names, nil
}

// cmpLoad reads one model (unless grid is given), reduces it to the layer
// of sel and fits it to sel.LMax as build does (fitLayer).
func cmpLoad(name, spec string, g *tomo.Grid, sel *config.Spec) (*cmpModel, []string, error) {
	m := &cmpModel{name: name, file: spec, grid: g}
	var err error
	switch {
	case g != nil:
		m.file = g.Source.Path
		if m.file == "demo" {
			m.file = tomo.DemoName
		}
	case spec == "demo":
		m.grid, m.file = tomo.Demo(), tomo.DemoName
	case spec == "-":
		m.grid, err = tomo.Read("<stdin>", stdin, readOptions(sel))
	default:
		m.grid, err = tomo.ReadFile(spec, readOptions(sel))
	}
	if err != nil {
		return nil, nil, withFlagHints(asInput(err))
	}
	if m.layer, err = tomo.SelectLayer(m.grid, cmpLayerOptions(sel)); err != nil {
		return nil, nil, withFlagHints(wrapInput(m.grid.Source.Path, err))
	}
	m.safe = tomo.SafeDegree(m.layer)
	if err := checkLMax(m.file, sel.LMax, m.safe, sel.ForceLMax); err != nil {
		return nil, nil, err
	}
	var notes []string
	if m.coeffs, notes, err = fitLayer(m.layer, sel.LMax); err != nil {
		return nil, nil, err
	}
	var warns []string
	for _, w := range append(m.layer.Warnings, notes...) {
		warns = append(warns, fmt.Sprintf("model %s: %s", name, flagHint(w)))
	}
	if sel.LMax > m.safe.Lmax {
		warns = append(warns, fmt.Sprintf("model %s: lmax %d is above degree %d, the highest its grid resolves: the degrees above are fitting artefacts, not structure", name, sel.LMax, m.safe.Lmax))
	}
	return m, warns, nil
}

// cmpProfile expands every depth level of the model (those in the depth
// range when one is given) for the profile cluster analysis.
func cmpProfile(m *cmpModel, sel *config.Spec) ([]*sh.Coeffs, []float64, error) {
	g := m.grid
	if g.Depth == nil {
		return nil, nil, inputErrorf("%s: --profiles needs depth levels, and model %s has no depth axis", m.file, m.name)
	}
	var out []*sh.Coeffs
	var depths []float64
	for _, d := range g.Depth {
		if sel.HasRange && (d < sel.DepthMin-1e-6 || d > sel.DepthMax+1e-6) {
			continue
		}
		lo := tomo.LayerOptions{Depth: d, Units: unitOptions(sel)}
		if d == 0 {
			// Depth 0 asks SelectLayer for the deepest level; a thin range
			// picks the surface level instead.
			lo = tomo.LayerOptions{Top: 0, Bottom: 1e-3, Units: unitOptions(sel)}
		}
		l, err := tomo.SelectLayer(g, lo)
		if err != nil {
			return nil, nil, withFlagHints(wrapInput(g.Source.Path, err))
		}
		c, _, err := fitLayer(l, sel.LMax) // the notes are those of the model's own layer
		if err != nil {
			return nil, nil, err
		}
		out = append(out, c)
		depths = append(depths, d)
	}
	if len(out) < 2 {
		return nil, nil, inputErrorf("%s: --profiles needs at least two depth levels in the range; model %s has %d", m.file, m.name, len(out))
	}
	return out, depths, nil
}

// cmpRings returns the outline rings of the field below level on the
// comparison grid (holes included).
func cmpRings(res *compare.Result, values []float64, level float64) [][][2]float64 {
	rings, err := contour.Below(res.Grid.Field(values), level)
	if err != nil {
		return nil
	}
	return rings
}

// cmpProximity measures the points against the slow regions of the mean
// model (exterior rings) and runs the Monte Carlo test.
func cmpProximity(pts []userPoint, res *compare.Result, meanC *sh.Coeffs, trials int) (*cmpPoints, []string, error) {
	var rings [][][2]float64
	for _, r := range res.MeanModel.Regions {
		rings = append(rings, r.Ring)
	}
	if len(rings) == 0 {
		return nil, []string{fmt.Sprintf("points: the mean model has no region below %.3g %%: no distances to measure", 100*res.MeanModel.Level)}, nil
	}
	xy := make([][2]float64, len(pts))
	colat := make([]float64, len(pts))
	lon := make([]float64, len(pts))
	for i, p := range pts {
		xy[i] = [2]float64{p.Lon, p.Lat}
		colat[i] = (90 - p.Lat) * math.Pi / 180
		lon[i] = p.Lon * math.Pi / 180
	}
	d, err := compare.DistanceToOutlines(xy, rings)
	if err != nil {
		return nil, nil, err
	}
	const seed = 1
	pt, err := compare.TestProximity(xy, rings, trials, seed)
	if err != nil {
		return nil, nil, err
	}
	vals := sh.EvaluatePoints(nil, meanC, colat, lon)
	ps := &cmpPoints{MeanDistanceDeg: round6(pt.MeanDistance), RandomMeanDeg: round6(pt.RandomMean), RandomStdDeg: round6(pt.RandomStd),
		PValue: pt.PValue, Trials: pt.Trials, Seed: seed}
	for i, p := range pts {
		ps.Points = append(ps.Points, cmpPoint{Lon: p.Lon, Lat: p.Lat, Label: p.Label, DistanceDeg: round6(d[i]),
			DistanceKm: round6(d[i] * math.Pi / 180 * compare.CMBRadiusKm), MeanPercent: round6(100 * vals[i]),
			Inside: vals[i] < res.MeanModel.Level})
	}
	return ps, nil, nil
}

// cmpParams are the parameters written into file headers and the manifest.
func cmpParams(sel *config.Spec, names []string, o compareOpts, level, areaFrac, voteFrac, step float64) map[string]string {
	p := map[string]string{
		"models": strings.Join(names, ","), "lmax": fmt.Sprint(sel.LMax), "vote-fraction": fmt.Sprint(voteFrac),
		"clusters": fmt.Sprint(o.clusters), "step": fmt.Sprintf("%g deg", step), "profiles": fmt.Sprint(o.profiles),
	}
	if areaFrac > 0 {
		p["area-fraction"] = fmt.Sprint(areaFrac)
	} else {
		p["level"] = fmt.Sprintf("%g %%", level)
	}
	switch {
	case sel.HasRange:
		p["depth-range"] = fmt.Sprintf("%g:%g km", sel.DepthMin, sel.DepthMax)
	case sel.HasDepth:
		p["depth"] = fmt.Sprintf("%g km", sel.Depth)
	default:
		p["depth"] = "deepest level"
	}
	if sel.Var != "" {
		p["var"] = sel.Var
	}
	if o.points != "" {
		p["points"] = o.points
		p["trials"] = fmt.Sprint(o.trials)
	}
	if o.consensus != "" {
		p["consensus"] = o.consensus
	}
	return p
}

// naOr formats v, or NA when ok is false.
func naOr(ok bool, v float64, format string) string {
	if !ok {
		return "NA"
	}
	return fmt.Sprintf(format, v)
}

// cmpWriteData writes the tables, maps, outlines and figures into st and
// returns the names written.
func cmpWriteData(st *outdir.Stage, sum *cmpSummary, models []*cmpModel, meanC *sh.Coeffs, m *export.Meta) ([]string, error) {
	res := sum.Result
	var names []string
	put := func(name string, data []byte) error {
		names = append(names, name)
		return st.WriteFile(name, data)
	}

	// correlation.tsv
	var b bytes.Buffer
	fmt.Fprintf(&b, "# cmbflux compare: degree correlation r of dVs between pairs of models, l = 1..%d (Becker & Boschi 2002), then l = total: degrees 1..%d together\n", res.LMax, res.LMax)
	b.WriteString("# defined: false where a model has no power at the degree (r is NA); confidence: one-sided level at which r > 0, Student's t with 2l-1 degrees of freedom (Eckhardt 1984)\n")
	b.WriteString("# r_crit_95, r_crit_99: smallest r significantly positive at 95 % and 99 % (one-sided); NA for the total\n")
	b.WriteString("a\tb\tl\tr\tdefined\tconfidence\tr_crit_95\tr_crit_99\n")
	crit := func(c, l int) float64 { return res.Critical[c].OneSided[l-1] }
	for _, pr := range res.Pairs {
		for _, d := range pr.ByDegree {
			fmt.Fprintf(&b, "%s\t%s\t%d\t%s\t%v\t%s\t%.6f\t%.6f\n", pr.Names[0], pr.Names[1], d.L,
				naOr(d.Defined, d.R, "%.6f"), d.Defined, naOr(d.Defined, d.Confidence, "%.6f"), crit(0, d.L), crit(1, d.L))
		}
	}
	for _, pr := range res.Pairs {
		fmt.Fprintf(&b, "%s\t%s\ttotal\t%.6f\ttrue\tNA\tNA\tNA\n", pr.Names[0], pr.Names[1], pr.Total)
	}
	if err := put("correlation.tsv", append([]byte(nil), b.Bytes()...)); err != nil {
		return nil, err
	}

	// spectra.tsv
	b.Reset()
	b.WriteString("# cmbflux compare: degree power of dVs, l = 0..lmax, then l = total: degrees 1..lmax together\n")
	b.WriteString("# power: mean square over the sphere of the degree-l part of dVs (percent^2), S_l / (4 pi) with S_l = sum_m (C_lm^2 + S_lm^2) in orthonormal harmonics; rms: its square root (percent)\n")
	b.WriteString("model\tl\tpower\trms\n")
	all := append(append([]compare.ModelSummary(nil), res.Models...), res.MeanModel)
	for _, ms := range all {
		var tot float64
		for l, s := range ms.Spectrum {
			pw := s / (4 * math.Pi) * 1e4
			if l >= 1 {
				tot += pw
			}
			fmt.Fprintf(&b, "%s\t%d\t%.9g\t%.9g\n", ms.Name, l, pw, math.Sqrt(pw))
		}
		fmt.Fprintf(&b, "%s\ttotal\t%.9g\t%.9g\n", ms.Name, tot, 100*ms.RMS)
	}
	if err := put("spectra.tsv", append([]byte(nil), b.Bytes()...)); err != nil {
		return nil, err
	}

	// regions.tsv
	b.Reset()
	fmt.Fprintf(&b, "# cmbflux compare: slow regions (dVs below level) of every model and of the mean, largest first, on a %g-degree grid\n", res.Options.Step)
	b.WriteString("# area at the CMB radius 3480 km (PREM); centroid: spherical centroid of the region; antipodality_deg: angle between the centroids of the model's two largest regions (180 = antipodal), NA with fewer than two; rank 0: no region\n")
	b.WriteString("model\trank\tarea_fraction\tarea_km2\tcentroid_lon\tcentroid_lat\tlevel_percent\tantipodality_deg\n")
	for _, ms := range all {
		anti := naOr(ms.HasAntipodality, ms.Antipodality, "%.3f")
		if len(ms.Regions) == 0 {
			fmt.Fprintf(&b, "%s\t0\t0\t0\tNA\tNA\t%.6g\t%s\n", ms.Name, 100*ms.Level, anti)
		}
		for k, r := range ms.Regions {
			c := lon360([2]float64{r.CentroidLon, r.CentroidLat})
			fmt.Fprintf(&b, "%s\t%d\t%.6f\t%.6g\t%.3f\t%.3f\t%.6g\t%s\n", ms.Name, k+1, r.Fraction, r.AreaKm2, c[0], c[1], 100*ms.Level, anti)
		}
	}
	if err := put("regions.tsv", append([]byte(nil), b.Bytes()...)); err != nil {
		return nil, err
	}

	// Maps.
	n := float64(len(models))
	votes := make([]float64, len(res.Votes))
	cvotes := make([]float64, len(res.ClusterVotes))
	for i := range votes {
		votes[i] = float64(res.Votes[i])
		cvotes[i] = float64(res.ClusterVotes[i])
	}
	maps := []struct {
		file, name, what, units string
		vals                    []float64
	}{
		{"mean.nc", "dvs_mean", fmt.Sprintf("mean dVs of %d models", len(models)), "percent", scaled(res.Mean, 100)},
		{"spread.nc", "dvs_spread", fmt.Sprintf("standard deviation of dVs across %d models (dividing by %d)", len(models), len(models)), "percent", scaled(res.Std, 100)},
		{"votes.nc", "votes", fmt.Sprintf("number of models (of %d) placing the point in their slowest %g of the area", len(models), res.VoteFraction), "1", votes},
		{"clusters.nc", "cluster_votes", fmt.Sprintf("number of models (of %d) placing the point in their slowest k-means cluster (k = %d)", len(models), res.Options.K), "1", cvotes},
	}
	for _, mp := range maps {
		mm := *m
		mm.Quantity, mm.Units = mp.what, mp.units
		if mp.units == "1" {
			mm.Sign = "count of models"
		}
		b.Reset()
		g := &export.Grid{Kind: "user", Lon: res.Grid.Lon, Lat: res.Grid.Lat, Values: mp.vals, Name: mp.name}
		if err := export.WriteGridNetCDF(&b, g, &mm); err != nil {
			return nil, err
		}
		if err := put(mp.file, append([]byte(nil), b.Bytes()...)); err != nil {
			return nil, err
		}
	}

	// Outlines.
	var ols []export.Outline
	for k, ms := range res.Models {
		ols = append(ols, export.Outline{Rings: cmpRings(res, res.Fields[k], ms.Level), Split: true,
			Props: map[string]any{"model": ms.Name, "region": "dVs below level", "level_percent": round6(100 * ms.Level)}})
	}
	ols = append(ols, export.Outline{Rings: cmpRings(res, res.Mean, res.MeanModel.Level), Split: true,
		Props: map[string]any{"model": "mean", "region": "dVs below level", "level_percent": round6(100 * res.MeanModel.Level)}})
	maj := len(models)/2 + 1
	ols = append(ols, export.Outline{Rings: cmpRings(res, scaled(votes, -1), -float64(maj)+0.5), Split: true,
		Props: map[string]any{"model": "votes", "region": fmt.Sprintf("at least %d of %d models vote slow", maj, len(models))}})
	mo := *m
	mo.Quantity = "slow regions of the compared models"
	b.Reset()
	if err := export.WriteOutlines(&b, ols, &mo); err != nil {
		return nil, err
	}
	if err := put("outlines.geojson", append([]byte(nil), b.Bytes()...)); err != nil {
		return nil, err
	}

	// Figures.
	for _, f := range cmpFigures(res, n, votes, maj) {
		b.Reset()
		if err := f.fig.WritePNG(&b); err != nil {
			return nil, err
		}
		if err := put(f.name, append([]byte(nil), b.Bytes()...)); err != nil {
			return nil, err
		}
	}

	// points.tsv
	if ps := sum.Points; ps != nil {
		b.Reset()
		fmt.Fprintf(&b, "# cmbflux compare: distance of each point to the nearest slow-region outline of the mean model (dVs below %.3g %%), degrees of arc and km at the CMB radius 3480 km\n", 100*res.MeanModel.Level)
		fmt.Fprintf(&b, "# mean_dvs_percent: the mean model at the point; inside: the point lies in a slow region\n")
		fmt.Fprintf(&b, "# Monte Carlo test: mean distance %.4g deg; %d sets of %d points uniform on the sphere (seed %d): mean %.4g deg, sd %.4g deg; p = %.6g (fraction of sets at least as close, (1 + count)/(1 + trials))\n",
			ps.MeanDistanceDeg, ps.Trials, len(ps.Points), ps.Seed, ps.RandomMeanDeg, ps.RandomStdDeg, ps.PValue)
		b.WriteString("lon\tlat\tlabel\tdistance_deg\tdistance_km\tmean_dvs_percent\tinside\n")
		for _, p := range ps.Points {
			fmt.Fprintf(&b, "%g\t%g\t%s\t%.4f\t%.1f\t%.4f\t%v\n", p.Lon, p.Lat, p.Label, p.DistanceDeg, p.DistanceKm, p.MeanPercent, p.Inside)
		}
		if err := put("points.tsv", append([]byte(nil), b.Bytes()...)); err != nil {
			return nil, err
		}
	}
	sort.Strings(names)
	return names, nil
}

type namedFigure struct {
	name string
	fig  figure.Figure
}

// cmpFigures draws the correlation and spectra plots and the maps.
func cmpFigures(res *compare.Result, n float64, votes []float64, maj int) []namedFigure {
	var series []figure.Series
	for _, pr := range res.Pairs {
		y := make([]float64, res.LMax+1)
		y[0] = math.NaN()
		for _, d := range pr.ByDegree {
			y[d.L] = d.R
			if !d.Defined {
				y[d.L] = math.NaN()
			}
		}
		series = append(series, figure.Series{Label: pr.Names[0] + " – " + pr.Names[1], Y: y})
	}
	var thr []figure.Series
	for _, cr := range res.Critical {
		y := make([]float64, res.LMax+1)
		y[0] = math.NaN()
		for i, l := range cr.L {
			y[l] = cr.OneSided[i]
		}
		thr = append(thr, figure.Series{Label: fmt.Sprintf("%g %% significance (one-sided)", 100*cr.Confidence), Y: y})
	}
	var spec []figure.Series
	for _, ms := range append(append([]compare.ModelSummary(nil), res.Models...), res.MeanModel) {
		y := make([]float64, len(ms.Spectrum))
		for l, s := range ms.Spectrum {
			y[l] = s / (4 * math.Pi) * 1e4
		}
		spec = append(spec, figure.Series{Label: ms.Name, Y: y})
	}
	g := res.Grid
	fg := func(v []float64) *figure.Grid {
		return &figure.Grid{NLon: len(g.Lon), NLat: len(g.Lat), Lon0: g.Lon[0], Lat0: g.Lat[0], DLat: g.Lat[1] - g.Lat[0], Values: v}
	}
	meanOutline := figure.Outline{Rings: cmpRings(res, res.Mean, res.MeanModel.Level), Label: fmt.Sprintf("mean model below %.3g %%", 100*res.MeanModel.Level)}
	var maps []*figure.Map
	for k, ms := range res.Models {
		maps = append(maps, &figure.Map{Title: ms.Name, Grid: fg(scaled(res.Fields[k], 100)),
			Outlines: []figure.Outline{{Rings: cmpRings(res, res.Fields[k], ms.Level), Label: fmt.Sprintf("below %.3g %%", 100*ms.Level)}}})
	}
	maps = append(maps, &figure.Map{Title: "mean of the models", Grid: fg(scaled(res.Mean, 100)), Outlines: []figure.Outline{meanOutline}})
	cols := 2
	if len(maps) > 4 {
		cols = 3
	}
	majOutline := figure.Outline{Rings: cmpRings(res, scaled(votes, -1), -float64(maj)+0.5), Label: fmt.Sprintf("at least %d of %d models vote slow", maj, int(n)), Style: figure.Dashed}
	return []namedFigure{
		{"correlation.png", &figure.Correlation{Title: fmt.Sprintf("degree correlation of dVs, degrees 1-%d", res.LMax), Series: series, Thresholds: thr}},
		{"spectra.png", &figure.Spectrum{Title: "degree power of dVs", YLabel: "mean square per degree (%²)", Series: spec}},
		{"models.png", &figure.Panel{Title: "dVs of the models and their mean at the comparison depth", Subtitle: fmt.Sprintf("degrees 0-%d; outlines: slow regions", res.LMax),
			Maps: maps, Cols: cols, Center: 0, CenterLabel: "zero", Label: "dVs", Units: "%"}},
		{"spread.png", &figure.Map{Title: "spread of dVs across the models (standard deviation)", Grid: fg(scaled(res.Std, 100)), Center: 0, CenterLabel: "zero",
			Label: "spread of dVs", Units: "%", Outlines: []figure.Outline{meanOutline}}},
		{"votes.png", &figure.Map{Title: fmt.Sprintf("votes: models placing the point in their slowest %g of the area", res.VoteFraction), Grid: fg(votes),
			Center: n / 2, CenterLabel: "half the models", HalfRange: n / 2, Label: "votes", Units: "models", NoExtrema: true,
			Outlines: []figure.Outline{meanOutline, majOutline}}},
	}
}

// scaled returns v times k.
func scaled(v []float64, k float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = k * x
	}
	return out
}

// cmpConsensusLayer turns values on the comparison grid (rows north to
// south) into a tomo.Layer (rows south to north, node-registered).
func cmpConsensusLayer(res *compare.Result, vals []float64, desc string, src tomo.Provenance) *tomo.Layer {
	g := res.Grid
	nlon, nlat := len(g.Lon), len(g.Lat)
	l := &tomo.Layer{Lon: append([]float64(nil), g.Lon...), Lat: make([]float64, nlat), Values: make([]float64, nlat*nlon),
		Reg: tomo.NodeRegistered, Weights: []float64{1}, Description: desc, Source: src, Title: desc}
	var s, w float64
	for j := 0; j < nlat; j++ {
		from := nlat - 1 - j
		l.Lat[j] = g.Lat[from]
		c := math.Max(0, math.Cos(l.Lat[j]*math.Pi/180))
		for i := 0; i < nlon; i++ {
			v := vals[from*nlon+i]
			l.Values[j*nlon+i] = v
			s += c * v
			w += c
		}
	}
	l.Mean = s / w
	return l
}

// cmpConsensusBuild builds the boundary condition of the consensus into
// st/consensus/ through build's pipeline: the consensus layer enters the
// build cache as the source of the spec, so that build's pattern,
// amplitude, diagnostics and outputs apply unchanged.
func cmpConsensusBuild(st *outdir.Stage, kind string, csp *config.Spec, cset config.Set, res *compare.Result, models []*cmpModel, meanC *sh.Coeffs) (*cmpConsensus, []string, []string, error) {
	h := sha256.New()
	var names []string
	safe := math.MaxInt
	for _, m := range models {
		fmt.Fprintf(h, "%s  %s\n", m.grid.Source.SHA256, m.file)
		names = append(names, m.name)
		safe = min(safe, m.safe.Lmax)
	}
	src := &source{sha256: hex.EncodeToString(h.Sum(nil)), format: "consensus"}
	c := newCache()
	desc := ""
	switch kind {
	case "mean":
		src.name = fmt.Sprintf("consensus: mean of %s", strings.Join(names, ", "))
		desc = fmt.Sprintf("mean of the %d models' expansions to degree %d, each from %s", len(models), res.LMax, models[0].layer.Description)
		src.layer = cmpConsensusLayer(res, res.Mean, desc, tomo.Provenance{Path: src.name, SHA256: src.sha256, Format: "consensus"})
		// The mean of the fits is the expansion itself; no refit of the
		// sampled map is needed.
		expKey := "expansion " + sourceKey(csp) + fmt.Sprintf(" lmax=%d", max(csp.LMax, 1))
		mc := meanC
		if csp.LMax != meanC.LMax {
			return nil, nil, nil, fmt.Errorf("compare: consensus lmax %d differs from the comparison's %d", csp.LMax, meanC.LMax)
		}
		if _, err := c.get(expKey, func() (any, error) { return &expansion{c: mc}, nil }); err != nil {
			return nil, nil, nil, err
		}
	case "votes":
		src.name = fmt.Sprintf("consensus: votes of %s", strings.Join(names, ", "))
		desc = fmt.Sprintf("vote map of the %d models (slowest %g of the area) as dVs = %g %% x votes / %d, fitted to degree %d", len(models), res.VoteFraction, 100*voteDVs, len(models), res.LMax)
		vals := make([]float64, len(res.Votes))
		for i, v := range res.Votes {
			vals[i] = voteDVs * float64(v) / float64(len(models))
		}
		src.layer = cmpConsensusLayer(res, vals, desc, tomo.Provenance{Path: src.name, SHA256: src.sha256, Format: "consensus"})
		safe = min(safe, tomo.SafeDegree(src.layer).Lmax)
	}
	src.safe = tomo.DegreeLimit{Lmax: safe, Reason: "the lowest of the compared models"}
	if _, err := c.get("source "+sourceKey(csp), func() (any, error) { return src, nil }); err != nil {
		return nil, nil, nil, err
	}
	s, err := buildFolder(context.Background(), c, csp, st.Path("consensus"), false, false, cset)
	if err != nil {
		return nil, nil, nil, err
	}
	cs := &cmpConsensus{Kind: kind, Folder: "consensus", QStar: s.QStar, QMin: s.QMin, QMax: s.QMax}
	var w []string
	if kind == "votes" {
		w = append(w, "consensus: the vote map is a step function; its expansion to a finite degree rings (overshoots) near the steps")
	}
	for _, x := range s.Warnings {
		w = append(w, "consensus: "+x)
	}
	return cs, prefixed("consensus/", s.Files), w, nil
}

// cmpReport writes the HTML report of a comparison; dir holds the files
// already written.
func cmpReport(dir string, sum *cmpSummary, models []*cmpModel, files []string) ([]byte, error) {
	res := sum.Result
	var figs []htmlreport.Figure
	captions := map[string]string{
		"correlation.png": "Degree correlation of every pair with the 95 % and 99 % one-sided significance curves (Eckhardt 1984).",
		"spectra.png":     "Degree power of dVs (mean square per degree) of every model and of the mean.",
		"models.png":      "dVs of every model and of the mean on one colour scale, with the slow-region outlines.",
		"spread.png":      "Spread (standard deviation) of dVs across the models, with the outline of the mean model's slow regions.",
		"votes.png":       "Votes: how many models place each point in their slowest part of the area.",
	}
	for _, name := range []string{"correlation.png", "spectra.png", "models.png", "spread.png", "votes.png"} {
		data, _, err := readInput(filepath.Join(dir, name))
		if err != nil {
			return nil, err
		}
		figs = append(figs, htmlreport.Figure{Caption: name + ": " + captions[name], MIME: "image/png", Data: data})
	}
	var mrows [][]string
	for k, ms := range append(append([]compare.ModelSummary(nil), res.Models...), res.MeanModel) {
		file, sha, layer := "", "", ""
		if k < len(models) {
			file, sha, layer = sum.Inputs[k].File, sum.Inputs[k].SHA256, sum.Inputs[k].Layer
		}
		mrows = append(mrows, []string{ms.Name, file, layer, fmt.Sprintf("%.3f", 100*ms.RMS), fmt.Sprintf("%.1f", 100*ms.SlowFraction),
			strconv.Itoa(len(ms.Regions)), naOr(ms.HasAntipodality, ms.Antipodality, "%.1f"), sha})
	}
	var prows [][]string
	for _, pr := range res.Pairs {
		r2 := "NA"
		if len(pr.ByDegree) > 1 && pr.ByDegree[1].Defined {
			r2 = fmt.Sprintf("%.3f (%.1f %%)", pr.ByDegree[1].R, 100*pr.ByDegree[1].Confidence)
		}
		prows = append(prows, []string{pr.Names[0], pr.Names[1], fmt.Sprintf("%.3f", pr.Total), fmt.Sprintf("%.3f", pr.Weighted), r2})
	}
	sections := []htmlreport.Section{
		{Heading: "Models", Tables: []htmlreport.Table{{Caption: "Models at the comparison depth (dVs in percent)",
			Header: []string{"model", "file", "layer", "rms (%)", "slow area (%)", "slow regions", "antipodality (deg)", "sha256"}, Rows: mrows}}},
		{Heading: "Correlation", Text: []string{fmt.Sprintf("Total correlation over degrees 1-%d (Becker & Boschi 2002), the mean of the degree correlations weighted by the geometric mean of the degree powers, and r at degree 2 with the one-sided confidence that it is positive. correlation.tsv holds every degree.", res.LMax)},
			Tables: []htmlreport.Table{{Header: []string{"a", "b", "total r", "power-weighted r", "r_2 (confidence)"}, Rows: prows}}},
	}
	if ps := sum.Points; ps != nil {
		var rows [][]string
		for _, p := range ps.Points {
			rows = append(rows, []string{fmt.Sprintf("%g", p.Lon), fmt.Sprintf("%g", p.Lat), p.Label, fmt.Sprintf("%.2f", p.DistanceDeg), fmt.Sprintf("%.0f", p.DistanceKm), fmt.Sprintf("%v", p.Inside)})
		}
		sections = append(sections, htmlreport.Section{Heading: "Points",
			Text: []string{fmt.Sprintf("The %d points of %s lie on average %.2f degrees from the nearest slow-region outline of the mean model; %d sets of as many points drawn uniformly on the sphere lie %.2f ± %.2f degrees from it, so p = %.4g (the fraction of random sets at least as close).",
				len(ps.Points), ps.File, ps.MeanDistanceDeg, ps.Trials, ps.RandomMeanDeg, ps.RandomStdDeg, ps.PValue)},
			Tables: []htmlreport.Table{{Header: []string{"lon", "lat", "label", "distance (deg)", "distance (km)", "inside"}, Rows: rows}}})
	}
	if cs := sum.Consensus; cs != nil {
		sections = append(sections, htmlreport.Section{Heading: "Consensus boundary condition",
			Text: []string{fmt.Sprintf("consensus/ holds a boundary condition built from the %s of the models exactly as cmbflux build builds one, with q* = %.3g; its own report is consensus/report.html when html is among --formats.", cs.Kind, cs.QStar), conventionReminder}})
	}
	var rf []htmlreport.File
	for _, n := range files {
		f, err := htmlreport.HashFile(filepath.Join(dir, filepath.FromSlash(n)), n)
		if err != nil {
			return nil, err
		}
		rf = append(rf, f)
	}
	var pp [][2]string
	params := map[string]string{"lmax": strconv.Itoa(res.LMax), "vote fraction": fmt.Sprint(res.VoteFraction), "k-means clusters": strconv.Itoa(res.Options.K)}
	for _, k := range sortedKeys(params) {
		pp = append(pp, [2]string{k, params[k]})
	}
	r := &htmlreport.Report{
		Title: fmt.Sprintf("Comparison of %d tomography models at the core-mantle boundary", len(models)),
		Summary: []string{
			fmt.Sprintf("Models: %s, each reduced to %s and expanded to degree %d.", strings.Join(modelNames(models), ", "), models[0].layer.Description, res.LMax),
			fmt.Sprintf("The mean model has %d slow regions below %.3g %% covering %.1f %% of the CMB.", len(res.MeanModel.Regions), 100*res.MeanModel.Level, 100*res.MeanModel.SlowFraction),
		},
		Warnings:   sum.Warnings,
		Figures:    figs,
		Parameters: htmlreport.KeyValues("Parameters", "parameter", "value", pp...),
		Sections:   sections,
		Files:      rf,
		Generator:  version,
	}
	var b bytes.Buffer
	if err := r.Write(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

func modelNames(models []*cmpModel) []string {
	out := make([]string, len(models))
	for i, m := range models {
		out[i] = m.name
	}
	return out
}

// cmpPrint prints the comparison's summary.
func cmpPrint(w io.Writer, out string, sum *cmpSummary, models []*cmpModel) {
	res := sum.Result
	if out != "" {
		fmt.Fprintf(w, "wrote %s/\n", filepath.ToSlash(out))
	}
	fmt.Fprintf(w, "  models       %s\n", strings.Join(modelNames(models), ", "))
	same := true
	for _, m := range models {
		same = same && m.layer.Description == models[0].layer.Description
	}
	if same {
		fmt.Fprintf(w, "  layer        %s; lmax %d\n", models[0].layer.Description, res.LMax)
	} else {
		fmt.Fprintf(w, "  layers       lmax %d\n", res.LMax)
		for _, m := range models {
			fmt.Fprintf(w, "    %-18s %s\n", m.name, m.layer.Description)
		}
	}
	fmt.Fprintf(w, "  %-20s %8s %9s %14s %16s\n", "model", "rms (%)", "mean (%)", "slow area (%)", "antipodality")
	for _, ms := range append(append([]compare.ModelSummary(nil), res.Models...), res.MeanModel) {
		fmt.Fprintf(w, "  %-20s %8.3f %9.3f %14.1f %16s\n", ms.Name, 100*ms.RMS, 100*ms.Mean, 100*ms.SlowFraction, naOr(ms.HasAntipodality, ms.Antipodality, "%.1f deg"))
	}
	fmt.Fprintf(w, "  %-20s %-20s %8s %8s %18s\n", "a", "b", "total r", "r_2", "r_2 confidence")
	for _, pr := range res.Pairs {
		r2, c2 := "NA", "NA"
		if len(pr.ByDegree) > 1 && pr.ByDegree[1].Defined {
			r2, c2 = fmt.Sprintf("%.3f", pr.ByDegree[1].R), fmt.Sprintf("%.1f %%", 100*pr.ByDegree[1].Confidence)
		}
		fmt.Fprintf(w, "  %-20s %-20s %8.3f %8s %18s\n", pr.Names[0], pr.Names[1], pr.Total, r2, c2)
	}
	if ps := sum.Points; ps != nil {
		fmt.Fprintf(w, "  points       %d, mean distance %.2f deg to the mean model's slow regions (random: %.2f ± %.2f), p = %.4g (%d trials)\n",
			len(ps.Points), ps.MeanDistanceDeg, ps.RandomMeanDeg, ps.RandomStdDeg, ps.PValue, ps.Trials)
	}
	if cs := sum.Consensus; cs != nil {
		fmt.Fprintf(w, "  consensus    %s/consensus/ from the %s: q* = %.3g", filepath.ToSlash(out), cs.Kind, cs.QStar)
		if cs.QMin != nil && cs.QMax != nil {
			fmt.Fprintf(w, ", q from %.3g to %.3g mW/m^2", *cs.QMin, *cs.QMax)
		}
		fmt.Fprintln(w)
	}
	if out != "" {
		fmt.Fprintf(w, "  files        %d (see %s/manifest.yaml)\n", len(sum.Files), filepath.ToSlash(out))
	}
}
