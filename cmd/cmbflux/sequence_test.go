package main

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"cmbflux/cmd/cmbflux/internal/config"
	"cmbflux/export"
	"cmbflux/flux"
	"cmbflux/flux/sh"
)

// runSequenceCLI runs sequence with args (--out seq added) in a temporary
// folder and returns the frame folders in order.
func runSequenceCLI(t *testing.T, args ...string) []string {
	t.Helper()
	t.Chdir(t.TempDir())
	_, errs, code := cli(append(append([]string{"sequence"}, args...), "--out", "seq", "--quiet"), "")
	if code != 0 {
		t.Fatalf("sequence %s: exit %d\n%s", strings.Join(args, " "), code, errs)
	}
	data, err := os.ReadFile("seq/times.tsv")
	if err != nil {
		t.Fatal(err)
	}
	var dirs []string
	for _, line := range strings.Split(strings.TrimSpace(string(data)), "\n")[1:] {
		f := strings.Split(line, "\t")
		if len(f) != 9 {
			t.Fatalf("times.tsv line %q: %d columns, want 9", line, len(f))
		}
		dirs = append(dirs, filepath.Join("seq", f[3]))
	}
	return dirs
}

func readFrameCoeffs(t *testing.T, dir string) *sh.Coeffs {
	t.Helper()
	tab, err := export.ReadCoeffsFile(filepath.Join(dir, "coefficients.txt"), nil)
	if err != nil {
		t.Fatal(err)
	}
	return tab.Coeffs
}

// lonDiff returns a - b in degrees, wrapped to [-180, 180).
func lonDiff(a, b float64) float64 {
	return math.Mod(math.Mod(a-b+180, 360)+360, 360) - 180
}

// TestSequenceSpinGeographicPole checks a spin about the north pole
// against the closed form of a longitude shift: the field at time t is
// f(lon - alpha, lat) with alpha = rate * t, so by the angle-difference
// identities each (cos, sin) pair of order m turns by m*alpha,
// C' = C cos(m alpha) - S sin(m alpha), S' = C sin(m alpha) + S cos(m alpha),
// and the flux minimum keeps its latitude and moves east by alpha.
func TestSequenceSpinGeographicPole(t *testing.T) {
	const rate = 7.5 // degrees per unit of time
	times := []float64{0, 2, 4.5, 13}
	dirs := runSequenceCLI(t, "--pattern", "1:1:cos,2:2:sin:0.4,3:1:cos:0.2,3:0:cos:0.3", "--qstar", "1.2", "--qmean", "80",
		"--spin-rate", fmtF(rate), "--times", "0,2,4.5,13")
	if len(dirs) != len(times) {
		t.Fatalf("%d frames, want %d", len(dirs), len(times))
	}
	c0 := readFrameCoeffs(t, dirs[0])
	s0, err := readSummary(dirs[0])
	if err != nil {
		t.Fatal(err)
	}
	scale := math.Abs(c0.C[0]) // degree 0 is the mean flux; the rest is smaller
	for k, dir := range dirs[1:] {
		tk := times[k+1]
		alpha := rate * tk * math.Pi / 180
		c := readFrameCoeffs(t, dir)
		for l := 0; l <= c.LMax; l++ {
			for m := 0; m <= l; m++ {
				i := sh.Index(l, m)
				cs, sn := math.Cos(float64(m)*alpha), math.Sin(float64(m)*alpha)
				wc := c0.C[i]*cs - c0.S[i]*sn
				ws := c0.C[i]*sn + c0.S[i]*cs
				if math.Abs(c.C[i]-wc) > 1e-13*scale || math.Abs(c.S[i]-ws) > 1e-13*scale {
					t.Errorf("t = %g, (l, m) = (%d, %d): (%.15g, %.15g), closed form (%.15g, %.15g)", tk, l, m, c.C[i], c.S[i], wc, ws)
				}
			}
		}
		s, err := readSummary(dir)
		if err != nil {
			t.Fatal(err)
		}
		if d := lonDiff(s.QMinLonLat[0], s0.QMinLonLat[0]); math.Abs(d-lonDiff(rate*tk, 0)) > 2e-6 {
			t.Errorf("t = %g: q_min moved %.7f degrees east, want %.7f", tk, d, lonDiff(rate*tk, 0))
		}
		if math.Abs(s.QMinLonLat[1]-s0.QMinLonLat[1]) > 2e-6 {
			t.Errorf("t = %g: q_min latitude %.7f, at time 0 %.7f", tk, s.QMinLonLat[1], s0.QMinLonLat[1])
		}
		if s.Sequence == nil || s.Sequence.Time != tk || s.Sequence.RotationDeg == nil || *s.Sequence.RotationDeg != rate*tk {
			t.Errorf("t = %g: summary's sequence entry %+v", tk, s.Sequence)
		}
		if math.Abs(s.QStar-1.2) > 1e-12 || *s.QMin != *s0.QMin {
			t.Errorf("t = %g: q* %g, q_min %g; a rigid turn keeps q* = 1.2 and q_min %g", tk, s.QStar, *s.QMin, *s0.QMin)
		}
	}
}

