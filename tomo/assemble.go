package tomo

import (
	"fmt"
	"math"
	"sort"
)

// Tolerances used when assembling scattered points into a regular grid.
const (
	// coordMergeTol: coordinates closer than this (degrees or km) are the
	// same coordinate (printing noise).
	coordMergeTol = 1e-6
	// spacingTol: a step may differ from the smallest step by this
	// fraction of the step and still count as regular (covers coordinates
	// printed with two decimals on a 1/3-degree grid).
	spacingTol = 0.05
	// depthTooDeep: a depth axis whose values all exceed this (km) is
	// probably a radius axis (common practice: mantle models end at the
	// CMB, 2891 km in PREM).
	depthTooDeep = CMBDepthKm + 50
)

// coordTable collects the distinct values of one coordinate in order of
// first appearance.
type coordTable struct {
	vals     []float64
	first    []int // first record index carrying the value
	index    map[uint64]uint32
	lastBits uint64
	lastID   uint32
	have     bool
}

// id returns the identifier of v, adding it when new; rec is the record
// index (kept for error messages).
func (t *coordTable) id(v float64, rec int) uint32 {
	if v == 0 {
		v = 0 // fold -0 into +0
	}
	bits := math.Float64bits(v)
	if t.have {
		if bits == t.lastBits {
			return t.lastID
		}
		// Files usually cycle through a coordinate in order: try the value
		// after the last one, then the first, before the map.
		for _, n := range [2]uint32{t.lastID + 1, 0} {
			if int(n) < len(t.vals) && math.Float64bits(t.vals[n]) == bits {
				t.lastBits, t.lastID = bits, n
				return n
			}
		}
	}
	id, ok := t.index[bits]
	if !ok {
		if t.index == nil {
			t.index = make(map[uint64]uint32)
		}
		id = uint32(len(t.vals))
		t.vals = append(t.vals, v)
		t.first = append(t.first, rec)
		t.index[bits] = id
	}
	t.lastBits, t.lastID, t.have = bits, id, true
	return id
}

// builder assembles scattered (lon, lat[, depth], value) records into a
// Grid. Readers add records with add and finish with build.
type builder struct {
	file     string
	hasDepth bool
	radius   bool // the vertical coordinate is a radius
	explicit bool // the vertical role was named by the user or the file
	missing  []float64
	lon      coordTable
	lat      coordTable
	dep      coordTable
	lonID    []uint32
	latID    []uint32
	depID    []uint32
	val      []float64
	// line returns the 1-based line number of record rec.
	line func(rec int) int
}

// reserve makes room for n records (an upper bound such as the number of
// lines), so that add does not grow its slices (a grid without depth pays 4
// unused bytes a line for the depth slice).
func (b *builder) reserve(n int) {
	b.lonID = make([]uint32, 0, n)
	b.latID = make([]uint32, 0, n)
	b.depID = make([]uint32, 0, n)
	b.val = make([]float64, 0, n)
}

// add appends one record. Coordinates must be finite; a value equal to a
// missing-value sentinel is stored as NaN.
func (b *builder) add(lon, lat, dep, v float64) {
	rec := len(b.val)
	b.lonID = append(b.lonID, b.lon.id(lon, rec))
	b.latID = append(b.latID, b.lat.id(lat, rec))
	if b.hasDepth {
		b.depID = append(b.depID, b.dep.id(dep, rec))
	}
	if isMissing(v, b.missing) {
		v = math.NaN()
	}
	b.val = append(b.val, v)
}

// axis is a sorted, merged coordinate axis.
type axis struct {
	centres  []float64 // sorted cluster centres
	of       []int     // raw id -> cluster index
	firstRec []int     // per cluster: the earliest record
}

// clusterAxis sorts the raw values and merges those within coordMergeTol.
func clusterAxis(raw []float64, first []int) axis {
	ids := make([]int, len(raw))
	for i := range ids {
		ids[i] = i
	}
	sort.Slice(ids, func(a, b int) bool { return raw[ids[a]] < raw[ids[b]] })
	ax := axis{of: make([]int, len(raw))}
	sum, cnt := 0.0, 0
	for n, id := range ids {
		if n == 0 || raw[id]-raw[ids[n-1]] > coordMergeTol {
			if cnt > 0 {
				ax.centres[len(ax.centres)-1] = sum / float64(cnt)
			}
			ax.centres = append(ax.centres, raw[id])
			ax.firstRec = append(ax.firstRec, first[id])
			sum, cnt = 0, 0
		}
		c := len(ax.centres) - 1
		sum += raw[id]
		cnt++
		ax.of[id] = c
		if first[id] < ax.firstRec[c] {
			ax.firstRec[c] = first[id]
		}
	}
	if cnt > 0 {
		ax.centres[len(ax.centres)-1] = sum / float64(cnt)
	}
	return ax
}

