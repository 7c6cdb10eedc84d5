package contour

import "math"

const deg = math.Pi / 180

// unit returns the unit vector of the point (lon, lat) in degrees, with x
// towards (0, 0), y towards (90 E, 0) and z towards the north pole.
func unit(lon, lat float64) [3]float64 {
	sl, cl := math.Sincos(lon * deg)
	sp, cp := math.Sincos(lat * deg)
	return [3]float64{cp * cl, cp * sl, sp}
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

func norm(a [3]float64) float64 { return math.Sqrt(dot(a, a)) }

// triangle returns the signed solid angle of the geodesic triangle (o, a, b)
// on the unit sphere, positive when o, a, b run counter-clockwise seen from
// outside, by the formula of Van Oosterom & Strackee (1983, IEEE Trans.
// Biomed. Eng. 30, 125) and Eriksson (1990, Math. Mag. 63, 184):
//
//	tan(E/2) = o.(a x b) / (1 + a.b + b.o + o.a).
func triangle(o, a, b [3]float64) float64 {
	return 2 * math.Atan2(dot(o, cross(a, b)), 1+dot(a, b)+dot(b, o)+dot(o, a))
}

// reference picks the apex of the triangle fan for a ring: the direction of
// the mean vertex when the ring is concentrated, else the ring's normal, so
// that no vertex sits near the antipode of the apex (where the fan formula
// loses precision).
func reference(pts [][3]float64) [3]float64 {
	var m, n [3]float64
	for i, a := range pts {
		b := pts[(i+1)%len(pts)]
		c := cross(a, b)
		for k := 0; k < 3; k++ {
			m[k] += a[k]
			n[k] += c[k]
		}
	}
	if r := norm(m) / float64(len(pts)); r > 0.2 {
		return [3]float64{m[0] / (r * float64(len(pts))), m[1] / (r * float64(len(pts))), m[2] / (r * float64(len(pts)))}
	}
	if r := norm(n); r > 0 {
		return [3]float64{n[0] / r, n[1] / r, n[2] / r}
	}
	return [3]float64{0, 0, 1}
}

func toUnit(ring [][2]float64) [][3]float64 {
	pts := make([][3]float64, len(ring))
	for i, p := range ring {
		pts[i] = unit(p[0], p[1])
	}
	return pts
}

// ringArea returns the signed fan sum of a ring, congruent modulo 4 pi to the
// area on its left.
func ringArea(pts [][3]float64) float64 {
	if len(pts) < 3 {
		return 0
	}
	o := reference(pts)
	s := 0.0
	for i, a := range pts {
		s += triangle(o, a, pts[(i+1)%len(pts)])
	}
	return s
}

func mod4pi(s float64) float64 {
	s = math.Mod(s, 4*math.Pi)
	if s < 0 {
		s += 4 * math.Pi
	}
	return s
}

// Area returns the area, in steradians (multiply by R^2 for a sphere of
// radius R), of the region on the left of the ring, in [0, 4 pi). Edges are
// great-circle arcs, for which the result is exact up to rounding: it is the
// sum of the signed areas of the geodesic triangles fanned from one apex.
// A ring with fewer than three vertices has area 0.
func Area(ring [][2]float64) float64 { return mod4pi(ringArea(toUnit(ring))) }

// RegionArea returns the area, in steradians, of the region bounded by the
// given rings (exterior rings counter-clockwise, holes clockwise, the region
// on the left of each): the sum of the rings' left areas modulo 4 pi. With no
// rings it returns 0.
func RegionArea(rings [][][2]float64) float64 {
	s := 0.0
	for _, r := range rings {
		s += ringArea(toUnit(r))
	}
	return mod4pi(s)
}

// momentAdd adds the contribution of the geodesic edge a -> b to the first
// moment of area, (1/2) * theta * (a x b)/|a x b|, theta the arc length.
func momentAdd(v *[3]float64, a, b [3]float64) {
	c := cross(a, b)
	s := norm(c)
	if s == 0 {
		return
	}
	th := math.Atan2(s, dot(a, b))
	f := 0.5 * th / s
	v[0] += f * c[0]
	v[1] += f * c[1]
	v[2] += f * c[2]
}

// Centroid returns the centroid (lon, lat in degrees, lon in (-180, 180])
// of the region bounded by the rings: the direction of the first moment
// integral of n dA over the region, computed exactly for geodesic edges by
// Stokes' theorem as (1/2) * sum over edges of theta_e * u_e (theta_e the arc
// length and u_e the unit normal of the edge's great circle). ok is false
// when the moment vanishes (for example a band centred on a great circle), so
// that no centroid is defined.
func Centroid(rings [][][2]float64) (lon, lat float64, ok bool) {
	var v [3]float64
	for _, r := range rings {
		pts := toUnit(r)
		for i, a := range pts {
			momentAdd(&v, a, pts[(i+1)%len(pts)])
		}
	}
	n := norm(v)
	if n < 1e-12 {
		return 0, 0, false
	}
	return math.Atan2(v[1], v[0]) / deg, math.Asin(math.Max(-1, math.Min(1, v[2]/n))) / deg, true
}

// Distance returns the great-circle angle in degrees between the points
// (lon1, lat1) and (lon2, lat2), in degrees, by the atan2 form of the
// Vincenty formula for the sphere (well conditioned at all separations).
func Distance(lon1, lat1, lon2, lat2 float64) float64 {
	a, b := unit(lon1, lat1), unit(lon2, lat2)
	return math.Atan2(norm(cross(a, b)), dot(a, b)) / deg
}
