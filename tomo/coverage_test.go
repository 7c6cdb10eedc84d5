package tomo

import (
	"math"
	"math/rand/v2"
	"testing"
)

// covTol is the tolerance on area fractions (sums of a few hundred terms).
const covTol = 1e-13

// maskedLayer returns a layer on a global cell-registered grid of spacing
// d degrees whose point (lon, lat) is valid when keep says so.
func maskedLayer(d float64, keep func(lon, lat float64) bool) *Layer {
	nlon, nlat := int(math.Round(360/d)), int(math.Round(180/d))
	l := &Layer{Lon: steps(d/2, d, nlon), Lat: steps(-90+d/2, d, nlat), Reg: CellRegistered}
	l.Values = make([]float64, nlon*nlat)
	l.Valid = make([]bool, nlon*nlat)
	for j, la := range l.Lat {
		for i, lo := range l.Lon {
			l.Valid[j*nlon+i] = keep(lo, la)
		}
	}
	return l
}

// TestCoverage checks area fractions against the area of a spherical cap
// of angular radius a, 2*pi*(1 - cos a) on the unit sphere, i.e. a
// fraction (1 - cos a)/2 (Archimedes' hat-box theorem).
func TestCoverage(t *testing.T) {
	cap := func(a float64) float64 { return (1 - math.Cos(a*math.Pi/180)) / 2 }
	tests := []struct {
		name string
		l    *Layer
		want float64
	}{
		{"full", maskedLayer(2, func(lo, la float64) bool { return true }), 1},
		{"north cap of 30 degrees missing", maskedLayer(2, func(lo, la float64) bool { return la < 60 }), 1 - cap(30)},
		{"both caps of 10 degrees missing", maskedLayer(1, func(lo, la float64) bool { return math.Abs(la) < 80 }), 1 - 2*cap(10)},
		{"eastern hemisphere", maskedLayer(3, func(lo, la float64) bool { return lo < 180 }), 0.5},
		// A node-registered grid stopping at +-60: bands reach +-75.
		{"partial latitudes", &Layer{Lon: steps(0, 30, 12), Lat: steps(-60, 30, 5), Values: make([]float64, 60)}, 1 - 2*cap(15)},
	}
	for _, tc := range tests {
		if c := tc.l.Coverage(); math.Abs(c-tc.want) > covTol {
			t.Errorf("%s: Coverage = %.15g, want %.15g", tc.name, c, tc.want)
		}
	}
}

// TestSafeDegree checks the degree limits. Nyquist: floor(180/Delta) for
// spacing Delta (common practice). Gap: a missing polar cap of angular
// radius a is a hole of diameter 2a, limiting the degree to 180/(2a)
// (common practice); the grid estimate is within a cell of the truth.
func TestSafeDegree(t *testing.T) {
	full := SafeDegree(maskedLayer(2, func(lo, la float64) bool { return true }))
	if full.Nyquist != 90 || full.Lmax != 90 || full.Gap != 0 || full.GapLimit != 90 {
		t.Errorf("full 2-degree grid: %+v", full)
	}
	capped := SafeDegree(maskedLayer(2, func(lo, la float64) bool { return la < 70 }))
	// Cap north of 70 N: radius 20 degrees, diameter 40, 180/40 = 4.5.
	if math.Abs(capped.Gap-40) > 2 || capped.GapLimit != 4 || capped.Lmax != 4 {
		t.Errorf("20-degree polar cap missing: %+v", capped)
	}
	// A round hole of radius 15 degrees at the equator on a 0.5-degree grid.
	hole := SafeDegree(maskedLayer(0.5, func(lo, la float64) bool { return angDist(lo, la, 100, 0) > 15 }))
	if math.Abs(hole.Gap-30) > 1 || hole.GapLimit != 6 || hole.Nyquist != 360 {
		t.Errorf("30-degree hole: %+v", hole)
	}
	// A grid with only partial latitudes: the uncovered caps are gaps.
	part := SafeDegree(&Layer{Lon: steps(0, 10, 36), Lat: steps(-60, 10, 13), Values: make([]float64, 36*13)})
	if math.Abs(part.Gap-60) > 10 || part.GapLimit > 3 || part.Nyquist != 18 {
		t.Errorf("grid stopping at 60 degrees: %+v", part)
	}
	// Many scattered missing points (fixed seed) force the coarse search;
	// the estimate must stay conservative: at least the true largest gap of
	// the sprinkled mask (a few cells) and no more than a few coarse cells.
	r := rand.New(rand.NewPCG(5, 6))
	sprinkled := SafeDegree(maskedLayer(0.5, func(lo, la float64) bool { return r.IntN(2) == 0 }))
	if sprinkled.Gap <= 0.5 || sprinkled.Gap > 20 || sprinkled.Lmax > sprinkled.Nyquist {
		t.Errorf("sprinkled mask: %+v", sprinkled)
	}
}

// TestRegionalLayer: a grid covering a quarter of the longitudes covers a
// quarter of the sphere (the sphere's area is evenly spread in longitude);
// the missing three quarters are one large gap (nearly 180 degrees across:
// the valid points next to the poles are within 90 degrees of everything).
func TestRegionalLayer(t *testing.T) {
	g := &Grid{Lon: steps(5, 10, 9), Lat: steps(-85, 10, 18), Units: UnitPercent, Source: Provenance{Path: "r.nc"}}
	g.Values = make([]float64, 9*18)
	l, err := SelectLayer(g, LayerOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if c := l.Coverage(); math.Abs(c-0.25) > covTol {
		t.Errorf("Coverage = %g, want 0.25", c)
	}
	if !containsAny(l.Warnings, "the grid is regional: longitudes 5..85 cover 90 of 360 degrees") {
		t.Errorf("Warnings = %q", l.Warnings)
	}
	lim := SafeDegree(l)
	if lim.Gap < 150 || lim.Lmax > 1 || lim.Nyquist != 18 {
		t.Errorf("regional grid: %+v", lim)
	}
}
