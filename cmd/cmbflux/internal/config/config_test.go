package config

import (
	"errors"
	"strings"
	"testing"
)

func TestParseBuildLocatesErrors(t *testing.T) {
	for _, tc := range []struct {
		name, yaml, want string
	}{
		{"unknown key", "demo: true\nqstr: 5\n", `b.yaml:2:1: unknown parameter "qstr" (did you mean "qstar"?)`},
		{"bad number", "demo: true\nqstar: five\n", `b.yaml:2:8: qstar: "five" is not a finite number`},
		{"not a list", "lmax: [1, 2]\n", "b.yaml:1:7: lmax: expected a single value, not a list"},
		{"twice", "lmax: 4\nlmax: 5\n", "b.yaml:2:1: lmax: set twice (first at line 1)"},
		{"syntax", "lmax: 4\n  qstar: [\n", "b.yaml:"},
		{"not a mapping", "- 1\n- 2\n", "b.yaml:1:1: expected a mapping"},
		{"empty", "", "b.yaml: the file is empty"},
		{"null", "qstar:\n", "b.yaml:1:7: qstar: no value given"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ParseBuild("b.yaml", []byte(tc.yaml))
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.HasPrefix(err.Error(), tc.want) {
				t.Errorf("error %q, want prefix %q", err, tc.want)
			}
			if !errors.Is(err, ErrBadConfig) {
				t.Errorf("error does not wrap ErrBadConfig")
			}
		})
	}
}

func TestResolveUnits(t *testing.T) {
	s, err := ParseBuild("dir/b.yaml", []byte("input: m.txt\nheatflow: 10\nadiabatic-heatflow: 5\nqstar: 2\nformats: [png, json, png]\ndepth-range: 2700:2891\n"))
	if err != nil {
		t.Fatal(err)
	}
	sp, err := Resolve(s)
	if err != nil {
		t.Fatal(err)
	}
	// 10 TW over a CMB of radius 3480 km is 65.7 mW/m^2 (references sheet, [derived]).
	if got := sp.QMean * 1e3; got < 65.6 || got > 65.8 {
		t.Errorf("qmean = %g mW/m^2, want 65.7", got)
	}
	if got := sp.QAd * 1e3; got < 32.8 || got > 33.0 {
		t.Errorf("qad = %g mW/m^2, want 32.9", got)
	}
	if sp.Input != "dir/m.txt" {
		t.Errorf("input = %q, want it relative to the config's folder", sp.Input)
	}
	if strings.Join(sp.Formats, ",") != "txt,png,json" {
		t.Errorf("formats = %v", sp.Formats)
	}
	if sp.DepthMin != 2700 || sp.DepthMax != 2891 || !sp.HasRange {
		t.Errorf("depth range %g:%g", sp.DepthMin, sp.DepthMax)
	}
}

func TestResolveRefuses(t *testing.T) {
	for _, tc := range []struct{ yaml, want string }{
		{"qstar: 1\nqmean: 80\n", "no input"},
		{"demo: true\nqmean: 80\n", "no amplitude"},
		{"demo: true\nqstar: 1\n", "no mean flux"},
		{"demo: true\nqstar: -1\nqmean: 80\n", "negative"},
		{"demo: true\nphysical: true\nqmean: 80\ndlnvs-dt: 2e-5\nconductivity: 8\nthickness: 200\n", "must be negative"},
		{"demo: true\nqstar: 1\nqmean: 80\nformats: pdf\n", `"pdf" is not one of`},
		{"demo: true\nqstar: 1\nqmean: 80\ndepth-range: 2891:2700\n", "smaller depth first"},
		{"demo: true\ninput: a.txt\nqstar: 1\nqmean: 80\n", "not both"},
		{"demo: true\nqstar: 1\nqmean: 0\n", "must be positive"},
	} {
		s, err := ParseBuild("b.yaml", []byte(tc.yaml))
		if err != nil {
			t.Fatalf("%q: %v", tc.yaml, err)
		}
		_, err = Resolve(s)
		if err == nil || !strings.Contains(err.Error(), tc.want) || !errors.Is(err, ErrBadConfig) {
			t.Errorf("%q: error %v, want one containing %q", tc.yaml, err, tc.want)
		}
	}
}

