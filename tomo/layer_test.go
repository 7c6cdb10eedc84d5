package tomo

import (
	"math"
	"strings"
	"testing"
)

// weightTol is the tolerance on normalised layer weights.
const weightTol = 1e-14

// depthGrid returns a 4 x 2 cell-registered grid in percent whose value at
// every point of level k is vals[k].
func depthGrid(depths, vals []float64) *Grid {
	g := &Grid{Lon: []float64{45, 135, 225, 315}, Lat: []float64{-45, 45}, Depth: depths, Units: UnitPercent, Reg: CellRegistered}
	for _, v := range vals {
		for range 8 {
			g.Values = append(g.Values, v)
		}
	}
	return g
}

func TestSelectLayerNearest(t *testing.T) {
	g := depthGrid([]float64{2600, 2750, 2891}, []float64{1, 2, 3})
	tests := []struct {
		name  string
		opts  LayerOptions
		depth float64
		value float64 // fraction
		warn  string
	}{
		{"default deepest", LayerOptions{}, 2891, 0.03, ""},
		{"nearest", LayerOptions{Depth: 2800}, 2750, 0.02, ""},
		{"tie goes deeper", LayerOptions{Depth: 2820.5}, 2891, 0.03, ""},
		{"far request warns", LayerOptions{Depth: 2000}, 2600, 0.01, "is 600 km from the requested 2000 km"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			l, err := SelectLayer(g, tc.opts)
			if err != nil {
				t.Fatal(err)
			}
			if len(l.Depths) != 1 || l.Depths[0] != tc.depth || l.Weights[0] != 1 {
				t.Errorf("Depths %v Weights %v, want [%g] [1]", l.Depths, l.Weights, tc.depth)
			}
			if math.Abs(l.Values[0]-tc.value) > unitTol || math.Abs(l.Mean-tc.value) > unitTol {
				t.Errorf("value %g mean %g, want %g", l.Values[0], l.Mean, tc.value)
			}
			if !strings.Contains(l.Description, "km") {
				t.Errorf("Description %q", l.Description)
			}
			if tc.warn != "" && !containsAny(l.Warnings, tc.warn) {
				t.Errorf("Warnings %q lack %q", l.Warnings, tc.warn)
			}
		})
	}
}

// TestShellWeights checks the depth-average weights against the
// trapezoidal rule (Abramowitz & Stegun 1964, 25.4.2, from memory) applied to the
// volume integral over the shell, integral of f(r) r^2 dr, with
// r = 6371 km - depth (PREM Earth radius, from memory).
func TestShellWeights(t *testing.T) {
	depths := []float64{2600, 2700, 2800, 2891}
	g := depthGrid(depths, []float64{4, 1, 2, 3})
	l, err := SelectLayer(g, LayerOptions{Top: 2650, Bottom: 2891})
	if err != nil {
		t.Fatal(err)
	}
	// Levels 2700, 2800, 2891: trapezoidal thicknesses 50, 95.5, 45.5 km;
	// radii 3671, 3571, 3480 km.
	raw := []float64{3671 * 3671 * 50, 3571 * 3571 * 95.5, 3480 * 3480 * 45.5}
	sum := raw[0] + raw[1] + raw[2]
	if len(l.Weights) != 3 {
		t.Fatalf("Weights = %v", l.Weights)
	}
	want := 0.0
	for n, r := range raw {
		if math.Abs(l.Weights[n]-r/sum) > weightTol {
			t.Errorf("weight %d = %.17g, want %.17g", n, l.Weights[n], r/sum)
		}
		want += r / sum * []float64{0.01, 0.02, 0.03}[n]
	}
	if math.Abs(l.Values[3]-want) > unitTol {
		t.Errorf("average %g, want %g", l.Values[3], want)
	}
	if l.Min != l.Values[0] || l.Max != l.Values[0] || l.Units.Max != 0.04 {
		t.Errorf("layer range %g..%g (grid max %g), want %g..%g (grid max 0.04)", l.Min, l.Max, l.Units.Max, l.Values[0], l.Values[0])
	}
	if !strings.Contains(l.Description, "2700 km (weight") || !containsAny(l.Warnings, "span 2700..2891 km, less than the requested 2650..2891") {
		t.Errorf("Description %q Warnings %q", l.Description, l.Warnings)
	}
}

// TestShellAverageConverges compares the weighted average of f = depth
// over many levels with the exact volume average over the shell,
// integral (R - r) r^2 dr / integral r^2 dr for r in [3480, 3771] km,
// whose antiderivatives are R r^3/3 - r^4/4 and r^3/3 (calculus). The
// trapezoidal rule's error falls as the square of the spacing.
func TestShellAverageConverges(t *testing.T) {
	const R, a, b = EarthRadiusKm, 3480.0, 3771.0
	num := (R*b*b*b/3 - b*b*b*b/4) - (R*a*a*a/3 - a*a*a*a/4)
	den := b*b*b/3 - a*a*a/3
	exact := num / den
	prevErr := math.Inf(1)
	for _, n := range []int{5, 21, 97} {
		depths := steps(2600, 291/float64(n-1), n)
		vals := make([]float64, n)
		for k, d := range depths {
			vals[k] = d / 1e5 // percent small enough to pass the plausibility check
		}
		l, err := SelectLayer(depthGrid(depths, vals), LayerOptions{Top: 2600, Bottom: 2891})
		if err != nil {
			t.Fatal(err)
		}
		got := l.Values[0] * 100 * 1e5
		e := math.Abs(got - exact)
		if e >= prevErr || e > 1 {
			t.Errorf("%d levels: average depth %g km, exact %g km (error %g, previous %g)", n, got, exact, e, prevErr)
		}
		prevErr = e
	}
	if prevErr > 1e-3 {
		t.Errorf("97 levels: error %g km", prevErr)
	}
}

