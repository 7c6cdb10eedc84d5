package main

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"sort"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/export"
	"cmbflux/export/figure"
	"cmbflux/flux/sh"
)

// meta returns the header of every data file of a build.
func meta(sp *config.Spec, src *source, f *field, set config.Set) *export.Meta {
	m := &export.Meta{Quantity: f.what, Units: f.units, Sign: f.sign, Version: version, Params: map[string]string{}}
	if src != nil {
		m.Inputs = []export.Input{{Name: src.name, SHA256: src.sha256}}
	}
	for k, v := range set {
		if k != "out" {
			m.Params[k] = v.Raw
		}
	}
	return m
}

// writeOutputs writes the coefficient table and the requested formats into
// st and returns the names written.
func writeOutputs(ctx context.Context, sp *config.Spec, src *source, pt *pattern, f *field, conv sh.Convention, s *Summary, st *outdir.Stage) ([]string, error) {
	m := meta(sp, src, f, nil)
	m.Params = map[string]string{}
	for k, v := range specParams(sp) {
		m.Params[k] = v
	}
	opt := &export.CoeffOptions{Conv: conv, Complex: sp.Form == "complex"}
	var names []string
	coeffFile := func(name string, format export.Format) error {
		var b bytes.Buffer
		if err := export.WriteCoeffs(&b, format, f.out, m, opt); err != nil {
			return err
		}
		names = append(names, name)
		return st.WriteFile(name, b.Bytes())
	}
	if err := coeffFile("coefficients.txt", export.FormatText); err != nil {
		return nil, err
	}
	for _, format := range sp.Formats {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		var err error
		switch format {
		case "txt":
		case "json":
			err = coeffFile("coefficients.json", export.FormatJSON)
		case "csv":
			err = coeffFile("coefficients.csv", export.FormatCSV)
		case "png", "svg":
			var b bytes.Buffer
			mp := mapFigure(f.out, f, s)
			if format == "png" {
				err = mp.WritePNG(&b)
			} else {
				err = mp.WriteSVG(&b)
			}
			if err == nil {
				names = append(names, "map."+format)
				err = st.WriteFile("map."+format, b.Bytes())
			}
			if err == nil {
				b.Reset()
				sp := spectrumFigure(f.out, f)
				if format == "png" {
					err = sp.WritePNG(&b)
				} else {
					err = sp.WriteSVG(&b)
				}
				if err == nil {
					names = append(names, "spectrum."+format)
					err = st.WriteFile("spectrum."+format, b.Bytes())
				}
			}
		default:
			err = fmt.Errorf("output format %s is not available in this version of cmbflux", format)
		}
		if err != nil {
			return nil, err
		}
	}
	sort.Strings(names)
	return names, nil
}

// specParams returns the resolved parameters of a build, as written into
// file headers (defaults included, units stated).
func specParams(sp *config.Spec) map[string]string {
	p := map[string]string{
		"lmax": fmt.Sprint(sp.LMax), "taper": sp.Taper, "quantity": sp.Quantity, "grid": sp.Grid,
	}
	if sp.Demo {
		p["input"] = "demo"
	} else {
		p["input"] = sp.Input
	}
	if sp.Var != "" {
		p["var"] = sp.Var
	}
	switch {
	case sp.HasRange:
		p["depth-range"] = fmt.Sprintf("%g:%g km", sp.DepthMin, sp.DepthMax)
	case sp.HasDepth:
		p["depth"] = fmt.Sprintf("%g km", sp.Depth)
	}
	if sp.Rotate != 0 {
		p["rotate"] = fmt.Sprintf("%g deg", sp.Rotate)
	}
	if sp.HasQStar {
		p["qstar"] = fmt.Sprint(sp.QStar)
	}
	if sp.HasQMean {
		p["qmean"] = fmt.Sprintf("%.6g mW/m^2", sp.QMean*1e3)
	}
	if sp.HasQAd {
		p["qad"] = fmt.Sprintf("%.6g mW/m^2", sp.QAd*1e3)
	}
	if sp.Physical {
		p["physical"] = "true"
		p["dlnvs-dt"] = fmt.Sprintf("%g /K", sp.DlnVsDT)
		p["thickness"] = fmt.Sprintf("%g km", sp.Thickness/1e3)
	}
	if sp.Conductivity != 0 {
		p["conductivity"] = fmt.Sprintf("%g W/m/K", sp.Conductivity)
	}
	return p
}

// plotGrid samples canonical coefficients on a 1-degree node grid for maps.
func plotGrid(c *sh.Coeffs) *figure.Grid {
	g := sh.NewLonLat(181, 360, sh.NodeRegistered)
	tr := sh.NewTransform(c.LMax, g)
	vals := tr.Synthesis(nil, c)
	return &figure.Grid{NLon: 360, NLat: 181, Lon0: 0, Lat0: 90, DLat: -1, Values: vals}
}

func mapFigure(c *sh.Coeffs, f *field, s *Summary) *figure.Map {
	g := plotGrid(c)
	mean := c.C[0] / math.Sqrt(4*math.Pi)
	title := fmt.Sprintf("%s, lmax %d, q* = %.3g", f.what, s.LMax, s.QStar)
	if s.Quantity == "dvs" {
		title = fmt.Sprintf("%s, lmax %d", f.what, s.LMax)
	}
	return &figure.Map{Title: title, Grid: g, Center: mean, Label: s.Quantity, Units: f.units}
}

// degreePower returns the mean square of each degree of canonical c,
// sum_m (C_lm^2 + S_lm^2) / (4 pi).
func degreePower(c *sh.Coeffs) []float64 {
	p := make([]float64, c.LMax+1)
	for l := 0; l <= c.LMax; l++ {
		for m := 0; m <= l; m++ {
			a, b := c.At(l, m)
			p[l] += a*a + b*b
		}
		p[l] /= 4 * math.Pi
	}
	return p
}

func spectrumFigure(c *sh.Coeffs, f *field) *figure.Spectrum {
	return &figure.Spectrum{
		Title:  "degree power: " + f.what,
		YLabel: fmt.Sprintf("mean square per degree (%s)^2", f.units),
		Series: []figure.Series{{Label: f.units, Y: degreePower(c)}},
	}
}
