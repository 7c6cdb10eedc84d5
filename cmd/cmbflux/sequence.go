package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"syscall"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/export"
	"cmbflux/flux"
	"cmbflux/tomo"
)

const sequenceHelp = `Usage: cmbflux sequence (--input FILE | --demo | --pattern TERMS) --qstar X --qmean MW_M2
           --times T0:T1:N (--spin-rate DEG [--pole LON:LAT] | --blend-to SOURCE) --out DIR [flags]

Writes a time-dependent boundary condition as one build folder per sample
time. The pattern either turns rigidly at a constant rate (--spin-rate, in
degrees per unit of time, counter-clockwise seen from outside above --pole;
about the north pole, the default, features move east) or is blended
linearly into a second pattern (--blend-to): (1 - w) A + w B with
w = (t - T0)/(T1 - T0) over --blend-span (default the first to the last
time). The pattern at time 0 of a spin is the build's own.

Every build flag applies to every frame: each frame is scaled by the same
rule (the same q*, or --measure value, or physical constants), so a blend
changes the shape at a fixed heterogeneity. Time is in whatever unit the
simulation uses; cmbflux never converts it.

--blend-to SOURCE is a tomography file (read with the same flags as the
input), demo (the demo scenario), demo-merle, demo-roan or demo-dapple (its
invented variants), or pattern:TERMS (an idealised pattern; blend a
pattern only with a pattern).

DIR receives a folder per time named tNNNN_t=TIME (NNNN counts from 0, TIME
as given), each exactly what build writes, times.tsv (frame, time, rotation
in degrees or blend weight, folder, q*, q_min, q_max and where q_min is, in
mW/m^2 and degrees) and manifest.yaml listing every file. A failed run
leaves no DIR behind.
`

const sequenceExample = `
Example (the demo scenario turned eastward by 2 degrees per unit of time
about the north pole, sampled at times 0, 5 and 10):

  cmbflux sequence --demo --qstar 1 --qmean 80 --lmax 8 \
      --spin-rate 2 --times 0:10:3 --out spin

Check that the simulation code steps through the frames in the order of
times.tsv and interpolates between them the way you intend.
`

// maxFrames bounds the frames of one sequence.
const maxFrames = 10000

// sequenceFrame says where a build folder sits in a time sequence; it is
// written into the folder's summary.json.
type sequenceFrame struct {
	Index       int         `json:"index"`
	Time        float64     `json:"time"`
	RotationDeg *float64    `json:"rotation_deg,omitempty"`
	PoleLonLat  *[2]float64 `json:"pole_lonlat,omitempty"`
	BlendWeight *float64    `json:"blend_weight,omitempty"`
	BlendTo     string      `json:"blend_to,omitempty"`
}

// parseTimes reads --times: T0:T1:N (N equally spaced times from T0 to T1
// inclusive, T0 < T1, or N = 1 with T0 = T1) or a comma-separated list of
// increasing times.
func parseTimes(s string) ([]float64, error) {
	bad := func(format string, args ...any) error {
		return usagef("sequence", "--times %q: %s; want T0:T1:N (e.g. 0:10:11) or increasing times separated by commas (e.g. 0,1.5,3)", s, fmt.Sprintf(format, args...))
	}
	num := func(p string) (float64, bool) {
		x, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		return x, err == nil && !math.IsNaN(x) && !math.IsInf(x, 0) && math.Abs(x) <= 1e15
	}
	if strings.Contains(s, ":") {
		parts := strings.Split(s, ":")
		if len(parts) != 3 {
			return nil, bad("a range has three fields")
		}
		t0, ok0 := num(parts[0])
		t1, ok1 := num(parts[1])
		n, err := strconv.Atoi(strings.TrimSpace(parts[2]))
		if !ok0 || !ok1 {
			return nil, bad("T0 and T1 must be finite numbers")
		}
		if err != nil || n < 1 || n > maxFrames {
			return nil, bad("N must be an integer from 1 to %d", maxFrames)
		}
		if n == 1 {
			if t0 != t1 {
				return nil, bad("one time (N = 1) needs T0 = T1")
			}
			return []float64{t0}, nil
		}
		if !(t1 > t0) {
			return nil, bad("T1 must be greater than T0")
		}
		ts := make([]float64, n)
		for i := range ts {
			ts[i] = t0 + (t1-t0)*float64(i)/float64(n-1)
		}
		ts[n-1] = t1
		for i := 1; i < n; i++ {
			if !(ts[i] > ts[i-1]) {
				return nil, bad("the times are too close to tell apart in floating point")
			}
		}
		return ts, nil
	}
	parts := strings.Split(s, ",")
	if len(parts) > maxFrames {
		return nil, bad("at most %d times", maxFrames)
	}
	var ts []float64
	for _, p := range parts {
		x, ok := num(p)
		if !ok {
			return nil, bad("%q is not a finite number", strings.TrimSpace(p))
		}
		if len(ts) > 0 && !(x > ts[len(ts)-1]) {
			return nil, bad("times must increase (%g follows %g)", x, ts[len(ts)-1])
		}
		ts = append(ts, x)
	}
	return ts, nil
}

