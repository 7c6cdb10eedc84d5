package tomo

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// unitTol is the tolerance on converted values (a few ulps of O(1) numbers).
const unitTol = 1e-15

// fourRowGrid is a cell-registered 4 x 4 grid whose four 45-degree rows
// reach the poles: row j covers latitudes -90+45j .. -45+45j.
func fourRowGrid(rows [4]float64, units string) *Grid {
	g := &Grid{Lon: []float64{45, 135, 225, 315}, Lat: []float64{-67.5, -22.5, 22.5, 67.5}, Units: units, Reg: CellRegistered}
	for j := range 4 {
		for range 4 {
			g.Values = append(g.Values, rows[j])
		}
	}
	return g
}

func TestNormalizeConversions(t *testing.T) {
	tests := []struct {
		name  string
		units string
		opts  UnitOptions
		in    float64
		want  float64 // dlnVs as a fraction
	}{
		// Definitions: percent = 100 * fraction; dlnVs = (v - v_ref)/v_ref
		// (common practice).
		{"percent", "percent", UnitOptions{}, 1.5, 0.015},
		{"percent sign", "%", UnitOptions{}, -2.25, -0.0225},
		{"fraction", "1", UnitOptions{}, -0.02, -0.02},
		{"km/s", "km/s", UnitOptions{RefVelocity: 7}, 7.07, (7.07 - 7) / 7},
		{"km s-1", "km s-1", UnitOptions{RefVelocity: 7.2}, 7.2, 0},
		{"m/s", "m/s", UnitOptions{RefVelocity: 7}, 6930, (6.93 - 7) / 7},
		{"override", "furlongs", UnitOptions{Units: "percent"}, 3, 0.03},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			g := fourRowGrid([4]float64{tc.in, tc.in, tc.in, tc.in}, tc.units)
			out, rep, err := Normalize(g, tc.opts)
			if err != nil {
				t.Fatal(err)
			}
			if out.Units != UnitFraction {
				t.Errorf("Units = %q", out.Units)
			}
			for _, v := range out.Values {
				if math.Abs(v-tc.want) > unitTol {
					t.Fatalf("value %g, want %g", v, tc.want)
				}
			}
			if math.Abs(rep.Mean-tc.want) > unitTol {
				t.Errorf("Mean = %g, want %g", rep.Mean, tc.want)
			}
			if g.Values[0] != tc.in {
				t.Error("Normalize modified its input")
			}
			if len(rep.Warnings) != 0 {
				t.Errorf("unexpected warnings %q", rep.Warnings)
			}
		})
	}
}

