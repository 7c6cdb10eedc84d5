package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/export"
	"cmbflux/flux/sh"
	"cmbflux/tomo"
)

const inspectHelp = `Usage: cmbflux inspect FILE [--var NAME] [reading flags] [--json]
       cmbflux inspect --demo [--json]
       cmbflux inspect DIR

For an output folder of cmbflux (one with manifest.yaml), checks every file
against the manifest's sizes and sha256 sums and exits with status 1 if one
differs. A grid that cannot be read as a tomography model (such as a flux
grid written by build) is described as far as possible, and inspect exits
with status 2 as build would.

Says what a file is. For a tomography grid (text, CSV, netCDF): the grid's
geometry and registration, longitude and latitude ranges and steps, depth
levels, value range, the units cmbflux infers and why, missing values,
coverage and the highest degree the sampling resolves. For a coefficient
file (txt, csv, json as written by cmbflux): its convention, form, lmax,
quantity, units and the power per degree. FILE - reads standard input.
The reading flags (--units, --vref, --missing, --lon-name, ...) are those
of build, so inspect shows what build would read.
`

const inspectExample = `
Examples:

  cmbflux inspect --demo
  cmbflux inspect demo-out/bc/coefficients.txt --json
`

// gridInfo is what inspect reports about a tomography grid.
type gridInfo struct {
	File          string    `json:"file"`
	Kind          string    `json:"kind"`
	Format        string    `json:"format"`
	SHA256        string    `json:"sha256"`
	Title         string    `json:"title,omitempty"`
	Variable      string    `json:"variable"`
	UnitsInFile   string    `json:"units_in_file"`
	UnitsUsed     string    `json:"units_used"`
	UnitsGuessed  bool      `json:"units_guessed"`
	UnitsReason   string    `json:"units_reason"`
	Registration  string    `json:"registration"`
	NLon          int       `json:"nlon"`
	NLat          int       `json:"nlat"`
	LonRange      []float64 `json:"lon_range"`
	LatRange      []float64 `json:"lat_range"`
	LonStep       float64   `json:"lon_step"`
	LatStep       float64   `json:"lat_step"`
	Depths        []float64 `json:"depths_km"`
	Missing       int       `json:"missing_values"`
	Points        int       `json:"points"`
	DlnVsMinPct   float64   `json:"dlnvs_min_percent"`
	DlnVsMaxPct   float64   `json:"dlnvs_max_percent"`
	DlnVsMeanPct  float64   `json:"dlnvs_mean_percent"`
	Coverage      float64   `json:"coverage_fraction_deepest_layer"`
	ResolvedLMax  int       `json:"lmax_resolved"`
	ResolveReason string    `json:"lmax_resolved_reason"`
	Notes         []string  `json:"notes"`
	Warnings      []string  `json:"warnings"`
}

// coeffInfo is what inspect reports about a coefficient file.
type coeffInfo struct {
	File           string    `json:"file"`
	Kind           string    `json:"kind"`
	Quantity       string    `json:"quantity"`
	Units          string    `json:"units"`
	Sign           string    `json:"sign"`
	Normalization  string    `json:"normalization"`
	CondonShortley bool      `json:"condon_shortley"`
	Form           string    `json:"form"`
	LMax           int       `json:"lmax"`
	Mean           float64   `json:"mean"`
	RMSAnomaly     float64   `json:"rms_anomaly"`
	Power          []float64 `json:"power_per_degree"`
	PowerDef       string    `json:"power_definition"`
	Warnings       []string  `json:"warnings"`
}

