package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/compare"
	"cmbflux/export/figure"
)

const compareHelp = `Usage: cmbflux compare MODEL MODEL [MODEL...] [--lmax N] [--depth KM | --depth-range KM:KM] [--out DIR] [--json]

Compares tomography models at the base of the mantle: each MODEL (a grid
file, or demo for the embedded scenario) is reduced to the same layer and
expanded to degree --lmax; then for every pair the correlation per degree
with its significance (Eckhardt 1984) and the total correlation over
degrees 1..lmax (Becker & Boschi 2002), and for every model its rms, the
area of its slow regions below --level and how antipodal the two largest
are. With --out DIR, DIR receives compare.json and figures of the degree
correlations and spectra, and maps of the mean model and of the spread.
`

const compareExample = `
Example (the demo scenario against itself turned 30 degrees east):

  cmbflux build --demo --quantity dvs --rotate 30 --formats nc --out demo-turned
  cmbflux compare demo demo-turned/field.nc --lmax 8
`

func runCompare(stdout, stderr io.Writer, args []string) error {
	p := newParser("compare", stdout, compareHelp, compareExample)
	var out, varName, depth, depthRange string
	var asJSON, force bool
	lmax := 8
	level := -1.0
	p.intVar(&lmax, "lmax", "N", "common truncation degree (default 8)")
	p.stringVar(&depth, "depth", "KM", "use the level nearest to this depth in every model")
	p.stringVar(&depthRange, "depth-range", "KM:KM", "average the levels in this range in every model")
	p.stringVar(&varName, "var", "NAME", "variable or column to read from every file")
	p.fs.Float64Var(&level, "level", level, "dVs (percent) outlining the slow regions (default -1, common practice)")
	p.extra = append(p.extra, "level\x00PCT")
	p.stringVar(&out, "out", "DIR", "also write compare.json and figures into DIR")
	p.boolVar(&asJSON, "json", "print the comparison as JSON")
	p.boolVar(&force, "force", "replace a non-empty output folder")
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	if len(pos) < 2 {
		return usagef("compare", "give at least two models (grid files, or demo)")
	}
	if lmax < 1 || lmax > 200 {
		return usagef("compare", "--lmax %d: want 1 to 200", lmax)
	}
	c := newCache()
	var models []compare.Model
	seen := map[string]int{}
	for _, m := range pos {
		set := config.Set{}
		if m == "demo" {
			set.SetFlag("demo", "true")
		} else {
			set.SetFlag("input", m)
		}
		for k, v := range map[string]string{"var": varName, "depth": depth, "depth-range": depthRange} {
			if v != "" {
				if err := set.SetFlag(k, v); err != nil {
					return err
				}
			}
		}
		set.SetFlag("quantity", "dvs")
		set.SetFlag("lmax", fmt.Sprint(lmax))
		sp, err := config.Resolve(set)
		if err != nil {
			return err
		}
		src, err := c.source(sp)
		if err != nil {
			return err
		}
		coeffs, err := fitLayer(src.layer, lmax)
		if err != nil {
			return err
		}
		name := strings.TrimSuffix(filepath.Base(m), filepath.Ext(m))
		if m == "demo" {
			name = "demo"
		}
		if n := seen[name]; n > 0 {
			name = fmt.Sprintf("%s-%d", name, n+1)
		}
		seen[name]++
		for _, w := range src.layer.Warnings {
			fmt.Fprintf(stderr, "cmbflux: warning: %s: %s\n", m, w)
		}
		if lmax > src.safe.Lmax {
			fmt.Fprintf(stderr, "cmbflux: warning: %s: lmax %d is above degree %d, the most it resolves\n", m, lmax, src.safe.Lmax)
		}
		models = append(models, compare.Model{Name: name, Coeffs: coeffs})
	}
	res, err := compare.Analyze(models, compare.Options{LMax: lmax, Level: level / 100})
	if err != nil {
		return err
	}
	js, err := marshalJSON(res)
	if err != nil {
		return err
	}
	if out != "" {
		if err := writeCompare(out, force, res, models, js); err != nil {
			return err
		}
	}
	if asJSON {
		_, err := stdout.Write(js)
		return err
	}
	printCompare(stdout, res)
	if out != "" {
		fmt.Fprintf(stdout, "wrote %s/\n", filepath.ToSlash(out))
	}
	return nil
}

