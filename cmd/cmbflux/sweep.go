package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"syscall"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/cmd/cmbflux/internal/progress"
	htmlreport "cmbflux/export/report"

	"golang.org/x/term"
)

const sweepHelp = `Usage: cmbflux sweep SWEEP.yaml [--out DIR] [--resume] [--only I[,J...]] [flags]

Writes one boundary condition for every point of the cartesian product of
the lists in SWEEP.yaml. The file has

  base:            a build configuration, with the keys of build.yaml
  vary:            parameter: [value, value, ...] for any build parameter
  out:             optional output folder, relative to the file's folder

Each run goes to DIR/NNNN_key=value_..., written under a temporary name and
renamed when complete, so an interrupted sweep (Ctrl-C, SIGTERM, kill -9,
a job killed by the scheduler) never leaves a run that looks complete.
DIR/runs.tsv lists the runs by index; DIR/summary.csv, written once every
run is complete, holds every run's diagnostics. Runs that differ only in
amplitude share one spherical-harmonic transform.

On a cluster, a job array runs one index per task:

  cmbflux sweep sweep.yaml --only $SLURM_ARRAY_TASK_ID

(--only implies --resume for the runs it names; the task that completes the
sweep writes summary.csv.)
`

const sweepExample = `
Example (12 runs of the demo scenario, written to ./runs):

  cat > sweep.yaml <<'EOF'
  base: {demo: true, qmean: 80, qad: 60}
  vary:
    qstar: [0, 1, 2.3, 5]
    lmax: [4, 8, 16]
  EOF
  cmbflux sweep sweep.yaml --out runs
  cmbflux sweep sweep.yaml --out runs --resume    # after an interruption
`

type sweepOpts struct {
	out    string
	resume bool
	force  bool
	quiet  bool
	only   string
	jobs   int
	list   bool
}

