package figure

import (
	"fmt"
	"math"
)

// Kind names a map projection of the sphere.
type Kind int

// The projections. The zero Kind selects DefaultKind.
const (
	// Mollweide is the equal-area pseudocylindrical projection with an
	// elliptical outline twice as wide as high (Snyder 1987, ch. 31).
	Mollweide Kind = iota + 1
	// Hammer is the Hammer (Hammer-Aitoff) equal-area projection: the
	// equatorial Lambert azimuthal equal-area projection of the hemisphere
	// stretched to the whole sphere by halving longitudes and doubling x
	// (Snyder 1987, ch. 24 for the azimuthal projection it is built on).
	Hammer
	// Equirectangular is the plate carree: x proportional to longitude,
	// y to latitude, standard parallel the equator (Snyder 1987, ch. 12).
	Equirectangular
)

// DefaultKind is the projection used when none is chosen.
const DefaultKind = Mollweide

// DefaultCentralLon is the central meridian, in degrees east, used when
// none is chosen. A map centred on 180 degrees keeps a province centred
// on the Pacific whole in the middle of the map, and the map edge, the
// Greenwich meridian, runs through its antipode; choose 0 to keep a
// province centred near Greenwich whole instead. Either way one of two
// antipodal equatorial provinces is cut by the edge: a map centred on 90
// degrees east or west keeps both whole, halfway to the edges.
const DefaultCentralLon = 180.0

// Projection is a map projection of the unit sphere with a central meridian.
// The zero value is DefaultKind centred on DefaultCentralLon.
//
// Forward and Inverse work in degrees of longitude and latitude and in plane
// coordinates (x, y) for a sphere of radius 1: x grows eastward, y
// northward, and the central meridian maps to x = 0.
type Projection struct {
	// Kind is the projection; zero means DefaultKind.
	Kind Kind
	// CentralLon is the central meridian in degrees east. It is used only
	// when Kind is set: the zero Projection means DefaultCentralLon.
	CentralLon float64
}

// resolved returns p with the defaults of the zero value filled in.
func (p Projection) resolved() Projection {
	if p.Kind == 0 {
		return Projection{Kind: DefaultKind, CentralLon: DefaultCentralLon}
	}
	return p
}

// String returns the projection's name and central meridian.
func (p Projection) String() string {
	p = p.resolved()
	return fmt.Sprintf("%s, central meridian %g°E", p.Kind, p.CentralLon)
}

