package tomo

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"slices"
	"strings"

	"cmbflux/tomo/netcdf"
)

// ReadNetCDF reads a tomography grid from the netCDF classic file (CDF-1,
// CDF-2 or CDF-5) whose bytes are data; name is the path used in messages
// and in Grid.Source. It follows the CF Conventions 1.8:
//
//   - Longitude and latitude are the one-dimensional variables with units
//     degrees_east or degrees_north (or their variants, CF-1.8 sections
//     4.1 and 4.2) or standard_name longitude or latitude, unless
//     opts.LonName and opts.LatName name them.
//   - A third dimension is a depth axis (units km or m, positive down) or
//     a radius axis (a name, standard_name or long_name containing
//     "radius"; depth = 6371 km - radius, PREM); opts.DepthName names it
//     explicitly. Dimensions of length 1 without such a coordinate are
//     ignored.
//   - The value variable is opts.Var, or the only variable with the
//     longitude and latitude dimensions; with several candidates the error
//     lists them.
//   - _FillValue (or the type's default fill value when it is absent),
//     missing_value, valid_min, valid_max and valid_range mark invalid
//     values (CF-1.8 section 2.5.1), compared with the stored values;
//     scale_factor and add_offset are then applied (CF-1.8 section 8.1).
//
// The grid returned has Lat ascending, Lon in [0, 360) ascending (a
// longitude column repeated 360 degrees after the first is dropped), and
// Depth in km ascending (nil without a depth axis), with the values
// reordered to match. Reg is CellRegistered when the longitude or
// latitude variable has a bounds attribute (CF-1.8 section 7.1) or the
// coordinates sit at half steps from 0 E and from the South Pole, and
// NodeRegistered otherwise. Coordinates must be strictly monotonic, evenly
// spaced and free of fill values (CF-1.8 section 1.2, coordinate variable).
//
// Errors are *InputError wrapping ErrBadInput; header problems carry the
// *netcdf.FormatError with its byte offset and field.
func ReadNetCDF(name string, data []byte, opts ReadOptions) (*Grid, error) {
	f, err := netcdf.DecodeBytes(data)
	if err != nil {
		return nil, &InputError{File: name, Err: err}
	}
	// Hash on a second core while the values are decoded.
	sum := make(chan [sha256.Size]byte, 1)
	go func() { sum <- sha256.Sum256(data) }()
	r := &ncReader{name: name, f: f, opts: opts}
	g, err := r.read()
	h := <-sum
	if err != nil {
		return nil, err
	}
	g.Source = Provenance{Path: name, SHA256: hex.EncodeToString(h[:]), Format: ncFormat(f.Version)}
	return g, nil
}

func ncFormat(v netcdf.Version) string {
	switch v {
	case netcdf.CDF1:
		return "netcdf-cdf1"
	case netcdf.CDF2:
		return "netcdf-cdf2"
	}
	return "netcdf-cdf5"
}

type ncReader struct {
	name string
	f    *netcdf.File
	opts ReadOptions
}

func (r *ncReader) fail(v string, format string, args ...any) error {
	return &InputError{File: r.name, Var: v, Err: fmt.Errorf(format, args...)}
}

// ncText returns the text of attribute a of v, or "".
func ncText(v *netcdf.Var, a string) string {
	if at := v.Attr(a); at != nil {
		return strings.TrimSpace(at.Text())
	}
	return ""
}

// Units accepted for longitude and latitude, CF-1.8 sections 4.1 and 4.2.
var (
	ncLonUnits = []string{"degrees_east", "degree_east", "degree_E", "degrees_E", "degreeE", "degreesE"}
	ncLatUnits = []string{"degrees_north", "degree_north", "degree_N", "degrees_N", "degreeN", "degreesN"}
)

func ncIsLon(v *netcdf.Var) bool {
	return len(v.Dims) == 1 && (slices.Contains(ncLonUnits, ncText(v, "units")) || ncText(v, "standard_name") == "longitude")
}

