package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/export/figure"
	htmlreport "cmbflux/export/report"
	"cmbflux/tomo"
)

const demoHelp = `Usage: cmbflux demo [--out DIR] [--force] [--quiet]

Runs the whole job on the embedded demo scenario (an invented model, not a
real tomography model) and writes into DIR (default demo-out):

  bc/           one boundary condition: q* = 1 on 80 mW/m^2, adiabat 60 mW/m^2,
                lmax 12 (coefficients in txt, json and csv, netCDF grid,
                GeoJSON outlines, map and spectrum)
  sweep/        a sweep of q* from 0.5 to 3 at lmax 4, 8 and 12
  report.html   a self-contained report of both

It needs nothing but this program.
`

const demoExample = `
Example:

  cmbflux demo --out demo-out
`

func runDemo(stdout, stderr io.Writer, args []string) error {
	p := newParser("demo", stdout, demoHelp, demoExample)
	out := "demo-out"
	var force, quiet bool
	p.stringVar(&out, "out", "DIR", "output folder (default demo-out)")
	p.boolVar(&force, "force", "replace a non-empty output folder written by cmbflux")
	p.boolVar(&quiet, "quiet", "print nothing but warnings and errors")
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("demo", "unexpected argument %q", pos[0])
	}
	if err := checkForce(out, force); err != nil {
		return err
	}
	st, err := outdir.New(out, force)
	if err != nil {
		return err
	}
	defer st.Abort()

	set := config.Set{}
	for k, v := range map[string]string{"demo": "true", "qstar": "1", "qmean": "80", "qad": "60", "lmax": "12",
		"formats": "json,csv,nc,geojson,png"} {
		if err := set.SetFlag(k, v); err != nil {
			return err
		}
	}
	sp, err := config.Resolve(set)
	if err != nil {
		return err
	}
	c := newCache()
	sum, err := buildFolder(context.Background(), c, sp, st.Path("bc"), false, false, set)
	if err != nil {
		return err
	}

	sweepYAML := "# The sweep of cmbflux demo: run it again with cmbflux sweep sweep.yaml --out again\n" +
		"base: {demo: true, qmean: 80, qad: 60}\nvary:\n  qstar: [0.5, 1, 1.5, 2, 2.5, 3]\n  lmax: [4, 8, 12]\n"
	if err := st.WriteFile("sweep.yaml", []byte(sweepYAML)); err != nil {
		return err
	}
	var sout, serr bytes.Buffer
	if err := run(&sout, &serr, []string{"sweep", st.Path("sweep.yaml"), "--out", st.Path("sweep"), "--quiet"}); err != nil {
		return fmt.Errorf("demo sweep: %w", err)
	}
	sw, err := config.ParseSweep("sweep.yaml", []byte(sweepYAML))
	if err != nil {
		return err
	}
	pts := sw.Points()
	sums := make([]*Summary, len(pts))
	for i, pt := range pts {
		if sums[i], err = readSummary(filepath.Join(st.Path("sweep"), pt.Name)); err != nil {
			return err
		}
	}

	// The report: the boundary condition's figures, then the sweep.
	var figs []htmlreport.Figure
	for _, name := range []string{"map.png", "spectrum.png"} {
		data, _, err := readInput(filepath.Join(st.Path("bc"), name))
		if err != nil {
			return err
		}
		figs = append(figs, htmlreport.Figure{Caption: "bc/" + name, MIME: "image/png", Data: data})
	}
	var sb bytes.Buffer
	if err := sweepFigure("demo sweep", "qstar", pts, sums).WritePNG(&sb); err != nil {
		return err
	}
	sweepFig := htmlreport.Figure{Caption: "Sweep: achieved q* (dashed: equal to the requested q*), flux minimum and area fractions against q*, one curve per lmax.", MIME: "image/png", Data: sb.Bytes()}
	rows := [][]string{}
	for i, pt := range pts {
		s := sums[i]
		rows = append(rows, []string{pt.Name, pt.Set["qstar"].Raw, strconv.FormatFloat(s.QStar, 'g', 6, 64), pt.Set["lmax"].Raw, fmt.Sprintf("%.1f", *s.QMin), fmt.Sprintf("%.1f", *s.QMax),
			fmt.Sprintf("%.1f", 100*s.AreaNegative), fmt.Sprintf("%.1f", 100**s.AreaSubadiabatic)})
	}
	var files []htmlreport.File
	for _, n := range append(prefixed("bc/", sum.Files), "sweep/summary.csv", "sweep/runs.tsv") {
		f, err := htmlreport.HashFile(st.Path(n), n)
		if err != nil {
			return err
		}
		files = append(files, f)
	}
	params := specParams(sp)
	var pp [][2]string
	for _, k := range sortedKeys(params) {
		pp = append(pp, [2]string{k, params[k]})
	}
	r := &htmlreport.Report{
		Title: "cmbflux demo: the invented scenario \"" + tomo.DemoName + "\"",
		Summary: []string{
			"This report was made by cmbflux demo from the embedded demo scenario, an invented tomography model (" + tomo.DemoTitle + "). It is not a real model of the Earth.",
			fmt.Sprintf("The boundary condition in bc/ has q* = %.3g on a mean flux of %.3g mW/m^2 (%.3g TW), truncated at degree %d.", sum.QStar, *sum.QMean, *sum.HeatFlowTW, sum.LMax),
			conventionReminder,
		},
		Warnings:    prefixed("bc: ", sum.Warnings),
		Figures:     figs,
		Parameters:  htmlreport.KeyValues("Parameters of bc/", "parameter", "value", pp...),
		Diagnostics: htmlreport.KeyValues("Diagnostics of bc/", "diagnostic", "value", diagnosticRows(sum)...),
		Conventions: htmlreport.KeyValues("Convention of bc/coefficients.txt", "item", "value", [2]string{"normalization", sum.Normalization}, [2]string{"Condon-Shortley phase", "excluded"}, [2]string{"form", sum.Form}, [2]string{"units", sum.Units}, [2]string{"sign", sum.Sign}),
		Sections: []htmlreport.Section{{
			Heading: "Sweep of q* and lmax",
			Text:    []string{"Every run of sweep/ (see sweep/summary.csv): the flux extremes and the fractions of the CMB where the flux is negative or below the adiabatic 60 mW/m^2."},
			Figures: []htmlreport.Figure{sweepFig},
			Tables: []htmlreport.Table{{Caption: "Runs", Header: []string{"run", "q* requested", "q* achieved", "lmax", "q_min (mW/m^2)", "q_max (mW/m^2)", "negative (%)", "sub-adiabatic (%)"},
				Rows: rows}},
		}},
		Files:     files,
		Generator: version,
	}
	var b bytes.Buffer
	if err := r.Write(&b); err != nil {
		return err
	}
	if err := st.WriteFile("report.html", b.Bytes()); err != nil {
		return err
	}
	if err := st.Commit(); err != nil {
		return err
	}
	for _, w := range sum.Warnings {
		fmt.Fprintln(stderr, "cmbflux: warning: bc: "+w)
	}
	if !quiet {
		o := filepath.ToSlash(out)
		fmt.Fprintf(stdout, "wrote %s/\n", o)
		fmt.Fprintf(stdout, "  %s/bc/            q* = %.3g, q_mean = %.3g mW/m^2, lmax %d: %d files\n", o, sum.QStar, *sum.QMean, sum.LMax, len(sum.Files))
		fmt.Fprintf(stdout, "  %s/sweep/         %d runs; diagnostics in %s/sweep/summary.csv\n", o, len(pts), o)
		fmt.Fprintf(stdout, "  %s/report.html    open it in a browser\n", o)
	}
	return nil
}

