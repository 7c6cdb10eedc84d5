package compare

import (
	"math"
	"testing"

	"cmbflux/flux/contour"
)

// distanceField samples, on a 1-degree node grid, the smallest angular
// distance in degrees to any of the centres: its sub-level sets are unions
// of spherical caps.
func distanceField(centres [][2]float64) contour.Field {
	f := contour.Field{Lon0: 0, NLon: 360}
	for j := 0; j <= 180; j++ {
		f.Lat = append(f.Lat, 90-float64(j))
	}
	for _, lat := range f.Lat {
		for i := 0; i < f.NLon; i++ {
			p := unitVec(float64(i), lat)
			d := math.Inf(1)
			for _, c := range centres {
				d = math.Min(d, angle(p, unitVec(c[0], c[1]))*180/math.Pi)
			}
			f.Values = append(f.Values, d)
		}
	}
	return f
}

// TestSlowRegionsCaps: two caps of angular radius 30 degrees centred on the
// equator 180 degrees apart (one across the 0/360 seam) have area
// 2 pi R^2 (1 - cos alpha) each (area of a spherical cap), centroids at
// their centres, and an antipodality of 180 degrees.
func TestSlowRegionsCaps(t *testing.T) {
	f := distanceField([][2]float64{{0, 0}, {180, 0}})
	regs, err := SlowRegions(f, 30)
	if err != nil {
		t.Fatal(err)
	}
	if len(regs) != 2 {
		t.Fatalf("%d regions, want 2", len(regs))
	}
	wantFrac := (1 - math.Cos(30*math.Pi/180)) / 2
	wantKm2 := 2 * math.Pi * CMBRadiusKm * CMBRadiusKm * (1 - math.Cos(30*math.Pi/180))
	for _, r := range regs {
		// Linear interpolation of a cone-shaped field on a 1-degree grid:
		// the polygon's area is within 0.2 % of the cap's.
		if math.Abs(r.Fraction-wantFrac) > 2e-3*wantFrac || math.Abs(r.AreaKm2-wantKm2) > 2e-3*wantKm2 {
			t.Errorf("region area %g (%g km^2), want %g (%g km^2)", r.Fraction, r.AreaKm2, wantFrac, wantKm2)
		}
		if math.Abs(r.CentroidLat) > 0.05 {
			t.Errorf("centroid latitude %g, want 0", r.CentroidLat)
		}
	}
	sep, ok := Antipodality(regs)
	if !ok || math.Abs(sep-180) > 0.1 {
		t.Errorf("antipodality %g, want 180", sep)
	}
	// The level that encloses the two caps' total area is the cap radius.
	lev, err := LevelForFraction(f, 2*wantFrac)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(lev-30) > 0.05 {
		t.Errorf("level for the caps' area %g, want 30", lev)
	}
}
