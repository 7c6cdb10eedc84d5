package export

import (
	"math"
	"sort"
)

// glNodes and glWeights are the 8-point Gauss-Legendre rule on [-1, 1]
// (Abramowitz & Stegun 1964, table 25.4).
var glNodes = [8]float64{
	-0.9602898564975363, -0.7966664774136267, -0.5255324099163290, -0.1834346424956498,
	0.1834346424956498, 0.5255324099163290, 0.7966664774136267, 0.9602898564975363,
}
var glWeights = [8]float64{
	0.1012285362903763, 0.2223810344533745, 0.3137066458778873, 0.3626837833783620,
	0.3626837833783620, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763,
}

// lonLatMoments returns the area (steradians) and the first moment of area
// (integral of the unit position vector over the region, unit sphere) of a
// planar polygon in (lon, lat) degrees whose edges are straight in
// longitude and latitude, as GeoJSON draws them. By Green's theorem with
// dA = cos(lat) dlat dlon,
//
//	A   = closed integral of -sin(lat) dlon,
//	V_z = closed integral of -sin^2(lat)/2 dlon,
//	V_x = closed integral of -(lat/2 + sin(2 lat)/4) cos(lon) dlon,
//	V_y = closed integral of -(lat/2 + sin(2 lat)/4) sin(lon) dlon,
//
// counter-clockwise rings counting positive. A has a closed form along each
// edge (latitude linear in longitude); the moments use Gauss-Legendre
// quadrature on pieces of at most 5 degrees of longitude.
func lonLatMoments(poly [][]pt) (area float64, v [3]float64) {
	for _, r := range poly {
		for i, a := range r {
			b := r[(i+1)%len(r)]
			l1, l2 := a.x*deg, b.x*deg
			p1, p2 := a.y*deg, b.y*deg
			dl, dp := l2-l1, p2-p1
			if dl == 0 {
				continue
			}
			// (dl/dp)(cos p2 - cos p1) = -dl sin(pm) sinc(dp/2).
			h := dp / 2
			sinc := 1.0
			if h != 0 {
				sinc = math.Sin(h) / h
			}
			area += -dl * math.Sin((p1+p2)/2) * sinc
			n := int(math.Ceil(math.Abs(dl) / (5 * deg)))
			for k := range n {
				t0, t1 := float64(k)/float64(n), float64(k+1)/float64(n)
				for q, x := range glNodes {
					t := t0 + (t1-t0)*(x+1)/2
					w := glWeights[q] * (t1 - t0) / 2 * dl
					lon, lat := l1+t*dl, p1+t*dp
					s := math.Sin(lat)
					f := lat/2 + math.Sin(2*lat)/4
					v[0] -= w * f * math.Cos(lon)
					v[1] -= w * f * math.Sin(lon)
					v[2] -= w * s * s / 2
				}
			}
		}
	}
	return area, v
}

const deg = math.Pi / 180

// edgeIntervals returns the latitude intervals where ring r runs along the
// meridian x (positive length only).
func edgeIntervals(r []pt, x float64) [][2]float64 {
	var out [][2]float64
	for i, a := range r {
		b := r[(i+1)%len(r)]
		if a.x == x && b.x == x && a.y != b.y {
			out = append(out, [2]float64{math.Min(a.y, b.y), math.Max(a.y, b.y)})
		}
	}
	return out
}

// patches groups planar polygons into connected patches of the sphere:
// pieces that meet along the antimeridian (an edge on +180 overlapping an
// edge on -180) belong to one patch. Patches are ordered by their first
// polygon, which keeps the order of planarPolygons.
func patches(polys [][][]pt) [][][][]pt {
	parent := make([]int, len(polys))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	east := make([][][2]float64, len(polys))
	west := make([][][2]float64, len(polys))
	for k, p := range polys {
		east[k] = edgeIntervals(p[0], 180)
		west[k] = edgeIntervals(p[0], -180)
	}
	for a := range polys {
		for b := range polys {
			for _, e := range east[a] {
				for _, w := range west[b] {
					if math.Min(e[1], w[1]) > math.Max(e[0], w[0]) {
						parent[find(a)] = find(b)
					}
				}
			}
		}
	}
	groups := map[int][]int{}
	for k := range polys {
		groups[find(k)] = append(groups[find(k)], k)
	}
	var out [][][][]pt
	keys := make([]int, 0, len(groups))
	for r, g := range groups {
		sort.Ints(g)
		groups[r] = g
		keys = append(keys, r)
	}
	sort.Slice(keys, func(i, j int) bool { return groups[keys[i]][0] < groups[keys[j]][0] })
	for _, r := range keys {
		var p [][][]pt
		for _, k := range groups[r] {
			p = append(p, polys[k])
		}
		out = append(out, p)
	}
	return out
}