func prefixed(p string, s []string) []string {
	out := make([]string, len(s))
	for i, x := range s {
		out[i] = p + x
	}
	return out
}

// sweepFigure draws the achieved q* (beside the line y = x: it should
// equal the requested q*), q_min and the negative and sub-adiabatic area
// fractions against the varied parameter x, one curve per combination of the
// other varied parameters. It returns nil when x is not varied or not
// numeric.
func sweepFigure(title, x string, pts []config.Point, sums []*Summary) *figure.Sweep {
	series := map[string]int{}
	var order []string
	for _, pt := range pts {
		var parts []string
		found := false
		for _, kv := range pt.Varied {
			if kv.Key == x {
				found = true
				continue
			}
			parts = append(parts, kv.Key+" "+kv.Raw)
		}
		if !found {
			return nil
		}
		label := strings.Join(parts, ", ")
		if label == "" {
			label = x
		}
		if _, ok := series[label]; !ok {
			series[label] = len(order)
			order = append(order, label)
		}
	}
	panels := []figure.SweepPanel{{YLabel: "achieved q*", Identity: x == "qstar"}, {YLabel: "q_min (mW/m²)"}, {YLabel: "negative area fraction", Fraction: true}}
	hasAd := len(sums) > 0 && sums[0].AreaSubadiabatic != nil
	if hasAd {
		panels = append(panels, figure.SweepPanel{YLabel: "sub-adiabatic area fraction", Fraction: true})
	}
	for p := range panels {
		panels[p].Series = make([]figure.XYSeries, len(order))
		for i, l := range order {
			panels[p].Series[i].Label = l
		}
	}
	for i, pt := range pts {
		s := sums[i]
		if s.QMin == nil {
			return nil
		}
		var label []string
		xv := math.NaN()
		for _, kv := range pt.Varied {
			if kv.Key == x {
				v, err := strconv.ParseFloat(kv.Raw, 64)
				if err != nil {
					return nil
				}
				xv = v
			} else {
				label = append(label, kv.Key+" "+kv.Raw)
			}
		}
		l := strings.Join(label, ", ")
		if l == "" {
			l = x
		}
		k := series[l]
		ys := []float64{s.QStar, *s.QMin, s.AreaNegative}
		if hasAd {
			ys = append(ys, math.NaN())
			if s.AreaSubadiabatic != nil {
				ys[3] = *s.AreaSubadiabatic
			}
		}
		for p := range panels {
			panels[p].Series[k].X = append(panels[p].Series[k].X, xv)
			panels[p].Series[k].Y = append(panels[p].Series[k].Y, ys[p])
		}
	}
	return &figure.Sweep{Title: title, XLabel: x, Panels: panels}
}
