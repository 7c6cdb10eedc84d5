package main

import (
	"bytes"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/golden")

var goldenDir = func() string {
	d, err := filepath.Abs(filepath.Join("testdata", "golden"))
	if err != nil {
		panic(err)
	}
	return d
}()

// cli runs the command line in the current folder as main does and returns
// stdout, stderr and the exit status.
func cli(args []string, input string) (string, string, int) {
	var out, errb bytes.Buffer
	old := stdin
	stdin = strings.NewReader(input)
	defer func() { stdin = old }()
	err := run(&out, &errb, args)
	code := report(&errb, err)
	return out.String(), errb.String(), code
}

// checkGolden compares got with testdata/golden/name; on a mismatch it
// writes name.new beside it and shows the first differing line.
func checkGolden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join(goldenDir, name)
	if *update {
		if err := os.MkdirAll(goldenDir, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		os.Remove(path + ".new")
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		os.WriteFile(path+".new", []byte(got), 0o644)
		t.Errorf("%s: %v; wrote the output to %s.new (run go test -update to accept)", name, err, path)
		return
	}
	if string(want) == got {
		os.Remove(path + ".new")
		return
	}
	os.WriteFile(path+".new", []byte(got), 0o644)
	t.Errorf("%s differs from the golden file; new output in %s.new\n%s", name, path, firstDiff(string(want), got))
}

func firstDiff(want, got string) string {
	w, g := strings.Split(want, "\n"), strings.Split(got, "\n")
	for i := 0; i < max(len(w), len(g)); i++ {
		var a, b string
		if i < len(w) {
			a = w[i]
		}
		if i < len(g) {
			b = g[i]
		}
		if a != b {
			return fmt.Sprintf("line %d:\n  want: %q\n  got:  %q", i+1, a, b)
		}
	}
	return "(only line endings differ)"
}

type goldenCase struct {
	name  string
	args  []string
	stdin string
	code  int
	// setup prepares files in the test's folder.
	setup func(t *testing.T)
}

func runGoldenCases(t *testing.T, cases []goldenCase) {
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Chdir(t.TempDir())
			if tc.setup != nil {
				tc.setup(t)
			}
			out, errs, code := cli(tc.args, tc.stdin)
			if code != tc.code {
				t.Errorf("exit status %d, want %d\nstderr:\n%s", code, tc.code, errs)
			}
			checkGolden(t, tc.name+".stdout", out)
			checkGolden(t, tc.name+".stderr", errs)
		})
	}
}

