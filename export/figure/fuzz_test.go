package figure

import (
	"math"
	"testing"
)

// FuzzProjectionRoundTrip checks over arbitrary points and central
// meridians that Forward lands inside the map bounds and that Inverse
// returns the point (identity of the direct and inverse formulas of
// Snyder 1987), away from the edge meridian and the poles where longitude
// is not defined.
func FuzzProjectionRoundTrip(f *testing.F) {
	f.Add(uint8(0), 0.0, 10.0, 20.0)
	f.Add(uint8(1), 180.0, -170.0, 89.0)
	f.Add(uint8(2), -90.0, 359.0, -45.0)
	f.Fuzz(func(t *testing.T, k uint8, lon0, lon, lat float64) {
		if math.IsNaN(lon0+lon+lat) || math.IsInf(lon0+lon+lat, 0) || math.Abs(lon0) > 1e4 || math.Abs(lon) > 1e4 {
			return
		}
		lat = math.Mod(lat, 90)
		p := Projection{Kind: Kind(k%3) + 1, CentralLon: lon0}
		x, y := p.Forward(lon, lat)
		xm, ym := p.Bounds()
		if math.Abs(x) > xm*(1+1e-12) || math.Abs(y) > ym*(1+1e-12) {
			t.Fatalf("%v: Forward(%v, %v) = (%v, %v) outside the bounds", p, lon, lat, x, y)
		}
		if math.Abs(math.Abs(relLon(lon, lon0))-math.Pi) < 1e-6 || math.Abs(lat) > 89.999 {
			return
		}
		lo, la, ok := p.Inverse(x, y)
		if !ok || math.Abs(la-lat) > 1e-7 || math.Abs(relLon(lo, lon)) > 1e-7 {
			t.Fatalf("%v: (%v, %v) -> (%v, %v) -> (%v, %v, %v)", p, lon, lat, x, y, lo, la, ok)
		}
	})
}