// clean rounds v to 1e-9 so that snapped coordinates print simply.
func clean(v float64) float64 { return math.Round(v*1e9) / 1e9 }

// regular checks that the sorted centres are evenly spaced and returns the
// snapped coordinates. what is "longitude" or "latitude".
func (b *builder) regular(ax axis, what string, global bool) ([]float64, error) {
	c := ax.centres
	n := len(c)
	if n < 2 {
		return nil, inputErr(b.file, b.line(ax.firstRec[0]),
			"every point has %s %g: a grid needs at least two %ss to set its spacing", what, c[0], what)
	}
	dmin := math.Inf(1)
	for i := 1; i < n; i++ {
		dmin = math.Min(dmin, c[i]-c[i-1])
	}
	for i := 1; i < n; i++ {
		step := c[i] - c[i-1]
		ratio := step / dmin
		if math.Abs(ratio-1) <= spacingTol {
			continue
		}
		k := math.Round(ratio)
		if k >= 2 && math.Abs(ratio-k) <= spacingTol*k {
			return nil, inputErr(b.file, b.line(ax.firstRec[i]),
				"%ss jump from %g to %g, %g times the spacing %g elsewhere: %d %s value(s) are missing; every grid point must be present (write NaN where there is no data)",
				what, c[i-1], c[i], k, dmin, int(k)-1, what)
		}
		return nil, inputErr(b.file, b.line(ax.firstRec[i]),
			"the %s step from %g to %g is %g, but the smallest step is %g: the grid must be evenly spaced",
			what, c[i-1], c[i], step, dmin)
	}
	d := (c[n-1] - c[0]) / float64(n-1)
	if global {
		wrap := c[0] + 360 - c[n-1]
		if math.Abs(wrap/d-1) > spacingTol {
			want := int(math.Round(360 / d))
			return nil, inputErr(b.file, 0,
				"longitudes cover %g..%g in %d columns at spacing %g, but a global grid at this spacing has %d columns: the missing longitudes must be present (write NaN where there is no data)",
				c[0], c[n-1], n, d, want)
		}
		d = 360 / float64(n)
	}
	off := 0.0
	for i, v := range c {
		off += v - float64(i)*d
	}
	off /= float64(n)
	out := make([]float64, n)
	for i := range out {
		out[i] = clean(off + float64(i)*d)
	}
	return out, nil
}

