package main

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"sort"
	"strings"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/export"
	"cmbflux/export/figure"
	"cmbflux/flux"
	"cmbflux/flux/contour"
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
	if u := readUnits(sp, src); u != "" {
		m.Params["units"] = u
	}
	// The warnings travel with every data file, by class, so that a table
	// copied on its own still says what is wrong with it.
	if len(s.Warnings) > 0 {
		var classes []string
		for _, w := range s.Warnings {
			c, _, _ := strings.Cut(w, ":")
			if len(classes) == 0 || classes[len(classes)-1] != c {
				classes = append(classes, c)
			}
		}
		m.Params["warnings"] = strings.Join(classes, "; ") + " (details in summary.json)"
	}
	opt := &export.CoeffOptions{Conv: conv, Complex: sp.Form == "complex", OmitDegree0: sp.NoDegree0}
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
			mp.Outlines = mapOutlines(sp, pt, f, s)
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
		case "nc":
			var b bytes.Buffer
			if err = export.WriteGridNetCDF(&b, outputGrid(sp, pt, f), m); err == nil {
				names = append(names, "field.nc")
				err = st.WriteFile("field.nc", b.Bytes())
			}
		case "geojson":
			var b bytes.Buffer
			ol, warns := outlines(sp, pt, f)
			for _, w := range warns {
				addWarning(s, w)
			}
			if err = export.WriteOutlines(&b, ol, m); err == nil {
				names = append(names, "outlines.geojson")
				err = st.WriteFile("outlines.geojson", b.Bytes())
			}
		case "html":
			// written last, below, so that it lists every other file
		}
		if err != nil {
			return nil, err
		}
	}
	if sp.Has("html") {
		sort.Strings(names)
		html, err := buildReport(sp, pt, s, f.out, f, st.Tmp, names)
		if err != nil {
			return nil, err
		}
		names = append(names, "report.html")
		if err := st.WriteFile("report.html", html); err != nil {
			return nil, err
		}
	}
	sort.Strings(names)
	return names, nil
}

// outputGrid samples the output quantity on the --grid grid.
func outputGrid(sp *config.Spec, pt *pattern, f *field) *export.Grid {
	g, _ := parseGrid(sp.Grid) // checked by validateSpec
	vals := sh.NewTransform(f.out.LMax, g).Synthesis(nil, f.out)
	eg := &export.Grid{Values: vals, Name: strings.ReplaceAll(sp.Quantity, "-", "_")}
	switch g.Kind {
	case sh.GaussLegendre:
		eg.Kind = "gauss-legendre"
	case sh.DriscollHealy:
		eg.Kind = "equiangular"
	default:
		eg.Kind = "user"
	}
	for i := range g.Colat {
		eg.Lat = append(eg.Lat, round6(90-g.Colat[i]*180/math.Pi))
	}
	for j := 0; j < g.NLon; j++ {
		eg.Lon = append(eg.Lon, round6(g.Lon(j)*180/math.Pi))
	}
	return eg
}

// outlines returns the regions where the flux is negative, where it is
// sub-adiabatic, and where dVs is below -1 % (the outline of the slow
// provinces, a common-practice level, Burke & Torsvik 2004), drawn on a
// 1-degree grid, one feature per connected patch (Split), each with its own
// area and centroid. A region that cannot be drawn is left out with a
// warning, returned.
func outlines(sp *config.Spec, pt *pattern, f *field) ([]export.Outline, []string) {
	g := sh.NewLonLat(181, 360, sh.NodeRegistered)
	pc := pt.flux.Coeffs()
	pc.C[0] = pt.mean * math.Sqrt(4*math.Pi)
	dvs := sh.NewTransform(pc.LMax, g).Synthesis(nil, pc) // dlnVs fraction, mean kept
	lat := make([]float64, 181)
	for i := range lat {
		lat[i] = 90 - float64(i)
	}
	var out []export.Outline
	var warns []string
	below := func(name string, level float64, vals []float64, props map[string]any) {
		rings, err := contour.Below(contour.Field{Lon0: 0, NLon: 360, Lat: lat, Values: vals}, level)
		if err != nil {
			warns = append(warns, fmt.Sprintf("outlines: the region of %s could not be drawn (%v); it is missing from the outlines", name, err))
			return
		}
		p := map[string]any{"region": name}
		for k, v := range props {
			p[k] = v
		}
		out = append(out, export.Outline{Rings: rings, Props: p, Split: true})
	}
	if f.res != nil {
		q, err := f.res.OnGrid(flux.HeatFlux, g)
		if err != nil {
			warns = append(warns, fmt.Sprintf("outlines: the heat flux could not be sampled for its outlines (%v); the negative and sub-adiabatic regions are missing from the outlines", err))
		} else {
			below("negative heat flux", 0, q, map[string]any{"level_mw_m2": 0})
			if sp.HasQAd {
				below("sub-adiabatic heat flux", sp.QAd, q, map[string]any{"level_mw_m2": sp.QAd * 1e3})
			}
		}
	}
	below("dVs below -1 %", -0.01, dvs, map[string]any{"level_percent": -1.0})
	return out, warns
}

