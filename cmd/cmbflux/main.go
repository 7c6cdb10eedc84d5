// Command cmbflux turns seismic tomography of the lowermost mantle into
// heat-flux boundary conditions at the core-mantle boundary for geodynamo
// simulations, runs parameter sweeps of them and compares models.
//
// A session on the embedded demo scenario (a test runs these lines in order):
//
//	cmbflux demo --out demo-out
//	cmbflux build --demo --qstar 2 --qmean 80 --qad 60 --lmax 12 --out bc
//	cmbflux inspect bc/coefficients.txt
//	cmbflux convert bc/coefficients.txt --norm schmidt --out schmidt.txt
//	cmbflux plot bc/coefficients.txt --out map.png
//	cmbflux sweep demo-out/sweep.yaml --out runs
//	cmbflux sweep demo-out/sweep.yaml --out runs --resume
//	cmbflux sequence --demo --qstar 1 --qmean 80 --lmax 6 --spin-rate 2 --times 0:10:3 --out spin
//	cmbflux build --demo --quantity dvs --rotate 45 --formats nc --out turned
//	cmbflux compare demo turned/field.nc
//
// Every command takes --help, which ends with a worked example; README.md
// documents them all. Check the convention stated in every coefficient file
// against the documentation of the simulation code that will read it.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/cmd/cmbflux/internal/outdir"
	"cmbflux/tomo"
)

func main() {
	err := run(os.Stdout, os.Stderr, os.Args[1:])
	os.Exit(report(os.Stderr, err))
}

// stdin is where "-" reads from; tests replace it.
var stdin io.Reader = os.Stdin

// usageError is a mistake on the command line; it exits with status 2 and
// points at the command's help.
type usageError struct {
	cmd string
	msg string
}

// Error implements the error interface.
func (e *usageError) Error() string {
	if e.cmd == "" {
		return e.msg + " (see cmbflux --help)"
	}
	return e.msg + " (see cmbflux " + e.cmd + " --help)"
}

func usagef(cmd, format string, args ...any) error {
	return &usageError{cmd: cmd, msg: fmt.Sprintf(format, args...)}
}

// errHelp reports that help was printed; the exit status is 0.
var errHelp = errors.New("help printed")

// exitCode maps an error to the exit status: 0 success, 2 bad usage or bad
// input, 1 anything else.
func exitCode(err error) int {
	var ue *usageError
	switch {
	case err == nil, errors.Is(err, errHelp):
		return 0
	case errors.As(err, &ue), errors.Is(err, tomo.ErrBadInput), errors.Is(err, config.ErrBadConfig),
		errors.Is(err, outdir.ErrNotEmpty), errors.Is(err, errBadInput):
		return 2
	}
	return 1
}

// report prints err to stderr and returns the exit status.
func report(stderr io.Writer, err error) int {
	code := exitCode(err)
	if err != nil && !errors.Is(err, errHelp) {
		fmt.Fprintln(stderr, "cmbflux: "+err.Error())
	}
	return code
}

// errBadInput marks input problems found by the command itself (e.g. a
// coefficient file it cannot use); it maps to exit status 2.
var errBadInput = errors.New("bad input")

// inputError is a problem with an input file found by the command itself
// or reported by a reader without a sentinel; it maps to exit status 2.
type inputError struct{ err error }

// Error implements the error interface.
func (e *inputError) Error() string { return e.err.Error() }

// Unwrap lets errors.Is find the cause and errBadInput.
func (e *inputError) Unwrap() []error { return []error{e.err, errBadInput} }

// inputErrorf returns an error about an input file that maps to status 2.
func inputErrorf(format string, args ...any) error {
	return &inputError{fmt.Errorf(format, args...)}
}

// asInput marks an error from reading an input file as bad input (exit
// status 2), keeping its text; nil stays nil.
func asInput(err error) error {
	if err == nil || errors.Is(err, tomo.ErrBadInput) || errors.Is(err, errBadInput) {
		return err
	}
	return &inputError{err}
}

// command is one subcommand.
type command struct {
	name    string
	summary string
	run     func(stdout, stderr io.Writer, args []string) error
}

var commands []command

func init() {
	commands = []command{
		{"build", "write one heat-flux boundary condition", runBuild},
		{"sweep", "write a boundary condition for every point of a parameter sweep", runSweep},
		{"sequence", "write time-dependent boundary conditions: a pattern turning or blending", runSequence},
		{"inspect", "describe a tomography grid or a coefficient file; verify an output folder", runInspect},
		{"convert", "change the convention of a coefficient file, or go between grid and coefficients", runConvert},
		{"plot", "draw a map and a spectrum of a grid or coefficient file", runPlot},
		{"compare", "compare tomography models at the base of the mantle", runCompare},
		{"demo", "run the whole job on the embedded demo scenario and write the report", runDemo},
	}
}

const topHelp = `cmbflux turns seismic tomography of the lowermost mantle into heat-flux
boundary conditions at the core-mantle boundary for geodynamo simulations.

Usage: cmbflux COMMAND [flags] [arguments]

Commands:
%s
Run 'cmbflux COMMAND --help' for a command's flags and a worked example.
Start with:  cmbflux demo --out demo-out

Check every boundary condition against the documentation of your simulation
code's conventions (normalization, Condon-Shortley phase, sign, units)
before you spend computer time on it.
`