func ncIsLat(v *netcdf.Var) bool {
	return len(v.Dims) == 1 && (slices.Contains(ncLatUnits, ncText(v, "units")) || ncText(v, "standard_name") == "latitude")
}

// ncLengthFactor returns the factor from the units of a length to km, or 0
// when the units are not a length (UDUNITS names, common practice).
func ncLengthFactor(units string) float64 {
	switch strings.ToLower(units) {
	case "km", "kilometer", "kilometers", "kilometre", "kilometres":
		return 1
	case "m", "meter", "meters", "metre", "metres":
		return 1e-3
	}
	return 0
}

// coordFor returns the one-dimensional variable over dimension dim: the
// coordinate variable named like it (CF-1.8 section 1.2), else the only
// 1-D variable over it that is recognised by ok.
func (r *ncReader) coordFor(dim string, ok func(*netcdf.Var) bool) *netcdf.Var {
	if v := r.f.Var(dim); v != nil && len(v.Dims) == 1 && v.Dims[0] == dim {
		return v
	}
	var found *netcdf.Var
	for _, v := range r.f.Vars {
		if len(v.Dims) == 1 && v.Dims[0] == dim && ok(v) {
			if found != nil {
				return nil
			}
			found = v
		}
	}
	return found
}

func (r *ncReader) named(what, n string) (*netcdf.Var, error) {
	v := r.f.Var(n)
	if v == nil {
		return nil, r.fail(n, "no such variable (given as the %s variable); the file has %s", what, r.varList())
	}
	if len(v.Dims) != 1 {
		return nil, r.fail(n, "the %s variable must have one dimension, it has %d", what, len(v.Dims))
	}
	return v, nil
}

func (r *ncReader) varList() string {
	var s []string
	for _, v := range r.f.Vars {
		s = append(s, fmt.Sprintf("%s(%s)", v.Name, strings.Join(v.Dims, ",")))
	}
	if len(s) == 0 {
		return "no variables"
	}
	return "variables " + strings.Join(s, ", ")
}

