package figure

import (
	"math"
	"testing"
)

const projTol = 1e-12

// TestForwardTable checks Forward against values derived from Snyder's
// closed forms at 40 digits (testdata/projcheck.py, mpmath).
func TestForwardTable(t *testing.T) {
	for _, c := range projCheck {
		p := Projection{Kind: c.kind, CentralLon: c.lon0}
		x, y := p.Forward(c.lon, c.lat)
		if math.Abs(x-c.x) > projTol || math.Abs(y-c.y) > projTol {
			t.Errorf("%v Forward(%v, %v) = (%.15g, %.15g), want (%.15g, %.15g)", p, c.lon, c.lat, x, y, c.x, c.y)
		}
	}
}

// laeaSnyder is the Lambert azimuthal equal-area projection of a sphere of
// radius r about (lon0, lat1), Snyder 1987 eqs. (24-2), (24-3), (24-13).
func laeaSnyder(r, lon0, lat1, lon, lat float64) (x, y float64) {
	d := math.Pi / 180
	p1, l0, p, l := lat1*d, lon0*d, lat*d, lon*d
	k := math.Sqrt(2 / (1 + math.Sin(p1)*math.Sin(p) + math.Cos(p1)*math.Cos(p)*math.Cos(l-l0)))
	return r * k * math.Cos(p) * math.Sin(l-l0), r * k * (math.Cos(p1)*math.Sin(p) - math.Sin(p1)*math.Cos(p)*math.Cos(l-l0))
}

// TestHammerIsHalvedLambert checks the construction of the Hammer
// projection from the Lambert azimuthal equal-area projection. The test's
// own Lambert formula is first checked against Snyder's numerical example
// for the sphere (Snyder 1987, Lambert azimuthal equal-area, sphere:
// R = 3, phi1 = 40 N, lambda0 = 100 W, phi = 20 S, lambda = 100 E gives
// x = -4.2339303, y = 4.0257775; the numbers from memory, confirmed by
// recomputing the closed form).
func TestHammerIsHalvedLambert(t *testing.T) {
	x, y := laeaSnyder(3, -100, 40, 100, -20)
	if math.Abs(x-(-4.2339303)) > 5e-8 || math.Abs(y-4.0257775) > 5e-8 {
		t.Fatalf("Lambert check: (%.8f, %.8f), want (-4.2339303, 4.0257775)", x, y)
	}
	p := Projection{Kind: Hammer, CentralLon: 30}
	for lat := -90.0; lat <= 90; lat += 7.5 {
		for lon := -150.0; lon <= 210; lon += 11.25 {
			hx, hy := p.Forward(lon, lat)
			lx, ly := laeaSnyder(1, 0, 0, relLon(lon, 30)*90/math.Pi, lat)
			if math.Abs(hx-2*lx) > projTol || math.Abs(hy-ly) > projTol {
				t.Errorf("Hammer(%v, %v) = (%v, %v), want (%v, %v)", lon, lat, hx, hy, 2*lx, ly)
			}
		}
	}
}

// TestEquirectangular checks Snyder 1987 eqs. (12-1), (12-2) with the
// equator as standard parallel: x = lambda - lambda0, y = phi in radians.
func TestEquirectangular(t *testing.T) {
	p := Projection{Kind: Equirectangular, CentralLon: -90}
	x, y := p.Forward(-75, -50)
	if math.Abs(x-15*math.Pi/180) > projTol || math.Abs(y+50*math.Pi/180) > projTol {
		t.Errorf("Forward = (%v, %v)", x, y)
	}
}