// TestNormalizeMeanIsAreaWeighted checks the reported mean against
// spherical areas: a latitude band between phi1 and phi2 covers
// (sin phi2 - sin phi1)/2 of the sphere (Archimedes' hat-box theorem).
func TestNormalizeMeanIsAreaWeighted(t *testing.T) {
	g := fourRowGrid([4]float64{0, 0, 0, 0.01}, "fraction")
	_, rep, err := Normalize(g, UnitOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := 0.01 * (1 - math.Sin(math.Pi/4)) / 2 // cap north of 45 N
	if math.Abs(rep.Mean-want) > unitTol {
		t.Errorf("Mean = %.17g, want %.17g", rep.Mean, want)
	}
	// The reference taken as the layer mean: rows 7.0 and 7.2 km/s in the
	// two bands of equal area 0..45 N and 0..45 S give v_ref 7.1.
	h := fourRowGrid([4]float64{7.1, 7.0, 7.2, 7.1}, "km/s")
	out, rep, err := Normalize(h, UnitOptions{RefLayerMean: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Warnings) != 0 || len(rep.RefVelocity) != 1 || math.Abs(rep.RefVelocity[0]-7.1) > 1e-14 {
		t.Errorf("RefVelocity = %v, want [7.1]", rep.RefVelocity)
	}
	if v := out.Values[4]; math.Abs(v-(7.0-7.1)/7.1) > 1e-14 {
		t.Errorf("value %g, want %g", v, (7.0-7.1)/7.1)
	}
}

func TestGuessUnits(t *testing.T) {
	tests := []struct {
		name, units, vname string
		values             [4]float64
		want               string
		reason             string
	}{
		{"units attribute", "Percent", "", [4]float64{0.01, 0, 0, 0}, UnitPercent, "file's units"},
		{"units km.s-1", "km.s-1", "", [4]float64{7, 7, 7, 7}, UnitKmPerS, "file's units"},
		{"column name pct", "", "dvs_pct", [4]float64{0.01, 0, 0, 0}, UnitPercent, "column name"},
		{"range km/s", "", "", [4]float64{6.9, 7.1, 7.3, 7.0}, UnitKmPerS, "km/s"},
		{"range m/s", "", "", [4]float64{6900, 7100, 7300, 7000}, UnitMPerS, "m/s"},
		{"range fraction", "", "", [4]float64{-0.03, 0.02, 0, 0.01}, UnitFraction, "a fraction"},
		{"range percent", "", "", [4]float64{-2.5, 1.5, 0, 0.3}, UnitPercent, "percent"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			g := fourRowGrid(tc.values, tc.units)
			g.Name = tc.vname
			_, rep, err := Normalize(g, UnitOptions{RefVelocity: 7.1})
			if err != nil {
				t.Fatal(err)
			}
			if rep.From != tc.want || !rep.Guessed || !strings.Contains(rep.Reason, tc.reason) {
				t.Errorf("guess %q (%s), want %q with %q", rep.From, rep.Reason, tc.want, tc.reason)
			}
		})
	}
}

func TestNormalizePlausibility(t *testing.T) {
	g := fourRowGrid([4]float64{1, 25, -3, 0}, "percent")
	g.Source.Path = "p.txt"
	_, _, err := Normalize(g, UnitOptions{})
	var ie *InputError
	if !errors.As(err, &ie) || !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), "4 values exceed the plausible 20 %") {
		t.Fatalf("err = %v", err)
	}
	// Units from the file are not called a guess.
	if !strings.Contains(err.Error(), `the units were taken from the file's units "percent", so give them explicitly if the file's are wrong`) {
		t.Errorf("err = %v", err)
	}
	// Units guessed from the values are.
	u := fourRowGrid([4]float64{1, 25, -3, 0}, "")
	if _, _, err := Normalize(u, UnitOptions{}); err == nil || !strings.Contains(err.Error(), "the units were guessed (from the value range") {
		t.Errorf("guessed: %v", err)
	}
	_, rep, err := Normalize(g, UnitOptions{Force: true})
	if err != nil || len(rep.Warnings) != 1 || !strings.Contains(rep.Warnings[0], "forced") {
		t.Fatalf("forced: %v, %v", err, rep)
	}
	if rep.Max != 0.25 || rep.Min != -0.03 {
		t.Errorf("Min, Max = %g, %g", rep.Min, rep.Max)
	}
	// A stricter limit of 2 %.
	if _, _, err := Normalize(g, UnitOptions{MaxAbs: 0.02, Force: false}); err == nil {
		t.Error("3 % accepted under a 2 % limit")
	}
	// Mistaken units: km/s values declared as a fraction are 700 %.
	h := fourRowGrid([4]float64{7, 7, 7, 7}, "fraction")
	if _, _, err := Normalize(h, UnitOptions{}); err == nil || !strings.Contains(err.Error(), "largest 700 %") {
		t.Errorf("7 km/s read as a fraction: %v", err)
	}
}

func TestNormalizeUnusedReference(t *testing.T) {
	_, rep, err := Normalize(fourRowGrid([4]float64{1, 2, -1, 0}, "percent"), UnitOptions{RefVelocity: 7.2})
	if err != nil || len(rep.Warnings) != 1 || !strings.Contains(rep.Warnings[0], "it was not used") {
		t.Errorf("%v %q", err, rep.Warnings)
	}
}

// TestAmbiguousGuess checks the warning for values guessed to be fractions
// whose largest magnitude (above 0.05) is unusual read either way, given
// lowermost-mantle anomalies of typically 1 to 3 % (common practice,
// references.md); declared units or clearly small fractions give none.
func TestAmbiguousGuess(t *testing.T) {
	for _, tc := range []struct {
		name   string
		units  string
		values [4]float64
		warn   bool
	}{
		{"fraction of a few percent", "", [4]float64{-0.03, 0.02, 0, 0.01}, false},
		{"fraction at the 5 % edge", "", [4]float64{-0.05, 0.02, 0, 0.01}, false},
		{"ambiguous 0.15", "", [4]float64{-0.15, 0.1, 0, 0.01}, true},
		{"declared percent", "percent", [4]float64{-0.15, 0.1, 0, 0.01}, false},
		{"guessed percent", "", [4]float64{-2.5, 1.5, 0, 0.3}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, rep, err := Normalize(fourRowGrid(tc.values, tc.units), UnitOptions{})
			if err != nil {
				t.Fatal(err)
			}
			got := containsAny(rep.Warnings, "the units were guessed as a fraction, but the largest magnitude 0.15 is unusual either way (15 % as a fraction, 0.15 % as percent")
			if got != tc.warn {
				t.Errorf("warning %v, want %v: %q", got, tc.warn, rep.Warnings)
			}
		})
	}
}
