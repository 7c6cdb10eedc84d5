package main

import (
	"bytes"
	"fmt"
	"io/fs"
	"math"
	"math/rand"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"cmbflux/cmd/cmbflux/internal/outdir"
)

const demoSweep = `base: {demo: true, qmean: 80, qad: 60}
vary:
  qstar: [0, 1, 2.3, 5]
  lmax: [4, 8, 16]
`

func TestGoldenSweep(t *testing.T) {
	setup := func(t *testing.T) { writeFile(t, "sweep.yaml", demoSweep) }
	runGoldenCases(t, []goldenCase{
		{name: "sweep-demo", args: []string{"sweep", "sweep.yaml", "--out", "runs"}, setup: setup},
		{name: "sweep-list", args: []string{"sweep", "sweep.yaml", "--list"}, setup: setup},
		{name: "sweep-only-bad", args: []string{"sweep", "sweep.yaml", "--out", "runs", "--only", "12"}, setup: setup, code: 2},
	})
}

// tree returns every regular file below dir (slash paths) with its bytes.
func tree(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	m := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.Type().IsRegular() {
			rel, _ := filepath.Rel(dir, p)
			b, err := os.ReadFile(p)
			if err != nil {
				return err
			}
			m[filepath.ToSlash(rel)] = b
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func sameTree(t *testing.T, want, got map[string][]byte) {
	t.Helper()
	for name, b := range want {
		g, ok := got[name]
		if !ok {
			t.Errorf("missing %s", name)
		} else if !bytes.Equal(g, b) {
			t.Errorf("%s differs", name)
		}
	}
	for name := range got {
		if _, ok := want[name]; !ok {
			t.Errorf("extra file %s", name)
		}
	}
}

func TestSweepResumeAndOnly(t *testing.T) {
	t.Chdir(t.TempDir())
	writeFile(t, "sweep.yaml", demoSweep)
	if _, e, code := cli([]string{"sweep", "sweep.yaml", "--out", "full", "--quiet"}, ""); code != 0 {
		t.Fatalf("full sweep: %d %s", code, e)
	}
	want := tree(t, "full")
	if len(want) != 12*3+5 { // coefficients.txt, summary.json, manifest.yaml per run; runs.tsv, sweep.yaml, summary.csv, sweep.png, report.html
		t.Errorf("%d files in the sweep folder, want 41", len(want))
	}
	// The array-job way: every index on its own, in a scrambled order.
	for _, i := range []int{5, 0, 11, 3, 7, 1, 9, 2, 10, 4, 8, 6} {
		if _, e, code := cli([]string{"sweep", "sweep.yaml", "--out", "parts", "--only", fmt.Sprint(i), "--quiet"}, ""); code != 0 {
			t.Fatalf("--only %d: %d %s", i, code, e)
		}
		if i != 6 {
			if _, err := os.Stat("parts/summary.csv"); err == nil {
				t.Fatalf("summary.csv written before every run was complete")
			}
		}
	}
	sameTree(t, want, tree(t, "parts"))

	// A damaged run is detected by its manifest and rebuilt by --resume.
	os.WriteFile("parts/0004_qstar=1_lmax=8/coefficients.txt", []byte("0 0 1 0\n"), 0o644)
	out, e, code := cli([]string{"sweep", "sweep.yaml", "--out", "parts", "--resume"}, "")
	if code != 0 {
		t.Fatalf("resume: %d %s", code, e)
	}
	if !strings.Contains(out, "(1 built, 11 already complete)") {
		t.Errorf("resume output %q", out)
	}
	sameTree(t, want, tree(t, "parts"))

	// Another sweep's folder is refused.
	writeFile(t, "other.yaml", "base: {demo: true, qmean: 80}\nvary: {qstar: [1, 2]}\n")
	if _, e, code := cli([]string{"sweep", "other.yaml", "--out", "parts", "--resume"}, ""); code != 2 || !strings.Contains(e, "not empty") {
		t.Errorf("other sweep into the folder: %d %q", code, e)
	}
}

// TestSweepSurvivesSIGKILL builds the command, kills a sweep with SIGKILL at
// random moments again and again, resumes it each time, and checks that the
// final folder is byte for byte that of an uninterrupted sweep and that no
// visible run folder is ever incomplete.
func TestSweepSurvivesSIGKILL(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the command")
	}
	dir := t.TempDir()
	bin := filepath.Join(dir, "cmbflux")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	sweep := filepath.Join(dir, "sweep.yaml")
	os.WriteFile(sweep, []byte("base: {demo: true, qmean: 80, qad: 60, formats: [json, csv]}\nvary:\n  qstar: [0.5, 1, 1.5, 2, 2.5, 3]\n  lmax: [6, 12, 18]\n"), 0o644)
	runBin := func(out string, extra ...string) *exec.Cmd {
		cmd := exec.Command(bin, append([]string{"sweep", sweep, "--out", out, "--quiet", "--jobs", "2"}, extra...)...)
		cmd.Dir = dir
		return cmd
	}
	start := time.Now()
	if out, err := runBin(filepath.Join(dir, "ref")).CombinedOutput(); err != nil {
		t.Fatalf("uninterrupted sweep: %v\n%s", err, out)
	}
	full := time.Since(start)
	want := tree(t, filepath.Join(dir, "ref"))

	rng := rand.New(rand.NewSource(1))
	target := filepath.Join(dir, "killed")
	kills := 0
	for attempt := 0; attempt < 60 && kills < 8; attempt++ {
		cmd := runBin(target, "--resume")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- cmd.Wait() }()
		delay := time.Duration(rng.Int63n(int64(full)/2 + 1))
		select {
		case err := <-done:
			if err != nil {
				t.Fatalf("resumed sweep failed: %v", err)
			}
			// Finished before the kill: start over so that enough kills land.
			os.RemoveAll(target)
			continue
		case <-time.After(delay):
			cmd.Process.Signal(syscall.SIGKILL)
			<-done
			kills++
		}
		// Whatever is visible must be complete.
		ents, _ := os.ReadDir(target)
		for _, e := range ents {
			if e.IsDir() && !outdir.IsTemp(e.Name()) {
				if err := verifyFolder(filepath.Join(target, e.Name())); err != nil {
					t.Fatalf("after kill %d: visible run %s is incomplete: %v", kills, e.Name(), err)
				}
			}
		}
	}
	if kills < 8 {
		t.Fatalf("only %d kills landed during a sweep", kills)
	}
	if out, err := runBin(target, "--resume").CombinedOutput(); err != nil {
		t.Fatalf("final resume: %v\n%s", err, out)
	}
	sameTree(t, want, tree(t, target))
	t.Logf("%d kills; uninterrupted sweep %v", kills, full)

	// SIGINT and SIGTERM stop the sweep cleanly: status 1, a message that
	// says how to resume, no temporary folders left, and resuming completes
	// the same files.
	for _, sig := range []os.Signal{os.Interrupt, syscall.SIGTERM} {
		target := filepath.Join(dir, fmt.Sprint("signal-", sig))
		cmd := runBin(target)
		var stderr bytes.Buffer
		cmd.Stderr = &stderr
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		// Wait until the sweep has written its index (its signal handler is
		// installed before that), then a little into the runs.
		for i := 0; i < 500; i++ {
			if _, err := os.Stat(filepath.Join(target, "runs.tsv")); err == nil {
				break
			}
			time.Sleep(10 * time.Millisecond)
		}
		time.Sleep(full / 4)
		cmd.Process.Signal(sig)
		err := cmd.Wait()
		if err != nil {
			if ee, ok := err.(*exec.ExitError); !ok || ee.ExitCode() != 1 || !strings.Contains(stderr.String(), "--resume") {
				t.Errorf("after %v: %v, stderr %q", sig, err, stderr.String())
			}
			ents, _ := os.ReadDir(target)
			for _, e := range ents {
				if outdir.IsTemp(e.Name()) {
					t.Errorf("after %v: temporary %s left behind", sig, e.Name())
				}
			}
		}
		if out, err := runBin(target, "--resume").CombinedOutput(); err != nil {
			t.Fatalf("resume after %v: %v\n%s", sig, err, out)
		}
		sameTree(t, want, tree(t, target))
	}
}

