package contour

import (
	"math"
	"testing"
)

// capField samples f = -cos(d), d the angular distance from (lon0, lat0), and
// its exact derivatives on an nlat x 2nlat grid with cell-centred latitudes
// (no pole rows, so the pole closure is exercised too). The region f < -cos a
// is the spherical cap of half-angle a about (lon0, lat0).
func capField(lonc, latc float64, nlat int, withDerivs bool) Field {
	nlon := 2 * nlat
	c := unit(lonc, latc)
	f := Field{Lon0: 0, NLon: nlon}
	for i := range nlat {
		f.Lat = append(f.Lat, 90-180*(float64(i)+0.5)/float64(nlat))
	}
	for _, la := range f.Lat {
		for j := range nlon {
			lo := 360 * float64(j) / float64(nlon)
			x := unit(lo, la)
			f.Values = append(f.Values, -dot(x, c))
			if withDerivs {
				sl, cl := math.Sincos(lo * deg)
				sp, cp := math.Sincos(la * deg)
				dxdlon := [3]float64{-cp * sl, cp * cl, 0}
				dxdlat := [3]float64{-sp * cl, -sp * sl, cp}
				f.DLon = append(f.DLon, -dot(dxdlon, c)*deg)
				f.DLat = append(f.DLat, -dot(dxdlat, c)*deg)
			}
		}
	}
	return f
}

func TestCapArea(t *testing.T) {
	// Area of a spherical cap of half-angle a on the unit sphere,
	// 2 pi (1 - cos a): Archimedes' hat-box theorem (closed form).
	const tolHermite = 1e-6 // of the sphere; the flux diagnostics promise 1e-4
	const tolPolygon = 1e-3 // of the sphere: the plain polygon, second order
	for _, tc := range []struct {
		name            string
		lon, lat, alpha float64
	}{
		{"mid-latitude", 120, 30, 40},
		{"crossing the seam", 0, -20, 35},
		{"crossing the seam west", 355, 10, 60},
		{"north polar cap", 0, 90, 25},
		{"south polar cap", 77, -90, 50},
		{"near the pole", 30, 80, 20},
		{"more than a hemisphere", 200, 5, 130},
		{"small", 45, 45, 4},
	} {
		want := 2 * math.Pi * (1 - math.Cos(tc.alpha*deg))
		s, err := NewSurface(capField(tc.lon, tc.lat, 90, true))
		if err != nil {
			t.Fatal(err)
		}
		level := -math.Cos(tc.alpha * deg)
		got := s.AreaBelow(level)
		if math.Abs(got-want)/(4*math.Pi) > tolHermite {
			t.Errorf("%s: AreaBelow = %.8f, want %.8f (2 pi (1 - cos a))", tc.name, got, want)
		}
		rings := s.Rings(level)
		if len(rings) != 1 {
			t.Fatalf("%s: %d rings, want 1", tc.name, len(rings))
		}
		if a := Area(rings[0]); math.Abs(a-want)/(4*math.Pi) > tolPolygon {
			t.Errorf("%s: area of the assembled ring %.10f, want %.10f", tc.name, a, want)
		}
		lon, lat, ok := Centroid(rings)
		if !ok || Distance(lon, lat, tc.lon, tc.lat) > 0.05 {
			t.Errorf("%s: centroid (%g, %g), want the cap centre (%g, %g) (symmetry)", tc.name, lon, lat, tc.lon, tc.lat)
		}
	}
}

func TestCapAreaConverges(t *testing.T) {
	// Without derivatives, crossings are linear: the error must fall by about
	// 4 when the spacing halves (second order). Closed form as above.
	want := 2 * math.Pi * (1 - math.Cos(50*deg))
	var errs []float64
	for _, n := range []int{24, 48, 96} {
		s, err := NewSurface(capField(10, 40, n, false))
		if err != nil {
			t.Fatal(err)
		}
		errs = append(errs, math.Abs(s.AreaBelow(-math.Cos(50*deg))-want))
	}
	for k := 1; k < len(errs); k++ {
		if r := errs[k-1] / errs[k]; r < 3 {
			t.Errorf("error ratio %g at refinement %d, want about 4 (errors %v)", r, k, errs)
		}
	}
}

func TestCapAreaConvergesWithDerivatives(t *testing.T) {
	// With derivatives the error must fall by at least 8 when the spacing
	// halves (third order or better). Closed form as in TestCapArea.
	want := 2 * math.Pi * (1 - math.Cos(50*deg))
	var errs []float64
	for _, n := range []int{12, 24, 48} {
		s, err := NewSurface(capField(10, 40, n, true))
		if err != nil {
			t.Fatal(err)
		}
		errs = append(errs, math.Abs(s.AreaBelow(-math.Cos(50*deg))-want))
	}
	for k := 1; k < len(errs); k++ {
		if r := errs[k-1] / errs[k]; r < 8 {
			t.Errorf("error ratio %g at refinement %d, want 8 or more (errors %v)", r, k, errs)
		}
	}
}