func (r *ncReader) read() (*Grid, error) {
	f := r.f
	// Longitude and latitude variables.
	var lonVars, latVars []*netcdf.Var
	if r.opts.LonName != "" {
		v, err := r.named("longitude", r.opts.LonName)
		if err != nil {
			return nil, err
		}
		lonVars = []*netcdf.Var{v}
	}
	if r.opts.LatName != "" {
		v, err := r.named("latitude", r.opts.LatName)
		if err != nil {
			return nil, err
		}
		latVars = []*netcdf.Var{v}
	}
	for _, v := range f.Vars {
		if r.opts.LonName == "" && ncIsLon(v) {
			lonVars = append(lonVars, v)
		}
		if r.opts.LatName == "" && ncIsLat(v) {
			latVars = append(latVars, v)
		}
	}
	if len(lonVars) == 0 || len(latVars) == 0 {
		for _, v := range f.Vars {
			u := ncText(v, "units")
			if len(v.Dims) > 1 && (slices.Contains(ncLonUnits, u) || slices.Contains(ncLatUnits, u)) {
				return nil, r.fail(v.Name, "coordinate variable has %d dimensions (%s): a curvilinear grid; resample it to a regular longitude-latitude grid with one-dimensional coordinates", len(v.Dims), strings.Join(v.Dims, ", "))
			}
		}
	}
	if len(lonVars) == 0 {
		return nil, r.fail("", "no longitude coordinate variable: none has units degrees_east (CF-1.8 section 4.2) or standard_name longitude; name it with the longitude-variable option (file has %s)", r.varList())
	}
	if len(latVars) == 0 {
		return nil, r.fail("", "no latitude coordinate variable: none has units degrees_north (CF-1.8 section 4.1) or standard_name latitude; name it with the latitude-variable option (file has %s)", r.varList())
	}
	findIn := func(vs []*netcdf.Var, dims []string) *netcdf.Var {
		for _, c := range vs {
			if slices.Contains(dims, c.Dims[0]) {
				return c
			}
		}
		return nil
	}

	// The value variable.
	var val *netcdf.Var
	if r.opts.Var != "" {
		val = f.Var(r.opts.Var)
		if val == nil {
			return nil, r.fail(r.opts.Var, "no such variable; the file has %s", r.varList())
		}
	} else {
		var cands []*netcdf.Var
		for _, v := range f.Vars {
			if len(v.Dims) >= 2 && v.Type != netcdf.Char && findIn(lonVars, v.Dims) != nil && findIn(latVars, v.Dims) != nil {
				cands = append(cands, v)
			}
		}
		switch len(cands) {
		case 0:
			return nil, r.fail("", "no variable over the longitude and latitude dimensions (file has %s)", r.varList())
		case 1:
			val = cands[0]
		default:
			var names []string
			for _, c := range cands {
				names = append(names, c.Name)
			}
			return nil, r.fail("", "%d candidate value variables (%s); name the one to read with the variable option", len(cands), strings.Join(names, ", "))
		}
	}
	if val.Type == netcdf.Char {
		return nil, r.fail(val.Name, "is a char (text) variable, not numbers")
	}
	lonV, latV := findIn(lonVars, val.Dims), findIn(latVars, val.Dims)
	if lonV == nil || latV == nil {
		return nil, r.fail(val.Name, "dimensions (%s) do not include both the longitude and the latitude dimension", strings.Join(val.Dims, ", "))
	}
	if lonV.Dims[0] == latV.Dims[0] {
		return nil, r.fail(val.Name, "longitude %s and latitude %s share dimension %s; a regular grid needs one dimension each", lonV.Name, latV.Name, lonV.Dims[0])
	}

	// The depth axis and any other dimensions.
	shape := f.Shape(val)
	ilon, ilat, iz := -1, -1, -1
	var zV *netcdf.Var
	var zDepthName string
	if r.opts.DepthName != "" {
		v, err := r.named("depth", r.opts.DepthName)
		if err != nil {
			return nil, err
		}
		zDepthName = v.Dims[0]
		zV = v
	}
	for d, dn := range val.Dims {
		if slices.Index(val.Dims, dn) != d {
			return nil, r.fail(val.Name, "dimension %s appears twice in (%s); a grid needs each dimension once", dn, strings.Join(val.Dims, ", "))
		}
		switch {
		case dn == lonV.Dims[0]:
			ilon = d
		case dn == latV.Dims[0]:
			ilat = d
		case zDepthName != "" && dn == zDepthName:
			iz = d
		default:
			c := r.coordFor(dn, func(v *netcdf.Var) bool { return ncLengthFactor(ncText(v, "units")) != 0 })
			isZ := zDepthName == "" && c != nil && ncLengthFactor(ncText(c, "units")) != 0
			if isZ && iz < 0 {
				iz, zV = d, c
				continue
			}
			if shape[d] == 1 {
				continue
			}
			if c == nil {
				return nil, r.fail(val.Name, "dimension %s (length %d) has no coordinate variable; a third dimension must be depth or radius with units km or m", dn, shape[d])
			}
			return nil, r.fail(val.Name, "dimension %s (length %d, coordinate %s with units %q) is not longitude, latitude, or a depth or radius axis with units km or m", dn, shape[d], c.Name, ncText(c, "units"))
		}
	}
	if ilon < 0 || ilat < 0 {
		return nil, r.fail(val.Name, "dimensions (%s) do not include both the longitude and the latitude dimension", strings.Join(val.Dims, ", "))
	}
	if zDepthName != "" && iz < 0 {
		return nil, r.fail(val.Name, "dimensions (%s) do not include the depth variable's dimension %s", strings.Join(val.Dims, ", "), zDepthName)
	}

	for d, n := range shape {
		if n == 0 {
			return nil, r.fail(val.Name, "dimension %s has length 0: the variable holds no data", val.Dims[d])
		}
	}

	// Coordinates.
	lon, err := r.coord(lonV)
	if err != nil {
		return nil, err
	}
	lat, err := r.coord(latV)
	if err != nil {
		return nil, err
	}
	if int64(len(lon)) != shape[ilon] || int64(len(lat)) != shape[ilat] {
		return nil, r.fail(val.Name, "coordinate lengths differ from the variable's shape")
	}
	if len(lon) < 2 || len(lat) < 2 {
		return nil, r.fail(val.Name, "grid of %d longitudes by %d latitudes; at least 2 of each are needed", len(lon), len(lat))
	}
	latIdx, err := r.ascending(latV.Name, lat)
	if err != nil {
		return nil, err
	}
	for _, y := range lat {
		if y < -90 || y > 90 {
			return nil, r.fail(latV.Name, "latitude %g outside [-90, 90]", y)
		}
	}
	lonIdx, err := r.lonOrder(lonV.Name, lon)
	if err != nil {
		return nil, err
	}
	g := &Grid{Name: val.Name, Units: ncText(val, "units")}
	g.Lat = make([]float64, len(latIdx))
	for j, s := range latIdx {
		g.Lat[j] = lat[s]
	}
	g.Lon = make([]float64, len(lonIdx))
	for i, s := range lonIdx {
		g.Lon[i] = math.Mod(math.Mod(lon[s], 360)+360, 360)
	}
	for i := 1; i < len(g.Lon); i++ {
		if !(g.Lon[i] > g.Lon[i-1]) {
			return nil, r.fail(lonV.Name, "longitudes do not stay distinct and ascending once brought into [0, 360) (%g after %g); the spacing is too small or the values too large", g.Lon[i], g.Lon[i-1])
		}
	}
	if err := r.even(latV.Name, g.Lat); err != nil {
		return nil, err
	}
	if err := r.even(lonV.Name, g.Lon); err != nil {
		return nil, err
	}
	zIdx := []int{0}
	if iz >= 0 {
		if g.Depth, zIdx, err = r.depth(zV, shape[iz]); err != nil {
			return nil, err
		}
	}
	g.Reg = ncRegistration(f, lonV, latV, g.Lon, g.Lat)

	// Values: gather in grid order, mask, unpack.
	raw, err := f.Float64s(val)
	if err != nil {
		return nil, &InputError{File: r.name, Err: err}
	}
	strides := make([]int, len(shape))
	s := 1
	for d := len(shape) - 1; d >= 0; d-- {
		strides[d] = s
		s *= int(shape[d])
	}
	sz := 0
	if iz >= 0 {
		sz = strides[iz]
	}
	srcLon := make([]int, len(lonIdx))
	for i, x := range lonIdx {
		srcLon[i] = x * strides[ilon]
	}
	m, err := r.missing(val)
	if err != nil {
		return nil, err
	}
	nlon := len(srcLon)
	nrow := len(zIdx) * len(latIdx)
	valid := make([]bool, nrow*nlon)
	nvalid, ninf := 0, 0
	// transform masks, unpacks and reorders one row of the grid, taken at
	// offset base of raw, into dst and its validity into vdst.
	transform := func(dst []float64, vdst []bool, base int) {
		for i, x := range srcLon {
			v := raw[base+x]
			if m.bad(v) {
				dst[i] = math.NaN()
				vdst[i] = false
				continue
			}
			if v-v != 0 { // ±Inf: not a measurement, and not marked missing
				ninf++
			}
			dst[i] = v*m.scale + m.offset
			vdst[i] = true
			nvalid++
		}
	}
	rowBase := func(r int) int { return zIdx[r/len(latIdx)]*sz + latIdx[r%len(latIdx)]*strides[ilat] }
	w := int(shape[ilon])
	if strides[ilon] == 1 && strides[ilat] == w && (iz < 0 || sz == w*int(shape[ilat])) {
		// The file's layout is already depth, latitude, longitude (up to
		// dimensions of length 1): reorder raw in place. The row
		// permutation is a product of reversals, so it pairs rows.
		ta, tb := make([]float64, nlon), make([]float64, nlon)
		for r := range nrow {
			s := rowBase(r) / w
			if s < r {
				continue // done with its partner
			}
			transform(ta, valid[r*nlon:(r+1)*nlon], s*w)
			if s != r {
				transform(tb, valid[s*nlon:(s+1)*nlon], r*w)
				copy(raw[s*w:], tb)
			}
			copy(raw[r*w:], ta)
		}
		if nlon < w { // a dropped repeated column: close the gaps
			for r := range nrow {
				copy(raw[r*nlon:(r+1)*nlon], raw[r*w:r*w+nlon])
			}
		}
		g.Values = raw[: nrow*nlon : nrow*nlon]
	} else {
		g.Values = make([]float64, nrow*nlon)
		for r := range nrow {
			transform(g.Values[r*nlon:(r+1)*nlon], valid[r*nlon:(r+1)*nlon], rowBase(r))
		}
	}
	if ninf > 0 {
		return nil, r.fail(val.Name, "%d values are infinite; mark missing data with _FillValue or missing_value (CF-1.8 section 2.5.1)", ninf)
	}
	if nvalid == 0 {
		return nil, r.fail(val.Name, "every value is missing (equal to the fill value, a missing_value or outside the valid range)")
	}
	if nvalid < len(valid) {
		g.Valid = valid
	}
	if w := poleWarning(g); w != "" {
		g.Warnings = append(g.Warnings, w)
	}
	return g, nil
}