// addWarning adds w to the summary's warnings unless it is there already.
func addWarning(s *Summary, w string) {
	for _, x := range s.Warnings {
		if x == w {
			return
		}
	}
	s.Warnings = append(s.Warnings, w)
}

// specParams returns the resolved parameters of a build, as written into
// file headers (defaults included, units stated).
func specParams(sp *config.Spec) map[string]string {
	p := map[string]string{
		"lmax": fmt.Sprint(sp.LMax), "taper": sp.Taper, "quantity": sp.Quantity, "grid": sp.Grid,
	}
	switch {
	case sp.Demo:
		p["input"] = "demo"
	case sp.Pattern != nil:
		p["pattern"] = config.PatternText(sp.Pattern)
	default:
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
	if sp.HasQStar && sp.Measure == flux.PeakToPeak {
		p["qstar"] = fmt.Sprint(sp.QStar)
	} else if sp.HasQStar {
		// The value sets another measure: never call it qstar.
		p["measure"], p["amplitude"] = sp.Measure.String(), fmt.Sprint(sp.QStar)
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
	if sp.CoreConductivity != 0 {
		p["core-conductivity"] = fmt.Sprintf("%g W/m/K", sp.CoreConductivity)
	}
	p["mode"] = "ratio"
	if sp.Physical {
		p["mode"] = "physical"
	} else if sp.Quantity != "dvs" {
		p["qstar-on"] = "continuous"
		if sp.QStarOnGrid {
			p["qstar-on"] = "grid"
		}
	}
	p["norm"] = sp.Norm
	p["condon-shortley"] = fmt.Sprint(sp.CondonShortley)
	p["form"] = sp.Form
	p["no-degree0"] = fmt.Sprint(sp.NoDegree0)
	if sp.ForceLMax {
		p["force-lmax"] = "true"
	}
	// How the input was read, where it was given (the manifest adds the
	// units the reader decided on).
	if sp.Units != "" {
		p["units"] = sp.Units
	}
	switch {
	case sp.VRefMean:
		p["vref"] = "mean"
	case sp.VRef != 0:
		p["vref"] = fmt.Sprintf("%g km/s", sp.VRef)
	}
	if sp.ForceAmplitude {
		p["force-amplitude"] = "true"
	}
	if len(sp.Missing) > 0 {
		ms := make([]string, len(sp.Missing))
		for i, v := range sp.Missing {
			ms[i] = fmt.Sprint(v)
		}
		p["missing"] = strings.Join(ms, ",")
	}
	for k, v := range map[string]string{"lon-name": sp.LonName, "lat-name": sp.LatName, "depth-name": sp.DepthName, "vertical": sp.Vertical} {
		if v != "" {
			p[k] = v
		}
	}
	return p
}

// manifestParams returns every parameter of a build for its manifest:
// the resolved ones of specParams (defaults included), the values given
// in set as written (so that a rebuild from them is exact; the amplitude
// given as --heatflow or --adiabatic-heatflow replaces the derived qmean
// or qad), the units the input was read in, the output formats and the
// layer used. Its keys other than mode and layer are build parameters.
func manifestParams(sp *config.Spec, set config.Set, src *source) map[string]string {
	p := specParams(sp)
	for k, v := range set {
		if k != "out" {
			p[k] = v.Raw
		}
	}
	if sp.Input != "" {
		// As resolved: a path in a build file is relative to its folder.
		p["input"] = sp.Input
	}
	if _, ok := set["heatflow"]; ok {
		delete(p, "qmean")
	}
	if _, ok := set["adiabatic-heatflow"]; ok {
		delete(p, "qad")
	}
	if sp.Demo {
		delete(p, "input")
		p["demo"] = "true"
	}
	p["formats"] = strings.Join(sp.Formats, ",")
	if src != nil && src.layer != nil {
		p["layer"] = src.layer.Description
	}
	if u := readUnits(sp, src); u != "" {
		p["units"] = u
	}
	return p
}

// readUnits returns the units the input was read in: as given, or as the
// reader decided from the file (giving them again reads the same); "" for
// a source without a unit conversion (a consensus of compare).
func readUnits(sp *config.Spec, src *source) string {
	if sp.Units != "" {
		return sp.Units
	}
	if src != nil && src.layer != nil && src.layer.Units != nil {
		return src.layer.Units.From
	}
	return ""
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

// mapOutlines draws the regions of negative flux (solid) and of
// sub-adiabatic flux (dashed) over a map; a region that cannot be drawn is
// warned about in s.
func mapOutlines(sp *config.Spec, pt *pattern, f *field, s *Summary) []figure.Outline {
	var out []figure.Outline
	ol, warns := outlines(sp, pt, f)
	for _, w := range warns {
		addWarning(s, w)
	}
	for _, o := range ol {
		name, _ := o.Props["region"].(string)
		switch name {
		case "negative heat flux":
			if len(o.Rings) > 0 {
				out = append(out, figure.Outline{Rings: o.Rings, Label: "q < 0", Style: figure.Solid})
			}
		case "sub-adiabatic heat flux":
			if len(o.Rings) > 0 {
				out = append(out, figure.Outline{Rings: o.Rings, Label: "q < q_ad", Style: figure.Dashed})
			}
		}
	}
	return out
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
