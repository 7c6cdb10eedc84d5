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

// FuzzGridAt checks that interpolation never indexes outside the grid and
// stays within the range of the grid values (a bilinear interpolant is a
// convex combination of its corners).
func FuzzGridAt(f *testing.F) {
	f.Add(0.0, 0.0)
	f.Add(359.9999999999, -90.0)
	f.Add(-1e300, 1e300)
	g := demoGrid()
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range g.Values {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	f.Fuzz(func(t *testing.T, lon, lat float64) {
		v := g.At(lon, lat)
		if math.IsNaN(lon) || math.IsNaN(lat) || math.IsInf(lon, 0) {
			if !math.IsNaN(v) {
				t.Fatalf("At(%v, %v) = %v, want NaN", lon, lat, v)
			}
			return
		}
		if !(v >= lo-1e-9 && v <= hi+1e-9) {
			t.Fatalf("At(%v, %v) = %v outside [%v, %v]", lon, lat, v, lo, hi)
		}
	})
}

// FuzzProjectLine checks that a projected line is cut at the map edge: no
// step between consecutive points of a piece is longer than a tenth of the
// map's width, whatever the end points.
func FuzzProjectLine(f *testing.F) {
	f.Add(uint8(0), 170.0, 10.0, -170.0, -20.0)
	f.Add(uint8(2), 0.0, 89.0, 180.0, -89.0)
	f.Fuzz(func(t *testing.T, k uint8, lon1, lat1, lon2, lat2 float64) {
		for _, v := range []float64{lon1, lat1, lon2, lat2} {
			if math.IsNaN(v) || math.Abs(v) > 1e4 {
				return
			}
		}
		m := &Map{Projection: Projection{Kind: Kind(k%3) + 1, CentralLon: 180}}
		l, err := m.layout(900, 540)
		if err != nil {
			t.Fatal(err)
		}
		segs := projectLine(l, [][2]float64{{lon1, math.Mod(lat1, 90)}, {lon2, math.Mod(lat2, 90)}})
		w := 2 * l.xmax * l.scale
		for _, s := range segs {
			for i := 1; i < len(s); i++ {
				if d := math.Hypot(float64(s[i].X-s[i-1].X), float64(s[i].Y-s[i-1].Y)); d > w/10 {
					t.Fatalf("step of %.0f of %.0f points", d, w)
				}
			}
		}
	})
}
