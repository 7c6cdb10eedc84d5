package export

import (
	"bytes"
	"encoding/json"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"github.com/ctessum/geom/encoding/geojson"
	"gonum.org/v1/gonum/integrate/quad"

	"cmbflux/flux/contour"
)

// smallCircle returns n vertices at angular distance alpha (degrees) from
// (lon0, lat0), counter-clockwise seen from outside the sphere when ccw,
// by the destination-point formula of spherical trigonometry (common
// practice): lat = asin(sin p1 cos d + cos p1 sin d cos b),
// lon = l1 + atan2(sin b sin d cos p1, cos d - sin p1 sin lat).
func smallCircle(lon0, lat0, alpha float64, n int, ccw bool) [][2]float64 {
	p1, l1, d := lat0*deg, lon0*deg, alpha*deg
	out := make([][2]float64, n)
	for i := range n {
		b := 2 * math.Pi * float64(i) / float64(n) // bearing, clockwise from north
		if ccw {
			b = -b
		}
		lat := math.Asin(math.Sin(p1)*math.Cos(d) + math.Cos(p1)*math.Sin(d)*math.Cos(b))
		lon := l1 + math.Atan2(math.Sin(b)*math.Sin(d)*math.Cos(p1), math.Cos(d)-math.Sin(p1)*math.Sin(lat))
		out[i] = [2]float64{math.Remainder(lon/deg, 360), lat / deg}
	}
	return out
}

// capArea is the area of a spherical cap of angular radius alpha (degrees)
// on a sphere of radius r: 2 pi r^2 (1 - cos alpha) (Archimedes; any
// handbook of spherical geometry).
func capArea(r, alpha float64) float64 { return 2 * math.Pi * r * r * (1 - math.Cos(alpha*deg)) }

type fc struct {
	Type     string `json:"type"`
	Features []struct {
		Type     string          `json:"type"`
		Geometry json.RawMessage `json:"geometry"`
		Props    map[string]any  `json:"properties"`
	} `json:"features"`
}

type geometry struct {
	Type        string          `json:"type"`
	Coordinates json.RawMessage `json:"coordinates"`
}

func shoelace(r [][]float64) float64 {
	s := 0.0
	for i := 0; i+1 < len(r); i++ {
		s += r[i][0]*r[i+1][1] - r[i+1][0]*r[i][1]
	}
	return s / 2
}

// checkRFC7946 checks a Polygon or MultiPolygon against RFC 7946: positions
// of two numbers [lon, lat] with lon in [-180, 180] and lat in [-90, 90]
// (sections 3.1.1, 4), linear rings closed with at least four positions
// (3.1.6), exterior counter-clockwise and holes clockwise (3.1.6), and it
// must parse with ctessum/geom's GeoJSON decoder. It returns the polygons.
func checkRFC7946(t *testing.T, raw json.RawMessage) [][][][]float64 {
	t.Helper()
	var g geometry
	if err := json.Unmarshal(raw, &g); err != nil {
		t.Fatal(err)
	}
	var polys [][][][]float64
	switch g.Type {
	case "Polygon":
		var p [][][]float64
		if err := json.Unmarshal(g.Coordinates, &p); err != nil {
			t.Fatal(err)
		}
		polys = [][][][]float64{p}
	case "MultiPolygon":
		if err := json.Unmarshal(g.Coordinates, &polys); err != nil {
			t.Fatal(err)
		}
	default:
		t.Fatalf("geometry type %q", g.Type)
	}
	if _, err := geojson.Decode(raw); err != nil {
		t.Errorf("ctessum/geom cannot decode the geometry: %v", err)
	}
	for k, p := range polys {
		for i, r := range p {
			if len(r) < 4 {
				t.Errorf("polygon %d ring %d has %d positions, RFC 7946 3.1.6 wants >= 4", k, i, len(r))
				continue
			}
			if r[0][0] != r[len(r)-1][0] || r[0][1] != r[len(r)-1][1] {
				t.Errorf("polygon %d ring %d is not closed", k, i)
			}
			for _, q := range r {
				if len(q) != 2 || q[0] < -180 || q[0] > 180 || q[1] < -90 || q[1] > 90 {
					t.Fatalf("polygon %d ring %d: position %v outside [-180, 180] x [-90, 90]", k, i, q)
				}
			}
			if a := shoelace(r); i == 0 && a <= 0 || i > 0 && a >= 0 {
				t.Errorf("polygon %d ring %d: shoelace area %v: exterior must be counter-clockwise, holes clockwise", k, i, a)
			}
		}
	}
	return polys
}

