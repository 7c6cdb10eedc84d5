package main

import (
	"fmt"
	"math"
	"strings"
	"testing"
)

// writeVelocityCSV writes absolute shear velocities in km/s on 4-degree
// cells at two radii, under column titles cmbflux does not recognise
// (x, y, level, vs): v = 7.2 (1 + 0.01 sin(lat)) at radius 3500 km and
// v = 7.2 (1 + 0.02 cos(lat) cos(lon)) at 3600 km, with -999 at the points
// of latitude 88 N and longitude below 20 E.
func writeVelocityCSV(t *testing.T, name string) {
	t.Helper()
	var b strings.Builder
	b.WriteString("x,y,level,vs\n")
	for _, r := range []float64{3500, 3600} {
		for lat := -88.0; lat < 90; lat += 4 {
			for lon := 2.0; lon < 360; lon += 4 {
				p, q := lat*math.Pi/180, lon*math.Pi/180
				v := 7.2 * (1 + 0.01*math.Sin(p))
				if r == 3600 {
					v = 7.2 * (1 + 0.02*math.Cos(p)*math.Cos(q))
				}
				if lat == 88 && lon < 20 {
					v = -999
				}
				fmt.Fprintf(&b, "%g,%g,%g,%.15g\n", lon, lat, r, v)
			}
		}
	}
	writeFile(t, name, b.String())
}

// TestReadingOptions: --lon-name, --lat-name, --depth-name, --vertical
// radius, --units km/s, --vref and --missing read the file of
// writeVelocityCSV as dlnVs = 0.01 sin(lat) at the deepest level (radius
// 3500 km, depth 6371 - 3500 = 2871 km). Its expansion in percent has
// C_10 = sqrt(4 pi / 3) = 2.0466534158929770 (orthonormal
// Y_10 = sqrt(3/(4 pi)) cos(theta); Arfken & Weber, Mathematical Methods for
// Physicists, sec. 12.6, from memory; value by Python's math module) and
// nothing else; the sentinels left in, or the other level, would change it.
// inspect gives the range of that layer, 100 sin(88 deg) = 0.999 %, not the
// 2 % of the other level.
func TestReadingOptions(t *testing.T) {
	t.Chdir(t.TempDir())
	writeVelocityCSV(t, "vel.csv")
	read := []string{"--lon-name", "x", "--lat-name", "y", "--depth-name", "level", "--vertical", "radius",
		"--units", "km/s", "--vref", "7.2", "--missing", "-999"}
	mustCLI(t, append([]string{"build", "--input", "vel.csv", "--quantity", "dvs", "--lmax", "4", "--out", "bc"}, read...)...)
	c := readCanonical(t, "bc/coefficients.txt")
	for l := 0; l <= 4; l++ {
		for m := 0; m <= l; m++ {
			want := 0.0
			if l == 1 && m == 0 {
				want = 2.0466534158929770
			}
			if a, s := c.At(l, m); math.Abs(a-want) > 1e-6 || math.Abs(s) > 1e-6 {
				t.Errorf("C_%d%d, S_%d%d = %.10g, %.3g; want %.16g, 0", l, m, l, m, a, s, want)
			}
		}
	}
	if s := loadSummary(t, "bc"); !strings.Contains(s.Layer, "2871") {
		t.Errorf("layer %q, want the level at depth 2871 km", s.Layer)
	}
	// The same from a build file (the keys are the flag names), and
	// inspect reads it the same way.
	writeFile(t, "build.yaml", "input: vel.csv\nquantity: dvs\nlmax: 4\nlon-name: x\nlat-name: y\ndepth-name: level\n"+
		"vertical: radius\nunits: km/s\nvref: 7.2\nmissing: [-999]\n")
	mustCLI(t, "build", "--config", "build.yaml", "--out", "bc2")
	if c2 := readCanonical(t, "bc2/coefficients.txt"); math.Abs(c2.C[1]-2.0466534158929770) > 1e-6 {
		t.Errorf("from build.yaml: C_10 = %g", c2.C[1])
	}
	out, _ := mustCLI(t, append([]string{"inspect", "vel.csv"}, read...)...)
	if !strings.Contains(out, "read as       km/s (given") || !strings.Contains(out, "-0.999 to 0.999 %") {
		t.Errorf("inspect:\n%s", out)
	}
}

// TestReadingHintsNameFlags: the readers' hints name the flags that fix
// the problem, and the exit status is 2.
func TestReadingHintsNameFlags(t *testing.T) {
	t.Chdir(t.TempDir())
	writeVelocityCSV(t, "vel.csv")
	base := []string{"build", "--input", "vel.csv", "--quantity", "dvs", "--out", "bc"}
	for _, tc := range []struct {
		extra []string
		want  string
	}{
		{nil, "--lon-name"},
		{[]string{"--lon-name", "x"}, "--lat-name"},
		{[]string{"--lon-name", "x", "--lat-name", "y", "--depth-name", "level", "--vertical", "radius", "--units", "km/s"}, "give --vref KMS, or --vref mean"},
		{[]string{"--lon-name", "x", "--lat-name", "y", "--depth-name", "level", "--vertical", "radius", "--units", "fraction", "--missing", "-999"}, "give --force-amplitude if they are real"},
		{[]string{"--units", "furlongs"}, "is not one of percent, fraction, km/s, m/s"},
		{[]string{"--vref", "7200"}, "is not a shear velocity in km/s"},
		{[]string{"--vertical", "up"}, "is not depth or radius"},
	} {
		_, errs, code := cli(append(base, tc.extra...), "")
		if code != 2 || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d, stderr %q; want exit 2 and %q", tc.extra, code, errs, tc.want)
		}
	}
	onlyEntries(t, "vel.csv")
	_, errs := mustCLI(t, "build", "--input", "vel.csv", "--quantity", "dvs", "--lon-name", "x", "--lat-name", "y", "--depth-name", "level",
		"--vertical", "radius", "--units", "fraction", "--missing", "-999", "--force-amplitude", "--out", "forced")
	if !strings.Contains(errs, "accepted because forced") {
		t.Errorf("--force-amplitude: stderr %q lacks the warning", errs)
	}
}
