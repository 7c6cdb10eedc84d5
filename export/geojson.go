package export

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"

	"github.com/ctessum/geom"
	"github.com/ctessum/geom/encoding/geojson"

	"cmbflux/flux/contour"
)

// Outline is one region of the sphere, such as the slow provinces or the
// patches where the flux is sub-adiabatic or negative, bounded by Rings.
//
// Rings follow flux/contour: each ring is a list of (lon, lat) vertices in
// degrees, closed implicitly (a repeated last vertex is accepted), and the
// region lies on the left of every ring: rings around a piece of the region
// run counter-clockwise seen from outside the sphere, rings around a hole
// clockwise, and a ring that winds once around a pole encloses the north
// pole when it runs eastward and the south pole when it runs westward.
// Consecutive vertices are joined the short way in longitude, so longitudes
// may come in any range, with jumps of 360 degrees at a seam.
type Outline struct {
	// Rings bound the region (see above).
	Rings [][][2]float64
	// Props are written as the feature's properties, after the computed
	// ones (see WriteOutlines), whose names they must not reuse.
	Props map[string]any
	// Split writes one feature per connected patch of the region (pieces
	// cut at the antimeridian stay together), each with its own area and
	// centroid and the property "patch" (1, 2, ...), instead of one
	// feature for the whole region.
	Split bool
}

// The properties WriteOutlines adds to every feature.
const (
	PropAreaKm2      = "area_km2"      // area at the reference radius, km^2
	PropAreaFraction = "area_fraction" // area over the sphere's area, 4 pi R^2
	PropCentroidLon  = "centroid_lon"  // spherical centroid, degrees east in (-180, 180]
	PropCentroidLat  = "centroid_lat"  // spherical centroid, degrees north
)

// pt is a planar (lon, lat) point in degrees.
type pt struct{ x, y float64 }

// unwrap returns the ring with consecutive longitudes made continuous
// (steps in (-180, 180)), the closing vertex dropped, and the number of
// times it winds eastward around the pole axis (-1, 0 or 1).
func unwrap(ring [][2]float64) ([]pt, int, error) {
	n := len(ring)
	if n > 1 && ring[0] == ring[n-1] {
		n--
	}
	if n < 3 {
		return nil, 0, fmt.Errorf("ring has %d distinct vertices, want at least 3", n)
	}
	u := make([]pt, n)
	for i, p := range ring[:n] {
		if !finite(p[0]) || !(p[1] >= -90 && p[1] <= 90) {
			return nil, 0, fmt.Errorf("vertex %d (%v, %v) is not a longitude and a latitude in [-90, 90]", i, p[0], p[1])
		}
	}
	u[0] = pt{math.Remainder(ring[0][0], 360), ring[0][1]}
	step := func(from, to float64) (float64, error) {
		d := math.Remainder(to-from, 360)
		if math.Abs(d) == 180 {
			return 0, fmt.Errorf("an edge spans exactly 180 degrees of longitude, so its way round is ambiguous")
		}
		return d, nil
	}
	for i := 1; i < n; i++ {
		d, err := step(ring[i-1][0], ring[i][0])
		if err != nil {
			return nil, 0, fmt.Errorf("vertex %d: %v", i, err)
		}
		u[i] = pt{u[i-1].x + d, ring[i][1]}
	}
	d, err := step(ring[n-1][0], ring[0][0])
	if err != nil {
		return nil, 0, fmt.Errorf("closing edge: %v", err)
	}
	w := math.Round((u[n-1].x + d - u[0].x) / 360)
	if math.Abs(w) > 1 {
		return nil, 0, fmt.Errorf("ring winds %v times around the pole axis", w)
	}
	return u, int(w), nil
}

// piece is part of a ring inside the map rectangle [-180, 180] x [-90, 90];
// open pieces start and end on the antimeridian.
type piece struct {
	p      []pt
	closed bool
}