func TestComplementAndEmpty(t *testing.T) {
	s, err := NewSurface(capField(300, -45, 60, true))
	if err != nil {
		t.Fatal(err)
	}
	if a := s.AreaBelow(-2); a != 0 {
		t.Errorf("area below the minimum = %g, want 0", a)
	}
	if a := s.AreaBelow(2); a != 4*math.Pi {
		t.Errorf("area below the maximum = %g, want 4 pi", a)
	}
	// The region outside a tiny cap is nearly the whole sphere: the 0 / 4 pi
	// ambiguity must resolve to the large side. Closed form as in TestCapArea.
	neg := capField(300, -45, 60, true)
	for k := range neg.Values {
		neg.Values[k], neg.DLon[k], neg.DLat[k] = -neg.Values[k], -neg.DLon[k], -neg.DLat[k]
	}
	s2, _ := NewSurface(neg)
	alpha := 8.0
	want := 4*math.Pi - 2*math.Pi*(1-math.Cos(alpha*deg))
	if a := s2.AreaBelow(math.Cos(alpha * deg)); math.Abs(a-want) > 1e-4*4*math.Pi {
		t.Errorf("area outside a small cap = %g, want %g", a, want)
	}
	rings := s2.Rings(math.Cos(alpha * deg))
	if len(rings) != 1 || !clockwiseish(rings[0]) {
		t.Errorf("the ring around a hole must run clockwise (region on its left), got %d rings", len(rings))
	}
}

// clockwiseish reports whether the ring's left area exceeds a hemisphere,
// i.e. it runs clockwise around the smaller region.
func clockwiseish(r [][2]float64) bool { return Area(r) > 2*math.Pi }

func TestBandTwoRings(t *testing.T) {
	// f = |z - z0|: below level e is the band z0 - e < z < z0 + e, whose area
	// is 2 pi * 2e (Archimedes: area proportional to the height of the zone).
	const nlat, nlon = 90, 180
	f := Field{NLon: nlon}
	z0, e := 0.2, 0.3
	for i := range nlat {
		f.Lat = append(f.Lat, -90+180*(float64(i)+0.5)/nlat) // south to north
	}
	for _, la := range f.Lat {
		for range nlon {
			f.Values = append(f.Values, math.Abs(math.Sin(la*deg)-z0))
		}
	}
	s, err := NewSurface(f)
	if err != nil {
		t.Fatal(err)
	}
	rings := s.Rings(e)
	if len(rings) != 2 {
		t.Fatalf("%d rings, want 2", len(rings))
	}
	want := 2 * math.Pi * 2 * e
	if a := RegionArea(rings); math.Abs(a-want) > 2e-3 {
		t.Errorf("band area from rings = %g, want %g", a, want)
	}
	if a := s.AreaBelow(e); math.Abs(a-want) > 2e-3 {
		t.Errorf("band area = %g, want %g", a, want)
	}
}

func TestPolygonArea(t *testing.T) {
	// The octant triangle has three right angles: spherical excess
	// 3 pi/2 - pi = pi/2 (Girard's theorem). Its centroid lies on the
	// diagonal (1, 1, 1) by symmetry: lon 45, lat asin(1/sqrt 3).
	oct := [][2]float64{{0, 0}, {90, 0}, {0, 90}}
	if a := Area(oct); math.Abs(a-math.Pi/2) > 1e-13 {
		t.Errorf("octant area = %.16g, want pi/2", a)
	}
	rev := [][2]float64{{0, 90}, {90, 0}, {0, 0}}
	if a := Area(rev); math.Abs(a-3.5*math.Pi) > 1e-13 {
		t.Errorf("reversed octant area = %.16g, want 4 pi - pi/2", a)
	}
	lon, lat, ok := Centroid([][][2]float64{oct})
	if !ok || math.Abs(lon-45) > 1e-12 || math.Abs(lat-math.Asin(1/math.Sqrt(3))/deg) > 1e-12 {
		t.Errorf("octant centroid = (%g, %g)", lon, lat)
	}
	// A lune between meridians 0 and 60 has area 2 * 60 deg in radians
	// (closed form); as a polygon through both poles.
	lune := [][2]float64{{0, -90}, {60, 0}, {0, 90}, {0, 0}}
	if a := Area(lune); math.Abs(a-2*60*deg) > 1e-12 {
		t.Errorf("lune area = %.16g, want %.16g", a, 2*60*deg)
	}
	// Seam: the same triangle written with longitudes across 0/360.
	tri1 := [][2]float64{{-10, 0}, {10, 0}, {0, 10}}
	tri2 := [][2]float64{{350, 0}, {10, 0}, {360, 10}}
	if a, b := Area(tri1), Area(tri2); math.Abs(a-b) > 1e-14 {
		t.Errorf("seam: %g != %g", a, b)
	}
}