func writeFile(t *testing.T, name, content string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(name), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(name, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestGoldenUsage(t *testing.T) {
	runGoldenCases(t, []goldenCase{
		{name: "help", args: []string{"--help"}},
		{name: "no-command", args: nil, code: 2},
		{name: "unknown-command", args: []string{"bild"}, code: 2},
		{name: "build-help", args: []string{"build", "--help"}},
		{name: "sweep-help", args: []string{"sweep", "--help"}},
		{name: "build-unknown-flag", args: []string{"build", "--qstr", "2"}, code: 2},
		{name: "build-bad-number", args: []string{"build", "--demo", "--qstar", "two"}, code: 2},
		{name: "build-no-out", args: []string{"build", "--demo", "--qstar", "2", "--qmean", "80"}, code: 2},
		{name: "build-config-error", args: []string{"build", "--config", "b.yaml"}, code: 2,
			setup: func(t *testing.T) { writeFile(t, "b.yaml", "demo: true\nqstar: 2\nqmean: [80]\n") }},
		{name: "build-missing-input", args: []string{"build", "--input", "nope.txt", "--qstar", "2", "--qmean", "80", "--out", "o"}, code: 2},
		{name: "sweep-bad-yaml", args: []string{"sweep", "s.yaml", "--out", "o"}, code: 2,
			setup: func(t *testing.T) { writeFile(t, "s.yaml", "base: {demo: true}\nvary:\n  qstar: [1, 2\n") }},
		{name: "sweep-escape", args: []string{"sweep", "s.yaml"}, code: 2,
			setup: func(t *testing.T) {
				writeFile(t, "s.yaml", "base: {demo: true, qmean: 80}\nvary: {qstar: [1, 2]}\nout: ../elsewhere\n")
			}},
	})
}

// buildDemo makes bc/ in the current folder for the cases that read it.
func buildDemo(t *testing.T) {
	t.Helper()
	if _, e, code := cli([]string{"build", "--demo", "--qstar", "1", "--qmean", "80", "--qad", "60", "--lmax", "6", "--formats", "nc", "--out", "bc"}, ""); code != 0 {
		t.Fatalf("setup build: %s", e)
	}
}

func TestGoldenCommands(t *testing.T) {
	runGoldenCases(t, []goldenCase{
		{name: "build-demo", args: []string{"build", "--demo", "--qstar", "2.3", "--qmean", "80", "--qad", "60", "--lmax", "8", "--out", "bc"}},
		{name: "build-demo-quiet", args: []string{"build", "--demo", "--qstar", "1", "--qmean", "80", "--quiet", "--out", "bc"}},
		{name: "build-physical", args: []string{"build", "--demo", "--physical", "--dlnvs-dt", "-2e-5", "--conductivity", "8.4", "--thickness", "200", "--heatflow", "11", "--adiabatic-heatflow", "9", "--out", "bc"}},
		{name: "build-schmidt", args: []string{"build", "--demo", "--qstar", "1", "--qmean", "80", "--norm", "schmidt", "--condon-shortley", "--lmax", "30", "--taper", "gauss:10", "--out", "bc"}},
		{name: "build-config", args: []string{"build", "--config", "b.yaml", "--qstar", "1.5"},
			setup: func(t *testing.T) {
				writeFile(t, "b.yaml", "demo: true\nqstar: 1\nqmean: 80\nqad: 60\nlmax: 12\ntaper: cos:10:12\ndepth-range: 2700:2891\nout: bc\n")
			}},
		{name: "build-bad-taper", args: []string{"build", "--demo", "--qstar", "1", "--qmean", "80", "--taper", "cos:8", "--out", "bc"}, code: 2},
		{name: "build-exists", args: []string{"build", "--demo", "--qstar", "1", "--qmean", "80", "--out", "bc"}, code: 2, setup: buildDemo},
		{name: "build-physical-incomplete", args: []string{"build", "--demo", "--physical", "--dlnvs-dt", "-2e-5", "--qmean", "80", "--out", "bc"}, code: 2},
		{name: "inspect-demo", args: []string{"inspect", "--demo"}},
		{name: "inspect-coeffs", args: []string{"inspect", "bc/coefficients.txt"}, setup: buildDemo},
		{name: "inspect-coeffs-json", args: []string{"inspect", "bc/coefficients.txt", "--json"}, setup: buildDemo},
		{name: "inspect-grid", args: []string{"inspect", "bc/field.nc"}, code: 2, setup: buildDemo},
		{name: "inspect-folder", args: []string{"inspect", "bc"}, setup: buildDemo},
		{name: "inspect-folder-damaged", args: []string{"inspect", "bc"}, code: 1,
			setup: func(t *testing.T) { buildDemo(t); writeFile(t, "bc/coefficients.txt", "0 0 1 0\n") }},
		{name: "inspect-missing", args: []string{"inspect", "nothing.nc"}, code: 2},
		{name: "convert-stdout", args: []string{"convert", "bc/coefficients.txt", "--norm", "schmidt", "--out", "-"}, setup: buildDemo},
		{name: "convert-plain-undeclared", args: []string{"convert", "plain.txt", "--out", "x.txt"}, code: 2,
			setup: func(t *testing.T) { writeFile(t, "plain.txt", "0 0 1 0\n1 0 0.5 0\n1 1 0.1 0.2\n") }},
		{name: "convert-plain-declared", args: []string{"convert", "plain.txt", "--from-norm", "schmidt", "--out", "-"},
			setup: func(t *testing.T) { writeFile(t, "plain.txt", "0 0 1 0\n1 0 0.5 0\n1 1 0.1 0.2\n") }},
		{name: "plot-demo", args: []string{"plot", "--demo", "--out", "m.png", "--spectrum", "s.svg"}},
		{name: "plot-bad-ext", args: []string{"plot", "--demo", "--out", "m.pdf"}, code: 2},
		{name: "demo", args: []string{"demo", "--out", "d"}},
		{name: "demo-help", args: []string{"demo", "--help"}},
		{name: "inspect-help", args: []string{"inspect", "--help"}},
		{name: "convert-help", args: []string{"convert", "--help"}},
		{name: "plot-help", args: []string{"plot", "--help"}},
	})
}