func runInspect(stdout, stderr io.Writer, args []string) error {
	p := newParser("inspect", stdout, inspectHelp, inspectExample)
	var asJSON, demo bool
	var varName string
	p.boolVar(&asJSON, "json", "print JSON instead of text")
	p.boolVar(&demo, "demo", "inspect the embedded demo scenario")
	p.stringVar(&varName, "var", "NAME", "variable (netCDF) or column (CSV) to read")
	// The reading flags of build, with build's checks (config.Resolve).
	rd := map[string]*string{}
	var forceAmp bool
	for _, k := range readKeys {
		key := config.Lookup(k)
		if key.Kind == config.Bool {
			p.boolVar(&forceAmp, k, key.Usage)
			continue
		}
		rd[k] = new(string)
		p.stringVar(rd[k], k, key.Arg, key.Usage)
	}
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	sel := config.Set{}
	for k, v := range rd {
		if *v != "" {
			if err := sel.SetFlag(k, *v); err != nil {
				return err
			}
		}
	}
	if forceAmp {
		if err := sel.SetFlag("force-amplitude", "true"); err != nil {
			return err
		}
	}
	for k, v := range map[string]string{"demo": "true", "quantity": "dvs"} {
		if err := sel.SetFlag(k, v); err != nil {
			return err
		}
	}
	sp, err := config.Resolve(sel)
	if err != nil {
		return err
	}
	sp.Var = varName
	if demo == (len(pos) == 1) || len(pos) > 1 {
		return usagef("inspect", "give one FILE or --demo")
	}
	if !demo && pos[0] != "-" {
		if fi, err := os.Stat(pos[0]); err == nil && fi.IsDir() {
			return inspectFolder(stdout, pos[0], asJSON)
		}
	}
	var info any
	if demo {
		info, err = inspectGrid(tomo.Demo(), unitOptions(sp))
	} else {
		var data []byte
		var name string
		data, name, err = readInput(pos[0])
		if err != nil {
			return err
		}
		if looksLikeCoeffs(data) {
			info, err = inspectCoeffs(name, data)
		} else {
			var g *tomo.Grid
			g, err = tomo.ReadBytes(name, data, readOptions(sp))
			if err != nil {
				if ci, cerr := inspectCoeffs(name, data); cerr == nil {
					info, err = ci, nil
				} else {
					err = withFlagHints(err)
				}
			} else {
				info, err = inspectGrid(g, unitOptions(sp))
			}
		}
	}
	if err != nil {
		return err
	}
	if asJSON {
		b, err := marshalJSON(info)
		if err != nil {
			return err
		}
		if _, err = stdout.Write(b); err != nil {
			return err
		}
	} else {
		switch v := info.(type) {
		case *gridInfo:
			printGridInfo(stdout, v)
		case *coeffInfo:
			printCoeffInfo(stdout, v)
		}
	}
	// A grid that build would refuse is described as far as it can be,
	// and exits with status 2 like build.
	if gi, ok := info.(*gridInfo); ok && gi.UnitsUsed == "none" {
		return inputErrorf("not usable as a tomography model: %s", gi.UnitsReason)
	}
	return nil
}

// looksLikeCoeffs recognises the header of cmbflux coefficient files.
func looksLikeCoeffs(data []byte) bool {
	head := data[:min(len(data), 4096)]
	return bytes.Contains(head, []byte("cmbflux-coefficients")) || bytes.Contains(head, []byte("cmbflux spherical-harmonic coefficients"))
}

// inspectGrid describes g, its deepest layer converted to dlnVs with uo.
func inspectGrid(g *tomo.Grid, uo tomo.UnitOptions) (*gridInfo, error) {
	in := &gridInfo{File: g.Source.Path, Kind: "tomography grid", Format: g.Source.Format, SHA256: g.Source.SHA256, Title: g.Title,
		Variable: g.Name, UnitsInFile: g.Units, Registration: g.Reg.String(), NLon: g.NLon(), NLat: g.NLat(),
		LonRange: []float64{g.Lon[0], g.Lon[len(g.Lon)-1]}, LatRange: []float64{g.Lat[0], g.Lat[len(g.Lat)-1]},
		LonStep: g.DLon(), LatStep: g.DLat(), Depths: g.Depth, Points: len(g.Values),
		Notes: nonNil(g.Notes), Warnings: nonNil(g.Warnings)}
	for i := range g.Values {
		if g.Valid != nil && !g.Valid[i] {
			in.Missing++
		}
	}
	l, err := tomo.SelectLayer(g, tomo.LayerOptions{Units: uo})
	if err != nil {
		// Not a velocity anomaly (e.g. a flux grid written by cmbflux): the
		// geometry is still worth reporting.
		in.Kind = "grid (not usable as a tomography model)"
		in.UnitsUsed = "none"
		in.UnitsReason = flagHint(err.Error())
		in.ResolveReason = "not computed"
		return in, nil
	}
	if l.Units != nil {
		in.UnitsUsed, in.UnitsGuessed, in.UnitsReason = l.Units.From, l.Units.Guessed, l.Units.Reason
		for _, w := range l.Units.Warnings {
			in.Warnings = append(in.Warnings, flagHint(w))
		}
	}
	// The layer's own range and mean: Units.Min and Units.Max span every
	// depth level of the grid.
	in.DlnVsMinPct, in.DlnVsMaxPct, in.DlnVsMeanPct = 100*l.Min, 100*l.Max, 100*l.Mean
	in.Coverage = l.Coverage()
	d := tomo.SafeDegree(l)
	in.ResolvedLMax, in.ResolveReason = d.Lmax, d.Reason
	return in, nil
}