// build assembles the records into a Grid (without Source, Name, Units).
func (b *builder) build() (*Grid, error) {
	if len(b.val) == 0 {
		return nil, inputErr(b.file, 0, "no data records")
	}
	g := &Grid{}

	// Latitude range first: a swapped column shows here.
	for id, v := range b.lat.vals {
		if v < -90 || v > 90 {
			hint := ""
			if v >= -180 && v <= 360 {
				hint = " (if latitude and longitude are swapped, name the columns: a '# columns: lat lon ...' line in a text file, or the CSV header)"
			}
			return nil, inputErr(b.file, b.line(b.lat.first[id]), "latitude %g is outside -90..90 degrees%s", v, hint)
		}
	}
	// Longitudes: range, convention, wrap to [0, 360).
	rawLon := b.lon.vals
	negRec, overRec := -1, -1
	var negV, overV float64
	for id, v := range rawLon {
		rec := b.lon.first[id]
		if v < -180 || v > 360 {
			return nil, inputErr(b.file, b.line(rec), "longitude %g is outside -180..360 degrees", v)
		}
		if v < 0 && (negRec < 0 || rec < negRec) {
			negRec, negV = rec, v
		}
		if v > 180 && (overRec < 0 || rec < overRec) {
			overRec, overV = rec, v
		}
	}
	if negRec >= 0 && overRec >= 0 {
		return nil, inputErr(b.file, b.line(max(negRec, overRec)),
			"mixed longitude conventions: line %d has longitude %g (-180..180) and line %d has %g (0..360); use one convention throughout the file",
			b.line(negRec), negV, b.line(overRec), overV)
	}
	wrapped := make([]float64, len(rawLon))
	for id, v := range rawLon {
		w := math.Mod(v, 360)
		if w < 0 {
			w += 360
		}
		if w >= 360-coordMergeTol {
			w = 0
		}
		wrapped[id] = w
	}
	if negRec >= 0 {
		g.Notes = append(g.Notes, "longitudes converted from the -180..180 convention to 0..360")
	}
	lonAx := clusterAxis(wrapped, b.lon.first)
	lon, err := b.regular(lonAx, "longitude", true)
	if err != nil {
		return nil, err
	}
	g.Lon = lon

	// Latitudes.
	latAx := clusterAxis(b.lat.vals, b.lat.first)
	lat, err := b.regular(latAx, "latitude", false)
	if err != nil {
		return nil, err
	}
	for j, v := range lat {
		lat[j] = math.Max(-90, math.Min(90, v))
	}
	g.Lat = lat
	if lv := b.lat.vals; len(lv) > 1 && lv[0] > lv[len(lv)-1] {
		g.Notes = append(g.Notes, "latitudes run from north to south in the file; stored from south to north")
	}
	g.Reg = registration(g.Lon, lat)
	dlat := g.DLat()
	south, north := math.Max(-90, lat[0]-dlat/2), math.Min(90, lat[len(lat)-1]+dlat/2)
	if south > -90+1e-6 || north < 90-1e-6 {
		g.Warnings = append(g.Warnings, fmt.Sprintf(
			"latitudes %g..%g cover only %g..%g degrees (each point standing for half a step either side): the polar caps beyond are treated as missing data",
			lat[0], lat[len(lat)-1], south, north))
	}

	// Depths.
	var depAx axis
	if b.hasDepth {
		raw := b.dep.vals
		conv := make([]float64, len(raw))
		allDeep := true
		for id, v := range raw {
			rec := b.dep.first[id]
			if b.radius {
				if v <= 0 || v > EarthRadiusKm {
					return nil, inputErr(b.file, b.line(rec), "radius %g km is outside 0..%g km", v, EarthRadiusKm)
				}
				conv[id] = DepthOfRadius(v)
				continue
			}
			if v < 0 || v >= EarthRadiusKm {
				hint := " (if this column is a radius, name it radius)"
				if v >= EarthRadiusKm {
					hint = " (if the depths are in metres, say so in the column name: depth(m) in a '# columns:' line, or depth (m) in a CSV header)"
				}
				if v < 0 {
					hint = " (depths are positive downwards; a height or elevation axis must be converted to depth first)"
				}
				return nil, inputErr(b.file, b.line(rec), "depth %g km is outside 0..%g km%s", v, EarthRadiusKm, hint)
			}
			if v <= depthTooDeep {
				allDeep = false
			}
			conv[id] = v
		}
		if !b.radius && !b.explicit && allDeep {
			return nil, inputErr(b.file, b.line(b.dep.first[0]),
				"every depth is below the core-mantle boundary (%g km): the third coordinate looks like a radius; name the column radius (a '# columns: lon lat radius value' line in a text file) or set the vertical coordinate to radius",
				CMBDepthKm)
		}
		if b.radius {
			g.Notes = append(g.Notes, fmt.Sprintf("radius converted to depth as %g km - r", EarthRadiusKm))
		}
		depAx = clusterAxis(conv, b.dep.first)
		g.Depth = make([]float64, len(depAx.centres))
		for k, v := range depAx.centres {
			g.Depth[k] = clean(v)
		}
	} else {
		depAx = axis{centres: []float64{0}}
	}

	// Placement.
	nlon, nlat, nd := len(g.Lon), len(g.Lat), len(depAx.centres)
	total := nlon * nlat * nd
	slot := func(r int) int {
		k := 0
		if b.hasDepth {
			k = depAx.of[b.depID[r]]
		}
		return (k*nlat+latAx.of[b.latID[r]])*nlon + lonAx.of[b.lonID[r]]
	}
	if float64(nlon)*float64(nlat)*float64(nd) > float64(len(b.val)) { // float: no overflow
		// Fewer records than points: the grid is incomplete. Find the first
		// missing point without allocating the (possibly huge) grid.
		filled := make(map[int]bool, len(b.val))
		for r := range b.val {
			filled[slot(r)] = true
		}
		s := 0
		for filled[s] {
			s++
		}
		return nil, b.incomplete(g, s, float64(nlon)*float64(nlat)*float64(nd)-float64(len(filled)), float64(nlon)*float64(nlat)*float64(nd), nlat, nlon)
	}
	g.Values = make([]float64, total)
	owner := make([]int32, total) // record that filled each point, -1 if none
	for s := range owner {
		owner[s] = -1
	}
	dups, seams, firstDup := 0, 0, -1
	for r, v := range b.val {
		s := slot(r)
		if owner[s] < 0 {
			g.Values[s] = v
			owner[s] = int32(r)
			continue
		}
		r0 := int(owner[s])
		seam := math.Abs(rawLon[b.lonID[r0]]-rawLon[b.lonID[r]]) > 180
		old := g.Values[s]
		if old == v || (math.IsNaN(old) && math.IsNaN(v)) {
			if seam {
				seams++
			} else {
				dups++
				if firstDup < 0 {
					firstDup = r
				}
			}
			continue
		}
		if seam {
			return nil, inputErr(b.file, b.line(r),
				"longitude %g duplicates longitude %g of line %d (the same meridian) at latitude %g with a different value (%g, not %g); drop the repeated seam column or make it equal",
				rawLon[b.lonID[r]], rawLon[b.lonID[r0]], b.line(r0), b.lat.vals[b.latID[r]], v, old)
		}
		return nil, inputErr(b.file, b.line(r),
			"duplicate point (lon %g, lat %g%s) conflicts with line %d: value %g here, %g there",
			rawLon[b.lonID[r]], b.lat.vals[b.latID[r]], b.depthText(r), b.line(r0), v, old)
	}
	if seams > 0 {
		g.Notes = append(g.Notes, fmt.Sprintf("%d points of a repeated seam column (longitude 0 = 360, or -180 = 180) merged: their values are equal", seams))
	}
	if dups > 0 {
		g.Warnings = append(g.Warnings, fmt.Sprintf("%d duplicate points with identical values merged (the first at line %d)", dups, b.line(firstDup)))
	}
	for s, o := range owner {
		if o >= 0 {
			continue
		}
		missing := 0
		for _, o := range owner {
			if o < 0 {
				missing++
			}
		}
		return nil, b.incomplete(g, s, float64(missing), float64(total), nlat, nlon)
	}

	// Validity mask.
	bad := 0
	for _, v := range g.Values {
		if math.IsNaN(v) {
			bad++
		}
	}
	if bad == total {
		return nil, inputErr(b.file, 0, "all %d values are missing (NaN or a missing-value sentinel): there is no data to use", total)
	}
	if bad > 0 {
		g.Valid = make([]bool, total)
		for s, v := range g.Values {
			g.Valid[s] = !math.IsNaN(v)
		}
		for k := 0; k < nd && b.hasDepth; k++ {
			any := false
			for _, ok := range g.Valid[k*nlat*nlon : (k+1)*nlat*nlon] {
				any = any || ok
			}
			if !any {
				g.Warnings = append(g.Warnings, fmt.Sprintf("depth level %g km has no valid data", g.Depth[k]))
			}
		}
	}
	if w := poleWarning(g); w != "" {
		g.Warnings = append(g.Warnings, w)
	}
	return g, nil
}

