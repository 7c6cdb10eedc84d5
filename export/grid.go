package export

import (
	"bufio"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"

	"cmbflux/tomo/netcdf"
)

// Grid is a scalar field on a longitude-latitude grid, as written by the grid
// writers. Values[j*len(Lon)+i] is the value at Lat[j], Lon[i]: this is the
// row-major ring-by-ring layout of flux/sh when Lat runs north to south.
type Grid struct {
	// Kind names the grid: "gauss-legendre", "equiangular" or "user".
	Kind string
	// Lon holds east longitudes in degrees, strictly monotonic.
	Lon []float64
	// Lat holds latitudes in degrees north, strictly monotonic, in
	// [-90, 90].
	Lat []float64
	// Values holds the field, finite, in Meta.Units.
	Values []float64
	// Name is the variable name used in CSV headings and netCDF
	// (letters, digits and '_', starting with a letter), e.g. "heat_flux";
	// "" means "value".
	Name string
	// StandardName is an optional CF standard name for the variable.
	StandardName string
}

var ncName = regexp.MustCompile(`^[A-Za-z][A-Za-z0-9_]*$`)

func (g *Grid) name() string {
	if g.Name == "" {
		return "value"
	}
	return g.Name
}

func monotonic(x []float64) bool {
	if len(x) < 2 {
		return len(x) == 1
	}
	up := x[1] > x[0]
	for i := 1; i < len(x); i++ {
		if !(up && x[i] > x[i-1] || !up && x[i] < x[i-1]) {
			return false
		}
	}
	return true
}

func (g *Grid) check() error {
	var errs []error
	if !monotonic(g.Lon) {
		errs = append(errs, errors.New("export: grid longitudes are empty or not strictly monotonic"))
	}
	if !monotonic(g.Lat) {
		errs = append(errs, errors.New("export: grid latitudes are empty or not strictly monotonic"))
	}
	for _, v := range g.Lon {
		if !finite(v) {
			errs = append(errs, fmt.Errorf("export: grid longitude %v is not finite", v))
			break
		}
	}
	for _, v := range g.Lat {
		if !(v >= -90 && v <= 90) {
			errs = append(errs, fmt.Errorf("export: grid latitude %v is outside [-90, 90]", v))
			break
		}
	}
	if len(g.Values) != len(g.Lon)*len(g.Lat) {
		errs = append(errs, fmt.Errorf("export: grid has %d values for %d latitudes x %d longitudes", len(g.Values), len(g.Lat), len(g.Lon)))
	}
	for k, v := range g.Values {
		if !finite(v) {
			errs = append(errs, fmt.Errorf("export: grid value %v at index %d is not finite", v, k))
			break
		}
	}
	if !ncName.MatchString(g.name()) || g.name() == "lon" || g.name() == "lat" {
		errs = append(errs, fmt.Errorf("export: grid variable name %q must be letters, digits and '_', start with a letter, and not be lon or lat", g.Name))
	}
	if strings.ContainsAny(g.Kind+g.StandardName, "\r\n") {
		errs = append(errs, errors.New("export: grid kind and standard name must be one line"))
	}
	return errors.Join(errs...)
}

func gridHeader(g *Grid, meta *Meta) []kv {
	kind := g.Kind
	if kind == "" {
		kind = "user"
	}
	latOrder := "south to north"
	if len(g.Lat) > 1 && g.Lat[1] < g.Lat[0] {
		latOrder = "north to south"
	}
	h := []kv{
		{"format", "cmbflux-grid/" + strconv.Itoa(FormatVersion)},
		{"quantity", orUnspecified(meta.Quantity)},
		{"units", orUnspecified(meta.Units)},
		{"sign", orUnspecified(meta.Sign)},
		{"variable", g.name()},
		{"grid", kind},
		{"nlon", strconv.Itoa(len(g.Lon))},
		{"nlat", strconv.Itoa(len(g.Lat))},
		{"lon_units", "degrees_east"},
		{"lat_units", "degrees_north"},
		{"row_order", "latitude " + latOrder + ", longitude varies fastest"},
		{"registration", "node: values are the field at the listed points, not cell averages"},
		{"reference_radius_km", fmtFloat(meta.radiusKm())},
		{"columns", "lon lat " + g.name()},
	}
	return append(h, meta.provenance()...)
}

// WriteGridText writes g as "lon lat value" lines after a "# key = value"
// header (see the package documentation).
func WriteGridText(w io.Writer, g *Grid, meta *Meta) error {
	if meta == nil {
		meta = &Meta{}
	}
	if err := errors.Join(g.check(), meta.check()); err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	writeHeader(bw, "cmbflux grid", gridHeader(g, meta))
	var b []byte
	for j, lat := range g.Lat {
		for i, lon := range g.Lon {
			b = strconv.AppendFloat(b[:0], lon, 'g', -1, 64)
			b = append(b, ' ')
			b = strconv.AppendFloat(b, lat, 'g', -1, 64)
			b = append(b, ' ')
			b = strconv.AppendFloat(b, g.Values[j*len(g.Lon)+i], 'g', -1, 64)
			b = append(b, '\n')
			bw.Write(b)
		}
	}
	return bw.Flush()
}