// fixed3 formats x with 3 decimals, without the sign of a value that
// rounds to zero ("0.000", never "-0.000").
func fixed3(x float64) string {
	s := fmt.Sprintf("%.3f", x)
	if s == "-0.000" {
		return "0.000"
	}
	return s
}

func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

func printGridInfo(w io.Writer, in *gridInfo) {
	fmt.Fprintf(w, "%s: %s (%s)\n", in.File, in.Kind, in.Format)
	if in.Title != "" {
		fmt.Fprintf(w, "  title         %s\n", in.Title)
	}
	fmt.Fprintf(w, "  variable      %s, units in file %q\n", in.Variable, in.UnitsInFile)
	guess := "given"
	if in.UnitsGuessed {
		guess = "guessed"
	}
	fmt.Fprintf(w, "  read as       %s (%s: %s)\n", in.UnitsUsed, guess, in.UnitsReason)
	fmt.Fprintf(w, "  grid          %d x %d, %s-registered\n", in.NLon, in.NLat, in.Registration)
	fmt.Fprintf(w, "  longitude     %g to %g E, step %g\n", in.LonRange[0], in.LonRange[1], in.LonStep)
	fmt.Fprintf(w, "  latitude      %g to %g N, step %g\n", in.LatRange[0], in.LatRange[1], in.LatStep)
	if len(in.Depths) > 0 {
		ds := make([]string, len(in.Depths))
		for i, d := range in.Depths {
			ds[i] = fmt.Sprint(d)
		}
		fmt.Fprintf(w, "  depths        %s km (%d levels)\n", strings.Join(ds, ", "), len(in.Depths))
	} else {
		fmt.Fprintf(w, "  depths        one layer (no depth axis)\n")
	}
	if in.UnitsUsed != "none" {
		fmt.Fprintf(w, "  dlnVs         %s to %s %%, area-weighted mean %s %% (deepest layer)\n", fixed3(in.DlnVsMinPct), fixed3(in.DlnVsMaxPct), fixed3(in.DlnVsMeanPct))
	}
	fmt.Fprintf(w, "  missing       %d of %d values\n", in.Missing, in.Points)
	if in.UnitsUsed != "none" {
		fmt.Fprintf(w, "  coverage      %.1f %% of the sphere (deepest layer)\n", 100*in.Coverage)
		fmt.Fprintf(w, "  resolves      degree %d (%s)\n", in.ResolvedLMax, in.ResolveReason)
	}
	for _, n := range in.Notes {
		fmt.Fprintf(w, "  note          %s\n", n)
	}
	for _, n := range in.Warnings {
		fmt.Fprintf(w, "  warning       %s\n", n)
	}
}

