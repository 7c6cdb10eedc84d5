package main

import (
	"math"
	"os"
	"strings"
	"testing"

	"cmbflux/export"
)

// buildSummary runs build with args (--out o added) in a temporary folder
// and returns the summary it wrote.
func buildSummary(t *testing.T, args ...string) *Summary {
	t.Helper()
	t.Chdir(t.TempDir())
	_, errs, code := cli(append(append([]string{"build"}, args...), "--out", "o"), "")
	if code != 0 {
		t.Fatalf("build %s: exit %d\n%s", strings.Join(args, " "), code, errs)
	}
	s, err := readSummary("o")
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestPatternZonalDegreeOne checks --pattern 1:0:cos against the closed
// form of a zonal Y_1^0 pattern, q = q_mean (1 + (q*/2) cos theta): the
// flux is negative where cos theta < -2/q*, a polar cap of area fraction
// (1 - 2/q*)/2 (the area of a cap of height h on the unit sphere is
// 2 pi h, Archimedes' hat-box theorem), and q_max - q_min = q* q_mean, with
// the maximum at the north pole (positive weights raise the flux).
func TestPatternZonalDegreeOne(t *testing.T) {
	const tolArea = 1e-4 // area fractions are promised to 1e-4 of the sphere
	for _, qs := range []float64{1, 3, 4, 8} {
		s := buildSummary(t, "--pattern", "1:0:cos", "--qstar", fmtF(qs), "--qmean", "80")
		want := 0.0
		if qs > 2 {
			want = (1 - 2/qs) / 2
		}
		if math.Abs(s.AreaNegative-want) > tolArea {
			t.Errorf("q* = %g: area_fraction_negative %.6f, closed form %.6f", qs, s.AreaNegative, want)
		}
		if d := *s.QMax - *s.QMin; math.Abs(d-qs*80) > 1e-9*qs*80 {
			t.Errorf("q* = %g: q_max - q_min = %.12g mW/m^2, want q* q_mean = %g", qs, d, qs*80)
		}
		if s.QMaxLonLat[1] != 90 || s.QMinLonLat[1] != -90 {
			t.Errorf("q* = %g: q_max at %v, q_min at %v; want the north and south poles", qs, s.QMaxLonLat, s.QMinLonLat)
		}
		if s.LMax != 1 || !strings.HasPrefix(s.Input, "pattern 1:0:cos") {
			t.Errorf("q* = %g: lmax %d, input %q; want lmax 1 (the highest term degree) and the pattern named", qs, s.LMax, s.Input)
		}
	}
}

// TestPatternDefaultLMax checks that lmax defaults to the highest degree
// of the terms and that a given --lmax wins.
func TestPatternDefaultLMax(t *testing.T) {
	if s := buildSummary(t, "--pattern", "2:2:cos:1,3:1:sin:0.5", "--qstar", "1", "--qmean", "80"); s.LMax != 3 {
		t.Errorf("lmax %d, want 3", s.LMax)
	}
	s := buildSummary(t, "--pattern", "2:2:cos:1,3:1:sin:0.5", "--qstar", "1", "--qmean", "80", "--lmax", "2")
	if s.LMax != 2 {
		t.Errorf("lmax %d, want 2", s.LMax)
	}
	found := false
	for _, w := range s.Warnings {
		found = found || strings.HasPrefix(w, "harmonic dropped:")
	}
	if !found {
		t.Errorf("no warning that the degree-3 term was dropped: %q", s.Warnings)
	}
}

// TestPatternConfigKey checks the YAML key pattern: as a list.
func TestPatternConfigKey(t *testing.T) {
	t.Chdir(t.TempDir())
	writeFile(t, "b.yaml", "pattern: [\"2:2:cos\", \"1:0:cos:0.3\"]\nqstar: 1\nqmean: 80\nout: o\n")
	if _, errs, code := cli([]string{"build", "--config", "b.yaml", "--quiet"}, ""); code != 0 {
		t.Fatalf("exit %d\n%s", code, errs)
	}
	s, err := readSummary("o")
	if err != nil {
		t.Fatal(err)
	}
	if s.Input != "pattern 2:2:cos:1,1:0:cos:0.3" || s.LMax != 2 {
		t.Errorf("input %q lmax %d", s.Input, s.LMax)
	}
}

// TestMeasures checks --measure on Y_1^0, g = N cos theta with
// N = sqrt(3/(4 pi)): max|g| = N, the rms over the sphere is N/sqrt(3)
// (the mean of cos^2 over the sphere is 1/3), so for q = q_mean (1 + a g)
// q* = 2 a N = 2 max-deviation = 2 sqrt(3) rms, and
// (q_max - q_min)/(q_mean - q_ad) = q* q_mean/(q_mean - q_ad) (closed forms).
func TestMeasures(t *testing.T) {
	const tol = 1e-9
	for _, tc := range []struct {
		measure   string
		value     float64
		wantQStar float64
	}{
		{"qstar", 1.5, 1.5},
		{"rms", 0.1, 0.2 * math.Sqrt(3)},
		{"max-deviation", 0.3, 0.6},
		{"qstar-superadiabatic", 1, 1 * (80 - 60) / 80.0},
	} {
		s := buildSummary(t, "--pattern", "1:0:cos", "--measure", tc.measure, "--amplitude", fmtF(tc.value), "--qmean", "80", "--qad", "60")
		if math.Abs(s.QStar-tc.wantQStar) > tol {
			t.Errorf("%s = %g: q* %.12g, closed form %.12g", tc.measure, tc.value, s.QStar, tc.wantQStar)
		}
		if s.AmplitudeMeasure != tc.measure || !strings.HasSuffix(s.AmplitudeSetBy, " = "+fmtF(tc.value)) {
			t.Errorf("%s: summary says amplitude_measure %q, amplitude_set_by %q", tc.measure, s.AmplitudeMeasure, s.AmplitudeSetBy)
		}
		if (s.QStarRequested != nil) != (tc.measure == "qstar") {
			t.Errorf("%s: qstar_requested %v; want it only when q* itself was set", tc.measure, s.QStarRequested)
		}
		if tc.measure == "rms" && math.Abs(s.RMSRatio-tc.value) > tol {
			t.Errorf("rms: rms_ratio %.12g, want %g", s.RMSRatio, tc.value)
		}
	}
}

// TestPatternSweep checks that a sweep takes the pattern key in its base.
func TestPatternSweep(t *testing.T) {
	t.Chdir(t.TempDir())
	writeFile(t, "s.yaml", "base: {pattern: \"1:0:cos\", qmean: 80}\nvary:\n  qstar: [1, 4]\n")
	if _, errs, code := cli([]string{"sweep", "s.yaml", "--out", "runs", "--quiet"}, ""); code != 0 {
		t.Fatalf("exit %d\n%s", code, errs)
	}
	ents, err := os.ReadDir("runs")
	if err != nil {
		t.Fatal(err)
	}
	var areas []float64
	for _, e := range ents {
		if e.IsDir() {
			s, err := readSummary("runs/" + e.Name())
			if err != nil {
				t.Fatal(err)
			}
			areas = append(areas, s.AreaNegative)
		}
	}
	// Y_1^0 closed form as in TestPatternZonalDegreeOne: 0 at q* = 1,
	// 0.25 at q* = 4 (folders sort by q*).
	if len(areas) != 2 || areas[0] > 1e-4 || math.Abs(areas[1]-0.25) > 1e-4 {
		t.Errorf("negative areas %v, want [0 0.25]", areas)
	}
}

// TestPatternBadInput checks that mistakes with --pattern and --measure
// exit with status 2, name the flag and write nothing.
func TestPatternBadInput(t *testing.T) {
	base := []string{"build", "--qmean", "80", "--out", "o"}
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--pattern", "2:2", "--demo", "--qstar", "1"}, "--pattern: give one input"},
		{[]string{"--pattern", "2:3", "--qstar", "1"}, "--pattern: harmonic \"2:3\""},
		{[]string{"--pattern", "2:0:sin", "--qstar", "1"}, "order 0 has no sine part"},
		{[]string{"--pattern", "2:2:cos:0", "--qstar", "1"}, "every weight is 0"},
		{[]string{"--pattern", ",", "--qstar", "1"}, "--pattern: no terms"},
		{[]string{"--pattern", "2:2", "--qstar", "1", "--depth", "2800"}, "--depth: only used with a tomography input"},
		{[]string{"--pattern", "2:2", "--qstar", "1", "--quantity", "dvs"}, "--quantity: dvs needs a tomography input"},
		{[]string{"--pattern", "2:2", "--qstar", "1", "--measure", "rms"}, "--qstar: --qstar sets q*"},
		{[]string{"--pattern", "2:2", "--amplitude", "1", "--measure", "qstar-superadiabatic"}, "--measure: qstar-superadiabatic"},
		{[]string{"--pattern", "2:2", "--amplitude", "1", "--measure", "peak"}, "--measure: \"peak\" is not one of"},
		{[]string{"--pattern", "2:2", "--amplitude", "1", "--qstar", "1"}, "--amplitude: give either --qstar or --amplitude"},
		{[]string{"--pattern", "2:2", "--measure", "rms"}, "--measure: rms needs its value"},
	} {
		t.Run(strings.Join(tc.args, " "), func(t *testing.T) {
			t.Chdir(t.TempDir())
			_, errs, code := cli(append(append([]string(nil), base...), tc.args...), "")
			if code != 2 || !strings.Contains(errs, tc.want) {
				t.Errorf("exit %d, stderr %q; want 2 and %q", code, errs, tc.want)
			}
			if _, err := os.Stat("o"); err == nil {
				t.Errorf("output folder written despite the error")
			}
		})
	}
}