// WriteGridCSV writes g as CSV: the same "#" header lines as the text
// form, then the heading "lon,lat,NAME" and one record per point.
func WriteGridCSV(w io.Writer, g *Grid, meta *Meta) error {
	if meta == nil {
		meta = &Meta{}
	}
	if err := errors.Join(g.check(), meta.check()); err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	writeHeader(bw, "cmbflux grid", gridHeader(g, meta))
	cw := csv.NewWriter(bw)
	cw.Write([]string{"lon", "lat", g.name()})
	rec := make([]string, 3)
	for j, lat := range g.Lat {
		for i, lon := range g.Lon {
			rec[0], rec[1], rec[2] = fmtFloat(lon), fmtFloat(lat), fmtFloat(g.Values[j*len(g.Lon)+i])
			cw.Write(rec)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	return bw.Flush()
}

// GridNetCDF builds the netCDF dataset written by WriteGridNetCDF: dimensions
// lat and lon; coordinate variables lat and lon (double, units
// degrees_north and degrees_east, standard_name, long_name, axis Y and X);
// the variable NAME(lat, lon) (double, units, long_name = quantity,
// standard_name if given, comment = sign); global attributes Conventions =
// "CF-1.8", title, history, source, and the cmbflux provenance attributes
// (see the package documentation). Nothing in it depends on the time of
// writing.
func GridNetCDF(g *Grid, meta *Meta) (*netcdf.File, error) {
	if meta == nil {
		meta = &Meta{}
	}
	if err := errors.Join(g.check(), meta.check()); err != nil {
		return nil, err
	}
	if strings.ContainsAny(meta.Units, "\x00") {
		return nil, errors.New("export: units contain a NUL byte")
	}
	f := &netcdf.File{}
	f.AddDim("lat", int64(len(g.Lat)))
	f.AddDim("lon", int64(len(g.Lon)))
	// CF-1.8 section 4.1 (latitude) and 4.2 (longitude): units,
	// standard_name and axis on the coordinate variables.
	f.AddVar("lat", netcdf.Double, []string{"lat"}, append([]float64(nil), g.Lat...)).
		SetAttr("units", "degrees_north").SetAttr("standard_name", "latitude").
		SetAttr("long_name", "latitude").SetAttr("axis", "Y")
	f.AddVar("lon", netcdf.Double, []string{"lon"}, append([]float64(nil), g.Lon...)).
		SetAttr("units", "degrees_east").SetAttr("standard_name", "longitude").
		SetAttr("long_name", "longitude").SetAttr("axis", "X")
	v := f.AddVar(g.name(), netcdf.Double, []string{"lat", "lon"}, append([]float64(nil), g.Values...))
	if meta.Units != "" {
		v.SetAttr("units", meta.Units)
	}
	if meta.Quantity != "" {
		v.SetAttr("long_name", meta.Quantity)
	}
	if g.StandardName != "" {
		v.SetAttr("standard_name", g.StandardName)
	}
	if meta.Sign != "" {
		v.SetAttr("comment", "sign: "+meta.Sign)
	}
	// Point samples, not cell averages (CF-1.8 section 7.3, cell_methods
	// "point").
	v.SetAttr("cell_methods", "lat: point lon: point")
	kind := g.Kind
	if kind == "" {
		kind = "user"
	}
	version := meta.Version
	if version == "" {
		version = "unknown version"
	}
	tool := version
	if !strings.HasPrefix(tool, "cmbflux") {
		tool = "cmbflux " + version
	}
	title := meta.Quantity
	if title == "" {
		title = g.name()
	}
	f.SetAttr("Conventions", "CF-1.8")
	f.SetAttr("title", title)
	f.SetAttr("source", tool)
	f.SetAttr("history", "written by "+tool+" (no time recorded: the build manifest holds it)")
	f.SetAttr("cmbflux_version", meta.Version)
	f.SetAttr("cmbflux_format", "cmbflux-grid/"+strconv.Itoa(FormatVersion))
	f.SetAttr("cmbflux_grid", kind)
	f.SetAttr("cmbflux_reference_radius_km", meta.radiusKm())
	if meta.Sign != "" {
		f.SetAttr("cmbflux_sign", meta.Sign)
	}
	var in, par strings.Builder
	for _, x := range meta.Inputs {
		fmt.Fprintf(&in, "%s %s\n", x.SHA256, x.Name)
	}
	for _, k := range sortedKeys(meta.Params) {
		fmt.Fprintf(&par, "%s = %s\n", k, meta.Params[k])
	}
	if in.Len() > 0 {
		f.SetAttr("cmbflux_inputs", in.String())
	}
	if par.Len() > 0 {
		f.SetAttr("cmbflux_parameters", par.String())
	}
	return f, nil
}

// WriteGridNetCDF writes g as a netCDF classic (CDF-1) file with CF-1.8
// metadata, built by GridNetCDF and encoded by tomo/netcdf. Grids too large
// for CDF-1 are written as CDF-2 (64-bit offsets).
func WriteGridNetCDF(w io.Writer, g *Grid, meta *Meta) error {
	f, err := GridNetCDF(g, meta)
	if err != nil {
		return err
	}
	ver := netcdf.CDF1
	if 8*len(g.Values) > math.MaxInt32/2 {
		ver = netcdf.CDF2
	}
	return netcdf.Encode(w, f, ver)
}

// WriteGrid writes g in the format f (FormatText, FormatCSV or FormatNetCDF).
func WriteGrid(w io.Writer, f Format, g *Grid, meta *Meta) error {
	switch f {
	case FormatText:
		return WriteGridText(w, g, meta)
	case FormatCSV:
		return WriteGridCSV(w, g, meta)
	case FormatNetCDF:
		return WriteGridNetCDF(w, g, meta)
	}
	return fmt.Errorf("export: grids cannot be written as %q (want text, csv or netcdf)", f)
}

// WriteGridFile writes g atomically to path in the format its extension
// names (see FormatFromPath).
func WriteGridFile(path string, g *Grid, meta *Meta) error {
	f, err := FormatFromPath(path)
	if err != nil {
		return err
	}
	return WriteFile(path, func(w io.Writer) error { return WriteGrid(w, f, g, meta) })
}