// incomplete reports the missing point s of a grid with missing of total
// points absent (counts as float64: the product of the axis lengths of a
// hostile file may overflow int).
func (b *builder) incomplete(g *Grid, s int, missing, total float64, nlat, nlon int) error {
	k, j, i := s/(nlat*nlon), (s/nlon)%nlat, s%nlon
	where := fmt.Sprintf("lon %g, lat %g", g.Lon[i], g.Lat[j])
	combo := "lon-lat"
	if b.hasDepth {
		where += fmt.Sprintf(", depth %g km", g.Depth[k])
		combo = "lon-lat-depth"
	}
	return inputErr(b.file, 0,
		"the grid is incomplete: %.0f of %.0f points are missing, the first at %s; every %s combination must appear once (write NaN where there is no data)",
		missing, total, where, combo)
}

// depthText returns ", depth D km" (or ", radius R km") for record r, or "".
func (b *builder) depthText(r int) string {
	if !b.hasDepth {
		return ""
	}
	if b.radius {
		return fmt.Sprintf(", radius %g km", b.dep.vals[b.depID[r]])
	}
	return fmt.Sprintf(", depth %g km", b.dep.vals[b.depID[r]])
}

// registration applies the rule documented on ReadText to ascending,
// evenly spaced latitudes and longitudes: cell-registered when every
// latitude lies half a step from the poles' lattice, -90 + (j + 1/2)*dlat
// (so that no point lies on a pole), and every longitude half a step from
// the lattice through 0 E, (i + 1/2)*dlon; node-registered otherwise.
func registration(lon, lat []float64) Registration {
	if len(lat) < 2 || len(lon) < 1 {
		return NodeRegistered
	}
	half := func(v, origin, d float64) bool {
		f := (v - origin) / d
		return math.Abs(f-math.Floor(f)-0.5) <= spacingTol
	}
	d := (lat[len(lat)-1] - lat[0]) / float64(len(lat)-1)
	for _, v := range lat {
		if math.Abs(math.Abs(v)-90) < 1e-6 || !half(v, -90, d) {
			return NodeRegistered
		}
	}
	dlon := 360 / float64(len(lon))
	for _, v := range lon {
		if !half(v, 0, dlon) {
			return NodeRegistered
		}
	}
	return CellRegistered
}