func writeOne(t *testing.T, rings [][][2]float64, props map[string]any) (*fc, []byte) {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteOutlines(&buf, []Outline{{Rings: rings, Props: props}}, &Meta{RadiusKm: 3480, Units: "mW/m^2"}); err != nil {
		t.Fatal(err)
	}
	var c fc
	if err := json.Unmarshal(buf.Bytes(), &c); err != nil {
		t.Fatalf("%v\n%s", err, buf.String())
	}
	if c.Type != "FeatureCollection" || len(c.Features) != 1 || c.Features[0].Type != "Feature" {
		t.Fatalf("not a FeatureCollection of one Feature: %s", buf.String()[:200])
	}
	return &c, buf.Bytes()
}

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// A cap of radius 20 degrees centred on the antimeridian: RFC 7946 section
// 3.1.9 wants it cut into two polygons at 180 degrees; its area must match
// the spherical cap formula and its centroid the cap's centre.
func TestOutlineAcrossAntimeridian(t *testing.T) {
	const n, alpha, r = 1440, 20.0, 3480.0
	c, out := writeOne(t, [][][2]float64{smallCircle(180, 10, alpha, n, true)}, map[string]any{"level": -1.0})
	f := c.Features[0]
	polys := checkRFC7946(t, f.Geometry)
	if len(polys) != 2 {
		t.Fatalf("%d polygons, want 2 (cut at the antimeridian)", len(polys))
	}
	var sides [2]bool
	for _, p := range polys {
		lo, hi := 180.0, -180.0
		for _, q := range p[0] {
			lo, hi = math.Min(lo, q[0]), math.Max(hi, q[0])
		}
		sides[0] = sides[0] || hi == 180 && lo > 0
		sides[1] = sides[1] || lo == -180 && hi < 0
	}
	if !sides[0] || !sides[1] {
		t.Errorf("pieces do not end on +180 and -180: %v", sides)
	}
	// The inscribed polygon of n great-circle chords falls short of the
	// cap by a relative amount of order (pi/n)^2.
	want := capArea(r, alpha)
	if e := relErr(f.Props[PropAreaKm2].(float64), want); e > 2e-5 {
		t.Errorf("area %v km^2, cap formula %v (relative error %v)", f.Props[PropAreaKm2], want, e)
	}
	if e := relErr(f.Props[PropAreaFraction].(float64), want/(4*math.Pi*r*r)); e > 2e-5 {
		t.Errorf("area fraction %v", f.Props[PropAreaFraction])
	}
	lon, lat := f.Props[PropCentroidLon].(float64), f.Props[PropCentroidLat].(float64)
	if math.Abs(math.Abs(lon)-180) > 1e-6 || math.Abs(lat-10) > 1e-6 {
		t.Errorf("centroid (%v, %v), want (180, 10)", lon, lat)
	}
	if f.Props["level"] != -1.0 {
		t.Errorf("user property lost: %v", f.Props)
	}
	// Identical inputs, identical bytes.
	_, again := writeOne(t, [][][2]float64{smallCircle(180, 10, alpha, n, true)}, map[string]any{"level": -1.0})
	if !bytes.Equal(out, again) {
		t.Error("two writes differ")
	}
}

// A ring around the north pole, run eastward, bounds the polar cap; the
// polygon follows the map's top edge (latitude 90).
func TestOutlinePolarCap(t *testing.T) {
	const n, r = 3600, 3480.0
	ring := make([][2]float64, n)
	for i := range ring {
		ring[i] = [2]float64{-170 + 360*float64(i)/n, 70}
	}
	c, _ := writeOne(t, [][][2]float64{ring}, nil)
	f := c.Features[0]
	polys := checkRFC7946(t, f.Geometry)
	if len(polys) != 1 || len(polys[0]) != 1 {
		t.Fatalf("want one polygon without holes, got %d", len(polys))
	}
	top := 0
	for _, q := range polys[0][0] {
		if q[1] == 90 {
			top++
		}
	}
	if top != 2 {
		t.Errorf("%d vertices at latitude 90, want the two top corners", top)
	}
	// Great-circle chords between points of the latitude circle cut
	// slightly into the cap: relative error of order (pi/n)^2.
	if e := relErr(f.Props[PropAreaKm2].(float64), capArea(r, 20)); e > 1e-5 {
		t.Errorf("area %v, cap formula %v (relative error %v)", f.Props[PropAreaKm2], capArea(r, 20), e)
	}
	if lat := f.Props[PropCentroidLat].(float64); math.Abs(lat-90) > 1e-9 {
		t.Errorf("centroid latitude %v, want 90", lat)
	}
	// The same ring run westward bounds the rest of the sphere.
	for i, j := 0, n-1; i < j; i, j = i+1, j-1 {
		ring[i], ring[j] = ring[j], ring[i]
	}
	c, _ = writeOne(t, [][][2]float64{ring}, nil)
	checkRFC7946(t, c.Features[0].Geometry)
	if e := relErr(c.Features[0].Props[PropAreaKm2].(float64), 4*math.Pi*r*r-capArea(r, 20)); e > 1e-5 {
		t.Errorf("complement area %v", c.Features[0].Props[PropAreaKm2])
	}
}