// TestSequenceSpinOtherPole checks a spin about the pole (0 E, 0 N), the
// x axis: counter-clockwise seen from outside above the pole is the
// right-hand rotation about +x, which takes the north pole (0, 0, 1) to
// (0, -sin a, cos a), that is latitude 90 - a at longitude 270 (closed
// form). The Y_1^0 pattern has its flux maximum at the north pole.
func TestSequenceSpinOtherPole(t *testing.T) {
	dirs := runSequenceCLI(t, "--pattern", "1:0:cos", "--qstar", "1", "--qmean", "80", "--spin-rate", "10", "--pole", "0:0", "--times", "0:3:4")
	for k, dir := range dirs {
		s, err := readSummary(dir)
		if err != nil {
			t.Fatal(err)
		}
		a := 10.0 * float64(k)
		wantLat := 90 - a
		if math.Abs(s.QMaxLonLat[1]-wantLat) > 1e-5 || (k > 0 && math.Abs(lonDiff(s.QMaxLonLat[0], 270)) > 1e-5) {
			t.Errorf("turned %g degrees: q_max at %v, want lat %g at lon 270", a, s.QMaxLonLat, wantLat)
		}
	}
}

// TestSequenceBlendDegreeOne checks a blend against the closed form for
// degree-1 harmonics, which are linear functions n.x of the unit vector:
// halfway from Y_1^0 (n = z) to Y_1^1 (n = x) the pattern is proportional
// to (z + x)/2, largest at latitude 45 on longitude 0 and smallest at
// latitude -45 on longitude 180; at the ends it is each pattern alone.
func TestSequenceBlendDegreeOne(t *testing.T) {
	dirs := runSequenceCLI(t, "--pattern", "1:0:cos", "--blend-to", "pattern:1:1:cos", "--qstar", "1", "--qmean", "80", "--times", "0:1:3")
	want := [][2]float64{{0, -90}, {180, -45}, {180, 0}}
	for k, dir := range dirs {
		s, err := readSummary(dir)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(s.QMinLonLat[1]-want[k][1]) > 1e-5 || (k > 0 && math.Abs(lonDiff(s.QMinLonLat[0], want[k][0])) > 1e-5) {
			t.Errorf("weight %g: q_min at %v, closed form %v", 0.5*float64(k), s.QMinLonLat, want[k])
		}
		if s.Sequence == nil || s.Sequence.BlendWeight == nil || *s.Sequence.BlendWeight != 0.5*float64(k) {
			t.Errorf("frame %d: sequence entry %+v", k, s.Sequence)
		}
		if math.Abs(s.QStar-1) > 1e-12 {
			t.Errorf("frame %d: q* %g; every frame is scaled to the same q* = 1", k, s.QStar)
		}
	}
}

// TestSequenceFolder checks that the folder verifies against its manifest
// (inspect DIR) and holds the frames under their deterministic names.
func TestSequenceFolder(t *testing.T) {
	dirs := runSequenceCLI(t, "--demo", "--qstar", "1", "--qmean", "80", "--lmax", "4", "--spin-rate", "3", "--times", "0,1.5,3")
	want := []string{"seq/t0000_t=0", "seq/t0001_t=1.5", "seq/t0002_t=3"}
	for i := range want {
		if i >= len(dirs) || filepath.ToSlash(dirs[i]) != want[i] {
			t.Fatalf("frames %q, want %q", dirs, want)
		}
	}
	if out, errs, code := cli([]string{"inspect", "seq"}, ""); code != 0 || !strings.Contains(out, "verified") {
		t.Errorf("inspect seq: exit %d\n%s%s", code, out, errs)
	}
	m, err := export.ReadManifestFile("seq/manifest.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Files) != 3*3+1 { // coefficients.txt, summary.json, manifest.yaml per frame, times.tsv
		t.Errorf("manifest lists %d files, want 10", len(m.Files))
	}
}