// parseLonLat reads a position LON:LAT in degrees, for --pole.
func parseLonLat(flagName, s string) (lon, lat float64, err error) {
	a, b, ok := strings.Cut(s, ":")
	lon, e1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
	lat, e2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
	if !ok || e1 != nil || e2 != nil || !(lat >= -90 && lat <= 90) || !(lon >= -360 && lon <= 360) {
		return 0, 0, usagef("sequence", "--%s %q: want LON:LAT in degrees, longitude from -360 to 360 and latitude from -90 to 90 (e.g. 0:90, the north pole)", flagName, s)
	}
	return lon, lat, nil
}

// parseSpan reads --blend-span T0:T1 (T0 != T1).
func parseSpan(s string) (t0, t1 float64, err error) {
	a, b, ok := strings.Cut(s, ":")
	t0, e1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
	t1, e2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
	if !ok || e1 != nil || e2 != nil || math.IsNaN(t0) || math.IsNaN(t1) || math.IsInf(t0, 0) || math.IsInf(t1, 0) || t0 == t1 {
		return 0, 0, usagef("sequence", "--blend-span %q: want T0:T1, two different finite times (weight 0 at T0, 1 at T1)", s)
	}
	return t0, t1, nil
}

// frameName is the folder of frame i at time t.
func frameName(i int, t float64) string {
	return fmt.Sprintf("t%04d_t=%s", i, strconv.FormatFloat(t, 'g', -1, 64))
}

// sequenceOpts are the flags of sequence that are not build parameters.
type sequenceOpts struct {
	config, times, pole, spinRate, blendTo, blendSpan string
	force, quiet                                      bool
}