// Two rings around the pole bound a zone between latitudes 60 and 70,
// area 2 pi R^2 (sin 70 - sin 60) (Archimedes' hat-box theorem).
func TestOutlineZone(t *testing.T) {
	const n, r = 3600, 3480.0
	var south, north [][2]float64
	for i := range n {
		south = append(south, [2]float64{360 * float64(i) / n, 60})
		north = append(north, [2]float64{-360 * float64(i) / n, 70})
	}
	c, _ := writeOne(t, [][][2]float64{north, south}, nil)
	polys := checkRFC7946(t, c.Features[0].Geometry)
	if len(polys) != 1 || len(polys[0]) != 1 {
		t.Fatalf("want one band polygon, got %v polygons", len(polys))
	}
	want := 2 * math.Pi * r * r * (math.Sin(70*deg) - math.Sin(60*deg))
	if e := relErr(c.Features[0].Props[PropAreaKm2].(float64), want); e > 1e-5 {
		t.Errorf("zone area %v, want %v", c.Features[0].Props[PropAreaKm2], want)
	}
}

// An annulus across the antimeridian: the hole is cut too, and the area is
// the difference of two caps.
func TestOutlineHoleAcrossAntimeridian(t *testing.T) {
	const r = 3480.0
	rings := [][][2]float64{smallCircle(175, -30, 25, 2000, true), smallCircle(-178, -31, 8, 1000, false)}
	c, _ := writeOne(t, rings, nil)
	polys := checkRFC7946(t, c.Features[0].Geometry)
	if len(polys) != 2 {
		t.Fatalf("%d polygons, want 2", len(polys))
	}
	if e := relErr(c.Features[0].Props[PropAreaKm2].(float64), capArea(r, 25)-capArea(r, 8)); e > 1e-4 {
		t.Errorf("area %v, want %v", c.Features[0].Props[PropAreaKm2], capArea(r, 25)-capArea(r, 8))
	}
	// A hole that does not cross: one polygon with one clockwise hole.
	rings = [][][2]float64{smallCircle(30, 0, 25, 500, true), smallCircle(32, 1, 5, 200, false)}
	c, _ = writeOne(t, rings, nil)
	polys = checkRFC7946(t, c.Features[0].Geometry)
	if len(polys) != 1 || len(polys[0]) != 2 {
		t.Fatalf("want one polygon with one hole, got %d polygons", len(polys))
	}
	// A lone clockwise ring is a hole in the whole sphere.
	c, _ = writeOne(t, [][][2]float64{smallCircle(30, 0, 5, 200, false)}, nil)
	polys = checkRFC7946(t, c.Features[0].Geometry)
	if len(polys) != 1 || len(polys[0]) != 2 {
		t.Fatalf("want the map rectangle with one hole, got %v", polys)
	}
}

func TestOutlineErrors(t *testing.T) {
	for name, o := range map[string]Outline{
		"two vertices": {Rings: [][][2]float64{{{0, 0}, {1, 1}}}},
		"latitude":     {Rings: [][][2]float64{{{0, 0}, {1, 95}, {2, 0}}}},
		"half turn":    {Rings: [][][2]float64{{{0, 0}, {180, 0}, {90, 10}}}},
		"reserved":     {Rings: [][][2]float64{{{0, 0}, {1, 0}, {1, 1}}}, Props: map[string]any{PropAreaKm2: 1}},
	} {
		err := WriteOutlines(&bytes.Buffer{}, []Outline{o}, nil)
		if err == nil {
			t.Errorf("%s: no error", name)
		} else if !strings.Contains(err.Error(), "outline 0") {
			t.Errorf("%s: error %q does not name the outline", name, err)
		}
	}
}