// TestSequenceBadInput checks that mistakes exit with status 2, name the
// flag and leave no folder.
func TestSequenceBadInput(t *testing.T) {
	base := []string{"sequence", "--demo", "--qstar", "1", "--qmean", "80", "--lmax", "4", "--out", "seq"}
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--spin-rate", "1"}, "no sample times"},
		{[]string{"--times", "0:1:3"}, "nothing changes in time"},
		{[]string{"--times", "0:1:3", "--spin-rate", "1", "--blend-to", "demo-roan"}, "either --spin-rate or --blend-to"},
		{[]string{"--times", "0:1:3", "--spin-rate", "fast"}, "--spin-rate \"fast\""},
		{[]string{"--times", "0:1:3", "--spin-rate", "1", "--pole", "0:95"}, "--pole \"0:95\""},
		{[]string{"--times", "3,1", "--spin-rate", "1"}, "times must increase"},
		{[]string{"--times", "0:1:3", "--blend-to", "demo-roan", "--blend-span", "0:0.5"}, "--times: time 1 lies outside"},
		{[]string{"--times", "0:1:3", "--blend-to", "demo-pinto"}, "no such demo variant"},
		{[]string{"--times", "0:1:3", "--blend-to", "pattern:2:2"}, "blend an idealised pattern only with another"},
		{[]string{"--times", "0:1:3", "--blend-to", "missing.txt"}, "--blend-to: missing.txt"},
		{[]string{"--times", "0:1:3", "--pole", "0:0", "--blend-to", "demo"}, "--pole is only used with --spin-rate"},
	} {
		t.Run(strings.Join(tc.args, " "), func(t *testing.T) {
			t.Chdir(t.TempDir())
			_, errs, code := cli(append(append([]string(nil), base...), tc.args...), "")
			if code != 2 || !strings.Contains(errs, tc.want) {
				t.Errorf("exit %d, stderr %q; want 2 and %q", code, errs, tc.want)
			}
			if ents, _ := os.ReadDir("."); len(ents) != 0 {
				t.Errorf("left %d entries behind", len(ents))
			}
		})
	}
}