func runSweep(stdout, stderr io.Writer, args []string) error {
	// Ctrl-C and SIGTERM (a scheduler's time limit) stop the sweep between
	// runs; the runs in progress are removed, the complete ones kept.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	p := newParser("sweep", stdout, sweepHelp, sweepExample)
	o := sweepOpts{jobs: runtime.NumCPU()}
	p.stringVar(&o.out, "out", "DIR", "output folder (default: the file's out:)")
	p.boolVar(&o.resume, "resume", "keep the runs already complete (checked against their manifests) and do the rest")
	p.stringVar(&o.only, "only", "I[,J...]", "do only the runs with these indices from runs.tsv (ranges like 4-7 allowed)")
	p.intVar(&o.jobs, "jobs", "N", "runs in parallel (default: the number of CPUs)")
	p.boolVar(&o.list, "list", "print the runs (runs.tsv) and exit without writing anything")
	p.boolVar(&o.force, "force", "delete the contents of an output folder written by cmbflux (another sweep, or this one) and start over")
	p.boolVar(&o.quiet, "quiet", "print nothing but warnings and errors")
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("sweep", "give exactly one sweep file, got %d arguments", len(pos))
	}
	data, name, err := readInput(pos[0])
	if err != nil {
		return err
	}
	sw, err := config.ParseSweep(name, data)
	if err != nil {
		return err
	}
	if o.jobs < 1 {
		return usagef("sweep", "--jobs %d: need at least 1", o.jobs)
	}
	pts := sw.Points()
	specs := make([]*config.Spec, len(pts))
	for i, pt := range pts {
		sp, err := config.Resolve(pt.Set)
		if err == nil {
			err = validateSpec(sp)
		}
		if err != nil {
			return fmt.Errorf("run %s: %w", pt.Name, err)
		}
		specs[i] = sp
	}
	index := runsTSV(sw, pts)
	if o.list {
		_, err := stdout.Write(index)
		return err
	}
	out := o.out
	if out == "" {
		out = sw.Out
	}
	if out == "" {
		return usagef("sweep", "no output folder: give --out DIR or out: in %s", name)
	}
	var sel []int
	if o.only != "" {
		if sel, err = parseIndices(o.only, len(pts)); err != nil {
			return err
		}
	} else {
		for i := range pts {
			sel = append(sel, i)
		}
	}
	resume := o.resume || o.only != ""
	if err := prepareSweepDir(out, index, data, resume, o.force); err != nil {
		return err
	}
	tty := false
	if f, ok := stderr.(*os.File); ok {
		tty = term.IsTerminal(int(f.Fd()))
	}
	var pw io.Writer = stderr
	if o.quiet {
		pw = nil
	}
	bar := progress.New(pw, "sweep", len(sel), tty)
	c := newCache()
	type result struct {
		skipped bool
		err     error
	}
	results := make([]result, len(pts))
	work := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < min(o.jobs, len(sel)); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range work {
				if ctx.Err() != nil {
					results[i].err = ctx.Err()
					continue
				}
				dir := filepath.Join(out, pts[i].Name)
				if complete(dir) {
					results[i].skipped = true
					bar.Done(true)
					continue
				}
				if err := os.RemoveAll(dir); err != nil {
					results[i].err = err
					continue
				}
				_, err := buildFolderCmd(ctx, c, specs[i], dir, false, true, pts[i].Set,
					fmt.Sprintf("cmbflux sweep %s --only %d (run %s)", shellQuote(name), i, pts[i].Name))
				results[i].err = err
				if err == nil {
					bar.Done(false)
				}
			}
		}()
	}
	for _, i := range sel {
		work <- i
	}
	close(work)
	wg.Wait()
	bar.Finish()

	if ctx.Err() != nil {
		return fmt.Errorf("interrupted; the runs already complete are kept: run the same command with --resume to finish")
	}
	var failed []string
	var firstErr error
	built, skipped := 0, 0
	for _, i := range sel {
		r := results[i]
		switch {
		case r.err != nil:
			failed = append(failed, pts[i].Name)
			if firstErr == nil {
				firstErr = fmt.Errorf("run %s: %w", pts[i].Name, r.err)
			}
		case r.skipped:
			skipped++
		default:
			built++
		}
	}
	// Warnings of the selected runs, read back from their summaries so that a
	// resumed sweep reports the same as an uninterrupted one.
	type class struct {
		runs []int
		msgs map[string]bool
	}
	warn := map[string]*class{}
	for _, i := range sel {
		if results[i].err != nil {
			continue
		}
		s, err := readSummary(filepath.Join(out, pts[i].Name))
		if err != nil {
			return err
		}
		for _, w := range s.Warnings {
			k, _, _ := strings.Cut(w, ":")
			c := warn[k]
			if c == nil {
				c = &class{msgs: map[string]bool{}}
				warn[k] = c
			}
			if len(c.runs) == 0 || c.runs[len(c.runs)-1] != i {
				c.runs = append(c.runs, i)
			}
			c.msgs[w] = true
		}
	}
	for _, k := range sortedKeys(warn) {
		c := warn[k]
		if len(c.msgs) == 1 {
			for m := range c.msgs {
				fmt.Fprintf(stderr, "cmbflux: warning: %s (%s)\n", m, runList(c.runs, len(pts)))
			}
			continue
		}
		fmt.Fprintf(stderr, "cmbflux: warning: %s in %s; see the warnings in each run's summary.json\n", k, runList(c.runs, len(pts)))
	}
	if firstErr != nil {
		if len(failed) > 1 {
			return fmt.Errorf("%d runs failed (%s); the first: %w", len(failed), strings.Join(failed, ", "), firstErr)
		}
		return firstErr
	}
	all, err := writeSweepSummary(out, sw, pts)
	if err != nil {
		return err
	}
	if !o.quiet {
		fmt.Fprintf(stdout, "sweep: %s in %s/ (%d built, %d already complete)\n", plural(len(sel), "run"), filepath.ToSlash(out), built, skipped)
		if all {
			fmt.Fprintf(stdout, "sweep: all %d runs complete; diagnostics in %s and %s\n", len(pts), filepath.ToSlash(filepath.Join(out, "summary.csv")), filepath.ToSlash(filepath.Join(out, "report.html")))
		} else {
			fmt.Fprintf(stdout, "sweep: other runs are still missing; summary.csv is written when all %d are complete\n", len(pts))
		}
	}
	return nil
}

// runList formats run indices compactly: "runs 0-3, 7".
func runList(idx []int, total int) string {
	sort.Ints(idx)
	if len(idx) == total {
		return "all runs"
	}
	var parts []string
	for i := 0; i < len(idx); {
		j := i
		for j+1 < len(idx) && idx[j+1] == idx[j]+1 {
			j++
		}
		if j > i {
			parts = append(parts, fmt.Sprintf("%d-%d", idx[i], idx[j]))
		} else {
			parts = append(parts, strconv.Itoa(idx[i]))
		}
		i = j + 1
	}
	if len(idx) == 1 {
		return "run " + parts[0]
	}
	return "runs " + strings.Join(parts, ", ")
}