func TestSelectLayerMasks(t *testing.T) {
	g := depthGrid([]float64{2800, 2891}, []float64{1, 2})
	g.Valid = make([]bool, len(g.Values))
	for s := range g.Valid {
		g.Valid[s] = true
	}
	g.Valid[1] = false   // level 2800, point 1
	g.Valid[8+1] = false // level 2891, point 1 too
	g.Valid[8+2] = false // level 2891, point 2 only
	deep, err := SelectLayer(g, LayerOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if deep.Valid == nil || deep.Valid[1] || deep.Valid[2] || !deep.Valid[0] {
		t.Errorf("deepest level mask %v", deep.Valid)
	}
	avg, err := SelectLayer(g, LayerOptions{Top: 2800, Bottom: 2891})
	if err != nil {
		t.Fatal(err)
	}
	if avg.Valid[1] || avg.Valid[2] || !avg.Valid[3] || !containsAny(avg.Warnings, "1 points have data at some but not all") {
		t.Errorf("average mask %v warnings %q", avg.Valid, avg.Warnings)
	}
	// Coverage: 6 of 8 equal-area cells.
	if c := avg.Coverage(); math.Abs(c-0.75) > 1e-15 {
		t.Errorf("Coverage = %g, want 0.75", c)
	}
	for _, bad := range []LayerOptions{{Top: 2891, Bottom: 2800}, {Top: 2800, Bottom: 2800}, {Depth: -1}} {
		if _, err := SelectLayer(g, bad); err == nil || !strings.Contains(err.Error(), "is not valid") {
			t.Errorf("options %+v: %v", bad, err)
		}
	}
	if _, err := SelectLayer(g, LayerOptions{Top: 1000, Bottom: 2000}); err == nil || !strings.Contains(err.Error(), "the levels are 2800, 2891 km") {
		t.Errorf("empty range: %v", err)
	}
	flat := fourRowGrid([4]float64{1, 1, 1, 1}, "percent")
	l, err := SelectLayer(flat, LayerOptions{Depth: 2800})
	if err != nil || l.Depths != nil || l.Weights[0] != 1 || !containsAny(l.Warnings, "no depth axis") {
		t.Errorf("grid without depth: %v %+v", err, l)
	}
}

func TestSelectLayerEmptyLevel(t *testing.T) {
	g := depthGrid([]float64{2800, 2891}, []float64{1, 2})
	g.Source.Path = "e.txt"
	g.Valid = make([]bool, len(g.Values))
	for s := 0; s < 8; s++ {
		g.Valid[s] = true // only the 2800 km level has data
	}
	if _, err := SelectLayer(g, LayerOptions{}); err == nil || !strings.Contains(err.Error(), "e.txt: the selected layer (the deepest level: 2891 km (level 2 of 2)) has no valid points") {
		t.Errorf("empty deepest level: %v", err)
	}
	l, err := SelectLayer(g, LayerOptions{Depth: 2800})
	if err != nil || l.Valid != nil || math.Abs(l.Mean-0.01) > unitTol {
		t.Errorf("2800 km level: %v %+v", err, l)
	}
}

// TestReadTextLineEndings reads the same grid with Unix and Windows line
// endings and tab separators.
func TestReadTextLineEndings(t *testing.T) {
	unix := gridText(steps(0, 90, 4), []float64{-45, 45}, nil, fieldText, 13)
	for _, text := range []string{unix, strings.ReplaceAll(unix, "\n", "\r\n"), strings.ReplaceAll(unix, " ", "\t"), strings.TrimSuffix(unix, "\n")} {
		g, err := ReadText("e.txt", []byte(text), ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		checkField(t, g, func(l float64) float64 { return l })
	}
}

func TestGridCheck(t *testing.T) {
	good := func() *Grid { return depthGrid([]float64{2800, 2891}, []float64{1, 2}) }
	if err := good().Check(); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name   string
		break_ func(g *Grid)
		want   string
	}{
		{"values", func(g *Grid) { g.Values = g.Values[1:] }, "15 values for 2 x 2 x 4 points"},
		{"valid", func(g *Grid) { g.Valid = make([]bool, 3) }, "3 validity flags"},
		{"lon range", func(g *Grid) { g.Lon[3] = 360 }, "longitude 360 outside [0, 360)"},
		{"lon order", func(g *Grid) { g.Lon[1], g.Lon[2] = g.Lon[2], g.Lon[1] }, "not ascending"},
		{"lon spacing", func(g *Grid) { g.Lon[1] = 100 }, "longitude not evenly spaced at 100"},
		{"lat range", func(g *Grid) { g.Lat[0] = -95 }, "latitude -95 outside [-90, 90]"},
		{"depth", func(g *Grid) { g.Depth[1] = 2700 }, "depth not ascending"},
	}
	for _, tc := range tests {
		g := good()
		tc.break_(g)
		err := g.Check()
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want %q", tc.name, err, tc.want)
		}
		if _, err := SelectLayer(g, LayerOptions{}); err == nil {
			t.Errorf("%s: SelectLayer accepted a broken grid", tc.name)
		}
	}
}
