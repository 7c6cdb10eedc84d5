package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"

	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/export"
	"cmbflux/flux/sh"
	"cmbflux/tomo"
)

const convertHelp = `Usage: cmbflux convert IN --out OUT [--norm N] [--condon-shortley] [--form F] [--no-degree0]
       cmbflux convert IN --out OUT.nc --grid G          coefficients to a grid
       cmbflux convert IN --out OUT.txt --lmax N         a grid to coefficients

Rewrites a coefficient file in another convention: normalization, phase,
real or complex form, degree 0 in or out. The values of the field do not
change; the header of OUT states the new convention. The format of OUT
follows its extension (.txt, .csv, .json; .nc, .txt, .csv for grids);
--out - writes a text table to standard output.

A plain table made elsewhere (columns l m cos sin, or l m re im with
--from-form complex, no cmbflux header) is read only when its convention is
declared with --from-norm (and --from-condon-shortley if it has the phase).

With --grid, the expansion is sampled on a grid (gauss:NLAT, equiangular:N
or lonlat:STEP); with --lmax, a grid file (text, CSV, netCDF) is expanded
to degree N by the same least-squares fit as build (only the valid points
count; a degree above what the grid's spacing and coverage support is
refused unless --force-lmax is given).
`

const convertExample = `
Examples:

  cmbflux convert demo-out/bc/coefficients.txt --norm schmidt --condon-shortley --out schmidt.txt
  cmbflux convert demo-out/bc/coefficients.txt --grid lonlat:2 --out flux.nc
  cmbflux convert demo-out/bc/field.nc --lmax 12 --out refit.txt
`

func runConvert(stdout, stderr io.Writer, args []string) error {
	p := newParser("convert", stdout, convertHelp, convertExample)
	var out, norm, form, fromNorm, fromForm, grid string
	var cs, fromCS, noDeg0, force, forceLMax bool
	lmax := 0
	norm, form = "orthonormal", "real"
	p.stringVar(&out, "out", "FILE", "output file (- for standard output)")
	p.stringVar(&norm, "norm", "N", "normalization to write: orthonormal, fully-normalized, schmidt, unnormalized")
	p.boolVar(&cs, "condon-shortley", "write with the Condon-Shortley phase (-1)^m")
	p.stringVar(&form, "form", "F", "real (cos/sin) or complex")
	p.boolVar(&noDeg0, "no-degree0", "leave out degree 0 (the mean)")
	p.stringVar(&fromNorm, "from-norm", "N", "declare the normalization of a plain table without a cmbflux header")
	p.boolVar(&fromCS, "from-condon-shortley", "declare that a plain table includes the Condon-Shortley phase")
	p.stringVar(&fromForm, "from-form", "F", "declare the form of a plain table: real or complex")
	p.stringVar(&grid, "grid", "G", "sample the coefficients on this grid instead of converting them")
	p.intVar(&lmax, "lmax", "N", "expand a grid file to this degree")
	p.boolVar(&forceLMax, "force-lmax", "with --lmax, fit a degree above what the grid supports (refused otherwise)")
	p.boolVar(&force, "force", "overwrite OUT if it exists")
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("convert", "give one input file")
	}
	if out == "" {
		return usagef("convert", "no output: give --out FILE (or --out - for standard output)")
	}
	if out != "-" && !force {
		if _, err := os.Stat(out); err == nil {
			return fmt.Errorf("%s: %w; give --force to overwrite it", out, outdir.ErrNotEmpty)
		}
	}
	data, name, err := readInput(pos[0])
	if err != nil {
		return err
	}
	n, err := sh.ParseNormalization(norm)
	if err != nil {
		return usagef("convert", "--norm %q: want orthonormal, fully-normalized, schmidt or unnormalized", norm)
	}
	if form != "real" && form != "complex" {
		return usagef("convert", "--form %q: want real or complex", form)
	}
	conv := sh.Convention{Norm: n, CondonShortley: cs}

	format := export.FormatText
	if out != "-" {
		if format, err = export.FormatFromPath(out); err != nil {
			return usagef("convert", "--out %s: %v", out, err)
		}
	}
	var body []byte
	var warns []string
	if lmax > 0 {
		if grid != "" {
			return usagef("convert", "give --lmax (grid to coefficients) or --grid (coefficients to grid), not both")
		}
		g, err := tomo.ReadBytes(name, data, tomo.ReadOptions{})
		if err != nil {
			return err
		}
		c, notes, err := fitGrid(g, lmax, forceLMax)
		if err != nil {
			return err
		}
		for _, n := range notes {
			warns = append(warns, name+": "+n)
		}
		if format == export.FormatNetCDF {
			return usagef("convert", "coefficients are written as .txt, .csv or .json, not %s", out)
		}
		m := &export.Meta{Quantity: g.Name + " expanded from " + name, Units: g.Units, Version: version,
			Inputs: []export.Input{{Name: name, SHA256: g.Source.SHA256}}}
		var b bytes.Buffer
		if err := export.WriteCoeffs(&b, format, c, m, &export.CoeffOptions{Conv: conv, Complex: form == "complex", OmitDegree0: noDeg0}); err != nil {
			return err
		}
		body = b.Bytes()
	} else {
		opt := &export.CoeffReadOptions{}
		if fromNorm != "" {
			fn, err := sh.ParseNormalization(fromNorm)
			if err != nil {
				return usagef("convert", "--from-norm %q: want orthonormal, fully-normalized, schmidt or unnormalized", fromNorm)
			}
			opt.Conv = &sh.Convention{Norm: fn, CondonShortley: fromCS}
			opt.Complex = fromForm == "complex"
		}
		t, err := export.ReadCoeffs(bytes.NewReader(data), name, opt)
		if err != nil {
			return asInput(err)
		}
		warns = append(warns, t.Warnings...)
		m := t.Meta
		m.Version = version
		can, err := t.Coeffs.Convert(sh.Canonical)
		if err != nil {
			return inputErrorf("%s: %v", name, err)
		}
		var b bytes.Buffer
		if grid != "" {
			sg, err := parseGrid(grid)
			if err != nil {
				return err
			}
			if format == export.FormatJSON {
				return usagef("convert", "grids are written as .nc, .txt or .csv, not %s", out)
			}
			vals := sh.NewTransform(can.LMax, sg).Synthesis(nil, can)
			eg := &export.Grid{Values: vals, Name: "value", Kind: "user"}
			switch sg.Kind {
			case sh.GaussLegendre:
				eg.Kind = "gauss-legendre"
			case sh.DriscollHealy:
				eg.Kind = "equiangular"
			}
			for i := range sg.Colat {
				eg.Lat = append(eg.Lat, round6(90-sg.Colat[i]*180/math.Pi))
			}
			for j := 0; j < sg.NLon; j++ {
				eg.Lon = append(eg.Lon, round6(sg.Lon(j)*180/math.Pi))
			}
			// The grid written is this one, not the one of the build that
			// made the coefficients.
			overrideParams(&m, map[string]string{"grid": grid})
			if err := export.WriteGrid(&b, format, eg, &m); err != nil {
				return err
			}
		} else {
			if format == export.FormatNetCDF {
				return usagef("convert", "coefficients are written as .txt, .csv or .json; give --grid to write a netCDF grid")
			}
			if err := conv.CheckDegree(can.LMax); err != nil {
				return usagef("convert", "%v", err)
			}
			// The convention parameters of the build that made the table
			// give way to the new ones, so that the header does not
			// contradict itself.
			if _, ok := m.Params["norm"]; ok {
				overrideParams(&m, map[string]string{"norm": n.String(), "condon-shortley": fmt.Sprint(cs), "form": form, "no-degree0": fmt.Sprint(noDeg0)})
			}
			if err := export.WriteCoeffs(&b, format, can, &m, &export.CoeffOptions{Conv: conv, Complex: form == "complex", OmitDegree0: noDeg0}); err != nil {
				return err
			}
			if conv != sh.Canonical || form != "real" {
				warns = append(warns, fmt.Sprintf("non-default convention: written %s, %s form; check that this is exactly the convention your simulation code's documentation states", conv, form))
			}
		}
		body = b.Bytes()
	}
	for _, w := range warns {
		fmt.Fprintln(stderr, "cmbflux: warning: "+w)
	}
	if out == "-" {
		_, err := stdout.Write(body)
		return err
	}
	return outdir.WriteFile(out, body)
}

