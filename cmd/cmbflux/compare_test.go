package main

import (
	"bytes"
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"cmbflux/export"
	"cmbflux/tomo"
)

// demoDir is the absolute path of the committed demo files (tests change
// into temporary folders).
var demoDir = func() string {
	d, err := filepath.Abs(filepath.Join("..", "..", "testdata", "demo"))
	if err != nil {
		panic(err)
	}
	return d
}()

// demoFile returns the absolute path of a committed demo file.
func demoFile(name string) string { return filepath.Join(demoDir, name) }

// writeVariants writes the demo variants as text grids named NAME.txt.
func writeVariants(t *testing.T) {
	t.Helper()
	for _, g := range tomo.DemoVariants() {
		var b bytes.Buffer
		if err := tomo.WriteText(&b, g); err != nil {
			t.Fatal(err)
		}
		writeFile(t, g.Source.Path+".txt", b.String())
	}
}

// readTSV reads a tab-separated table after its '#' lines: the heading and
// the rows.
func readTSV(t *testing.T, path string) ([]string, [][]string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var head []string
	var rows [][]string
	for _, line := range strings.Split(strings.TrimSuffix(string(data), "\n"), "\n") {
		if strings.HasPrefix(line, "#") {
			continue
		}
		f := strings.Split(line, "\t")
		if head == nil {
			head = f
			continue
		}
		if len(f) != len(head) {
			t.Fatalf("%s: row %q has %d fields, the heading %d", path, line, len(f), len(head))
		}
		rows = append(rows, f)
	}
	return head, rows
}

func num(t *testing.T, s string) float64 {
	t.Helper()
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("%q is not a number", s)
	}
	return x
}

// onlyEntries fails unless the current folder holds exactly the names.
func onlyEntries(t *testing.T, names ...string) {
	t.Helper()
	ents, err := os.ReadDir(".")
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, e := range ents {
		got = append(got, e.Name())
	}
	if strings.Join(got, " ") != strings.Join(names, " ") {
		t.Errorf("folder holds %v, want only %v", got, names)
	}
}

func TestGoldenCompare(t *testing.T) {
	badPoints := func(t *testing.T) { writeFile(t, "pts.txt", "# two points\n15 -5\n195 north\n") }
	runGoldenCases(t, []goldenCase{
		{name: "compare-demo-out", args: []string{"compare", "--demo", "--lmax", "6", "--out", "cmp"}},
		{name: "compare-files", args: []string{"compare", "merle.txt", "roan.txt", "dapple.txt", "--names", "m,r,d", "--lmax", "4", "--depth", "2800"}, setup: writeVariants},
		{name: "compare-bad-points", args: []string{"compare", "--demo", "--points", "pts.txt", "--out", "cmp"}, code: 2, setup: badPoints},
		{name: "compare-same-name", args: []string{"compare", "merle.txt", "merle.txt"}, code: 2, setup: writeVariants},
		{name: "compare-qstar-alone", args: []string{"compare", "--demo", "--qstar", "1", "--out", "cmp"}, code: 2},
		{name: "compare-consensus-no-out", args: []string{"compare", "--demo", "--consensus", "mean", "--qstar", "1", "--qmean", "80"}, code: 2},
		{name: "compare-bad-consensus", args: []string{"compare", "--demo", "--consensus", "median", "--out", "cmp"}, code: 2},
		{name: "compare-usage-help", args: []string{"compare", "--help"}},
		{name: "compare-too-few", args: []string{"compare", "demo"}, code: 2},
		{name: "compare-names-count", args: []string{"compare", "--demo", "--names", "a,b"}, code: 2},
		{name: "compare-missing", args: []string{"compare", "--demo", "nothing.nc", "--out", "cmp"}, code: 2},
		{name: "compare-exists", args: []string{"compare", "--demo", "--out", "cmp"}, code: 2,
			setup: func(t *testing.T) { writeFile(t, "cmp/keep.txt", "x\n") }},
	})
}