// cut splits an unwrapped ring at the antimeridians x = 180 + 360 k and
// shifts each part into [-180, 180]. Edges are straight in (lon, lat), as
// GeoJSON draws them (RFC 7946 section 3.1.1).
func cut(u []pt, wind int) []piece {
	n := len(u)
	// strip k holds -180 + 360 k <= x < 180 + 360 k; the bounds are
	// compared exactly, since x + 180 may round up to the next strip.
	strip := func(x float64) int {
		k := int(math.Floor((x + 180) / 360))
		for x < -180+360*float64(k) {
			k--
		}
		for x >= 180+360*float64(k) {
			k++
		}
		return k
	}
	type raw struct {
		p []pt
		k int
	}
	var parts []raw
	cur := raw{p: []pt{u[0]}, k: strip(u[0].x)}
	crossed := false
	for i := 0; i < n; i++ {
		a := u[i]
		b := pt{u[0].x + 360*float64(wind), u[0].y}
		if i+1 < n {
			b = u[i+1]
		}
		kb := strip(b.x)
		for cur.k != kb {
			// Cross the line between the current strip and the next one
			// towards b.
			var c float64
			next := cur.k + 1
			if kb < cur.k {
				next = cur.k - 1
				c = 180 + 360*float64(next)
			} else {
				c = 180 + 360*float64(cur.k)
			}
			t := (c - a.x) / (b.x - a.x)
			p := pt{c, a.y + t*(b.y-a.y)}
			cur.p = append(cur.p, p)
			parts = append(parts, cur)
			cur = raw{p: []pt{p}, k: next}
			crossed = true
		}
		if i+1 < n {
			cur.p = append(cur.p, b)
		} else if crossed {
			cur.p = append(cur.p, b)
		}
	}
	shift := func(r raw) []pt {
		out := make([]pt, 0, len(r.p))
		for _, p := range r.p {
			q := pt{p.x - 360*float64(r.k), p.y}
			if m := len(out); m > 0 && out[m-1] == q {
				continue
			}
			out = append(out, q)
		}
		return out
	}
	if !crossed {
		return []piece{{p: shift(cur), closed: true}}
	}
	// The last part ends where the first began: join them.
	first := shift(parts[0])
	last := shift(cur)
	joined := append(last, first[1:]...)
	if len(last) > 0 && len(first) > 0 && last[len(last)-1] != first[0] {
		joined = append(last, first...)
	}
	out := []piece{{p: joined}}
	for _, r := range parts[1:] {
		out = append(out, piece{p: shift(r)})
	}
	// Drop parts that merely touch the antimeridian at a point.
	keep := out[:0]
	for _, pc := range out {
		if len(pc.p) >= 2 {
			keep = append(keep, pc)
		}
	}
	return keep
}

// perimeter returns the position of p on the boundary of the map rectangle,
// counter-clockwise from (-180, -90): bottom, right, top, left edges.
func perimeter(p pt) float64 {
	switch {
	case p.x >= 180:
		return 360 + (p.y + 90)
	case p.x <= -180:
		return 900 + (90 - p.y)
	case p.y <= -90:
		return p.x + 180
	default: // top edge
		return 540 + (180 - p.x)
	}
}

// corners of the rectangle with their perimeter positions.
var corners = [4]struct {
	s float64
	p pt
}{{360, pt{180, -90}}, {540, pt{180, 90}}, {900, pt{-180, 90}}, {1080, pt{-180, -90}}}

// walk appends the rectangle's corners passed going counter-clockwise from
// perimeter position s0 to s1, with s0 in [0, 1080) and s0 <= s1 < s0 + 1080.
func walk(dst []pt, s0, s1 float64) []pt {
	for _, off := range []float64{0, 1080} {
		for _, c := range corners {
			if s := c.s + off; s > s0 && s < s1 {
				dst = append(dst, c.p)
			}
		}
	}
	return dst
}