// overrideParams replaces parameters of m's header with kv, in a copy of
// its map (the map may be shared with the table read).
func overrideParams(m *export.Meta, kv map[string]string) {
	p := make(map[string]string, len(m.Params)+len(kv))
	for k, v := range m.Params {
		p[k] = v
	}
	for k, v := range kv {
		p[k] = v
	}
	m.Params = p
}

// fitGrid expands the values of a single-layer grid (the deepest level of a
// grid with depths) without any unit conversion, by build's least-squares
// fit on the valid points, after the coverage check of build (checkLMax).
// The notes say what the user should know (points left out, the fit's
// own notes, an lmax above what the grid supports when forced).
func fitGrid(g *tomo.Grid, lmax int, force bool) (*sh.Coeffs, []string, error) {
	nlat, nlon := g.NLat(), g.NLon()
	off := (g.NDepth() - 1) * nlat * nlon
	vals := g.Values[off : off+nlat*nlon]
	var valid []bool
	missing := 0
	if g.Valid != nil {
		valid = g.Valid[off : off+nlat*nlon]
		for _, v := range valid {
			if !v {
				missing++
			}
		}
	}
	if missing == len(vals) {
		return nil, nil, inputErrorf("%s: no valid values", g.Source.Path)
	}
	l := &tomo.Layer{Lon: g.Lon, Lat: g.Lat, Values: vals, Valid: valid, Reg: g.Reg, Source: g.Source}
	safe := tomo.SafeDegree(l)
	if err := checkLMax(g.Source.Path, lmax, safe, force); err != nil {
		return nil, nil, err
	}
	var notes []string
	if missing > 0 {
		notes = append(notes, fmt.Sprintf("%d of %d points have no value and were left out of the fit", missing, len(vals)))
	}
	if lmax > safe.Lmax {
		notes = append(notes, fmt.Sprintf("lmax above the resolution: lmax %d is above degree %d, the highest the grid supports: the degrees above are fitting artefacts, not structure", lmax, safe.Lmax))
	}
	c, fitNotes, err := fitLayer(l, lmax)
	return c, append(notes, fitNotes...), err
}