// TestCompareBadPointsLeavesNothing: a bad points file exits with status 2
// and leaves no output folder, not even a temporary one.
func TestCompareBadPointsLeavesNothing(t *testing.T) {
	t.Chdir(t.TempDir())
	writeFile(t, "pts.txt", "15 -5\n\n200 95 too far north\n")
	_, errs, code := cli([]string{"compare", "--demo", "--points", "pts.txt", "--out", "cmp"}, "")
	if code != 2 || !strings.Contains(errs, "pts.txt:3: latitude 95 is outside -90..90") {
		t.Errorf("exit %d, stderr %q; want 2 and the file:line", code, errs)
	}
	onlyEntries(t, "pts.txt")
}

// TestCompareDemoFolder checks the structure of correlation.tsv (one row
// per pair and degree 1..lmax, then one per pair with l = total), the
// critical r against shared/references.md, spectra.tsv against Parseval's
// theorem, and the folder against its manifest.
func TestCompareDemoFolder(t *testing.T) {
	t.Chdir(t.TempDir())
	writeFile(t, "pts.txt", "15 -5 broad\n195 8 round\n# the fast belt, 90 degrees from the broad province\n105 -5 belt\n")
	mustCLI(t, "compare", "--demo", "--lmax", "8", "--points", "pts.txt", "--trials", "200", "--out", "cmp")
	const lmax, nModels = 8, 4
	head, rows := readTSV(t, "cmp/correlation.tsv")
	if strings.Join(head[:4], " ") != "a b l r" {
		t.Fatalf("correlation.tsv starts with columns %v, want a b l r", head)
	}
	pairs := nModels * (nModels - 1) / 2
	if len(rows) != pairs*(lmax+1) {
		t.Fatalf("%d rows, want %d pairs x (%d degrees + total)", len(rows), pairs, lmax)
	}
	for p := 0; p < pairs; p++ {
		for l := 1; l <= lmax; l++ {
			r := rows[p*lmax+l-1]
			if r[2] != strconv.Itoa(l) {
				t.Fatalf("row %v: degree %s, want %d", r, r[2], l)
			}
			if x := num(t, r[3]); x < -1 || x > 1 {
				t.Errorf("row %v: |r| > 1", r)
			}
		}
		tot := rows[pairs*lmax+p]
		if tot[2] != "total" || tot[0] != rows[p*lmax][0] || tot[1] != rows[p*lmax][1] {
			t.Errorf("total row %v does not follow the pairs' order", tot)
		}
	}
	// Critical r, one-sided 95 %: l = 2: 0.805, l = 4: 0.582, l = 8: 0.412
	// (shared/references.md, derived from Eckhardt 1984's t statistic).
	col := map[string]int{}
	for i, h := range head {
		col[h] = i
	}
	for l, want := range map[int]float64{2: 0.805, 4: 0.582, 8: 0.412} {
		if got := num(t, rows[l-1][col["r_crit_95"]]); math.Abs(got-want) > 6e-4 {
			t.Errorf("r_crit_95 at l = %d: %g, want %g", l, got, want)
		}
	}
	// Parseval: the mean square over the sphere is the sum of the degree
	// mean squares, so the total rms squared equals the summed power.
	_, srows := readTSV(t, "cmp/spectra.tsv")
	sum := map[string]float64{}
	for _, r := range srows {
		if r[1] == "total" {
			rms := num(t, r[3])
			if math.Abs(rms*rms-sum[r[0]]) > 1e-6*sum[r[0]] {
				t.Errorf("%s: total rms^2 %g, sum of degree powers %g", r[0], rms*rms, sum[r[0]])
			}
			continue
		}
		if l := num(t, r[1]); l >= 1 {
			sum[r[0]] += num(t, r[2])
		}
	}
	if len(sum) != nModels+1 {
		t.Errorf("spectra of %d models, want %d and the mean", len(sum), nModels)
	}
	// The points: inside the broad and round provinces of the invented
	// scenario, outside on the fast belt (by construction, tomo.Demo).
	_, prow := readTSV(t, "cmp/points.tsv")
	want := []string{"true", "true", "false"}
	for i, r := range prow {
		if r[len(r)-1] != want[i] || num(t, r[3]) <= 0 {
			t.Errorf("point %v: inside %s, want %s", r, r[len(r)-1], want[i])
		}
	}
	if _, err := export.Verify("cmp"); err != nil {
		t.Error(err)
	}
	var sm map[string]any
	data, _ := os.ReadFile("cmp/summary.json")
	if err := json.Unmarshal(data, &sm); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"inputs", "pairs", "models", "critical", "mean_model", "points", "warnings", "files"} {
		if _, ok := sm[k]; !ok {
			t.Errorf("summary.json lacks %q", k)
		}
	}
	for _, f := range []string{"mean.nc", "spread.nc", "votes.nc", "clusters.nc", "outlines.geojson", "correlation.png", "spectra.png", "models.png", "spread.png", "votes.png", "report.html"} {
		if _, err := os.Stat(filepath.Join("cmp", f)); err != nil {
			t.Error(err)
		}
	}
}