func runSequence(stdout, stderr io.Writer, args []string) error {
	p := newParser("sequence", stdout, sequenceHelp, sequenceExample)
	p.buildKeys()
	var o sequenceOpts
	p.stringVar(&o.times, "times", "T0:T1:N", "sample times: N equally spaced from T0 to T1, or a list T,T,... (increasing)")
	p.stringVar(&o.spinRate, "spin-rate", "DEG", "turn the pattern by DEG degrees per unit of time about --pole")
	p.stringVar(&o.pole, "pole", "LON:LAT", "rotation pole in degrees (default 0:90, the north pole)")
	p.stringVar(&o.blendTo, "blend-to", "SOURCE", "blend linearly into SOURCE: FILE, demo, demo-merle, demo-roan, demo-dapple or pattern:TERMS")
	p.stringVar(&o.blendSpan, "blend-span", "T0:T1", "times of weight 0 and 1 of the blend (default the first and last time)")
	p.stringVar(&o.config, "config", "FILE", "read the build parameters from a YAML file (- for standard input); flags override it")
	p.boolVar(&o.force, "force", "replace a non-empty output folder written by cmbflux")
	p.boolVar(&o.quiet, "quiet", "print nothing but warnings and errors")
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("sequence", "unexpected argument %q; sequence takes only flags", pos[0])
	}
	// The sequence's own flags first: they are cheap to check.
	if o.times == "" {
		return usagef("sequence", "no sample times: give --times T0:T1:N or a list")
	}
	times, err := parseTimes(o.times)
	if err != nil {
		return err
	}
	switch {
	case o.spinRate == "" && o.blendTo == "":
		return usagef("sequence", "nothing changes in time: give --spin-rate DEG (rotation) or --blend-to SOURCE (blend)")
	case o.spinRate != "" && o.blendTo != "":
		return usagef("sequence", "give either --spin-rate or --blend-to, not both")
	}
	var spin flux.Spin
	spin.PoleLat = 90
	if o.spinRate != "" {
		r, err := strconv.ParseFloat(o.spinRate, 64)
		if err != nil || math.IsNaN(r) || math.IsInf(r, 0) || math.Abs(r) > 1e12 {
			return usagef("sequence", "--spin-rate %q is not a finite number of degrees per unit of time", o.spinRate)
		}
		spin.Rate = r
		if o.pole != "" {
			if spin.PoleLon, spin.PoleLat, err = parseLonLat("pole", o.pole); err != nil {
				return err
			}
		}
		if o.blendSpan != "" {
			return usagef("sequence", "--blend-span is only used with --blend-to")
		}
	} else if o.pole != "" {
		return usagef("sequence", "--pole is only used with --spin-rate")
	}
	t0, t1 := times[0], times[len(times)-1]
	if o.blendTo != "" {
		if o.blendSpan != "" {
			if t0, t1, err = parseSpan(o.blendSpan); err != nil {
				return err
			}
		} else if len(times) < 2 {
			return usagef("sequence", "a blend over one time needs --blend-span T0:T1")
		}
	}
	set, sp, err := resolveBuildSpec("sequence", o.config, p.keys)
	if err != nil {
		return err
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	seq := &sequenceRun{sp: sp, set: set, times: times, spin: spin, blendTo: o.blendTo, t0: t0, t1: t1,
		command: commandLine("sequence", args)}
	rows, warns, err := seq.write(ctx, o.force)
	if err != nil {
		if ctx.Err() != nil {
			return fmt.Errorf("interrupted; nothing was written to %s", sp.Out)
		}
		return err
	}
	for _, w := range warns {
		fmt.Fprintln(stderr, "cmbflux: warning: "+w)
	}
	if !o.quiet {
		printSequence(stdout, sp.Out, seq, rows)
	}
	return nil
}

// sequenceRun is one run of the sequence command.
type sequenceRun struct {
	sp      *config.Spec
	set     config.Set
	times   []float64
	spin    flux.Spin
	blendTo string
	t0, t1  float64 // blend span
	command string
}

// seqRow is one line of times.tsv.
type seqRow struct {
	frame  sequenceFrame
	folder string
	sum    *Summary
}

// blendSource resolves --blend-to into a spec for the second pattern.
func (r *sequenceRun) blendSpec() (*config.Spec, error) {
	b := *r.sp
	b.Input, b.Demo, b.Pattern = "", false, nil
	spec := r.blendTo
	switch {
	case strings.HasPrefix(spec, "pattern:"):
		terms, err := config.ParsePattern(strings.TrimPrefix(spec, "pattern:"))
		if err != nil {
			return nil, usagef("sequence", "--blend-to %q: %v", spec, err)
		}
		b.Pattern = terms
	case spec == "demo" || spec == "demo-"+tomo.DemoName:
		b.Demo = true
	case strings.HasPrefix(spec, "demo-"):
		name := strings.TrimPrefix(spec, "demo-")
		found := false
		for _, n := range tomo.DemoVariantNames {
			found = found || n == name
		}
		if !found {
			return nil, usagef("sequence", "--blend-to %q: no such demo variant; the variants are demo-%s", spec, strings.Join(tomo.DemoVariantNames, ", demo-"))
		}
		b.Input = spec
	default:
		b.Input = spec
	}
	if (b.Pattern == nil) != (r.sp.Pattern == nil) {
		return nil, usagef("sequence", "--blend-to %q: blend an idealised pattern only with another (pattern:TERMS) and tomography only with tomography: their amplitudes are not comparable", spec)
	}
	return &b, nil
}