// BenchmarkSweep runs sweeps of the demo scenario at lmax 16 that vary q*;
// the time per point is reported as ns/point.
func BenchmarkSweep(b *testing.B) {
	for _, n := range []int{10, 1000} {
		b.Run(fmt.Sprintf("points=%d", n), func(b *testing.B) {
			dir := b.TempDir()
			var vals []string
			for i := 0; i < n; i++ {
				vals = append(vals, fmt.Sprintf("%.4f", 4*float64(i)/float64(n)))
			}
			sw := filepath.Join(dir, "sweep.yaml")
			os.WriteFile(sw, []byte("base: {demo: true, qmean: 80, qad: 60, lmax: 16}\nvary:\n  qstar: ["+strings.Join(vals, ", ")+"]\n"), 0o644)
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				out := filepath.Join(dir, fmt.Sprint("out", i))
				var o, e bytes.Buffer
				if err := run(&o, &e, []string{"sweep", sw, "--out", out, "--quiet"}); err != nil {
					b.Fatal(err, e.String())
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*n), "ns/point")
		})
	}
}

func TestSweepOverInputFiles(t *testing.T) {
	t.Chdir(t.TempDir())
	writeCosGrid(t, "models/a.txt", 1)
	writeCosGrid(t, "models/b.txt", 2)
	writeFile(t, "study/sweep.yaml", "base: {qstar: 1, qmean: 80, lmax: 4}\nvary:\n  input: [../models/a.txt, ../models/b.txt, ../models/missing.txt]\n  rotate: [0, 90]\nout: runs\n")
	_, errs, code := cli([]string{"sweep", "study/sweep.yaml", "--quiet"}, "")
	// The missing model fails its two runs (bad input: status 2); the others
	// are complete, and the summary waits for the missing ones.
	if code != 2 || !strings.Contains(errs, "missing.txt") || !strings.Contains(errs, "2 runs failed") {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
	for _, name := range []string{"0000_input=a_rotate=0", "0003_input=b_rotate=90"} {
		if err := verifyFolder(filepath.Join("study", "runs", name)); err != nil {
			t.Errorf("run %s: %v", name, err)
		}
	}
	if _, err := os.Stat("study/runs/summary.csv"); err == nil {
		t.Error("summary.csv written although runs failed")
	}
	// Turning a pattern by 90 degrees moves its extrema by 90 degrees of
	// longitude; a pattern symmetric about the axis has none to move, so
	// check that q* and the extreme values are unchanged instead.
	a, b := loadSummary(t, "study/runs/0000_input=a_rotate=0"), loadSummary(t, "study/runs/0001_input=a_rotate=90")
	if math.Abs(*a.QMax-*b.QMax) > 1e-9 || math.Abs(*a.QMin-*b.QMin) > 1e-9 {
		t.Errorf("rotation about the axis changed an axisymmetric pattern: %g %g vs %g %g", *a.QMax, *a.QMin, *b.QMax, *b.QMin)
	}
}