// TestCompareSelf: the same model read from two files (the committed demo
// as text and as CSV) correlates with r = 1 at every degree and in total
// (definition of the correlation coefficient), the spread across the two is
// zero everywhere, and every point gets 0 or 2 votes. The consensus mean is
// then the model itself, so its boundary condition has the coefficients of
// a plain build of the model.
func TestCompareSelf(t *testing.T) {
	t.Chdir(t.TempDir())
	txt, csv := demoFile("brindle.txt"), demoFile("brindle.csv")
	mustCLI(t, "compare", txt, csv, "--lmax", "10", "--consensus", "mean", "--qstar", "1.5", "--qmean", "80", "--taper", "cos:8:10", "--out", "cmp")
	_, rows := readTSV(t, "cmp/correlation.tsv")
	if len(rows) != 11 {
		t.Fatalf("%d rows, want 10 degrees and the total", len(rows))
	}
	for _, r := range rows {
		if r[0] != "brindle.txt" || r[1] != "brindle.csv" {
			t.Fatalf("pair %s %s, want the file names (same base name, so with extension)", r[0], r[1])
		}
		if x := num(t, r[3]); math.Abs(x-1) > 1e-6 {
			t.Errorf("degree %s: r = %g, want 1", r[2], x)
		}
	}
	sp, err := export.ReadGridFile("cmp/spread.nc")
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range sp.Grid.Values {
		if math.Abs(v) > 1e-9 {
			t.Fatalf("spread %g %% at point %d, want 0", v, i)
		}
	}
	vt, err := export.ReadGridFile("cmp/votes.nc")
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range vt.Grid.Values {
		if v != 0 && v != 2 {
			t.Fatalf("%g votes at point %d, want 0 or 2", v, i)
		}
	}
	mustCLI(t, "build", "--input", txt, "--lmax", "10", "--qstar", "1.5", "--qmean", "80", "--taper", "cos:8:10", "--out", "bc")
	a, b := readCanonical(t, "cmp/consensus/coefficients.txt"), readCanonical(t, "bc/coefficients.txt")
	for i := range a.C {
		if math.Abs(a.C[i]-b.C[i]) > 1e-9*math.Abs(b.C[0]) || math.Abs(a.S[i]-b.S[i]) > 1e-9*math.Abs(b.C[0]) {
			t.Fatalf("coefficient %d: consensus (%g, %g), build (%g, %g)", i, a.C[i], a.S[i], b.C[i], b.S[i])
		}
	}
	cs, bs := loadSummary(t, "cmp/consensus"), loadSummary(t, "bc")
	if math.Abs(cs.QStar-1.5) > 1e-6 || math.Abs(*cs.QMin-*bs.QMin) > 1e-6 {
		t.Errorf("consensus q* %g q_min %g; build q* %g q_min %g", cs.QStar, *cs.QMin, bs.QStar, *bs.QMin)
	}
	if _, err := export.Verify("cmp"); err != nil {
		t.Error(err)
	}
	if _, err := export.Verify("cmp/consensus"); err != nil {
		t.Error(err)
	}
}