// signedArea is the planar shoelace area in square degrees, positive for
// counter-clockwise rings.
func signedArea(r []pt) float64 {
	s := 0.0
	for i, a := range r {
		b := r[(i+1)%len(r)]
		s += a.x*b.y - b.x*a.y
	}
	return s / 2
}

// inside reports whether q is inside the planar ring r (even-odd rule).
func inside(q pt, r []pt) bool {
	in := false
	for i, a := range r {
		b := r[(i+1)%len(r)]
		if (a.y > q.y) != (b.y > q.y) && q.x < a.x+(q.y-a.y)*(b.x-a.x)/(b.y-a.y) {
			in = !in
		}
	}
	return in
}

// planarPolygons turns the rings of one region into RFC 7946 polygons inside
// [-180, 180] x [-90, 90]: cut at the antimeridian, closed along it and along
// the poles' edges of the map, exteriors counter-clockwise and holes
// clockwise.
func planarPolygons(rings [][][2]float64) ([][][]pt, error) {
	var open []piece
	var closedRings [][]pt
	for i, r := range rings {
		u, w, err := unwrap(r)
		if err != nil {
			return nil, fmt.Errorf("ring %d: %v", i, err)
		}
		for _, pc := range cut(u, w) {
			if pc.closed {
				closedRings = append(closedRings, pc.p)
			} else {
				open = append(open, pc)
			}
		}
	}
	// Trace the open pieces into rings: from the end of a piece, go
	// counter-clockwise along the map's edge to the nearest start.
	used := make([]bool, len(open))
	for i0 := range open {
		if used[i0] {
			continue
		}
		var ring []pt
		i := i0
		for steps := 0; ; steps++ {
			if steps > len(open) {
				return nil, errors.New("outline rings do not bound a region consistently (check their orientation)")
			}
			used[i] = true
			ring = append(ring, open[i].p...)
			end := open[i].p[len(open[i].p)-1]
			se := perimeter(end)
			best, bestD := -1, math.Inf(1)
			for j, pc := range open {
				d := perimeter(pc.p[0]) - se
				if d < 0 {
					d += 1080
				}
				if d < bestD {
					best, bestD = j, d
				}
			}
			ring = walk(ring, se, se+bestD)
			if best == i0 {
				break
			}
			if used[best] {
				return nil, errors.New("outline rings do not bound a region consistently (check their orientation)")
			}
			i = best
		}
		closedRings = append(closedRings, ring)
	}
	// Remove repeated vertices and degenerate rings.
	var exts, holes [][]pt
	for _, r := range closedRings {
		c := r[:0:0]
		for _, p := range r {
			if m := len(c); m == 0 || c[m-1] != p {
				c = append(c, p)
			}
		}
		for len(c) > 1 && c[0] == c[len(c)-1] {
			c = c[:len(c)-1]
		}
		if len(c) < 3 {
			continue
		}
		switch a := signedArea(c); {
		case a > 0:
			exts = append(exts, c)
		case a < 0:
			holes = append(holes, c)
		}
	}
	// Each hole goes to the smallest exterior that contains it; holes that
	// no exterior contains are holes in the whole map.
	polys := make([][][]pt, len(exts))
	for k, e := range exts {
		polys[k] = [][]pt{e}
	}
	var world [][]pt
	for _, h := range holes {
		best, bestA := -1, math.Inf(1)
		for k, e := range exts {
			votes := 0
			for j := 0; j < len(h) && j < 5; j++ {
				if inside(h[j*len(h)/min(len(h), 5)], e) {
					votes++
				} else {
					votes--
				}
			}
			if a := signedArea(e); votes > 0 && a < bestA {
				best, bestA = k, a
			}
		}
		if best < 0 {
			world = append(world, h)
		} else {
			polys[best] = append(polys[best], h)
		}
	}
	if len(world) > 0 {
		rect := []pt{{-180, -90}, {180, -90}, {180, 90}, {-180, 90}}
		polys = append(polys, append([][]pt{rect}, world...))
	}
	// A fixed order, whatever the order of the rings: by exterior's first
	// vertex.
	sort.SliceStable(polys, func(a, b int) bool {
		pa, pb := polys[a][0][0], polys[b][0][0]
		if pa.x != pb.x {
			return pa.x < pb.x
		}
		return pa.y < pb.y
	})
	return polys, nil
}