// parseIndices reads "3", "0,4,9" or "2-5" against n runs.
func parseIndices(s string, n int) ([]int, error) {
	var out []int
	seen := map[int]bool{}
	for _, part := range strings.Split(s, ",") {
		part = strings.TrimSpace(part)
		lo, hi, isRange := strings.Cut(part, "-")
		a, err1 := strconv.Atoi(lo)
		b := a
		var err2 error
		if isRange {
			b, err2 = strconv.Atoi(hi)
		}
		if err1 != nil || err2 != nil || a > b {
			return nil, usagef("sweep", "--only %q: want indices like 3, 0,4,9 or 2-5", s)
		}
		if a < 0 || b >= n {
			return nil, usagef("sweep", "--only %q: the sweep has runs 0 to %d (see runs.tsv)", s, n-1)
		}
		for i := a; i <= b; i++ {
			if !seen[i] {
				seen[i] = true
				out = append(out, i)
			}
		}
	}
	return out, nil
}

// runsTSV is the index of the runs: index, folder, varied values.
func runsTSV(sw *config.Sweep, pts []config.Point) []byte {
	var b bytes.Buffer
	b.WriteString("index\trun")
	for _, a := range sw.Axes {
		b.WriteString("\t" + a.Key)
	}
	b.WriteString("\n")
	for _, p := range pts {
		fmt.Fprintf(&b, "%d\t%s", p.Index, p.Name)
		for _, kv := range p.Varied {
			b.WriteString("\t" + strings.NewReplacer("\t", " ", "\n", " ").Replace(kv.Raw))
		}
		b.WriteString("\n")
	}
	return b.Bytes()
}

// prepareSweepDir makes sure out holds this sweep (or nothing) and writes
// runs.tsv and a copy of the sweep file.
func prepareSweepDir(out string, index, sweepFile []byte, resume, force bool) error {
	ents, err := os.ReadDir(out)
	if err != nil && !os.IsNotExist(err) {
		return err
	}
	visible := 0
	for _, e := range ents {
		if !outdir.IsTemp(e.Name()) {
			visible++
		}
	}
	if visible > 0 {
		old, err := os.ReadFile(filepath.Join(out, "runs.tsv"))
		same := err == nil && bytes.Equal(old, index)
		switch {
		case force:
			if err := checkForce(out, true); err != nil {
				return err
			}
			if err := clearDir(out); err != nil {
				return err
			}
		case !same:
			return fmt.Errorf("%s: %w and holds no results of this sweep (its runs.tsv differs or is missing); choose another --out or give --force to delete its contents", out, outdir.ErrNotEmpty)
		case !resume:
			return fmt.Errorf("%s: %w: it holds results of this sweep; give --resume to complete it or --force to start over", out, outdir.ErrNotEmpty)
		}
	}
	if err := os.MkdirAll(out, 0o755); err != nil {
		return err
	}
	if err := outdir.Clean(out); err != nil {
		return err
	}
	if err := outdir.WriteFile(filepath.Join(out, "runs.tsv"), index); err != nil {
		return err
	}
	return outdir.WriteFile(filepath.Join(out, "sweep.yaml"), sweepFile)
}

func clearDir(dir string) error {
	ents, err := os.ReadDir(dir)
	if err != nil {
		return err
	}
	for _, e := range ents {
		if err := os.RemoveAll(filepath.Join(dir, e.Name())); err != nil {
			return err
		}
	}
	return nil
}

// complete reports whether dir holds a finished run whose files match its
// manifest.
func complete(dir string) bool {
	if _, err := os.Stat(filepath.Join(dir, "manifest.yaml")); err != nil {
		return false
	}
	return verifyFolder(dir) == nil
}

func readSummary(dir string) (*Summary, error) {
	data, err := os.ReadFile(filepath.Join(dir, "summary.json"))
	if err != nil {
		return nil, err
	}
	var s Summary
	if err := json.Unmarshal(data, &s); err != nil {
		return nil, fmt.Errorf("%s: %v", filepath.Join(dir, "summary.json"), err)
	}
	return &s, nil
}

// writeSweepSummary writes summary.csv when every run is complete and
// reports whether it did.
func writeSweepSummary(out string, sw *config.Sweep, pts []config.Point) (bool, error) {
	sums := make([]*Summary, len(pts))
	for i, p := range pts {
		dir := filepath.Join(out, p.Name)
		if _, err := os.Stat(filepath.Join(dir, "manifest.yaml")); err != nil {
			return false, nil
		}
		s, err := readSummary(dir)
		if err != nil {
			if errors.Is(err, os.ErrNotExist) {
				return false, nil
			}
			return false, err
		}
		sums[i] = s
	}
	err := outdir.Write(filepath.Join(out, "summary.csv"), func(w io.Writer) error {
		cw := csv.NewWriter(w)
		head := []string{"index", "run"}
		for _, a := range sw.Axes {
			head = append(head, "param_"+a.Key)
		}
		head = append(head, summaryColumns...)
		if err := cw.Write(head); err != nil {
			return err
		}
		for i, p := range pts {
			rec := []string{strconv.Itoa(p.Index), p.Name}
			for _, kv := range p.Varied {
				rec = append(rec, kv.Raw)
			}
			rec = append(rec, sums[i].row()...)
			if err := cw.Write(rec); err != nil {
				return err
			}
		}
		cw.Flush()
		return cw.Error()
	})
	if err != nil {
		return false, err
	}
	var fig []byte
	if sf := sweepFigure("sweep "+filepath.Base(sw.File), "qstar", pts, sums); sf != nil {
		var b bytes.Buffer
		if err := sf.WritePNG(&b); err != nil {
			return false, err
		}
		fig = b.Bytes()
		if err := outdir.WriteFile(filepath.Join(out, "sweep.png"), fig); err != nil {
			return false, err
		}
	}
	html, err := sweepReport(out, sw, pts, sums, fig)
	if err != nil {
		return false, err
	}
	return true, outdir.WriteFile(filepath.Join(out, "report.html"), html)
}