func printCompare(w io.Writer, r *compare.Result) {
	fmt.Fprintf(w, "models at degree %d\n", r.LMax)
	fmt.Fprintf(w, "  %-20s %10s %10s %14s %14s\n", "model", "rms (%)", "mean (%)", "slow area (%)", "antipodal (deg)")
	for _, m := range append(append([]compare.ModelSummary(nil), r.Models...), r.MeanModel) {
		anti := "-"
		if m.HasAntipodality {
			anti = fmt.Sprintf("%.1f", m.Antipodality)
		}
		fmt.Fprintf(w, "  %-20s %10.3f %10.3f %14.1f %14s\n", m.Name, 100*m.RMS, 100*m.Mean, 100*m.SlowFraction, anti)
	}
	for _, pr := range r.Pairs {
		fmt.Fprintf(w, "%s vs %s: total correlation %.3f (degrees 1-%d)\n", pr.Names[0], pr.Names[1], pr.Total, r.LMax)
		fmt.Fprintf(w, "  %3s %8s %12s\n", "l", "r_l", "confidence")
		for _, d := range pr.ByDegree {
			if !d.Defined {
				fmt.Fprintf(w, "  %3d %8s %12s\n", d.L, "-", "-")
				continue
			}
			fmt.Fprintf(w, "  %3d %8.3f %11.1f%%\n", d.L, d.R, 100*d.Confidence)
		}
	}
}

func writeCompare(out string, force bool, r *compare.Result, models []compare.Model, js []byte) error {
	st, err := outdir.New(out, force)
	if err != nil {
		return err
	}
	defer st.Abort()
	if err := st.WriteFile("compare.json", js); err != nil {
		return err
	}
	var series []figure.Series
	for _, pr := range r.Pairs {
		y := make([]float64, r.LMax+1)
		y[0] = math.NaN()
		for _, d := range pr.ByDegree {
			if d.L <= r.LMax {
				y[d.L] = d.R
				if !d.Defined {
					y[d.L] = math.NaN()
				}
			}
		}
		series = append(series, figure.Series{Label: pr.Names[0] + " vs " + pr.Names[1], Y: y})
	}
	var thr []figure.Series
	for _, cr := range r.Critical {
		y := make([]float64, r.LMax+1)
		for i := range y {
			y[i] = math.NaN()
		}
		for i, l := range cr.L {
			if l <= r.LMax {
				y[l] = cr.OneSided[i]
			}
		}
		thr = append(thr, figure.Series{Label: fmt.Sprintf("%g %% one-sided", 100*cr.Confidence), Y: y})
	}
	var spec []figure.Series
	for _, m := range r.Models {
		spec = append(spec, figure.Series{Label: m.Name, Y: m.Spectrum})
	}
	g := r.Grid
	fg := func(v []float64) *figure.Grid {
		return &figure.Grid{NLon: len(g.Lon), NLat: len(g.Lat), Lon0: g.Lon[0], Lat0: g.Lat[0], DLat: g.Lat[1] - g.Lat[0], Values: scaled(v, 100)}
	}
	figs := map[string]figure.Figure{
		"correlation.png": &figure.Correlation{Title: "degree correlation", Series: series, Thresholds: thr},
		"spectra.png":     &figure.Spectrum{Title: "degree power of dlnVs", YLabel: "power per degree (fraction^2)", Series: spec},
		"mean.png":        &figure.Map{Title: "mean model", Grid: fg(r.Mean), Label: "dVs", Units: "%"},
		"spread.png":      &figure.Map{Title: "spread across models (standard deviation)", Grid: fg(r.Std), Label: "std dVs", Units: "%", Center: 0},
	}
	for _, name := range sortedKeys(figs) {
		var b bytes.Buffer
		if err := figs[name].WritePNG(&b); err != nil {
			return err
		}
		if err := st.WriteFile(name, b.Bytes()); err != nil {
			return err
		}
	}
	return st.Commit()
}

func scaled(v []float64, k float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = k * x
	}
	return out
}