// Rings as flux/contour makes them from a gridded field, with vertices on
// the grid meridian at 180 degrees: a field that is the angular distance
// from (180, 0) has the region "below 25 degrees" as a cap of radius 25,
// whose area is 2 pi R^2 (1 - cos 25) (cap formula; the contour follows the
// circle to the grid's accuracy).
func TestOutlineFromContour(t *testing.T) {
	const nlon, nlat, r = 360, 181, 3480.0
	f := contour.Field{Lon0: 0, NLon: nlon}
	for i := range nlat {
		f.Lat = append(f.Lat, 90-float64(i))
	}
	for _, lat := range f.Lat {
		for j := range nlon {
			lon := float64(j) * 360 / nlon
			// great-circle distance from (180, 0) in degrees
			c := math.Cos(lat*deg) * math.Cos((lon-180)*deg)
			f.Values = append(f.Values, math.Acos(math.Max(-1, math.Min(1, c)))/deg)
		}
	}
	rings, err := contour.Below(f, 25)
	if err != nil {
		t.Fatal(err)
	}
	c, _ := writeOne(t, rings, nil)
	polys := checkRFC7946(t, c.Features[0].Geometry)
	if len(polys) != 2 {
		t.Fatalf("%d polygons, want the cap cut in two at the antimeridian", len(polys))
	}
	if e := relErr(c.Features[0].Props[PropAreaKm2].(float64), capArea(r, 25)); e > 1e-3 {
		t.Errorf("area %v, cap formula %v (relative error %v)", c.Features[0].Props[PropAreaKm2], capArea(r, 25), e)
	}
}

// Vertices exactly on the antimeridian, and a ring that only touches it.
func TestOutlineVerticesOnAntimeridian(t *testing.T) {
	square := [][2]float64{{170, 0}, {180, 0}, {190, 0}, {190, 10}, {180, 10}, {170, 10}}
	c, _ := writeOne(t, [][][2]float64{square}, nil)
	polys := checkRFC7946(t, c.Features[0].Geometry)
	if len(polys) != 2 {
		t.Fatalf("%d polygons, want 2", len(polys))
	}
	for _, p := range polys {
		if len(p[0]) != 5 {
			t.Errorf("piece %v, want a closed rectangle of 5 positions", p[0])
		}
	}
	touch := [][2]float64{{170, 0}, {180, 5}, {170, 10}}
	c, _ = writeOne(t, [][][2]float64{touch}, nil)
	polys = checkRFC7946(t, c.Features[0].Geometry)
	if len(polys) != 1 || len(polys[0][0]) != 4 {
		t.Fatalf("touching triangle became %v", polys)
	}
}

// Split outlines: one feature per patch, the antimeridian pieces kept in one
// patch, each area against the cap formula 2 pi R^2 (1 - cos alpha) and each
// centroid at its cap's centre.
func TestOutlineSplitPatches(t *testing.T) {
	const r = 3480.0
	caps := []struct{ lon, lat, alpha float64 }{{180, 10, 20}, {20, -40, 12}, {-90, 60, 8}}
	var rings [][][2]float64
	for _, c := range caps {
		rings = append(rings, smallCircle(c.lon, c.lat, c.alpha, 2000, true))
	}
	var buf bytes.Buffer
	if err := WriteOutlines(&buf, []Outline{{Rings: rings, Split: true, Props: map[string]any{"region": "demo"}}}, nil); err != nil {
		t.Fatal(err)
	}
	var c fc
	if err := json.Unmarshal(buf.Bytes(), &c); err != nil {
		t.Fatal(err)
	}
	if len(c.Features) != 3 {
		t.Fatalf("%d features, want 3 patches", len(c.Features))
	}
	found := 0
	for _, f := range c.Features {
		checkRFC7946(t, f.Geometry)
		if f.Props["region"] != "demo" || f.Props[PropPatch] == nil {
			t.Errorf("properties %v", f.Props)
		}
		lon, lat := f.Props[PropCentroidLon].(float64), f.Props[PropCentroidLat].(float64)
		for _, cp := range caps {
			if math.Abs(math.Remainder(lon-cp.lon, 360)) < 1e-3 && math.Abs(lat-cp.lat) < 1e-3 {
				found++
				// Straight lon-lat edges between points of a small circle
				// differ from it by a relative O((pi/n)^2) in area.
				if e := relErr(f.Props[PropAreaKm2].(float64), capArea(r, cp.alpha)); e > 1e-4 {
					t.Errorf("cap at (%v, %v): area %v, formula %v (relative error %v)", cp.lon, cp.lat, f.Props[PropAreaKm2], capArea(r, cp.alpha), e)
				}
			}
		}
	}
	if found != 3 {
		t.Errorf("%d of 3 centroids at their cap's centre", found)
	}
	// The polar cap as one patch: the exact zone area for an edge along a
	// latitude, 2 pi R^2 (1 - sin 70).
	var ring [][2]float64
	for i := range 36 {
		ring = append(ring, [2]float64{float64(i) * 10, 70})
	}
	buf.Reset()
	WriteOutlines(&buf, []Outline{{Rings: [][][2]float64{ring}, Split: true}}, &Meta{RadiusKm: r})
	json.Unmarshal(buf.Bytes(), &c)
	if len(c.Features) != 1 {
		t.Fatalf("%d features", len(c.Features))
	}
	if e := relErr(c.Features[0].Props[PropAreaKm2].(float64), capArea(r, 20)); e > 1e-13 {
		t.Errorf("polar cap area %v, want %v exactly (edges along the parallel)", c.Features[0].Props[PropAreaKm2], capArea(r, 20))
	}
}