// String returns the projection's name.
func (k Kind) String() string {
	switch k {
	case 0:
		return DefaultKind.String()
	case Mollweide:
		return "Mollweide"
	case Hammer:
		return "Hammer"
	case Equirectangular:
		return "equirectangular"
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// ParseKind returns the projection named s ("mollweide", "hammer",
// "equirectangular"; case-sensitive lower-case names as used on a command
// line).
func ParseKind(s string) (Kind, error) {
	switch s {
	case "mollweide":
		return Mollweide, nil
	case "hammer":
		return Hammer, nil
	case "equirectangular":
		return Equirectangular, nil
	}
	return 0, fmt.Errorf("figure: unknown projection %q (want mollweide, hammer or equirectangular)", s)
}

// Bounds returns the half-width and half-height of the whole map for a
// sphere of radius 1: the map fits in [-xmax, xmax] x [-ymax, ymax]. For
// Mollweide and Hammer they are 2*sqrt(2) and sqrt(2); for
// Equirectangular pi and pi/2.
func (p Projection) Bounds() (xmax, ymax float64) {
	switch p.resolved().Kind {
	case Mollweide, Hammer:
		return 2 * math.Sqrt2, math.Sqrt2
	case Equirectangular:
		return math.Pi, math.Pi / 2
	}
	panic("figure: unknown projection kind")
}

// relLon returns lon - lon0 wrapped into [-180, 180] degrees, in radians.
// A longitude exactly on the far side stays at +180.
func relLon(lon, lon0 float64) float64 {
	d := math.Mod(lon-lon0, 360)
	if d > 180 {
		d -= 360
	} else if d < -180 {
		d += 360
	}
	return d * math.Pi / 180
}

// wrapLon returns lon wrapped into (-180, 180] degrees.
func wrapLon(lon float64) float64 {
	d := math.Mod(lon, 360)
	if d > 180 {
		d -= 360
	} else if d <= -180 {
		d += 360
	}
	return d
}

// Forward returns the plane coordinates of the point at longitude lon and
// latitude lat (degrees) on the unit sphere. Latitudes outside [-90, 90]
// are clamped to it. Longitudes are reduced modulo 360 about the central
// meridian into [-180, 180]; on the meridian opposite to it, lon - lon0 =
// +180 maps to the east edge and -180 to the west edge.
func (p Projection) Forward(lon, lat float64) (x, y float64) {
	p = p.resolved()
	lam := relLon(lon, p.CentralLon)
	phi := math.Max(-90, math.Min(90, lat)) * math.Pi / 180
	switch p.Kind {
	case Mollweide:
		// Snyder 1987, eqs. (31-1) to (31-3):
		// 2 theta + sin 2 theta = pi sin phi,
		// x = (2 sqrt 2 / pi) lambda cos theta, y = sqrt 2 sin theta.
		th := mollweideTheta(phi)
		return 2 * math.Sqrt2 / math.Pi * lam * math.Cos(th), math.Sqrt2 * math.Sin(th)
	case Hammer:
		// Lambert azimuthal equal-area, equatorial aspect (Snyder 1987,
		// eqs. (24-2), (24-3) with phi1 = 0 and k' from (24-13) in the
		// form sqrt(2 / (1 + cos phi cos lambda))), applied to lambda/2
		// with x doubled.
		c := math.Cos(phi)
		d := math.Sqrt(1 + c*math.Cos(lam/2))
		return 2 * math.Sqrt2 * c * math.Sin(lam/2) / d, math.Sqrt2 * math.Sin(phi) / d
	case Equirectangular:
		// Snyder 1987, eqs. (12-1), (12-2) with phi1 = 0.
		return lam, phi
	}
	panic("figure: unknown projection kind")
}

// mollweideTheta solves 2 theta + sin 2 theta = pi sin phi for the
// auxiliary angle theta by Newton's method (Snyder 1987, eq. (31-4) with
// the Newton step written for theta rather than 2 theta).
func mollweideTheta(phi float64) float64 {
	if math.Abs(phi) >= math.Pi/2-1e-12 {
		return math.Copysign(math.Pi/2, phi)
	}
	t := math.Pi * math.Sin(phi)
	th := phi
	for range 50 {
		f := 2*th + math.Sin(2*th) - t
		df := 2 + 2*math.Cos(2*th)
		d := f / df
		th -= d
		if math.Abs(d) < 1e-15 {
			break
		}
	}
	return th
}

// Inverse returns the longitude and latitude (degrees) of the plane point
// (x, y) on the unit sphere, and ok = false when the point lies outside
// the map. Longitudes are in (-180, 180] degrees about Greenwich.
func (p Projection) Inverse(x, y float64) (lon, lat float64, ok bool) {
	p = p.resolved()
	var lam, phi float64
	switch p.Kind {
	case Mollweide:
		// Snyder 1987, eqs. (31-5) to (31-7): theta = arcsin(y / sqrt 2),
		// phi = arcsin((2 theta + sin 2 theta) / pi),
		// lambda = pi x / (2 sqrt 2 cos theta).
		s := y / math.Sqrt2
		if math.Abs(s) > 1 {
			return 0, 0, false
		}
		th := math.Asin(s)
		phi = math.Asin(math.Max(-1, math.Min(1, (2*th+math.Sin(2*th))/math.Pi)))
		c := math.Cos(th)
		if c < 1e-15 {
			if math.Abs(x) > 1e-12 {
				return 0, 0, false
			}
			lam = 0
		} else {
			lam = math.Pi * x / (2 * math.Sqrt2 * c)
		}
		if math.Abs(lam) > math.Pi*(1+1e-12) {
			return 0, 0, false
		}
	case Hammer:
		// Inverse of the Lambert azimuthal equal-area projection
		// (Snyder 1987, eqs. (20-14), (24-16), (24-17) for the sphere)
		// with x halved and the longitude doubled; here written with
		// z = sqrt(1 - (x/4)^2 - (y/2)^2), which equals cos(c/2) for the
		// angular distance c of the azimuthal projection (derived).
		if (x*x)/8+(y*y)/2 > 1+1e-12 {
			return 0, 0, false
		}
		z2 := 1 - x*x/16 - y*y/4
		z := math.Sqrt(math.Max(0, z2))
		phi = math.Asin(math.Max(-1, math.Min(1, z*y)))
		lam = 2 * math.Atan2(z*x, 2*(2*z2-1))
	case Equirectangular:
		if math.Abs(x) > math.Pi*(1+1e-12) || math.Abs(y) > math.Pi/2*(1+1e-12) {
			return 0, 0, false
		}
		lam, phi = x, y
	default:
		panic("figure: unknown projection kind")
	}
	lat = phi * 180 / math.Pi
	lon = wrapLon(p.CentralLon + lam*180/math.Pi)
	return lon, lat, true
}