func TestSweepPoints(t *testing.T) {
	sw, err := ParseSweep("s/sweep.yaml", []byte("base: {demo: true, qmean: 80}\nvary:\n  qstar: [0, 1, 2.3, 5]\n  lmax: [4, 8, 16]\nout: runs\n"))
	if err != nil {
		t.Fatal(err)
	}
	pts := sw.Points()
	if len(pts) != 12 {
		t.Fatalf("%d points, want 12", len(pts))
	}
	if pts[0].Name != "0000_qstar=0_lmax=4" || pts[5].Name != "0005_qstar=1_lmax=16" {
		t.Errorf("names %q, %q", pts[0].Name, pts[5].Name)
	}
	if pts[11].Set["qstar"].Raw != "5" || pts[11].Set["lmax"].Raw != "16" || pts[11].Set["qmean"].Raw != "80" {
		t.Errorf("last point %v", pts[11].Set)
	}
	if sw.Out != "s/runs" {
		t.Errorf("out = %q", sw.Out)
	}
}

func TestSweepNamesStayInside(t *testing.T) {
	sw, err := ParseSweep("sweep.yaml", []byte("base: {qstar: 1, qmean: 80}\nvary:\n  input: [../../etc/passwd, /abs/x.nc, 'a/../..', '..']\n  taper: ['cos:8:12', '../x']\n"))
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range sw.Points() {
		if !SafeName(p.Name) {
			t.Errorf("unsafe run name %q", p.Name)
		}
	}
	for _, y := range []string{"base: {demo: true}\nvary: {qstar: [1]}\nout: ../x\n", "base: {demo: true}\nvary: {qstar: [1]}\nout: /tmp/x\n", "base: {demo: true}\nvary: {out: [a, b]}\n"} {
		if _, err := ParseSweep("s.yaml", []byte(y)); err == nil {
			t.Errorf("%q accepted", y)
		}
	}
}

func TestSweepErrors(t *testing.T) {
	for _, tc := range []struct{ yaml, want string }{
		{"base: {demo: true}\n", "s.yaml:1:1: no vary"},
		{"base: {demo: true}\nvary:\n  qstar: [1, 2, 1]\n", "s.yaml:3:17: qstar: value \"1\" listed twice"},
		{"base: {demo: true, qstar: 1}\nvary:\n  qstar: [1, 2]\n", "s.yaml:3:3: qstar: set both in base and in vary"},
		{"base: {demo: true}\nvary:\n  qstar: []\n", "s.yaml:3:10: qstar: empty list"},
		{"bases: {}\n", "s.yaml:1:1: unknown key \"bases\""},
		{"base: {demo: true, out: x}\nvary: {qstar: [1]}\n", "s.yaml:1:25: out: a sweep's runs go into folders"},
	} {
		_, err := ParseSweep("s.yaml", []byte(tc.yaml))
		if err == nil || !strings.HasPrefix(err.Error(), tc.want) {
			t.Errorf("%q: error %v, want prefix %q", tc.yaml, err, tc.want)
		}
	}
}

func FuzzParseBuild(f *testing.F) {
	f.Add([]byte("demo: true\nqstar: 5\nqmean: 80\nformats: [txt, png]\n"))
	f.Add([]byte("input: x.nc\ndepth-range: 2700:2891\nphysical: yes\n"))
	f.Add([]byte("- [\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ParseBuild("f.yaml", data)
		if err != nil {
			if !errors.Is(err, ErrBadConfig) {
				t.Fatalf("error without ErrBadConfig: %v", err)
			}
			return
		}
		if _, err := Resolve(s); err != nil && !errors.Is(err, ErrBadConfig) {
			t.Fatalf("resolve error without ErrBadConfig: %v", err)
		}
	})
}

func FuzzParseSweep(f *testing.F) {
	f.Add([]byte("base: {demo: true, qmean: 80}\nvary: {qstar: [0, 1, 2.3, 5], lmax: [4, 8, 16]}\n"))
	f.Add([]byte("base: {qstar: 1}\nvary: {input: [../a.txt, b/c.nc]}\nout: x\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		sw, err := ParseSweep("f.yaml", data)
		if err != nil {
			if !errors.Is(err, ErrBadConfig) {
				t.Fatalf("error without ErrBadConfig: %v", err)
			}
			return
		}
		if sw.NumPoints() > 2000 {
			return
		}
		seen := map[string]bool{}
		for _, p := range sw.Points() {
			if !SafeName(p.Name) || seen[p.Name] {
				t.Fatalf("bad or repeated run name %q", p.Name)
			}
			seen[p.Name] = true
		}
	})
}