// The 8-point Gauss-Legendre rule in patches.go (Abramowitz & Stegun 1964,
// table 25.4) against gonum's integrate/quad.
func TestGaussLegendreTable(t *testing.T) {
	x, w := make([]float64, 8), make([]float64, 8)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	if x[0] > x[7] { // gonum lists the nodes from +1 down
		slices.Reverse(x)
		slices.Reverse(w)
	}
	for i := range x {
		if math.Abs(x[i]-glNodes[i]) > 1e-15 || math.Abs(w[i]-glWeights[i]) > 1e-15 {
			t.Errorf("node %d: (%v, %v), gonum (%v, %v)", i, glNodes[i], glWeights[i], x[i], w[i])
		}
	}
}

// A clockwise ring across the antimeridian is a hole in the whole sphere: the
// map rectangle with a notch on each side, plus a hole elsewhere.
func TestOutlineWorldWithHoleAcrossAntimeridian(t *testing.T) {
	const r = 3480.0
	rings := [][][2]float64{smallCircle(180, 0, 10, 720, false), smallCircle(0, 0, 10, 720, false)}
	c, _ := writeOne(t, rings, nil)
	polys := checkRFC7946(t, c.Features[0].Geometry)
	if len(polys) != 1 || len(polys[0]) != 2 {
		t.Fatalf("want one polygon (rectangle with notches) with one hole, got %d polygons", len(polys))
	}
	want := 4*math.Pi*r*r - 2*capArea(r, 10)
	if e := relErr(c.Features[0].Props[PropAreaKm2].(float64), want); e > 1e-5 {
		t.Errorf("area %v, want %v", c.Features[0].Props[PropAreaKm2], want)
	}
}

// Random caps anywhere (across the antimeridian, around or through a pole),
// either orientation: every output must be valid RFC 7946, and the areas
// of the split patches (lon-lat edges) must agree with the whole outline's
// (great-circle edges) to the discretisation error.
func TestOutlineRandomCaps(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for k := range 120 {
		lon, lat := rng.Float64()*360-180, math.Asin(2*rng.Float64()-1)/deg
		alpha := 1 + rng.Float64()*60
		ccw := rng.IntN(2) == 0
		if k%10 == 0 {
			lon = 180 // right on the antimeridian
		}
		rings := [][][2]float64{smallCircle(lon, lat, alpha, 720, ccw)}
		var buf bytes.Buffer
		err := WriteOutlines(&buf, []Outline{{Rings: rings}, {Rings: rings, Split: true}}, nil)
		if err != nil {
			t.Fatalf("cap (%v, %v, %v, ccw=%v): %v", lon, lat, alpha, ccw, err)
		}
		var c fc
		if err := json.Unmarshal(buf.Bytes(), &c); err != nil {
			t.Fatal(err)
		}
		whole := c.Features[0].Props[PropAreaKm2].(float64)
		sum := 0.0
		for _, f := range c.Features {
			checkRFC7946(t, f.Geometry)
		}
		for _, f := range c.Features[1:] {
			sum += f.Props[PropAreaKm2].(float64)
		}
		want := capArea(DefaultRadiusKm, alpha)
		if !ccw {
			want = 4*math.Pi*DefaultRadiusKm*DefaultRadiusKm - want
		}
		// 720 vertices: chords and lon-lat lines stay within 1e-3 of the
		// circle's area even for caps through a pole.
		if e := relErr(whole, want); e > 1e-4 {
			t.Errorf("cap (%v, %v, %v, ccw=%v): area %v, want %v", lon, lat, alpha, ccw, whole, want)
		}
		if e := relErr(sum, want); e > 1e-3 {
			t.Errorf("cap (%v, %v, %v, ccw=%v): split area %v, want %v", lon, lat, alpha, ccw, sum, want)
		}
	}
}