// coord reads a coordinate variable, which must be numeric and free of
// missing values (CF-1.8 section 1.2: coordinate variables must not have
// missing data).
func (r *ncReader) coord(v *netcdf.Var) ([]float64, error) {
	if v.Type == netcdf.Char {
		return nil, r.fail(v.Name, "coordinate variable is char, not numeric")
	}
	x, err := r.f.Float64s(v)
	if err != nil {
		return nil, &InputError{File: r.name, Err: err}
	}
	m, err := r.missing(v)
	if err != nil {
		return nil, err
	}
	for i, c := range x {
		if m.bad(c) || math.IsInf(c, 0) {
			return nil, r.fail(v.Name, "coordinate value %d (%g) is missing or not finite; CF-1.8 section 1.2 (coordinate variable) forbids missing values in coordinates", i, c)
		}
		x[i] = c*m.scale + m.offset
	}
	return x, nil
}

// ascending checks that x is strictly monotonic and returns the indices
// that put it in ascending order.
func (r *ncReader) ascending(name string, x []float64) ([]int, error) {
	n := len(x)
	idx := make([]int, n)
	up := n < 2 || x[1] > x[0]
	for i := 1; i < n; i++ {
		if (up && !(x[i] > x[i-1])) || (!up && !(x[i] < x[i-1])) {
			return nil, r.fail(name, "coordinate is not strictly monotonic at index %d (%g after %g); CF-1.8 section 1.2 requires coordinate variables to be strictly monotonic", i, x[i], x[i-1])
		}
	}
	for i := range idx {
		if up {
			idx[i] = i
		} else {
			idx[i] = n - 1 - i
		}
	}
	return idx, nil
}

