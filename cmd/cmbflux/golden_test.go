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