func inspectCoeffs(name string, data []byte) (*coeffInfo, error) {
	t, err := export.ReadCoeffs(bytes.NewReader(data), name, nil)
	if err != nil {
		return nil, asInput(err)
	}
	c := t.Coeffs
	can, err := c.Convert(sh.Canonical)
	if err != nil {
		return nil, inputErrorf("%s: %v", name, err)
	}
	in := &coeffInfo{File: name, Kind: "spherical-harmonic coefficients", Quantity: t.Meta.Quantity, Units: t.Meta.Units, Sign: t.Meta.Sign,
		Normalization: c.Conv.Norm.String(), CondonShortley: c.Conv.CondonShortley, Form: "real", LMax: c.LMax,
		Power:    degreePower(can),
		PowerDef: "mean square over the sphere per degree, sum_m (C_lm^2 + S_lm^2) / (4 pi) in orthonormal harmonics",
		Warnings: nonNil(t.Warnings)}
	if t.Complex {
		in.Form = "complex"
	}
	in.Mean = can.C[0] / math.Sqrt(4*math.Pi)
	var ss float64
	for l := 1; l < len(in.Power); l++ {
		ss += in.Power[l]
	}
	in.RMSAnomaly = math.Sqrt(ss)
	return in, nil
}

func printCoeffInfo(w io.Writer, in *coeffInfo) {
	fmt.Fprintf(w, "%s: %s\n", in.File, in.Kind)
	if in.Quantity != "" {
		fmt.Fprintf(w, "  quantity      %s (%s)\n", in.Quantity, in.Units)
		fmt.Fprintf(w, "  sign          %s\n", in.Sign)
	}
	cs := "no Condon-Shortley phase"
	if in.CondonShortley {
		cs = "with Condon-Shortley phase"
	}
	fmt.Fprintf(w, "  convention    %s, %s, %s form\n", in.Normalization, cs, in.Form)
	fmt.Fprintf(w, "  lmax          %d\n", in.LMax)
	fmt.Fprintf(w, "  mean          %.6g\n", in.Mean)
	fmt.Fprintf(w, "  rms anomaly   %.6g\n", in.RMSAnomaly)
	fmt.Fprintf(w, "  power per degree (mean square, (%s)^2):\n", in.Units)
	for l, p := range in.Power {
		fmt.Fprintf(w, "    %3d  %.6g\n", l, p)
	}
	for _, n := range in.Warnings {
		fmt.Fprintf(w, "  warning       %s\n", n)
	}
}

// folderInfo is what inspect reports about an output folder.
type folderInfo struct {
	Folder   string   `json:"folder"`
	Kind     string   `json:"kind"`
	Command  string   `json:"command,omitempty"`
	Version  string   `json:"cmbflux_version"`
	Files    int      `json:"files"`
	Verified bool     `json:"verified"`
	Problem  string   `json:"problem,omitempty"`
	Inputs   []string `json:"inputs"`
}

// inspectFolder verifies a cmbflux output folder against its manifest.
func inspectFolder(w io.Writer, dir string, asJSON bool) error {
	if _, err := os.Stat(filepath.Join(dir, "manifest.yaml")); err != nil {
		return inputErrorf("%s: a folder without manifest.yaml; inspect takes a file, or a folder written by cmbflux build", dir)
	}
	m, verr := export.Verify(dir)
	in := &folderInfo{Folder: dir, Kind: "cmbflux output folder", Verified: verr == nil, Inputs: []string{}}
	if m != nil {
		in.Command, in.Version, in.Files = m.Command, m.Version, len(m.Files)
		for _, i := range m.Inputs {
			in.Inputs = append(in.Inputs, i.Name+" (sha256 "+i.SHA256+")")
		}
	}
	if verr != nil {
		in.Problem = verr.Error()
	}
	if asJSON {
		b, err := marshalJSON(in)
		if err != nil {
			return err
		}
		if _, err := w.Write(b); err != nil {
			return err
		}
	} else {
		fmt.Fprintf(w, "%s: %s written by %s\n", dir, in.Kind, in.Version)
		if in.Command != "" {
			fmt.Fprintf(w, "  made by       %s\n", in.Command)
		}
		for _, i := range in.Inputs {
			fmt.Fprintf(w, "  input         %s\n", i)
		}
		if verr == nil {
			fmt.Fprintf(w, "  verified      all %d files match the manifest\n", in.Files)
		}
	}
	if verr != nil {
		return fmt.Errorf("%s: %v", dir, verr)
	}
	return nil
}
