package export

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"cmbflux/tomo/netcdf"
)

// GridTable is a grid file as read by ReadGrid.
type GridTable struct {
	// Grid holds the coordinates and values as read.
	Grid *Grid
	// Meta holds the quantity, units, sign, reference radius and
	// provenance found in the file.
	Meta Meta
	// Header holds the text or CSV header keys (nil for netCDF).
	Header map[string]string
}

// ReadGridFile reads the grid file at path (see ReadGrid).
func ReadGridFile(path string) (*GridTable, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return ReadGrid(f, path)
}

// maxGridPoints bounds the size of a grid read from a file.
var maxGridPoints = 1 << 26

// ReadGrid reads a grid written by WriteGridText, WriteGridCSV or
// WriteGridNetCDF (told apart by content: the netCDF magic "CDF", a comma in
// the first data line, or plain text). Text and CSV rows must list every
// point once, latitude by latitude with longitude varying fastest, as the
// writers do. Errors are *InputError values naming the file and the line
// (or the netCDF variable).
func ReadGrid(r io.Reader, name string) (*GridTable, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if bytes.HasPrefix(data, []byte("CDF")) {
		return readGridNetCDF(data, name)
	}
	csvForm := detectCoeffFormat(data) == FormatCSV
	t := &GridTable{Grid: &Grid{}}
	hdr := map[string]hval{}
	p := &parsed{}
	type point struct {
		lon, lat, v float64
		line        int
	}
	var pts []point
	addRow := func(line int, f []string) error {
		if len(f) != 3 {
			return inputErr(name, line, "%d columns, want 3 (lon lat value)", len(f))
		}
		var q [3]float64
		for k, s := range f {
			v, err := parseNumber(strings.TrimSpace(s))
			if err != nil {
				return inputErr(name, line, "%s: %v", [3]string{"lon", "lat", "value"}[k], err)
			}
			if !finite(v) {
				return inputErr(name, line, "%s is not finite", [3]string{"lon", "lat", "value"}[k])
			}
			q[k] = v
		}
		if len(pts) >= maxGridPoints {
			return inputErr(name, line, "more than %d points", maxGridPoints)
		}
		pts = append(pts, point{q[0], q[1], q[2], line})
		return nil
	}
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(nil, 1<<20)
	line := 0
	var body []byte
	bodyLine := 0
	for sc.Scan() {
		line++
		s := strings.TrimSpace(strings.TrimPrefix(sc.Text(), "\ufeff"))
		if s == "" {
			continue
		}
		if s[0] == '#' {
			if k, v, ok := parseHeaderLine(s); ok && len(pts) == 0 {
				if err := p.addHeader(name, line, k, v); err != nil {
					return nil, err
				}
			}
			continue
		}
		if csvForm {
			// Hand the rest to the CSV reader, which keeps counting lines.
			bodyLine = line
			break
		}
		f := strings.Fields(s)
		if len(pts) == 0 && len(f) > 0 {
			if _, err := strconv.ParseFloat(f[0], 64); err != nil {
				continue // a heading line
			}
		}
		if err := addRow(line, f); err != nil {
			return nil, err
		}
	}
	if err := sc.Err(); err != nil {
		return nil, inputErr(name, line+1, "%v", err)
	}
	if csvForm && bodyLine > 0 {
		body = data
		first := true
		err := eachCSVRecord(name, body, func(ln int, rec []string) error {
			if first {
				first = false
				if _, err := strconv.ParseFloat(strings.TrimSpace(rec[0]), 64); err != nil {
					if len(rec) == 3 {
						t.Grid.Name = strings.TrimSpace(rec[2])
					}
					return nil
				}
			}
			return addRow(ln, rec)
		})
		if err != nil {
			return nil, err
		}
	}
	if p.header != nil {
		hdr = p.header
	}
	if len(pts) == 0 {
		return nil, &InputError{File: name, Err: errors.New("no grid points")}
	}
	// Longitudes of the first latitude row, then every row must repeat them.
	g := t.Grid
	for _, q := range pts {
		if q.lat != pts[0].lat {
			break
		}
		g.Lon = append(g.Lon, q.lon)
	}
	nlon := len(g.Lon)
	if len(pts)%nlon != 0 {
		return nil, inputErr(name, pts[len(pts)-1].line, "%d points do not fill rows of %d longitudes", len(pts), nlon)
	}
	g.Values = make([]float64, len(pts))
	for k, q := range pts {
		j, i := k/nlon, k%nlon
		if i == 0 {
			g.Lat = append(g.Lat, q.lat)
		}
		switch {
		case q.lat != g.Lat[j]:
			return nil, inputErr(name, q.line, "latitude %v where the row of latitude %v continues (rows must hold %d longitudes)", q.lat, g.Lat[j], nlon)
		case q.lon != g.Lon[i]:
			return nil, inputErr(name, q.line, "longitude %v where %v was expected (every row lists the same longitudes)", q.lon, g.Lon[i])
		}
		g.Values[k] = q.v
	}
	if !monotonic(g.Lon) || !monotonic(g.Lat) {
		return nil, &InputError{File: name, Err: errors.New("longitudes or latitudes are not strictly monotonic")}
	}
	for k, want := range map[string]int{"nlon": len(g.Lon), "nlat": len(g.Lat)} {
		if v, ok := hdr[k]; ok && v.v != strconv.Itoa(want) {
			return nil, inputErr(name, v.line, "header %s = %s but the data have %d", k, v.v, want)
		}
	}
	if v, ok := hdr["variable"]; ok {
		g.Name = v.v
	}
	g.Kind = hdr["grid"].v
	t.Meta = Meta{Quantity: hdr["quantity"].v, Units: hdr["units"].v, Sign: hdr["sign"].v, Version: hdr["cmbflux_version"].v, Inputs: p.inputs}
	if len(p.params) > 0 {
		t.Meta.Params = p.params
	}
	if v, ok := hdr["reference_radius_km"]; ok {
		rk, err := strconv.ParseFloat(v.v, 64)
		if err != nil || !(rk > 0) || math.IsInf(rk, 0) {
			return nil, inputErr(name, v.line, "header reference_radius_km: %q is not a positive number", v.v)
		}
		t.Meta.RadiusKm = rk
	}
	t.Header = p.raw
	return t, nil
}