// TestSequenceCoarseWarning checks the warning for samples farther apart
// than the half-wavelength 180/lmax of the highest degree (common
// practice).
func TestSequenceCoarseWarning(t *testing.T) {
	t.Chdir(t.TempDir())
	_, errs, code := cli([]string{"sequence", "--pattern", "4:4", "--qstar", "1", "--qmean", "80", "--spin-rate", "50", "--times", "0:1:2", "--out", "s", "--quiet"}, "")
	if code != 0 || !strings.Contains(errs, "coarse time sampling: the pattern turns up to 50 degrees between samples, more than 45 degrees") {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
	_, errs, _ = cli([]string{"sequence", "--pattern", "4:4", "--qstar", "1", "--qmean", "80", "--spin-rate", "40", "--times", "0:1:2", "--out", "s2", "--quiet"}, "")
	if strings.Contains(errs, "coarse") {
		t.Errorf("warned at 40 degrees per sample for lmax 4: %q", errs)
	}
}

func TestGoldenSequence(t *testing.T) {
	runGoldenCases(t, []goldenCase{
		{name: "sequence-help", args: []string{"sequence", "--help"}},
		{name: "sequence-demo", args: []string{"sequence", "--demo", "--qstar", "1", "--qmean", "80", "--qad", "60", "--lmax", "6", "--spin-rate", "3", "--times", "0:10:3", "--out", "seq"}},
		{name: "sequence-blend", args: []string{"sequence", "--demo", "--blend-to", "demo-roan", "--qstar", "1", "--qmean", "80", "--lmax", "6", "--times", "0,0.5,1", "--out", "seq"}},
	})
}

// FuzzParseSequenceFlags feeds --times, --pole and --blend-span arbitrary
// text: each returns a usage error (exit status 2) or a valid value,
// never panics.
func FuzzParseSequenceFlags(f *testing.F) {
	for _, s := range []string{"0:10:11", "0,1.5,3", "1:1:1", "0:1:0", "5:1:3", "0:90", "0:-90", "10:95", "0:1", "1:1", ",", "NaN:1:2", "1e308:-1e308:2", "0:1:10001", "2,1", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		usage := func(err error) bool { var ue *usageError; return errors.As(err, &ue) && exitCode(err) == 2 }
		if ts, err := parseTimes(s); err == nil {
			if len(ts) == 0 || len(ts) > maxFrames {
				t.Fatalf("times %q: %d times", s, len(ts))
			}
			for i, x := range ts {
				if math.IsNaN(x) || math.IsInf(x, 0) || (i > 0 && !(x > ts[i-1])) {
					t.Fatalf("times %q: %v not finite and increasing", s, ts)
				}
			}
		} else if !usage(err) {
			t.Fatalf("times %q: %v is not a usage error", s, err)
		}
		if lon, lat, err := parseLonLat("pole", s); err == nil {
			if !(lat >= -90 && lat <= 90) || !(lon >= -360 && lon <= 360) {
				t.Fatalf("pole %q: (%g, %g)", s, lon, lat)
			}
		} else if !usage(err) {
			t.Fatalf("pole %q: %v is not a usage error", s, err)
		}
		if t0, t1, err := parseSpan(s); err == nil {
			if t0 == t1 || math.IsNaN(t0-t1) || math.IsInf(t0, 0) || math.IsInf(t1, 0) {
				t.Fatalf("span %q: (%g, %g)", s, t0, t1)
			}
		} else if !usage(err) {
			t.Fatalf("span %q: %v is not a usage error", s, err)
		}
	})
}

// TestSequenceInterruptedLeavesNothing checks the staging: a run stopped
// between frames (a cancelled context, as Ctrl-C gives) leaves neither the
// output folder nor its temporary folder behind.
func TestSequenceInterruptedLeavesNothing(t *testing.T) {
	t.Chdir(t.TempDir())
	set := config.Set{}
	for k, v := range map[string]string{"pattern": "2:2", "qstar": "1", "qmean": "80", "out": "seq"} {
		if err := set.SetFlag(k, v); err != nil {
			t.Fatal(err)
		}
	}
	sp, err := config.Resolve(set)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := &sequenceRun{sp: sp, set: set, times: []float64{0, 1, 2}, spin: flux.Spin{PoleLat: 90, Rate: 1}}
	if _, _, err := r.write(ctx, false); !errors.Is(err, context.Canceled) {
		t.Fatalf("write with a cancelled context: %v", err)
	}
	if ents, _ := os.ReadDir("."); len(ents) != 0 {
		t.Errorf("left %q behind", ents[0].Name())
	}
}

// TestSequenceFrameIsBuild checks that a spin frame about the north pole
// is the build of the same pattern turned by --rotate rate*t: the two
// paths (flux.Pattern.Rotate and a rotated input) must give the same
// coefficients.
func TestSequenceFrameIsBuild(t *testing.T) {
	dirs := runSequenceCLI(t, "--pattern", "2:1:cos,3:2:sin:0.5", "--qstar", "1.5", "--qmean", "80", "--spin-rate", "4", "--times", "0,5")
	got := readFrameCoeffs(t, dirs[1])
	if _, errs, code := cli([]string{"build", "--pattern", "2:1:cos,3:2:sin:0.5", "--qstar", "1.5", "--qmean", "80", "--rotate", "20", "--out", "b", "--quiet"}, ""); code != 0 {
		t.Fatalf("build: %s", errs)
	}
	want := readFrameCoeffs(t, "b")
	for i := range want.C {
		if math.Abs(got.C[i]-want.C[i]) > 1e-12*math.Abs(want.C[0]) || math.Abs(got.S[i]-want.S[i]) > 1e-12*math.Abs(want.C[0]) {
			t.Errorf("coefficient %d: frame (%g, %g), build --rotate 20 (%g, %g)", i, got.C[i], got.S[i], want.C[i], want.S[i])
		}
	}
}