// toGeom wraps planar polygons as a geom.Polygon or geom.MultiPolygon with
// closed rings (X = longitude, Y = latitude).
func toGeom(polys [][][]pt) geom.Geom {
	gp := make([]geom.Polygon, len(polys))
	for k, poly := range polys {
		for _, r := range poly {
			path := make(geom.Path, 0, len(r)+1)
			for _, p := range r {
				path = append(path, geom.Point{X: p.x, Y: p.y})
			}
			path = append(path, path[0])
			gp[k] = append(gp[k], path)
		}
	}
	if len(gp) == 1 {
		return gp[0]
	}
	return geom.MultiPolygon(gp)
}

type featureJSON struct {
	Type       string            `json:"type"`
	Geometry   *geojson.Geometry `json:"geometry"`
	Properties map[string]any    `json:"properties"`
}

type collectionJSON struct {
	Type     string        `json:"type"`
	Metadata *outlineMeta  `json:"cmbflux"`
	Features []featureJSON `json:"features"`
}

// outlineMeta is a foreign member (RFC 7946 section 6.1) holding Meta.
type outlineMeta struct {
	Format            string            `json:"format"`
	Quantity          string            `json:"quantity"`
	Units             string            `json:"units"`
	Sign              string            `json:"sign"`
	ReferenceRadiusKm float64           `json:"reference_radius_km"`
	Version           string            `json:"cmbflux_version"`
	Inputs            []Input           `json:"inputs"`
	Params            map[string]string `json:"parameters"`
}