// lonOrder checks the longitudes and returns the source indices that put
// them in ascending order in [0, 360).
func (r *ncReader) lonOrder(name string, lon []float64) ([]int, error) {
	idx, err := r.ascending(name, lon)
	if err != nil {
		return nil, err
	}
	lo, hi := lon[idx[0]], lon[idx[len(idx)-1]]
	step := (hi - lo) / float64(len(idx)-1)
	span := hi - lo
	if math.Abs(span-360) <= 1e-4*step && len(idx) > 2 { // tolerance as in even
		idx = idx[:len(idx)-1] // the last column repeats the first
	} else if span >= 360 {
		return nil, r.fail(name, "longitudes span %g degrees (%g to %g), more than a full circle", span, lo, hi)
	}
	// Rotate so that the normalised longitudes ascend from the smallest.
	norm := func(x float64) float64 { return math.Mod(math.Mod(x, 360)+360, 360) }
	k := 0
	for i := range idx {
		if norm(lon[idx[i]]) < norm(lon[idx[k]]) {
			k = i
		}
	}
	if k != 0 && float64(len(idx))*step < 360-1e-6*step {
		return nil, r.fail(name, "longitudes %g to %g cross 0 E on a regional grid; a grid needs ascending longitudes in [0, 360): give a global grid or one that does not cross 0 E", lo, hi)
	}
	out := append(slices.Clone(idx[k:]), idx[:k]...)
	return out, nil
}