// variantSource is the layer of a demo variant, selected as build selects
// the demo's.
func variantSource(sp *config.Spec, name string) (*source, error) {
	var g *tomo.Grid
	for _, v := range tomo.DemoVariants() {
		if v.Source.Path == name {
			g = v
		}
	}
	if g == nil {
		return nil, fmt.Errorf("cmbflux: internal error: demo variant %q missing", name)
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
		return nil, withFlagHints(wrapInput(name, err))
	}
	return &source{layer: l, safe: tomo.SafeDegree(l), name: "demo-" + name, sha256: g.Source.SHA256, format: g.Source.Format}, nil
}

// patterns returns a function making the pattern of frame i with its
// sequence position, and the sequence's own warnings. The frames are made
// one at a time (flux.SpinSequence or flux.BlendSequence at one time each),
// so that a long sequence holds one frame's search grids at a time.
func (r *sequenceRun) patterns(c *cache, src *source, base *pattern) (func(i int) (*pattern, error), []string, error) {
	sp := r.sp
	build := func(q *flux.Pattern) (*flux.Result, error) {
		f, err := amplitude(sp, &pattern{flux: q, mean: base.mean})
		if err != nil {
			return nil, err
		}
		if f.res == nil { // --quantity dvs: no flux, the pattern only
			return &flux.Result{Pattern: q}, nil
		}
		return f.res, nil
	}
	var err error
	var warns []string
	if r.blendTo == "" {
		pole := [2]float64{r.spin.PoleLon, r.spin.PoleLat}
		frame := func(i int) (*pattern, error) {
			frames, err := flux.SpinSequence(base.flux, r.spin, r.times[i:i+1], build)
			if err != nil {
				return nil, seqError(err)
			}
			fr := frames[0]
			a := r.spin.Rate * fr.Time
			return &pattern{flux: fr.Result.Pattern, mean: base.mean, notes: base.notes,
				frame: &sequenceFrame{Index: i, Time: fr.Time, RotationDeg: &a, PoleLonLat: &pole}}, nil
		}
		if r.spin.Rate == 0 {
			warns = append(warns, "static sequence: --spin-rate 0 gives the same boundary condition at every time")
		}
		if len(r.times) > 1 {
			step := 0.0
			for i := 1; i < len(r.times); i++ {
				step = math.Max(step, math.Abs(r.spin.Rate*(r.times[i]-r.times[i-1])))
			}
			// A degree-l harmonic has a half-wavelength of 180/l degrees
			// (common practice); a larger step between samples moves the
			// finest structure farther than its own size.
			if half := 180 / float64(sp.LMax); step > half {
				warns = append(warns, fmt.Sprintf("coarse time sampling: the pattern turns up to %.4g degrees between samples, more than %.4g degrees, the half-wavelength of degree %d: a code interpolating between the frames blurs or aliases the structure instead of turning it; sample more times", step, half, sp.LMax))
			}
		}
		return frame, warns, nil
	}
	for _, t := range r.times {
		// As flux.BlendSequence checks, before anything is built.
		if w := (t - r.t0) / (r.t1 - r.t0); w < -1e-12 || w > 1+1e-12 {
			return nil, nil, usagef("sequence", "--times: time %g lies outside the blend span [%g, %g] (--blend-span, default the first to the last time); a blend does not extrapolate", t, r.t0, r.t1)
		}
	}
	bsp, err := r.blendSpec()
	if err != nil {
		return nil, nil, err
	}
	var bsrc *source
	if strings.HasPrefix(bsp.Input, "demo-") && !bsp.Demo && bsp.Pattern == nil && isVariant(bsp.Input) {
		bsrc, err = variantSource(bsp, strings.TrimPrefix(bsp.Input, "demo-"))
		bsp.Input = "\x00demo variant " + bsp.Input // a cache key no file name can take
	} else {
		bsrc, err = c.source(bsp)
	}
	if err != nil {
		return nil, nil, fmt.Errorf("--blend-to: %w", err)
	}
	bpt, err := c.pattern(bsp, bsrc)
	if err != nil {
		return nil, nil, fmt.Errorf("--blend-to: %w", err)
	}
	notes := append([]string(nil), base.notes...)
	for _, n := range bpt.notes {
		notes = append(notes, bsrc.name+": "+n)
	}
	for _, lw := range bsrc.layer.Warnings {
		warns = append(warns, "input: "+bsrc.name+": "+flagHint(lw))
	}
	frame := func(i int) (*pattern, error) {
		frames, err := flux.BlendSequence(base.flux, bpt.flux, r.t0, r.t1, r.times[i:i+1], build)
		if err != nil {
			return nil, seqError(err)
		}
		fr := frames[0]
		w := (fr.Time - r.t0) / (r.t1 - r.t0)
		return &pattern{flux: fr.Result.Pattern, mean: (1-w)*base.mean + w*bpt.mean, notes: notes,
			frame: &sequenceFrame{Index: i, Time: fr.Time, BlendWeight: &w, BlendTo: bsrc.name}}, nil
	}
	return frame, warns, nil
}