func TestSaddlesCloseRings(t *testing.T) {
	// A checkerboard-like field (cos 3 lon cos 2 lat-ish) has many saddles; the
	// ring areas must add up to the fan-sum area whatever the saddle choice.
	const nlat, nlon = 37, 72
	f := Field{NLon: nlon}
	for i := range nlat {
		f.Lat = append(f.Lat, 90-180*float64(i)/(nlat-1))
	}
	for _, la := range f.Lat {
		for j := range nlon {
			lo := 360 * float64(j) / nlon
			f.Values = append(f.Values, math.Cos(3*lo*deg)*math.Cos(la*deg)*math.Sin(2*la*deg))
		}
	}
	s, err := NewSurface(f)
	if err != nil {
		t.Fatal(err)
	}
	for _, level := range []float64{-0.2, 0, 1e-17, 0.15} {
		rings := s.Rings(level)
		if a, b := RegionArea(rings), s.AreaBelow(level); math.Abs(a-b) > 1e-12 {
			t.Errorf("level %g: rings area %g != AreaBelow %g (%d rings)", level, a, b, len(rings))
		}
	}
	// The field is odd under lat -> -lat, so exactly half the sphere lies
	// below 0 up to the grid's treatment of zeros (common practice check).
	if a := s.FractionBelow(0); math.Abs(a-0.5) > 1e-2 {
		t.Errorf("fraction below 0 = %g, want about 0.5", a)
	}
}

func TestNewSurfaceErrors(t *testing.T) {
	good := capField(0, 0, 6, false)
	for name, f := range map[string]Field{
		"few columns": {NLon: 2, Lat: []float64{0}, Values: []float64{1, 2}},
		"length":      {NLon: good.NLon, Lat: good.Lat, Values: good.Values[1:]},
		"monotone":    {NLon: 3, Lat: []float64{10, 20, 15}, Values: make([]float64, 9)},
		"range":       {NLon: 3, Lat: []float64{100}, Values: make([]float64, 3)},
		"nan":         {NLon: 3, Lat: []float64{0}, Values: []float64{1, math.NaN(), 2}},
	} {
		if _, err := NewSurface(f); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

func BenchmarkAreaBelow(b *testing.B) {
	s, _ := NewSurface(capField(120, 30, 136, true))
	b.ReportAllocs()
	for b.Loop() {
		s.AreaBelow(-0.7)
	}
}

// bandLines gives f = (z - z0)^2 exactly along grid lines (z = sin lat).
type bandLines struct {
	z0  float64
	lat []float64
}

func (b bandLines) Meridian(j int, lat float64) (float64, float64) {
	z := math.Sin(lat * deg)
	return (z - b.z0) * (z - b.z0), 2 * (z - b.z0) * math.Cos(lat*deg) * deg
}

func (b bandLines) Parallel(i int, lon float64) (float64, float64) {
	z := math.Sin(b.lat[i] * deg)
	return (z - b.z0) * (z - b.z0), 0
}

func TestThinBandBetweenRows(t *testing.T) {
	// f = (z - z0)^2 is below e^2 on the zone |z - z0| < e, of area
	// 2 pi * 2e (Archimedes, closed form). With z0 between two rows and the
	// zone thinner than the row spacing no node lies below the level: the
	// band must be found from the derivatives (a dip of the interpolant on
	// the meridian edges), and located exactly with Lines.
	const nlat, nlon = 60, 120 // rows every 3 degrees
	f := Field{NLon: nlon}
	for i := range nlat {
		f.Lat = append(f.Lat, 90-180*(float64(i)+0.5)/nlat)
	}
	z0 := math.Sin(31.5 * deg) // half way between the rows at 31.5 +- 1.5
	for _, la := range f.Lat {
		z := math.Sin(la * deg)
		for range nlon {
			f.Values = append(f.Values, (z-z0)*(z-z0))
			f.DLon = append(f.DLon, 0)
			f.DLat = append(f.DLat, 2*(z-z0)*math.Cos(la*deg)*deg)
		}
	}
	e := 0.5 * (math.Sin(33*deg) - math.Sin(30*deg)) * 0.6 // 60 % of the gap
	want := 2 * math.Pi * 2 * e
	s, err := NewSurface(f)
	if err != nil {
		t.Fatal(err)
	}
	if got := s.AreaBelow(e * e); math.Abs(got-want)/(4*math.Pi) > 1e-3 {
		t.Errorf("interpolated: band area %g, want %g", got, want)
	}
	// Second derivatives: quintic crossings, error O(h^6).
	for _, la := range f.Lat {
		z, c := math.Sin(la*deg), math.Cos(la*deg)
		for range nlon {
			f.DLon2 = append(f.DLon2, 0)
			f.DLat2 = append(f.DLat2, (2*c*c-2*(z-z0)*z)*deg*deg)
		}
	}
	s, _ = NewSurface(f)
	if got := s.AreaBelow(e * e); math.Abs(got-want)/(4*math.Pi) > 1e-6 {
		t.Errorf("quintic: band area %.12g, want %.12g", got, want)
	}
	f.DLon2, f.DLat2 = nil, nil
	f.Lines = bandLines{z0, f.Lat}
	s, _ = NewSurface(f)
	if got := s.AreaBelow(e * e); math.Abs(got-want)/(4*math.Pi) > 1e-9 {
		t.Errorf("with Lines: band area %.12g, want %.12g", got, want)
	}
	if r := s.Rings(e * e); len(r) != 2 {
		t.Errorf("%d rings, want 2", len(r))
	}
}