// even checks that the ascending coordinates x are evenly spaced to a
// relative tolerance that allows for coordinates stored as float.
func (r *ncReader) even(name string, x []float64) error {
	// Tolerance: 1e-4 of the step (common practice) plus four half-ulps of
	// float32 at the largest coordinate, since coordinates stored as float
	// round to 2^-24 relative (IEEE 754 binary32): a 0.1-degree grid near
	// 360 E errs by up to 3e-5 degrees between neighbours.
	step := (x[len(x)-1] - x[0]) / float64(len(x)-1)
	tol := 1e-4*step + 4*0x1p-24*math.Max(math.Abs(x[0]), math.Abs(x[len(x)-1]))
	for i := 1; i < len(x); i++ {
		if d := x[i] - x[i-1]; math.Abs(d-step) > tol {
			return r.fail(name, "coordinate is not evenly spaced: step %g between indices %d and %d, mean step %g; resample to a regular grid", d, i-1, i, step)
		}
	}
	return nil
}

// depth reads the depth or radius axis and returns the depths in km
// ascending and the source indices in that order.
func (r *ncReader) depth(v *netcdf.Var, n int64) ([]float64, []int, error) {
	units := ncText(v, "units")
	fac := ncLengthFactor(units)
	if fac == 0 {
		return nil, nil, r.fail(v.Name, "depth or radius axis has units %q; want km or m", units)
	}
	x, err := r.coord(v)
	if err != nil {
		return nil, nil, err
	}
	if int64(len(x)) != n {
		return nil, nil, r.fail(v.Name, "coordinate has %d values, the dimension %d", len(x), n)
	}
	lower := strings.ToLower(v.Name + " " + ncText(v, "standard_name") + " " + ncText(v, "long_name"))
	radius := strings.Contains(lower, "radius")
	if !radius && strings.EqualFold(ncText(v, "positive"), "up") {
		return nil, nil, r.fail(v.Name, "vertical axis with positive = \"up\" is neither depth nor radius (CF-1.8 section 4.3); give depth (positive down) or a variable named radius")
	}
	for i := range x {
		x[i] *= fac
		if radius {
			x[i] = DepthOfRadius(x[i])
		}
		if x[i] < 0 || x[i] > EarthRadiusKm {
			return nil, nil, r.fail(v.Name, "depth %g km (index %d) lies outside the Earth (0 to %g km)", x[i], i, EarthRadiusKm)
		}
	}
	idx, err := r.ascending(v.Name, x)
	if err != nil {
		return nil, nil, err
	}
	d := make([]float64, len(idx))
	for k, s := range idx {
		d[k] = x[s]
	}
	return d, idx, nil
}

// ncRegistration decides between cell and node registration.
func ncRegistration(f *netcdf.File, lonV, latV *netcdf.Var, lon, lat []float64) Registration {
	for _, v := range []*netcdf.Var{lonV, latV} {
		if b := ncText(v, "bounds"); b != "" && f.Var(b) != nil { // CF-1.8 section 7.1 cell boundaries
			return CellRegistered
		}
	}
	half := func(x, step float64) bool {
		q := x / step
		return math.Abs(q-math.Floor(q)-0.5) < 1e-3
	}
	dlat := lat[1] - lat[0]
	dlon := lon[1] - lon[0]
	if half(lat[0]+90, dlat) && half(lon[0], dlon) {
		return CellRegistered
	}
	return NodeRegistered
}

// ncMissing holds the CF-1.8 section 2.5.1 tests and the section 8.1
// unpacking of one variable.
type ncMissing struct {
	fill          float64 // NaN when there is none
	missing       []float64
	lo, hi        float64
	scale, offset float64
}

func (m *ncMissing) bad(v float64) bool {
	// NaN fails both comparisons; without a fill value, fill is NaN and
	// never equal.
	if !(v >= m.lo && v <= m.hi) || v == m.fill {
		return true
	}
	if len(m.missing) > 0 {
		return m.isMissing(v)
	}
	return false
}