func run(stdout, stderr io.Writer, args []string) error {
	if len(args) == 0 {
		printTopHelp(stderr)
		return usagef("", "no command given")
	}
	switch args[0] {
	case "-h", "-help", "--help", "help":
		if len(args) > 1 && args[0] == "help" {
			return run(stdout, stderr, []string{args[1], "--help"})
		}
		printTopHelp(stdout)
		return nil
	}
	for _, c := range commands {
		if c.name == args[0] {
			err := c.run(stdout, stderr, args[1:])
			if errors.Is(err, errHelp) {
				return nil
			}
			return err
		}
	}
	names := make([]string, len(commands))
	for i, c := range commands {
		names[i] = c.name
	}
	return usagef("", "unknown command %q; the commands are %s", args[0], strings.Join(names, ", "))
}

func printTopHelp(w io.Writer) {
	var b strings.Builder
	for _, c := range commands {
		fmt.Fprintf(&b, "  %-8s %s\n", c.name, c.summary)
	}
	fmt.Fprintf(w, topHelp, b.String())
}

// flagParser wraps a flag.FlagSet: long flags (--name or -name), positional
// arguments anywhere, errors returned as usage errors and help printed to
// stdout.
type flagParser struct {
	cmd   string
	fs    *flag.FlagSet
	help  string // text printed above the flags
	after string // text printed below the flags (examples)
	keys  config.Set
	out   io.Writer
	// extra holds the command's own flags in the order defined, for help.
	extra []string
}

func newParser(cmd string, stdout io.Writer, help, after string) *flagParser {
	fs := flag.NewFlagSet(cmd, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	return &flagParser{cmd: cmd, fs: fs, help: help, after: after, keys: config.Set{}, out: stdout}
}

// buildKeys defines a flag for every build parameter, recording the values
// given in p.keys.
func (p *flagParser) buildKeys() {
	for _, k := range config.BuildKeys {
		name := k.Name
		set := func(s string) error { return p.keys.SetFlag(name, s) }
		if k.Kind == config.Bool {
			p.fs.BoolFunc(name, k.Usage, set)
		} else {
			p.fs.Func(name, k.Usage, set)
		}
	}
}

func (p *flagParser) boolVar(v *bool, name, usage string) {
	p.fs.BoolVar(v, name, *v, usage)
	p.extra = append(p.extra, name)
}

func (p *flagParser) stringVar(v *string, name, arg, usage string) {
	p.fs.StringVar(v, name, *v, usage)
	p.extra = append(p.extra, name+"\x00"+arg)
}

func (p *flagParser) intVar(v *int, name, arg, usage string) {
	p.fs.IntVar(v, name, *v, usage)
	p.extra = append(p.extra, name+"\x00"+arg)
}

// parse parses args, allowing positional arguments between flags. "--"
// ends the flags.
func (p *flagParser) parse(args []string) ([]string, error) {
	var pos []string
	for {
		if err := p.fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				p.printHelp()
				return nil, errHelp
			}
			msg := err.Error()
			var ce *config.Error
			if errors.As(err, &ce) {
				return nil, err
			}
			if strings.HasPrefix(msg, "flag provided but not defined: ") {
				name := strings.TrimLeft(strings.TrimPrefix(msg, "flag provided but not defined: "), "-")
				if s := config.Suggest(name); s != "" && p.fs.Lookup(s) != nil {
					msg = fmt.Sprintf("unknown flag --%s (did you mean --%s?)", name, s)
				} else {
					msg = fmt.Sprintf("unknown flag --%s", name)
				}
			}
			return nil, usagef(p.cmd, "%s", msg)
		}
		rest := p.fs.Args()
		if len(rest) == 0 {
			return pos, nil
		}
		if len(args) > 0 && len(rest) < len(args) && args[len(args)-len(rest)-1] == "--" {
			return append(pos, rest...), nil
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

func (p *flagParser) printHelp() {
	w := p.out
	fmt.Fprint(w, p.help)
	byGroup := map[string][]config.Key{}
	if p.fs.Lookup("qstar") != nil {
		for _, k := range config.BuildKeys {
			byGroup[k.Group] = append(byGroup[k.Group], k)
		}
		for _, g := range config.Groups {
			fmt.Fprintf(w, "\n%s:\n", g)
			for _, k := range byGroup[g] {
				printFlag(w, k.Name, k.Arg, k.Usage)
			}
		}
	}
	if len(p.extra) > 0 {
		fmt.Fprintf(w, "\nOther flags:\n")
		for _, e := range p.extra {
			name, arg, _ := strings.Cut(e, "\x00")
			printFlag(w, name, arg, p.fs.Lookup(name).Usage)
		}
	}
	fmt.Fprint(w, p.after)
}

func printFlag(w io.Writer, name, arg, usage string) {
	left := "  --" + name
	if arg != "" {
		left += " " + arg
	}
	if len(left) > 26 {
		fmt.Fprintf(w, "%s\n%28s%s\n", left, "", usage)
		return
	}
	fmt.Fprintf(w, "%-28s%s\n", left, usage)
}

// sortedKeys returns the keys of m sorted.
func sortedKeys[V any](m map[string]V) []string {
	k := make([]string, 0, len(m))
	for n := range m {
		k = append(k, n)
	}
	sort.Strings(k)
	return k
}