func isVariant(input string) bool {
	for _, n := range tomo.DemoVariantNames {
		if input == "demo-"+n {
			return true
		}
	}
	return false
}

// seqError makes the flux package's setting errors (a time outside the
// blend span) usage errors.
func seqError(err error) error {
	if err == nil || errors.Is(err, config.ErrBadConfig) || !errors.Is(err, flux.ErrSetting) {
		return err // a build setting's error names its flag already
	}
	return usagef("sequence", "--times: %v", strings.TrimPrefix(err.Error(), flux.ErrSetting.Error()+": "))
}

// write builds every frame into a staged DIR and commits it.
func (r *sequenceRun) write(ctx context.Context, force bool) ([]seqRow, []string, error) {
	sp := r.sp
	c := newCache()
	src, err := c.source(sp)
	if err != nil {
		return nil, nil, err
	}
	base, err := c.pattern(sp, src)
	if err != nil {
		return nil, nil, err
	}
	frame, warns, err := r.patterns(c, src, base)
	if err != nil {
		return nil, nil, err
	}
	if err := checkForce(sp.Out, force); err != nil {
		return nil, nil, err
	}
	st, err := outdir.New(sp.Out, force)
	if err != nil {
		return nil, nil, err
	}
	defer st.Abort()
	rows := make([]seqRow, len(r.times))
	classes := map[string][]string{} // warning class -> texts, in frame order
	var order []string
	var files []string
	for i := range r.times {
		if err := ctx.Err(); err != nil {
			return nil, nil, err
		}
		pt, err := frame(i)
		if err != nil {
			return nil, nil, err
		}
		name := frameName(i, r.times[i])
		inner, err := outdir.New(st.Path(name), false)
		if err != nil {
			return nil, nil, err
		}
		what := fmt.Sprintf("%s (frame %d, time %g)", r.command, i, r.times[i])
		s, err := produceFrom(ctx, sp, r.set, inner, what, src, pt)
		if err != nil {
			inner.Abort()
			return nil, nil, fmt.Errorf("frame %d (time %g): %w", i, r.times[i], err)
		}
		if err := inner.Commit(); err != nil {
			return nil, nil, err
		}
		for _, f := range s.Files {
			files = append(files, name+"/"+f)
		}
		for _, w := range s.Warnings {
			cl, _, _ := strings.Cut(w, ":")
			if _, ok := classes[cl]; !ok {
				order = append(order, cl)
			}
			classes[cl] = append(classes[cl], w)
		}
		rows[i] = seqRow{frame: *pt.frame, folder: name, sum: s}
	}
	tsv := timesTSV(rows, r.blendTo != "")
	if err := st.WriteFile("times.tsv", tsv); err != nil {
		return nil, nil, err
	}
	man, err := r.manifest(st.Tmp, append(files, "times.tsv"), src, len(rows))
	if err != nil {
		return nil, nil, err
	}
	if err := st.WriteFile("manifest.yaml", man); err != nil {
		return nil, nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, nil, err
	}
	if err := st.Commit(); err != nil {
		return nil, nil, err
	}
	// Each class of warning once: the first frame's text, and how many
	// frames had it when not all did the same.
	for _, cl := range order {
		ws := classes[cl]
		w := ws[0]
		if len(ws) < len(rows) {
			w += fmt.Sprintf(" (in %d of %d frames; see their summary.json)", len(ws), len(rows))
		} else if !allSame(ws) {
			w += fmt.Sprintf(" (at the first time; every frame warns alike, see their summary.json)")
		}
		warns = append(warns, w)
	}
	return rows, warns, nil
}