// maxReportRows bounds the table of runs in a sweep's report.
const maxReportRows = 2000

// sweepReport is the HTML overview of a complete sweep.
func sweepReport(out string, sw *config.Sweep, pts []config.Point, sums []*Summary, fig []byte) ([]byte, error) {
	var axes []string
	for _, a := range sw.Axes {
		vals := make([]string, len(a.Values))
		for i, v := range a.Values {
			vals[i] = v.Raw
		}
		axes = append(axes, a.Key+" in ["+strings.Join(vals, ", ")+"]")
	}
	head := []string{"index", "run"}
	for _, a := range sw.Axes {
		head = append(head, a.Key)
	}
	head = append(head, "q* achieved", "q_min (mW/m^2)", "q_max (mW/m^2)", "negative (%)", "sub-adiabatic (%)", "warnings")
	var rows [][]string
	warnRuns := map[string][]int{}
	for i, p := range pts {
		s := sums[i]
		for _, w := range s.Warnings {
			k, _, _ := strings.Cut(w, ":")
			warnRuns[k] = append(warnRuns[k], i)
		}
		if i >= maxReportRows {
			continue
		}
		row := []string{strconv.Itoa(p.Index), p.Name}
		for _, kv := range p.Varied {
			row = append(row, kv.Raw)
		}
		f := func(v *float64, scale float64) string {
			if v == nil {
				return ""
			}
			return strconv.FormatFloat(*v*scale, 'f', 2, 64)
		}
		row = append(row, strconv.FormatFloat(s.QStar, 'g', 4, 64), f(s.QMin, 1), f(s.QMax, 1),
			f(&s.AreaNegative, 100), f(s.AreaSubadiabatic, 100), strconv.Itoa(len(s.Warnings)))
		rows = append(rows, row)
	}
	var warns []string
	for _, k := range sortedKeys(warnRuns) {
		warns = append(warns, fmt.Sprintf("%s in %s (see each run's summary.json)", k, runList(warnRuns[k], len(pts))))
	}
	text := []string{fmt.Sprintf("%d runs: %s. Base: %s.", len(pts), strings.Join(axes, "; "), baseText(sw.Base)), conventionReminder}
	if len(pts) > maxReportRows {
		text = append(text, fmt.Sprintf("The table shows the first %d runs; summary.csv has all %d.", maxReportRows, len(pts)))
	}
	r := &htmlreport.Report{
		Title:     "cmbflux sweep " + filepath.Base(sw.File),
		Summary:   text,
		Warnings:  warns,
		Sections:  []htmlreport.Section{{Heading: "Runs", Tables: []htmlreport.Table{{Caption: "Diagnostics of every run (summary.csv)", Header: head, Rows: rows}}}},
		Generator: version,
	}
	if fig != nil {
		r.Figures = []htmlreport.Figure{{Caption: "q_min and the area fractions of negative and sub-adiabatic flux against q*.", MIME: "image/png", Data: fig}}
	}
	for _, n := range []string{"runs.tsv", "summary.csv", "sweep.png"} {
		if n == "sweep.png" && fig == nil {
			continue
		}
		f, err := htmlreport.HashFile(filepath.Join(out, n), n)
		if err != nil {
			return nil, err
		}
		r.Files = append(r.Files, f)
	}
	var b bytes.Buffer
	if err := r.Write(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// baseText lists a sweep's base parameters as key = value.
func baseText(s config.Set) string {
	var parts []string
	for _, k := range s.Keys() {
		parts = append(parts, k+" = "+s[k].Raw)
	}
	if len(parts) == 0 {
		return "defaults"
	}
	return strings.Join(parts, ", ")
}

// plural returns "1 run" or "n runs".
func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}