// TestRoundTrip checks Inverse(Forward(p)) = p over the sphere for every
// projection and a few central meridians; Inverse uses Snyder's inverse
// closed forms, Forward the direct ones, so agreement checks both.
func TestRoundTrip(t *testing.T) {
	for _, k := range []Kind{Mollweide, Hammer, Equirectangular} {
		for _, lon0 := range []float64{0, 180, -90, 37.5} {
			p := Projection{Kind: k, CentralLon: lon0}
			for lat := -89.5; lat < 90; lat += 3.5 {
				for lon := -179.0; lon < 180; lon += 7 {
					if math.Abs(relLon(lon, lon0)) > math.Pi*(1-1e-9) {
						continue
					}
					x, y := p.Forward(lon, lat)
					lo, la, ok := p.Inverse(x, y)
					if !ok || math.Abs(la-lat) > 1e-9 || math.Abs(relLon(lo, lon)) > 1e-9*math.Pi/180 {
						t.Errorf("%v: (%v, %v) -> (%v, %v) -> (%v, %v, %v)", p, lon, lat, x, y, lo, la, ok)
					}
				}
			}
		}
	}
}

// TestInverseOutside checks that points outside the map outline are
// rejected: outside the ellipse x^2/8 + y^2/2 = 1 for Mollweide and Hammer
// (Snyder 1987, both bounded by an ellipse of axes 2 sqrt 2 and sqrt 2),
// outside the rectangle for the equirectangular map.
func TestInverseOutside(t *testing.T) {
	for _, k := range []Kind{Mollweide, Hammer} {
		p := Projection{Kind: k}
		for _, pt := range [][2]float64{{2.8, 0.5}, {0, 1.5}, {2, 1.1}, {-2.5, -0.8}} {
			if _, _, ok := p.Inverse(pt[0], pt[1]); ok {
				t.Errorf("%v: Inverse(%v) ok, want outside", p, pt)
			}
		}
		if _, _, ok := p.Inverse(2, 0.9); !ok { // 4/8 + 0.81/2 < 1
			t.Errorf("%v: Inverse(2, 0.9) outside, want inside", p)
		}
	}
	p := Projection{Kind: Equirectangular}
	if _, _, ok := p.Inverse(3.2, 0); ok {
		t.Error("equirectangular: Inverse(3.2, 0) ok, want outside")
	}
}

// TestEqualArea checks the equal-area property of Mollweide and Hammer
// (Snyder 1987: both are equal-area): the Jacobian of (lambda, phi) ->
// (x, y) has determinant cos phi on the unit sphere, so the whole map has
// area 4 pi. Checked by central differences.
func TestEqualArea(t *testing.T) {
	const h = 1e-5 // degrees
	for _, k := range []Kind{Mollweide, Hammer} {
		p := Projection{Kind: k, CentralLon: 0}
		for lat := -80.0; lat <= 80; lat += 10 {
			for lon := -170.0; lon <= 170; lon += 20 {
				x1, y1 := p.Forward(lon+h, lat)
				x0, y0 := p.Forward(lon-h, lat)
				x3, y3 := p.Forward(lon, lat+h)
				x2, y2 := p.Forward(lon, lat-h)
				s := 2 * h * math.Pi / 180
				det := ((x1-x0)*(y3-y2) - (x3-x2)*(y1-y0)) / (s * s)
				want := math.Cos(lat * math.Pi / 180)
				if math.Abs(det-want) > 1e-6 {
					t.Errorf("%v at (%v, %v): det J = %v, want cos(lat) = %v", k, lon, lat, det, want)
				}
			}
		}
	}
	if xm, ym := (Projection{Kind: Hammer}).Bounds(); math.Abs(math.Pi*xm*ym-4*math.Pi) > 1e-12 {
		t.Errorf("ellipse area %v, want 4 pi", math.Pi*xm*ym)
	}
}

// TestZeroProjection checks the documented defaults of the zero value.
func TestZeroProjection(t *testing.T) {
	var p Projection
	x, _ := p.Forward(DefaultCentralLon, 0)
	if x != 0 {
		t.Errorf("zero Projection: central meridian maps to x = %v", x)
	}
	if s := p.String(); s != "Mollweide, central meridian 180°E" {
		t.Errorf("String() = %q", s)
	}
	if k, err := ParseKind("hammer"); err != nil || k != Hammer {
		t.Errorf("ParseKind(hammer) = %v, %v", k, err)
	}
	if _, err := ParseKind("aitoff"); err == nil {
		t.Error("ParseKind(aitoff): no error")
	}
}
