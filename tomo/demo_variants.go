package tomo

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"math"
	"sync"
)

// DemoVariantNames are the names of the invented variants of the demo
// scenario returned by DemoVariants, in order.
var DemoVariantNames = []string{"merle", "roan", "dapple"}

// DemoVariantShiftDeg is the eastward turn, in degrees of longitude, of the
// whole brindle pattern in the variant "merle".
const DemoVariantShiftDeg = 12.0

// The variants' invented structure (amplitudes in percent).
var (
	// roan: the brindle provinces as a smoother, lower-resolution image
	// would show them: wider, weaker, with a broader fast belt.
	roanBroad = demoProvince{lon: 15, lat: -5, a: 36, b: 60, tilt: 25, amp: -2.0}
	roanRound = demoProvince{lon: 195, lat: 8, a: 31, b: 31, tilt: 0, amp: -1.6}
	// dapple: the brindle large-scale pattern with small-scale structure
	// of its own.
	dappleBumps = []demoBump{
		{30, 25, 8, -0.6}, {80, -55, 9, 0.5}, {120, 15, 7, 0.55},
		{160, -40, 8, -0.5}, {235, 60, 9, 0.45}, {270, -5, 7, -0.6},
		{315, 45, 8, 0.5}, {345, -25, 9, -0.45}, {205, -65, 10, 0.4},
		{95, 70, 8, -0.4}, {0, -80, 9, 0.35},
	}
)

var (
	variantsOnce sync.Once
	variantGrids []*Grid
)

// DemoVariants returns three invented variants of the demo scenario
// "brindle" (see Demo), for trying out comparisons of several models. No
// real data is in them:
//
//   - "merle": the whole brindle pattern turned DemoVariantShiftDeg degrees
//     east about the rotation axis;
//   - "roan": the brindle provinces wider and weaker, the fast belt broader
//     and weaker, and the small-scale structure damped to a third, as a
//     smoother, lower-resolution image of the same mantle would look;
//   - "dapple": the brindle large-scale pattern with other small-scale
//     structure (eleven bumps of its own).
//
// Each is laid out exactly as Demo (2-degree cell-registered grid, depth
// levels DemoDepths, values in percent rounded to 0.001 %, all valid, the
// same strengthening of the large-scale pattern towards the core-mantle
// boundary). Source.Path is the variant's name, Source.Format "demo" and
// Source.SHA256 the sha256 of the grid written by WriteText. Each call
// returns new copies.
func DemoVariants() []*Grid {
	variantsOnce.Do(func() {
		shifted := func(f func(lon, lat float64) float64) func(lon, lat float64) float64 {
			return func(lon, lat float64) float64 { return f(lon-DemoVariantShiftDeg, lat) }
		}
		roanLarge := func(lon, lat float64) float64 {
			v := roanBroad.at(lon, lat) + roanRound.at(lon, lat)
			x, y := local(demoBroad.lon, demoBroad.lat, lon, lat)
			z := (math.Hypot(x, y) - demoBeltDist) / (1.3 * demoBeltWidth)
			return v + 0.75*demoBeltAmp*math.Exp(-z*z)*(1-0.3*math.Cos(2*math.Atan2(x, y)))
		}
		roanSmall := func(lon, lat float64) float64 { return demoSmall(lon, lat) / 3 }
		dappleSmall := func(lon, lat float64) float64 {
			v := 0.0
			for _, b := range dappleBumps {
				z := angDist(b.lon, b.lat, lon, lat) / b.r
				v += b.amp * math.Exp(-z*z)
			}
			return v
		}
		specs := []struct {
			large, small func(lon, lat float64) float64
			what         string
		}{
			{shifted(demoLarge), shifted(demoSmall), "the brindle pattern turned 12 degrees east"},
			{roanLarge, roanSmall, "the brindle provinces wider, weaker and smoother"},
			{demoLarge, dappleSmall, "the brindle large-scale pattern with other small-scale structure"},
		}
		for n, s := range specs {
			name := DemoVariantNames[n]
			g := variantBuild(s.large, s.small)
			g.Title = name + ": an invented variant of the cmbflux demo scenario, " + s.what + " (not a tomography model of the Earth)"
			var buf bytes.Buffer
			if err := WriteText(&buf, g); err != nil {
				panic("tomo: writing a demo variant: " + err.Error())
			}
			sum := sha256.Sum256(buf.Bytes())
			g.Source = Provenance{Path: name, SHA256: hex.EncodeToString(sum[:]), Format: "demo"}
			variantGrids = append(variantGrids, g)
		}
	})
	out := make([]*Grid, len(variantGrids))
	for n, v := range variantGrids {
		g := *v
		g.Lon = append([]float64(nil), v.Lon...)
		g.Lat = append([]float64(nil), v.Lat...)
		g.Depth = append([]float64(nil), v.Depth...)
		g.Values = append([]float64(nil), v.Values...)
		out[n] = &g
	}
	return out
}

// variantBuild evaluates large and small parts on the demo's grid with the
// demo's depth dependence (see demoBuild).
func variantBuild(large, small func(lon, lat float64) float64) *Grid {
	g := &Grid{
		Lon: make([]float64, 180), Lat: make([]float64, 90), Depth: append([]float64(nil), DemoDepths...),
		Name: "dvs", Units: UnitPercent, Reg: CellRegistered,
	}
	for i := range g.Lon {
		g.Lon[i] = 1 + 2*float64(i)
	}
	for j := range g.Lat {
		g.Lat[j] = -89 + 2*float64(j)
	}
	g.Values = make([]float64, len(g.Depth)*len(g.Lat)*len(g.Lon))
	for k, d := range g.Depth {
		t := (d - DemoDepths[0]) / (CMBDepthKm - DemoDepths[0])
		wl := 0.5 + 0.5*math.Pow(t, 1.5)
		ws := 0.7 + 0.3*t
		for j, lat := range g.Lat {
			for i, lon := range g.Lon {
				v := wl*large(lon, lat) + ws*small(lon, lat)
				g.Values[g.Index(k, j, i)] = math.Round(v*1000) / 1000
			}
		}
	}
	return g
}