// TestCompareTurned: merle is brindle turned 12 degrees east. A rotation
// by alpha about the pole turns each (cos, sin) pair of order m by
// m * alpha (shared/references.md, rotation invariants), so the degree
// power is unchanged and
//
//	r_l = sum_m P_lm cos(m alpha) / sum_m P_lm,  P_lm = C_lm^2 + S_lm^2,
//
// computed here from brindle's own expansion.
func TestCompareTurned(t *testing.T) {
	t.Chdir(t.TempDir())
	writeVariants(t)
	const lmax = 8
	mustCLI(t, "compare", demoFile("brindle.txt"), "merle.txt", "--lmax", strconv.Itoa(lmax), "--out", "cmp")
	l, err := tomo.SelectLayer(tomo.Demo(), tomo.LayerOptions{})
	if err != nil {
		t.Fatal(err)
	}
	c, _, err := fitLayer(l, lmax)
	if err != nil {
		t.Fatal(err)
	}
	alpha := tomo.DemoVariantShiftDeg * math.Pi / 180
	_, rows := readTSV(t, "cmp/correlation.tsv")
	for deg := 1; deg <= lmax; deg++ {
		var num0, den float64
		for m := 0; m <= deg; m++ {
			a, b := c.At(deg, m)
			num0 += (a*a + b*b) * math.Cos(float64(m)*alpha)
			den += a*a + b*b
		}
		want := num0 / den
		if got := num(t, rows[deg-1][3]); math.Abs(got-want) > 2e-6 {
			t.Errorf("degree %d: r = %.6f, want %.6f from the rotation", deg, got, want)
		}
	}
	_, srows := readTSV(t, "cmp/spectra.tsv")
	power := map[string]float64{}
	for _, r := range srows {
		power[r[0]+" "+r[1]] = num(t, r[2])
	}
	for deg := 0; deg <= lmax; deg++ {
		a, b := power["brindle "+strconv.Itoa(deg)], power["merle "+strconv.Itoa(deg)]
		if math.Abs(a-b) > 1e-9*a {
			t.Errorf("degree %d: power %g and %g, want equal", deg, a, b)
		}
	}
}

// TestCompareProfiles: --profiles clusters on every depth level of the
// models and says which; a grid without a depth axis is refused with
// status 2 and no output.
func TestCompareProfiles(t *testing.T) {
	t.Chdir(t.TempDir())
	mustCLI(t, "compare", "--demo", "--lmax", "4", "--profiles", "--depth-range", "2700:2891", "--out", "cmp")
	var sm struct {
		Inputs []cmpInput `json:"inputs"`
	}
	data, _ := os.ReadFile("cmp/summary.json")
	if err := json.Unmarshal(data, &sm); err != nil {
		t.Fatal(err)
	}
	for _, in := range sm.Inputs {
		if len(in.ProfileDepths) != 4 || in.ProfileDepths[0] != 2700 || in.ProfileDepths[3] != 2891 {
			t.Errorf("%s: profile depths %v, want the four levels 2700..2891 km", in.Name, in.ProfileDepths)
		}
	}
	mustCLI(t, "build", "--demo", "--quantity", "dvs", "--formats", "nc", "--lmax", "4", "--out", "flat")
	_, errs, code := cli([]string{"compare", "--demo", "flat/field.nc", "--profiles", "--lmax", "4", "--out", "cmp2"}, "")
	if code != 2 || !strings.Contains(errs, "no depth axis") {
		t.Errorf("exit %d, stderr %q; want 2 and the reason", code, errs)
	}
	if _, err := os.Stat("cmp2"); !os.IsNotExist(err) {
		t.Error("cmp2 was created")
	}
}