func readGridNetCDF(data []byte, name string) (*GridTable, error) {
	f, err := netcdf.DecodeBytes(data)
	if err != nil {
		return nil, &InputError{File: name, Err: err}
	}
	varErr := func(v, format string, args ...any) error {
		return &InputError{File: name, Field: "variable " + v, Err: fmt.Errorf(format, args...)}
	}
	var field *netcdf.Var
	for _, v := range f.Vars {
		if len(v.Dims) == 2 && v.Dims[0] == "lat" && v.Dims[1] == "lon" {
			if field != nil {
				return nil, &InputError{File: name, Err: fmt.Errorf("variables %s and %s both lie on (lat, lon)", field.Name, v.Name)}
			}
			field = v
		}
	}
	if field == nil {
		return nil, &InputError{File: name, Err: errors.New("no variable on the dimensions (lat, lon)")}
	}
	t := &GridTable{Grid: &Grid{Name: field.Name}}
	g := t.Grid
	for _, c := range []struct {
		name string
		dst  *[]float64
	}{{"lat", &g.Lat}, {"lon", &g.Lon}} {
		v := f.Var(c.name)
		if v == nil || len(v.Dims) != 1 || v.Dims[0] != c.name {
			return nil, varErr(c.name, "missing coordinate variable")
		}
		if *c.dst, err = f.Float64s(v); err != nil {
			return nil, &InputError{File: name, Err: err}
		}
		if !monotonic(*c.dst) {
			return nil, varErr(c.name, "not strictly monotonic")
		}
	}
	if int64(len(g.Lat))*int64(len(g.Lon)) > int64(maxGridPoints) {
		return nil, varErr(field.Name, "more than %d points", maxGridPoints)
	}
	if g.Values, err = f.Float64s(field); err != nil {
		return nil, &InputError{File: name, Err: err}
	}
	text := func(a *netcdf.Attr) string {
		if a == nil {
			return ""
		}
		return a.Text()
	}
	g.StandardName = text(field.Attr("standard_name"))
	g.Kind = text(f.Attr("cmbflux_grid"))
	t.Meta = Meta{Quantity: text(field.Attr("long_name")), Units: text(field.Attr("units")), Sign: text(f.Attr("cmbflux_sign"))}
	if a := f.Attr("cmbflux_reference_radius_km"); a != nil {
		if v := a.Float64s(); len(v) == 1 {
			t.Meta.RadiusKm = v[0]
		}
	}
	t.Meta.Version = text(f.Attr("cmbflux_version"))
	for _, ln := range strings.Split(strings.TrimSpace(text(f.Attr("cmbflux_inputs"))), "\n") {
		if sum, file, ok := strings.Cut(ln, " "); ok {
			t.Meta.Inputs = append(t.Meta.Inputs, Input{Name: file, SHA256: sum})
		}
	}
	for _, ln := range strings.Split(text(f.Attr("cmbflux_parameters")), "\n") {
		if k, v, ok := strings.Cut(ln, " = "); ok {
			if t.Meta.Params == nil {
				t.Meta.Params = map[string]string{}
			}
			t.Meta.Params[k] = v
		}
	}
	return t, nil
}