// TestMeasureInHeaders checks that a value set by another measure is never
// recorded as q* in the coefficient table's header or among the
// manifest's parameters, where a set-up script would read it as q*.
func TestMeasureInHeaders(t *testing.T) {
	buildSummary(t, "--pattern", "2:2:cos", "--measure", "rms", "--amplitude", "0.2", "--qmean", "80")
	data, err := os.ReadFile("o/coefficients.txt")
	if err != nil {
		t.Fatal(err)
	}
	text := string(data)
	if strings.Contains(text, "param.qstar =") || !strings.Contains(text, "# param.measure = rms\n") ||
		!strings.Contains(text, "# param.amplitude = 0.2\n") || !strings.Contains(text, "# param.pattern = 2:2:cos:1\n") {
		t.Errorf("coefficients.txt header does not record measure, amplitude and pattern (and no qstar):\n%s", text)
	}
	m, err := export.ReadManifestFile("o/manifest.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if _, ok := m.Params["qstar"]; ok || m.Params["measure"] != "rms" || m.Params["amplitude"] != "0.2" || m.Params["pattern"] != "2:2:cos" {
		t.Errorf("manifest parameters %v; want measure rms, amplitude 0.2, the pattern, no qstar", m.Params)
	}
}

// TestPatternRotate checks --rotate on an idealised pattern: Y_1^1 (cos)
// is proportional to cos(lon) on the equator, so turned east by 30
// degrees its flux maximum lies at lon 30, lat 0 and its minimum at
// lon 210 (closed form).
func TestPatternRotate(t *testing.T) {
	s := buildSummary(t, "--pattern", "1:1:cos", "--qstar", "1", "--qmean", "80", "--rotate", "30")
	if math.Abs(s.QMaxLonLat[0]-30) > 1e-6 || math.Abs(s.QMaxLonLat[1]) > 1e-6 || math.Abs(s.QMinLonLat[0]-210) > 1e-6 {
		t.Errorf("q_max at %v, q_min at %v; want (30, 0) and (210, 0)", s.QMaxLonLat, s.QMinLonLat)
	}
	if s.LMaxResolved != 1 {
		t.Errorf("lmax_resolved_by_input %d, want 1, the highest degree of the pattern", s.LMaxResolved)
	}
}
