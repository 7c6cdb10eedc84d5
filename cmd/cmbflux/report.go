package main

import (
	"bytes"
	"fmt"
	"path/filepath"

	"cmbflux/cmd/cmbflux/internal/config"
	htmlreport "cmbflux/export/report"
	"cmbflux/flux/sh"
)

// conventionReminder is said in every report and in the README.
const conventionReminder = "Check the coefficients against the documentation of your simulation code's conventions " +
	"(normalization, Condon-Shortley phase, real or complex form, sign, units, longitude origin) before starting a simulation."

// buildReport returns the HTML report of one build. dir holds the files
// already written (their hashes go into the report).
func buildReport(sp *config.Spec, pt *pattern, s *Summary, out *sh.Coeffs, f *field, dir string, files []string) ([]byte, error) {
	var figs []htmlreport.Figure
	var b bytes.Buffer
	mp := mapFigure(out, f, s)
	mp.Outlines = mapOutlines(sp, pt, f, s)
	if err := mp.WritePNG(&b); err != nil {
		return nil, err
	}
	figs = append(figs, htmlreport.Figure{Caption: "Map of the " + f.what + " (" + f.units + "), Mollweide projection.", MIME: "image/png", Data: append([]byte(nil), b.Bytes()...)})
	b.Reset()
	if err := spectrumFigure(out, f).WritePNG(&b); err != nil {
		return nil, err
	}
	figs = append(figs, htmlreport.Figure{Caption: "Degree power (mean square per degree) of the output field.", MIME: "image/png", Data: append([]byte(nil), b.Bytes()...)})

	params := specParams(sp)
	var pp [][2]string
	for _, k := range sortedKeys(params) {
		pp = append(pp, [2]string{k, params[k]})
	}
	conv := [][2]string{
		{"normalization", s.Normalization},
		{"Condon-Shortley phase", map[bool]string{true: "included", false: "excluded"}[s.CondonShortley]},
		{"form", s.Form},
		{"units", s.Units},
		{"sign", s.Sign},
		{"longitude origin", "Greenwich, eastward"},
	}
	diag := diagnosticRows(s)
	var rf []htmlreport.File
	for _, n := range files {
		f, err := htmlreport.HashFile(filepath.Join(dir, n), n)
		if err != nil {
			return nil, err
		}
		rf = append(rf, f)
	}
	r := &htmlreport.Report{
		Title: "CMB heat-flux boundary condition",
		Summary: []string{
			fmt.Sprintf("Input: %s (%s). Quantity: %s, truncated at degree %d, taper %s.", s.Input, s.Layer, f.what, s.LMax, s.Taper),
			conventionReminder,
		},
		Warnings:    s.Warnings,
		Figures:     figs,
		Parameters:  htmlreport.KeyValues("Parameters", "parameter", "value", pp...),
		Conventions: htmlreport.KeyValues("Convention of the coefficient files", "item", "value", conv...),
		Diagnostics: htmlreport.KeyValues("Diagnostics", "diagnostic", "value", diag...),
		Files:       rf,
		Generator:   version,
	}
	b.Reset()
	if err := r.Write(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// diagnosticRows are the rows of a build's diagnostics table in a report.
func diagnosticRows(s *Summary) [][2]string {
	diag := [][2]string{
		{"q* (measured)", fmtF(s.QStar)},
		{"q* definition", s.QStarDefinition},
		{"rms ratio", fmtF(s.RMSRatio)},
		{"area with negative flux", fmt.Sprintf("%.2f %%", 100*s.AreaNegative)},
		{"q_max at (lon, lat)", fmt.Sprintf("%g, %g", s.QMaxLonLat[0], s.QMaxLonLat[1])},
		{"q_min at (lon, lat)", fmt.Sprintf("%g, %g", s.QMinLonLat[0], s.QMinLonLat[1])},
	}
	if s.QMean != nil {
		diag = append(diag, [2]string{"q_mean", fmt.Sprintf("%.4g mW/m^2 (%.4g TW)", *s.QMean, *s.HeatFlowTW)},
			[2]string{"q_max", fmt.Sprintf("%.4g mW/m^2", *s.QMax)}, [2]string{"q_min", fmt.Sprintf("%.4g mW/m^2", *s.QMin)})
	}
	if s.AreaSubadiabatic != nil {
		diag = append(diag, [2]string{"area with sub-adiabatic flux", fmt.Sprintf("%.2f %%", 100**s.AreaSubadiabatic)})
	}
	return diag
}