// WriteOutlines writes the outlines as a GeoJSON FeatureCollection (RFC
// 7946), one Feature per Outline. Positions are [longitude, latitude] in
// degrees with longitudes in [-180, 180]; polygons that cross the
// antimeridian are cut there into a MultiPolygon (section 3.1.9); rings are
// closed with at least 4 positions; exteriors run counter-clockwise and holes
// clockwise (section 3.1.6). Edges are straight lines in longitude and
// latitude, and a region around a pole is bounded along the map's edge at
// latitude +-90.
//
// Each feature's properties hold area_km2 (area at meta.RadiusKm) and
// area_fraction (of the whole sphere), and centroid_lon and centroid_lat
// (the spherical centroid, null when it is undefined), all computed on the
// sphere by flux/contour with the ring edges taken as great-circle arcs,
// followed by Props. With Outline.Split, each connected patch is a feature
// of its own whose area and centroid are computed exactly for the polygon
// as drawn (edges straight in longitude and latitude, see lonLatMoments),
// numbered by the property "patch". The collection carries meta in the
// foreign member "cmbflux". An Outline with no rings is written with a null
// geometry (one feature, or none when split).
func WriteOutlines(w io.Writer, outlines []Outline, meta *Meta) error {
	if meta == nil {
		meta = &Meta{}
	}
	if err := meta.check(); err != nil {
		return err
	}
	r := meta.radiusKm()
	col := collectionJSON{Type: "FeatureCollection", Features: []featureJSON{}, Metadata: &outlineMeta{
		Format: "cmbflux-outlines/1", Quantity: meta.Quantity, Units: meta.Units, Sign: meta.Sign,
		ReferenceRadiusKm: r, Version: meta.Version, Inputs: meta.Inputs, Params: meta.Params,
	}}
	if col.Metadata.Inputs == nil {
		col.Metadata.Inputs = []Input{}
	}
	if col.Metadata.Params == nil {
		col.Metadata.Params = map[string]string{}
	}
	for k, o := range outlines {
		var polys [][][]pt
		if len(o.Rings) > 0 {
			var err error
			if polys, err = planarPolygons(o.Rings); err != nil {
				return fmt.Errorf("export: outline %d: %v", k, err)
			}
		}
		if o.Split {
			for n, patch := range patches(polys) {
				area, v := 0.0, [3]float64{}
				for _, p := range patch {
					a, pv := lonLatMoments(p)
					area += a
					for i := range v {
						v[i] += pv[i]
					}
				}
				lon, lat, ok := direction(v)
				f, err := feature(patch, area, r, lon, lat, ok, o.Props, map[string]any{PropPatch: n + 1})
				if err != nil {
					return fmt.Errorf("export: outline %d: %v", k, err)
				}
				col.Features = append(col.Features, f)
			}
			continue
		}
		sr := 0.0
		lon, lat, ok := 0.0, 0.0, false
		if len(o.Rings) > 0 {
			sr = contour.RegionArea(o.Rings)
			lon, lat, ok = contour.Centroid(o.Rings)
		}
		f, err := feature(polys, sr, r, lon, lat, ok, o.Props, nil)
		if err != nil {
			return fmt.Errorf("export: outline %d: %v", k, err)
		}
		col.Features = append(col.Features, f)
	}
	// One line for the collection's members and one per feature: compact
	// coordinates, yet a file that line-oriented tools can handle.
	var b bytes.Buffer
	head, err := json.Marshal(col.Metadata)
	if err != nil {
		return fmt.Errorf("export: %v", err)
	}
	b.WriteString(`{"type":"FeatureCollection","cmbflux":`)
	b.Write(head)
	b.WriteString(`,"features":[`)
	for i := range col.Features {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteByte('\n')
		fj, err := json.Marshal(&col.Features[i])
		if err != nil {
			return fmt.Errorf("export: feature %d: %v", i, err)
		}
		b.Write(fj)
	}
	b.WriteString("\n]}\n")
	_, err = w.Write(b.Bytes())
	return err
}

// PropPatch is the property holding the patch number of a split outline.
const PropPatch = "patch"

// direction returns the longitude and latitude of v, ok false when v is
// too small to have one.
func direction(v [3]float64) (lon, lat float64, ok bool) {
	n := math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2])
	if n < 1e-12 {
		return 0, 0, false
	}
	return math.Atan2(v[1], v[0]) / deg, math.Asin(math.Max(-1, math.Min(1, v[2]/n))) / deg, true
}

// feature builds one GeoJSON feature; area is in steradians, r in km.
func feature(polys [][][]pt, area, r, lon, lat float64, ok bool, props, extra map[string]any) (featureJSON, error) {
	f := featureJSON{Type: "Feature", Properties: map[string]any{}}
	if len(polys) > 0 {
		g, err := geojson.ToGeoJSON(toGeom(polys))
		if err != nil {
			return f, err
		}
		f.Geometry = g
	}
	f.Properties[PropAreaKm2] = area * r * r
	f.Properties[PropAreaFraction] = area / (4 * math.Pi)
	f.Properties[PropCentroidLon], f.Properties[PropCentroidLat] = nil, nil
	if ok {
		f.Properties[PropCentroidLon], f.Properties[PropCentroidLat] = lon, lat
	}
	for key, v := range extra {
		f.Properties[key] = v
	}
	for key, v := range props {
		if _, taken := f.Properties[key]; taken {
			return f, fmt.Errorf("property %q is computed by the writer", key)
		}
		f.Properties[key] = v
	}
	return f, nil
}

// WriteOutlinesFile writes the outlines atomically to path (see
// WriteOutlines).
func WriteOutlinesFile(path string, outlines []Outline, meta *Meta) error {
	return WriteFile(path, func(w io.Writer) error { return WriteOutlines(w, outlines, meta) })
}
