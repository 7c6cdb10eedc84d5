package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/export"
	"cmbflux/flux/sh"
	"cmbflux/tomo"
)

// writeCosGrid writes a text grid (2-degree cells) of dlnVs = -amp% cos(colat):
// slow at the north pole, fast at the south pole.
func writeCosGrid(t *testing.T, name string, amp float64) {
	t.Helper()
	g := &tomo.Grid{Name: "dvs", Units: "percent", Reg: tomo.CellRegistered, Title: "test pattern -cos(colatitude)"}
	for lon := 1.0; lon < 360; lon += 2 {
		g.Lon = append(g.Lon, lon)
	}
	for lat := -89.0; lat < 90; lat += 2 {
		g.Lat = append(g.Lat, lat)
	}
	for _, lat := range g.Lat {
		for range g.Lon {
			g.Values = append(g.Values, -amp*math.Sin(lat*math.Pi/180))
		}
	}
	var b bytes.Buffer
	if err := tomo.WriteText(&b, g); err != nil {
		t.Fatal(err)
	}
	writeFile(t, name, b.String())
}

func loadSummary(t *testing.T, dir string) *Summary {
	t.Helper()
	s, err := readSummary(dir)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func mustCLI(t *testing.T, args ...string) (string, string) {
	t.Helper()
	out, errs, code := cli(args, "")
	if code != 0 {
		t.Fatalf("cmbflux %s: exit %d\n%s", strings.Join(args, " "), code, errs)
	}
	return out, errs
}

// readCanonical reads a coefficient file and converts it to sh.Canonical.
func readCanonical(t *testing.T, path string) *sh.Coeffs {
	t.Helper()
	tab, err := export.ReadCoeffsFile(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	c, err := tab.Coeffs.Convert(sh.Canonical)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func TestRatioModeGivesQStarAndMean(t *testing.T) {
	t.Chdir(t.TempDir())
	mustCLI(t, "build", "--demo", "--qstar", "1.7", "--qmean", "65.7", "--lmax", "10", "--out", "bc")
	c := readCanonical(t, "bc/coefficients.txt")
	s := loadSummary(t, "bc")
	at := func(p [2]float64) float64 { return c.Evaluate((90-p[1])*math.Pi/180, p[0]*math.Pi/180) }
	// Evaluate the written coefficients independently at the reported
	// extrema and apply the definition q* = (q_max - q_min)/q_mean
	// (references sheet, [derived]).
	mean := c.C[0] / math.Sqrt(4*math.Pi) // orthonormal Y00 = 1/sqrt(4 pi)
	if math.Abs(mean-65.7) > 1e-9*65.7 {
		t.Errorf("mean flux %g mW/m^2, want 65.7", mean)
	}
	qmax, qmin := at(s.QMaxLonLat), at(s.QMinLonLat)
	if got := (qmax - qmin) / mean; math.Abs(got-1.7) > 1e-7 {
		t.Errorf("q* of the written coefficients at the reported extrema = %.12g, want 1.7", got)
	}
	if math.Abs(*s.QMax-qmax) > 1e-6*qmax || math.Abs(*s.QMin-qmin) > 1e-6*qmax || math.Abs(s.QStar-1.7) > 1e-12 {
		t.Errorf("summary q_max %g q_min %g q* %g; evaluated %g %g", *s.QMax, *s.QMin, s.QStar, qmax, qmin)
	}
	// They are the extrema: no sample of a 1-degree grid lies outside them.
	for lat := -90.0; lat <= 90; lat += 1 {
		for lon := 0.0; lon < 360; lon += 1 {
			q := at([2]float64{lon, lat})
			if q > qmax+1e-9*qmax || q < qmin-1e-9*qmax {
				t.Fatalf("q(%g, %g) = %g lies outside [%g, %g]", lon, lat, q, qmin, qmax)
			}
		}
	}
}

func TestHeatFlowSetsMeanFlux(t *testing.T) {
	t.Chdir(t.TempDir())
	mustCLI(t, "build", "--demo", "--qstar", "1", "--heatflow", "10", "--out", "bc")
	// 10 TW over 4 pi (3480 km)^2 is 65.7 mW/m^2 (references sheet, [derived]).
	if q := *loadSummary(t, "bc").QMean; math.Abs(q-65.7) > 0.05 {
		t.Errorf("q_mean = %g mW/m^2, want 65.7", q)
	}
}

func TestPhysicalModeCheckValue(t *testing.T) {
	t.Chdir(t.TempDir())
	writeCosGrid(t, "cos.txt", 1)
	// dlnVs = -1 % cos(colat) with dlnVs/dT = -1e-5 /K is dT = 1000 K cos(colat);
	// k = 10 W/m/K over h = 200 km gives |dq| = 50 mW/m^2 (references sheet
	// check value), lowest under the slow (hot) north pole.
	mustCLI(t, "build", "--input", "cos.txt", "--physical", "--dlnvs-dt", "-1e-5", "--conductivity", "10",
		"--thickness", "200", "--qmean", "80", "--lmax", "4", "--out", "bc")
	s := loadSummary(t, "bc")
	const tol = 1e-6
	if math.Abs(*s.QMax-130) > tol*130 || math.Abs(*s.QMin-30) > tol*130 {
		t.Errorf("q_max %g, q_min %g mW/m^2; want 130 and 30", *s.QMax, *s.QMin)
	}
	if s.QMinLonLat[1] != 90 || s.QMaxLonLat[1] != -90 {
		t.Errorf("q_min at %v, q_max at %v: want the minimum under the slow north pole", s.QMinLonLat, s.QMaxLonLat)
	}
	if math.Abs(s.QStar-1.25) > 1e-6 {
		t.Errorf("q* = %g, want 100/80", s.QStar)
	}
}

func TestNegativeAndSubadiabaticAreas(t *testing.T) {
	t.Chdir(t.TempDir())
	writeCosGrid(t, "cos.txt", 1)
	// q = q0 (1 + a cos(colat)) with q* = 2a = 3: negative where
	// cos(colat) > 2/3 (the slow north is low), a cap of area fraction
	// (1 - 2/3)/2 = 1/6; below q_ad = q0 on half the sphere ([derived], cap
	// area 2 pi (1 - cos alpha)).
	_, errs := mustCLI(t, "build", "--input", "cos.txt", "--qstar", "3", "--qmean", "80", "--qad", "80", "--lmax", "4", "--out", "bc")
	s := loadSummary(t, "bc")
	if math.Abs(s.AreaNegative-1.0/6) > 0.005 {
		t.Errorf("negative area fraction %g, want 1/6", s.AreaNegative)
	}
	if math.Abs(*s.AreaSubadiabatic-0.5) > 0.005 {
		t.Errorf("sub-adiabatic area fraction %g, want 1/2", *s.AreaSubadiabatic)
	}
	if !strings.Contains(errs, "negative heat flux") || !strings.Contains(strings.Join(s.Warnings, "\n"), "negative heat flux") {
		t.Errorf("no negative-flux warning on stderr and in summary.json:\n%s", errs)
	}
	if table, _ := os.ReadFile("bc/coefficients.txt"); !strings.Contains(string(table), "param.warnings = negative heat flux") {
		t.Errorf("the coefficient table does not carry the warnings:\n%s", table)
	}
}

func TestConventionsRoundTrip(t *testing.T) {
	t.Chdir(t.TempDir())
	mustCLI(t, "build", "--demo", "--qstar", "1", "--qmean", "80", "--lmax", "9", "--out", "a")
	_, errs := mustCLI(t, "build", "--demo", "--qstar", "1", "--qmean", "80", "--lmax", "9", "--norm", "schmidt",
		"--condon-shortley", "--form", "complex", "--out", "b")
	if !strings.Contains(errs, "non-default convention") {
		t.Errorf("no convention reminder for schmidt/complex:\n%s", errs)
	}
	mustCLI(t, "convert", "a/coefficients.txt", "--norm", "unnormalized", "--out", "c.json")
	a, b, c := readCanonical(t, "a/coefficients.txt"), readCanonical(t, "b/coefficients.txt"), readCanonical(t, "c.json")
	for i := range a.C {
		for _, d := range []*sh.Coeffs{b, c} {
			if math.Abs(a.C[i]-d.C[i]) > 1e-9*math.Abs(a.C[0]) || math.Abs(a.S[i]-d.S[i]) > 1e-9*math.Abs(a.C[0]) {
				t.Fatalf("coefficient %d differs after a change of convention: %g %g vs %g %g", i, a.C[i], a.S[i], d.C[i], d.S[i])
			}
		}
	}
}

func TestGridRoundTrip(t *testing.T) {
	t.Chdir(t.TempDir())
	mustCLI(t, "build", "--demo", "--qstar", "1", "--qmean", "80", "--lmax", "12", "--formats", "nc", "--out", "bc")
	// field.nc holds the band-limited field on a 1-degree grid; fitting it
	// again must give back the coefficients (identity test).
	mustCLI(t, "convert", "bc/field.nc", "--lmax", "12", "--out", "refit.txt")
	a, b := readCanonical(t, "bc/coefficients.txt"), readCanonical(t, "refit.txt")
	for i := range a.C {
		if math.Abs(a.C[i]-b.C[i]) > 1e-8*a.C[0] || math.Abs(a.S[i]-b.S[i]) > 1e-8*a.C[0] {
			t.Fatalf("coefficient %d: %g %g after the round trip, want %g %g", i, b.C[i], b.S[i], a.C[i], a.S[i])
		}
	}
}

func TestFailedBuildLeavesNothing(t *testing.T) {
	t.Chdir(t.TempDir())
	writeFile(t, "bad.txt", "0 0 1\n10 0 2\n20 0 x\n")
	_, errs, code := cli([]string{"build", "--input", "bad.txt", "--qstar", "1", "--qmean", "80", "--out", "bc"}, "")
	if code != 2 || !strings.Contains(errs, "bad.txt:3") {
		t.Errorf("exit %d, stderr %q: want status 2 naming bad.txt line 3", code, errs)
	}
	ents, _ := os.ReadDir(".")
	if len(ents) != 1 {
		t.Errorf("a failed build left %v", ents)
	}
	// An output folder that is not empty is refused, and left alone.
	writeFile(t, "bc/keep.txt", "mine")
	if _, errs, code := cli([]string{"build", "--demo", "--qstar", "1", "--qmean", "80", "--out", "bc"}, ""); code != 2 || !strings.Contains(errs, "--force") {
		t.Errorf("non-empty --out: exit %d %q", code, errs)
	}
	if b, _ := os.ReadFile("bc/keep.txt"); string(b) != "mine" {
		t.Error("the existing folder was touched")
	}
	// Not even --force replaces a folder that cmbflux did not write.
	for _, args := range [][]string{
		{"build", "--demo", "--qstar", "1", "--qmean", "80", "--out", "bc", "--force"},
		{"demo", "--out", "bc", "--force"},
	} {
		if _, errs, code := cli(args, ""); code != 2 || !strings.Contains(errs, "not written by cmbflux") {
			t.Errorf("%v: exit %d %q", args, code, errs)
		}
	}
	writeFile(t, "s.yaml", "base: {demo: true, qmean: 80}\nvary: {qstar: [1, 2]}\n")
	if _, errs, code := cli([]string{"sweep", "s.yaml", "--out", "bc", "--force"}, ""); code != 2 || !strings.Contains(errs, "not written by cmbflux") {
		t.Errorf("sweep --force: exit %d %q", code, errs)
	}
	if b, _ := os.ReadFile("bc/keep.txt"); string(b) != "mine" {
		t.Error("--force deleted a folder that cmbflux did not write")
	}
	// A cmbflux folder is replaced by --force.
	mustCLI(t, "build", "--demo", "--qstar", "1", "--qmean", "80", "--out", "ok")
	mustCLI(t, "build", "--demo", "--qstar", "2", "--qmean", "80", "--out", "ok", "--force")
	if s := loadSummary(t, "ok"); s.QStar != 2 {
		t.Errorf("--force did not replace the build: q* %g", s.QStar)
	}
}

func TestStdinInputAndConfig(t *testing.T) {
	t.Chdir(t.TempDir())
	writeCosGrid(t, "cos.txt", 1)
	grid, _ := os.ReadFile("cos.txt")
	_, errs, code := cli([]string{"build", "--input", "-", "--qstar", "1", "--qmean", "80", "--lmax", "3", "--out", "a"}, string(grid))
	if code != 0 {
		t.Fatalf("--input -: %d %s", code, errs)
	}
	_, errs, code = cli([]string{"build", "--config", "-", "--out", "b"}, "demo: true\nqstar: 1\nqmean: 80\nlmax: 3\n")
	if code != 0 {
		t.Fatalf("--config -: %d %s", code, errs)
	}
	var s map[string]any
	data, _ := os.ReadFile("a/summary.json")
	if err := json.Unmarshal(data, &s); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"qstar", "q_mean", "q_max", "q_min", "q_max_lonlat", "q_min_lonlat", "area_fraction_negative", "area_fraction_subadiabatic", "lmax"} {
		if _, ok := s[k]; !ok {
			t.Errorf("summary.json lacks %s", k)
		}
	}
}

func TestSweepSharesTransforms(t *testing.T) {
	c := newCache()
	dir := t.TempDir()
	var specs []string
	for _, q := range []string{"0.5", "1", "2"} {
		st := mustSpec(t, "demo", "true", "qstar", q, "qmean", "80", "lmax", "8")
		if _, err := buildFolder(t.Context(), c, st, filepath.Join(dir, q), false, true, nil); err != nil {
			t.Fatal(err)
		}
		specs = append(specs, q)
	}
	n := 0
	for k := range c.m {
		if strings.HasPrefix(k, "expansion ") {
			n++
		}
	}
	// One fit and one tapered pattern for three amplitudes.
	if n != 2 {
		t.Errorf("%d transform entries in the cache for %d amplitudes, want 2", n, len(specs))
	}
}

func mustSpec(t *testing.T, kv ...string) *config.Spec {
	t.Helper()
	s := config.Set{}
	for i := 0; i+1 < len(kv); i += 2 {
		if err := s.SetFlag(kv[i], kv[i+1]); err != nil {
			t.Fatal(err)
		}
	}
	sp, err := config.Resolve(s)
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

func TestRotateMovesExtremaEast(t *testing.T) {
	t.Chdir(t.TempDir())
	mustCLI(t, "build", "--demo", "--qstar", "1", "--qmean", "80", "--lmax", "8", "--out", "a")
	mustCLI(t, "build", "--demo", "--qstar", "1", "--qmean", "80", "--lmax", "8", "--rotate", "90", "--out", "b")
	a, b := loadSummary(t, "a"), loadSummary(t, "b")
	// A rotation about the pole by 90 degrees east moves every feature 90
	// degrees east and keeps its latitude (references sheet, rotation
	// invariants).
	for _, p := range [][2][2]float64{{a.QMaxLonLat, b.QMaxLonLat}, {a.QMinLonLat, b.QMinLonLat}} {
		dlon := math.Mod(p[1][0]-p[0][0]+360, 360)
		if math.Abs(dlon-90) > 0.01 || math.Abs(p[1][1]-p[0][1]) > 0.01 {
			t.Errorf("extremum moved from %v to %v, want 90 degrees east", p[0], p[1])
		}
	}
	if math.Abs(*a.QMax-*b.QMax) > 1e-6 || math.Abs(a.QStar-b.QStar) > 1e-12 {
		t.Errorf("rotation changed the values: %g vs %g", *a.QMax, *b.QMax)
	}
}

func TestQStarOnGrid(t *testing.T) {
	t.Chdir(t.TempDir())
	mustCLI(t, "build", "--demo", "--qstar", "2", "--qmean", "80", "--lmax", "10", "--qstar-on", "grid", "--grid", "gauss:12", "--out", "bc")
	s := loadSummary(t, "bc")
	c := readCanonical(t, "bc/coefficients.txt")
	// On the grid points the written field has q* = 2 exactly; the continuous
	// field between them reaches further (and the summary says so).
	g := sh.NewGaussLegendre(12, 24)
	vals := sh.NewTransform(c.LMax, g).Synthesis(nil, c)
	qmax, qmin := math.Inf(-1), math.Inf(1)
	for _, v := range vals {
		qmax, qmin = math.Max(qmax, v), math.Min(qmin, v)
	}
	if got := (qmax - qmin) / 80; math.Abs(got-2) > 1e-9 {
		t.Errorf("q* on the grid points = %.12g, want 2", got)
	}
	if !(s.QStarContinuous > 2) || !strings.Contains(s.QStarDefinition, "gauss:12") {
		t.Errorf("continuous q* %g, definition %q", s.QStarContinuous, s.QStarDefinition)
	}
}

func TestConvertPlainTableNormalizations(t *testing.T) {
	t.Chdir(t.TempDir())
	// A Schmidt semi-normalized table with C_10 = C_11 = 1. Schmidt harmonics
	// have integral 4 pi/(2l+1) of Y^2 and orthonormal ones 1 (references
	// sheet), so the orthonormal coefficients are sqrt(4 pi/3) =
	// 2.0466534158929770 for both; with the Condon-Shortley phase written the
	// order-1 coefficient changes sign ((-1)^m).
	writeFile(t, "plain.txt", "1 0 1 0\n1 1 1 0\n")
	out, errs := mustCLI(t, "convert", "plain.txt", "--from-norm", "schmidt", "--condon-shortley", "--out", "-")
	if !strings.Contains(errs, "non-default convention") {
		t.Errorf("no convention reminder: %q", errs)
	}
	want := map[string]float64{"1 0": 2.0466534158929770, "1 1": -2.0466534158929770}
	got := 0
	for _, line := range strings.Split(out, "\n") {
		f := strings.Fields(line)
		if len(f) != 4 || strings.HasPrefix(line, "#") {
			continue
		}
		if w, ok := want[f[0]+" "+f[1]]; ok {
			var v float64
			if _, err := fmt.Sscan(f[2], &v); err != nil || math.Abs(v-w) > 1e-12 {
				t.Errorf("l m = %s %s: %s, want %.16g", f[0], f[1], f[2], w)
			}
			got++
		}
	}
	if got != 2 {
		t.Errorf("found %d of the 2 rows in\n%s", got, out)
	}
}

func TestNoDegree0(t *testing.T) {
	t.Chdir(t.TempDir())
	_, errs := mustCLI(t, "build", "--demo", "--qstar", "1", "--qmean", "80", "--lmax", "4", "--no-degree0", "--out", "bc")
	data, _ := os.ReadFile("bc/coefficients.txt")
	for _, line := range strings.Split(string(data), "\n") {
		if strings.HasPrefix(line, "0 0 ") {
			t.Fatalf("degree 0 written: %q", line)
		}
	}
	if !strings.Contains(errs, "degree 0 left out") || !strings.Contains(string(data), "degree_0 = omitted") {
		t.Errorf("no warning or header line for the missing degree 0:\n%s", errs)
	}
}
