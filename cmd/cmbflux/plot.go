package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/export"
	"cmbflux/export/figure"
	"cmbflux/flux/sh"
	"cmbflux/tomo"
)

const plotHelp = `Usage: cmbflux plot FILE --out MAP.png|MAP.svg [--spectrum SPECTRUM.png|.svg] [flags]
       cmbflux plot --demo --out MAP.png

Draws a global map of a tomography grid (its deepest layer, or --depth),
any grid file, or a coefficient file, and optionally its degree power
spectrum. The map's colour scale is centred on the mean. FILE - reads
standard input.
`

const plotExample = `
Examples:

  cmbflux plot demo-out/bc/coefficients.txt --out flux-map.png --spectrum flux-spectrum.svg
  cmbflux plot --demo --projection hammer --out demo-dvs.png
`

func runPlot(stdout, stderr io.Writer, args []string) error {
	p := newParser("plot", stdout, plotHelp, plotExample)
	var out, spec, proj, title string
	var demo, force bool
	lmax := 0
	proj = "mollweide"
	p.stringVar(&out, "out", "FILE", "map to write (.png or .svg)")
	p.stringVar(&spec, "spectrum", "FILE", "also write the power spectrum (.png or .svg)")
	p.stringVar(&proj, "projection", "P", "mollweide, hammer or equirectangular")
	p.stringVar(&title, "title", "TEXT", "title above the map")
	p.intVar(&lmax, "lmax", "N", "for grids: degree of the expansion behind the spectrum (default: what the grid resolves, at most 60)")
	p.boolVar(&demo, "demo", "plot the embedded demo scenario")
	p.boolVar(&force, "force", "overwrite existing files")
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	if demo == (len(pos) == 1) || len(pos) > 1 {
		return usagef("plot", "give one FILE or --demo")
	}
	if out == "" {
		return usagef("plot", "no output: give --out MAP.png or --out MAP.svg")
	}
	kind, err := figure.ParseKind(proj)
	if err != nil {
		return usagef("plot", "--projection %q: want mollweide, hammer or equirectangular", proj)
	}
	for _, f := range []string{out, spec} {
		if f == "" {
			continue
		}
		if ext := strings.ToLower(filepath.Ext(f)); ext != ".png" && ext != ".svg" {
			return usagef("plot", "%s: figures are written as .png or .svg", f)
		}
		if !force {
			if _, err := os.Stat(f); err == nil {
				return fmt.Errorf("%s: %w; give --force to overwrite it", f, outdir.ErrNotEmpty)
			}
		}
	}

	var mp *figure.Map
	var power []float64
	var units, label string
	if demo {
		mp, power, units, label, err = plotTomo(tomo.Demo(), lmax)
	} else {
		data, name, rerr := readInput(pos[0])
		if rerr != nil {
			return rerr
		}
		if looksLikeCoeffs(data) {
			t, cerr := export.ReadCoeffs(bytes.NewReader(data), name, nil)
			if cerr != nil {
				return asInput(cerr)
			}
			can, cerr := t.Coeffs.Convert(sh.Canonical)
			if cerr != nil {
				return inputErrorf("%s: %v", name, cerr)
			}
			units, label = t.Meta.Units, t.Meta.Quantity
			mp = &figure.Map{Grid: plotGrid(can), Center: can.C[0] / math.Sqrt(4*math.Pi), Label: label, Units: units, Title: name}
			power = degreePower(can)
		} else {
			g, gerr := tomo.ReadBytes(name, data, tomo.ReadOptions{})
			if gerr != nil {
				return gerr
			}
			mp, power, units, label, err = plotTomo(g, lmax)
		}
	}
	if err != nil {
		return err
	}
	mp.Projection = figure.Projection{Kind: kind}
	if title != "" {
		mp.Title = title
	}
	if err := writeFigure(out, mp); err != nil {
		return err
	}
	if spec != "" {
		s := &figure.Spectrum{Title: "degree power: " + label, YLabel: fmt.Sprintf("mean square per degree (%s)^2", units),
			Series: []figure.Series{{Label: label, Y: power}}}
		if err := writeFigure(spec, s); err != nil {
			return err
		}
	}
	return nil
}

func writeFigure(path string, f figure.Figure) error {
	return outdir.Write(path, func(w io.Writer) error {
		if strings.ToLower(filepath.Ext(path)) == ".svg" {
			return f.WriteSVG(w)
		}
		return f.WritePNG(w)
	})
}

// plotTomo maps the deepest level of a grid as read (no unit conversion)
// and expands it for the spectrum.
func plotTomo(g *tomo.Grid, lmax int) (*figure.Map, []float64, string, string, error) {
	nlat, nlon := g.NLat(), g.NLon()
	vals := make([]float64, nlat*nlon)
	for j := 0; j < nlat; j++ {
		for i := 0; i < nlon; i++ {
			v, ok := g.At(g.NDepth()-1, j, i)
			if !ok {
				v = math.NaN()
			}
			vals[j*nlon+i] = v
		}
	}
	dlat := 0.0
	if nlat > 1 {
		dlat = g.DLat()
	}
	fg := &figure.Grid{NLon: nlon, NLat: nlat, Lon0: g.Lon[0], Lat0: g.Lat[0], DLat: dlat, Values: vals}
	if lmax == 0 {
		lmax = min(60, max(1, min(nlat-1, (nlon-1)/2)))
	}
	c, _, err := fitGrid(g, lmax, true) // a spectrum to look at, not a boundary condition
	if err != nil {
		return nil, nil, "", "", err
	}
	label := g.Name
	title := g.Source.Path
	if g.Depth != nil {
		title += fmt.Sprintf(" at %g km", g.Depth[len(g.Depth)-1])
	}
	mean := c.C[0] / math.Sqrt(4*math.Pi)
	return &figure.Map{Grid: fg, Center: mean, Label: label, Units: g.Units, Title: title}, degreePower(c), g.Units, label, nil
}