func (m *ncMissing) isMissing(v float64) bool {
	for _, x := range m.missing {
		if v == x {
			return true
		}
	}
	return false
}

// asType rounds x to what a value of type t can hold, so that a Double
// _FillValue on a Float variable still matches.
func asType(t netcdf.Type, x float64) float64 {
	if t == netcdf.Float {
		return float64(float32(x))
	}
	return x
}

func (r *ncReader) missing(v *netcdf.Var) (*ncMissing, error) {
	m := &ncMissing{lo: math.Inf(-1), hi: math.Inf(1), scale: 1, fill: math.NaN()}
	num := func(a string) ([]float64, error) {
		at := v.Attr(a)
		if at == nil {
			return nil, nil
		}
		x := at.Float64s()
		if len(x) == 0 {
			return nil, r.fail(v.Name, "attribute %s must be numeric and not empty", a)
		}
		return x, nil
	}
	fill, err := num("_FillValue")
	if err != nil {
		return nil, err
	}
	if fill != nil {
		m.fill = asType(v.Type, fill[0])
	} else if v.Type != netcdf.Byte {
		// Without _FillValue, the default fill value of the type marks
		// data never written; the netCDF User's Guide (Attribute
		// Conventions) advises treating it as missing except for byte
		// (from memory).
		m.fill = v.Type.DefaultFill()
	}
	if m.missing, err = num("missing_value"); err != nil {
		return nil, err
	}
	for i := range m.missing {
		m.missing[i] = asType(v.Type, m.missing[i])
	}
	vr, err := num("valid_range")
	if err != nil {
		return nil, err
	}
	vmin, err := num("valid_min")
	if err != nil {
		return nil, err
	}
	vmax, err := num("valid_max")
	if err != nil {
		return nil, err
	}
	if vr != nil {
		if len(vr) != 2 || vr[0] > vr[1] {
			return nil, r.fail(v.Name, "valid_range must hold two values, minimum first; it holds %v", vr)
		}
		if vmin != nil || vmax != nil {
			return nil, r.fail(v.Name, "valid_range given together with valid_min or valid_max, which CF-1.8 section 2.5.1 forbids; keep one of them")
		}
		m.lo, m.hi = vr[0], vr[1]
	}
	if vmin != nil {
		m.lo = vmin[0]
	}
	if vmax != nil {
		m.hi = vmax[0]
	}
	sc, err := num("scale_factor")
	if err != nil {
		return nil, err
	}
	off, err := num("add_offset")
	if err != nil {
		return nil, err
	}
	if sc != nil {
		m.scale = sc[0]
		if m.scale == 0 || math.IsNaN(m.scale) || math.IsInf(m.scale, 0) {
			return nil, r.fail(v.Name, "scale_factor %g would make every value %s; it must be finite and non-zero (CF-1.8 section 8.1)", m.scale, "meaningless")
		}
	}
	if off != nil {
		m.offset = off[0]
		if math.IsNaN(m.offset) || math.IsInf(m.offset, 0) {
			return nil, r.fail(v.Name, "add_offset %g must be finite (CF-1.8 section 8.1)", m.offset)
		}
	}
	// Valid-range attributes of the unpacked type (that of scale_factor
	// when it differs from the variable's) are in unpacked units; the
	// netCDF User's Guide, Attribute Conventions (from memory).
	if sc != nil || off != nil {
		var pt netcdf.Type
		if a := v.Attr("scale_factor"); a != nil {
			pt = a.Type
		} else {
			pt = v.Attr("add_offset").Type
		}
		for _, a := range []string{"valid_range", "valid_min", "valid_max"} {
			if at := v.Attr(a); at != nil && at.Type == pt && pt != v.Type {
				m.lo = (m.lo - m.offset) / m.scale
				m.hi = (m.hi - m.offset) / m.scale
				if m.scale < 0 {
					m.lo, m.hi = m.hi, m.lo
				}
				break
			}
		}
	}
	return m, nil
}
