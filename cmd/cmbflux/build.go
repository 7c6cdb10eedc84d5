package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strings"
	"syscall"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
)

const buildHelp = `Usage: cmbflux build (--input FILE | --demo | --pattern TERMS) --qstar X (--qmean MW_M2 | --heatflow TW) --out DIR [flags]
       cmbflux build --config build.yaml [flags]

Writes one heat-flux boundary condition at the core-mantle boundary: the
lowermost layer of a tomography model, mapped linearly to heat flux (slow,
hot mantle takes less heat from the core), expanded in spherical harmonics,
truncated at --lmax, tapered, and scaled so that the total flux has the
heterogeneity q* = (q_max - q_min) / q_mean and the mean --qmean. In
physical mode (--physical) the amplitude follows from d ln Vs / dT, the
conductivity and the boundary-layer thickness instead.

--pattern TERMS replaces the tomography by an idealised pattern, a sum of
harmonics (e.g. --pattern 2:2:cos or 2:2:cos:1,1:0:cos:0.3) that goes
through the same amplitude control, diagnostics and outputs. --amplitude X
with --measure M sets another measure of the heterogeneity to X instead of
q*: qstar-superadiabatic (q_max - q_min)/(q_mean - q_ad), rms
rms(q - q_mean)/q_mean over the sphere, or max-deviation
max|q - q_mean|/q_mean; summary.json names the measure (amplitude_set_by).

DIR receives coefficients.txt (columns l m cos sin under a # header),
summary.json (q*, extrema and where they are, the area fractions with
negative and sub-adiabatic flux, warnings), manifest.yaml (sha256 of every
file) and the --formats asked for. DIR must not exist or be empty (or give
--force); a failed build leaves no DIR behind.

A YAML file given with --config holds the same parameters under their flag
names (qstar: 5, depth-range: 2700:2891, formats: [txt, png]); flags given
as well override it. Relative paths in the file are relative to its folder.
`

const buildExample = `
Example (the embedded demo scenario, q* = 2.3 on a mean of 80 mW/m^2, Schmidt
semi-normalized coefficients to degree 8):

  cmbflux build --demo --qstar 2.3 --qmean 80 --qad 60 --lmax 8 \
      --norm schmidt --formats json,png --out bc

Check the convention line in coefficients.txt against the documentation of
the code that will read it before starting a simulation.
`

// buildOpts are the flags of build that are not build parameters.
type buildOpts struct {
	config string
	force  bool
	quiet  bool
}

func runBuild(stdout, stderr io.Writer, args []string) error {
	p := newParser("build", stdout, buildHelp, buildExample)
	p.buildKeys()
	var o buildOpts
	p.stringVar(&o.config, "config", "FILE", "read the build parameters from a YAML file (- for standard input); flags override it")
	p.boolVar(&o.force, "force", "replace a non-empty output folder written by cmbflux")
	p.boolVar(&o.quiet, "quiet", "print nothing but warnings and errors")
	pos, err := p.parse(args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("build", "unexpected argument %q; build takes only flags", pos[0])
	}
	set, sp, err := resolveBuildSpec("build", o.config, p.keys)
	if err != nil {
		return err
	}
	// Ctrl-C or SIGTERM stops the build between stages and removes the
	// half-written folder.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	sum, err := buildFolderCmd(ctx, newCache(), sp, sp.Out, o.force, false, set, commandLine("build", args))
	if err != nil {
		if ctx.Err() != nil {
			return fmt.Errorf("interrupted; nothing was written to %s", sp.Out)
		}
		return err
	}
	for _, w := range sum.Warnings {
		fmt.Fprintln(stderr, "cmbflux: warning: "+w)
	}
	if !o.quiet {
		printSummary(stdout, sp.Out, sum)
	}
	return nil
}

// buildFolder runs the pipeline into a staged folder and renames it to out
// when every file is written.
//
// With noSync the files are not synced to disk one by one (see
// outdir.Stage.NoSync); sweeps use it and verify manifests on resume.
func buildFolder(ctx context.Context, c *cache, sp *config.Spec, out string, force, noSync bool, set config.Set) (*Summary, error) {
	return buildFolderCmd(ctx, c, sp, out, force, noSync, set, "")
}

// buildFolderCmd is buildFolder recording command, the command line or
// sweep point that made the folder, in its manifest.
func buildFolderCmd(ctx context.Context, c *cache, sp *config.Spec, out string, force, noSync bool, set config.Set, command string) (*Summary, error) {
	if err := checkForce(out, force); err != nil {
		return nil, err
	}
	st, err := outdir.New(out, force)
	if err != nil {
		return nil, err
	}
	st.NoSync = noSync
	defer st.Abort()
	sum, err := produce(ctx, c, sp, set, st, command)
	if err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := st.Commit(); err != nil {
		return nil, err
	}
	return sum, nil
}