func allSame(ws []string) bool {
	for _, w := range ws {
		if w != ws[0] {
			return false
		}
	}
	return true
}

// timesTSV writes the index of the frames.
func timesTSV(rows []seqRow, blend bool) []byte {
	var b bytes.Buffer
	col := "rotation_deg"
	if blend {
		col = "blend_weight"
	}
	fmt.Fprintf(&b, "frame\ttime\t%s\tfolder\tqstar\tq_min_mw_m2\tq_max_mw_m2\tq_min_lon\tq_min_lat\n", col)
	for _, r := range rows {
		v := 0.0
		if r.frame.RotationDeg != nil {
			v = *r.frame.RotationDeg
		} else if r.frame.BlendWeight != nil {
			v = *r.frame.BlendWeight
		}
		s := r.sum
		qs, lon, lat := "", "", ""
		if s.QMean != nil {
			qs, lon, lat = fmtF(s.QStar), fmtF(s.QMinLonLat[0]), fmtF(s.QMinLonLat[1])
		}
		fmt.Fprintf(&b, "%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", r.frame.Index, fmtF(r.frame.Time), fmtF(round6(v)), r.folder,
			qs, fmtP(s.QMin), fmtP(s.QMax), lon, lat)
	}
	return b.Bytes()
}

// manifest lists every file of the sequence folder.
func (r *sequenceRun) manifest(dir string, names []string, src *source, n int) ([]byte, error) {
	params := map[string]string{}
	for k, v := range r.set {
		if k != "out" {
			params[k] = v.Raw
		}
	}
	params["times"] = strings.Join(func() []string {
		s := make([]string, len(r.times))
		for i, t := range r.times {
			s[i] = fmtF(t)
		}
		return s
	}(), ",")
	if r.blendTo == "" {
		params["spin-rate"] = fmtF(r.spin.Rate)
		params["pole"] = fmtF(r.spin.PoleLon) + ":" + fmtF(r.spin.PoleLat)
	} else {
		params["blend-to"] = r.blendTo
		params["blend-span"] = fmtF(r.t0) + ":" + fmtF(r.t1)
	}
	m := &export.Manifest{Version: version, Command: r.command, Params: params,
		Inputs:      []export.ManifestInput{{Name: src.name, SHA256: src.sha256, Format: src.format}},
		Diagnostics: map[string]any{"frames": n}}
	sort.Strings(names)
	for _, name := range names {
		if err := m.AddFile(dir, name); err != nil {
			return nil, err
		}
	}
	var b bytes.Buffer
	if err := m.Encode(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

func printSequence(w io.Writer, out string, r *sequenceRun, rows []seqRow) {
	kind := fmt.Sprintf("rotation at %g degrees per unit of time about lon %g, lat %g", r.spin.Rate, r.spin.PoleLon, r.spin.PoleLat)
	col := "turned_deg"
	if r.blendTo != "" {
		kind = fmt.Sprintf("blend into %s, weight 0 at time %g and 1 at time %g", r.blendTo, r.t0, r.t1)
		col = "weight"
	}
	frames := "frames"
	if len(rows) == 1 {
		frames = "frame"
	}
	fmt.Fprintf(w, "wrote %s/ (%d %s; index in times.tsv)\n", filepath.ToSlash(out), len(rows), frames)
	fmt.Fprintf(w, "  %s\n", kind)
	fmt.Fprintf(w, "  %-22s %10s %10s %8s %10s %10s  %s\n", "folder", "time", col, "q*", "q_min", "q_max", "q_min at (lon, lat)")
	for _, row := range rows {
		v := 0.0
		if row.frame.RotationDeg != nil {
			v = *row.frame.RotationDeg
		} else if row.frame.BlendWeight != nil {
			v = *row.frame.BlendWeight
		}
		s := row.sum
		if s.QMean == nil {
			fmt.Fprintf(w, "  %-22s %10.4g %10.4g\n", row.folder, row.frame.Time, v)
			continue
		}
		fmt.Fprintf(w, "  %-22s %10.4g %10.4g %8.4g %10.4g %10.4g  (%.1f, %.1f)\n", row.folder, row.frame.Time, v, s.QStar, *s.QMin, *s.QMax, s.QMinLonLat[0], s.QMinLonLat[1])
	}
}