// TestCompareHelpExample runs the worked example of compare --help, with the
// files it names made first, and the vote consensus.
func TestCompareHelpExample(t *testing.T) {
	t.Chdir(t.TempDir())
	// The example's printf line.
	writeFile(t, "points.txt", "15 -5 first\n195 8 second\n100 -30\n")
	nc, err := os.ReadFile(demoFile("brindle.nc"))
	if err != nil {
		t.Fatal(err)
	}
	writeFile(t, "a.nc", string(nc))
	writeVariants(t)
	if err := os.Rename("merle.txt", "b.txt"); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(compareExample, "\n")
	n := 0
	for i := 0; i < len(lines); i++ {
		cmd := strings.TrimSpace(lines[i])
		for strings.HasSuffix(cmd, "\\") && i+1 < len(lines) {
			i++
			cmd = strings.TrimSuffix(cmd, "\\") + " " + strings.TrimSpace(lines[i])
		}
		if !strings.HasPrefix(cmd, "cmbflux ") {
			continue
		}
		args, err := shellWords(cmd)
		if err != nil {
			t.Fatal(err)
		}
		mustCLI(t, args[1:]...)
		n++
	}
	if n != 2 {
		t.Fatalf("ran %d example commands, want 2", n)
	}
	for _, f := range []string{"cmp/points.tsv", "cmp/consensus/coefficients.txt", "cmp-ab/correlation.tsv"} {
		if _, err := os.Stat(f); err != nil {
			t.Error(err)
		}
	}
	mustCLI(t, "compare", "--demo", "--lmax", "6", "--consensus", "votes", "--qstar", "2", "--qmean", "80", "--quiet", "--out", "votes")
	if s := loadSummary(t, "votes/consensus"); math.Abs(s.QStar-2) > 1e-6 || !strings.Contains(s.Layer, "vote map") {
		t.Errorf("vote consensus: q* %g, layer %q", s.QStar, s.Layer)
	}
	if _, err := export.Verify("votes"); err != nil {
		t.Error(err)
	}
}

// BenchmarkCompareDemo times a comparison of the demo scenario and its three
// variants without an output folder (reading, fitting, Analyze).
func BenchmarkCompareDemo(b *testing.B) {
	for _, lmax := range []int{8, 16, 32} {
		b.Run("lmax="+strconv.Itoa(lmax), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := run(io.Discard, io.Discard, []string{"compare", "--demo", "--lmax", strconv.Itoa(lmax), "--quiet"}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestCompareMissingData: a model without data north of 60 degrees is fitted
// on its valid points only (a NaN taken as data would make every
// coefficient NaN), it still correlates with the complete model (the cap
// holds 6.7 % of the sphere, (1 - sin 60)/2), and the degree its coverage
// supports is refused, or with --force-lmax warned about naming the model.
func TestCompareMissingData(t *testing.T) {
	t.Chdir(t.TempDir())
	data, err := os.ReadFile(demoFile("brindle.txt"))
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	for _, line := range strings.Split(string(data), "\n") {
		f := strings.Fields(line)
		if len(f) == 4 && !strings.HasPrefix(line, "#") && num(t, f[1]) > 60 {
			f[3] = "NaN"
			line = strings.Join(f, " ")
		}
		b.WriteString(line + "\n")
	}
	writeFile(t, "capless.txt", b.String())
	// Without --force-lmax the degree is refused, as build refuses it.
	if _, errs, code := cli([]string{"compare", demoFile("brindle.txt"), "capless.txt", "--lmax", "8", "--out", "cmp"}, ""); code != 2 ||
		!strings.Contains(errs, "capless.txt: lmax 8 is above degree") {
		t.Errorf("exit %d, stderr %q; want the coverage refusal", code, errs)
	}
	_, errs := mustCLI(t, "compare", demoFile("brindle.txt"), "capless.txt", "--lmax", "8", "--force-lmax", "--out", "cmp")
	if !strings.Contains(errs, "warning: model capless: lmax 8 is above degree") {
		t.Errorf("stderr %q lacks the coverage warning", errs)
	}
	_, rows := readTSV(t, "cmp/correlation.tsv")
	tot := rows[len(rows)-1]
	if r := num(t, tot[3]); tot[2] != "total" || !(r > 0.99) {
		t.Errorf("total row %v, want r > 0.99", tot)
	}
}