// readInput reads a file, or standard input for "-"; the returned name is
// what errors should call it.
func readInput(path string) ([]byte, string, error) {
	if path == "-" {
		data, err := io.ReadAll(stdin)
		return data, "<stdin>", err
	}
	data, err := os.ReadFile(path)
	if err != nil {
		if os.IsNotExist(err) {
			return nil, path, inputErrorf("%s: no such file", path)
		}
		return nil, path, err
	}
	return data, path, nil
}

func printSummary(w io.Writer, out string, s *Summary) {
	row := func(label, format string, args ...any) {
		fmt.Fprintf(w, "  %-14s "+format+"\n", append([]any{label}, args...)...)
	}
	fmt.Fprintf(w, "wrote %s/\n", filepath.ToSlash(out))
	row("quantity", "%s (%s), lmax %d, taper %s", s.Quantity, s.Units, s.LMax, s.Taper)
	row("convention", "%s, %s form", s.Convention, s.Form)
	if s.QMean != nil {
		row("q*", "%.4g (peak to peak over mean of the total flux, %s)", s.QStar, strings.TrimPrefix(s.QStarDefinition, "(q_max - q_min) / q_mean of the total heat flux, "))
		if s.AmplitudeMeasure != "" && s.AmplitudeMeasure != "qstar" {
			row("set by", "%s (--measure %s)", s.AmplitudeSetBy, s.AmplitudeMeasure)
		}
		row("q_mean", "%.4g mW/m^2 (%.4g TW)", *s.QMean, *s.HeatFlowTW)
		row("q_max", "%.4g mW/m^2 at lon %.1f, lat %.1f", *s.QMax, s.QMaxLonLat[0], s.QMaxLonLat[1])
		row("q_min", "%.4g mW/m^2 at lon %.1f, lat %.1f", *s.QMin, s.QMinLonLat[0], s.QMinLonLat[1])
		row("negative", "%.2f %% of the CMB", 100*s.AreaNegative)
		if s.AreaSubadiabatic != nil {
			row("sub-adiabatic", "%.2f %% of the CMB", 100**s.AreaSubadiabatic)
		}
	}
	row("files", "%s", strings.Join(s.Files, " "))
}

// checkForce refuses --force on a non-empty folder that cmbflux did not
// write (no manifest.yaml, runs.tsv or bc/manifest.yaml in it), so that a
// mistyped --out never deletes someone's data.
func checkForce(dir string, force bool) error {
	if !force {
		return nil
	}
	ents, err := os.ReadDir(dir)
	if err != nil || len(ents) == 0 {
		return nil
	}
	for _, marker := range []string{"manifest.yaml", "runs.tsv", filepath.Join("bc", "manifest.yaml")} {
		if _, err := os.Stat(filepath.Join(dir, marker)); err == nil {
			return nil
		}
	}
	return fmt.Errorf("%s: %w and was not written by cmbflux (no manifest.yaml or runs.tsv in it): --force replaces only cmbflux output folders; remove it yourself or choose another --out", dir, outdir.ErrNotEmpty)
}

// commandLine quotes args for the manifest's record of what was run.
func commandLine(cmd string, args []string) string {
	parts := []string{"cmbflux", cmd}
	for _, a := range args {
		parts = append(parts, shellQuote(a))
	}
	return strings.Join(parts, " ")
}

// shellQuote returns a in single quotes when a shell would otherwise split
// or expand it.
func shellQuote(a string) string {
	if a != "" && !strings.ContainsAny(a, " \t\n'\"\\$`*?[]{}()<>|&;#~") {
		return a
	}
	return "'" + strings.ReplaceAll(a, "'", `'\''`) + "'"
}

// resolveBuildSpec merges the flags given (keys) over the build file named
// by configPath (if any), resolves the result and checks it, for a command
// that writes a build-like output folder; cmd names the command in usage
// errors. It returns the merged key set too, for the manifest.
func resolveBuildSpec(cmd, configPath string, keys config.Set) (config.Set, *config.Spec, error) {
	set := keys
	if configPath != "" {
		data, name, err := readInput(configPath)
		if err != nil {
			return nil, nil, err
		}
		file, err := config.ParseBuild(name, data)
		if err != nil {
			return nil, nil, err
		}
		set = file.Merge(keys)
	}
	sp, err := config.Resolve(set)
	if err != nil {
		return nil, nil, err
	}
	if sp.Out == "" {
		return nil, nil, usagef(cmd, "no output folder: give --out DIR")
	}
	if err := validateSpec(sp); err != nil {
		return nil, nil, err
	}
	return set, sp, nil
}
