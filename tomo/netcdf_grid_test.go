package tomo

import (
	"bytes"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"cmbflux/tomo/netcdf"
)

// Sources of the checks in this file: Unidata's ncgen and ncdump (Debian
// netcdf-bin) make the input files from committed CDL text; the CF
// Conventions 1.8 document gives the rules cited beside each check by
// section (section numbers from memory of its table of contents:
// 1.2 terminology/coordinate variable, 2.5.1 missing data, 4.1 latitude,
// 4.2 longitude, 4.3 vertical coordinate, 7.1 cell boundaries, 8.1 packed
// data); PREM (Dziewonski & Anderson 1981) gives the 6371 km radius.

// ncgenFile turns the committed CDL file testdata/cdl/<base> into a
// netCDF file with Unidata's ncgen (Debian netcdf-bin), using the kind
// named on the file's "// ncgen -k KIND" line, and returns its bytes. It
// skips the test when ncgen is missing, except under CI=true.
func ncgenFile(t testing.TB, base string) (string, []byte) {
	t.Helper()
	cdl := filepath.Join("..", "testdata", "cdl", base)
	src, err := os.ReadFile(cdl)
	if err != nil {
		t.Fatal(err)
	}
	kind := ""
	for _, line := range strings.Split(string(src), "\n") {
		if k, ok := strings.CutPrefix(line, "// ncgen -k "); ok {
			kind = strings.TrimSpace(k)
		}
	}
	if kind == "" {
		t.Fatalf("%s: no \"// ncgen -k KIND\" line", cdl)
	}
	ncgen, err := exec.LookPath("ncgen")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("ncgen (Debian package netcdf-bin) is required under CI=true")
		}
		t.Skip("ncgen not installed (Debian package netcdf-bin)")
	}
	out := filepath.Join(t.TempDir(), strings.TrimSuffix(base, ".cdl")+".nc")
	if msg, err := exec.Command(ncgen, "-k", kind, "-o", out, cdl).CombinedOutput(); err != nil {
		t.Fatalf("ncgen -k %s %s: %v\n%s", kind, cdl, err, msg)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	return out, b
}

// The value formulas of testdata/cdl/gen.go: each grid value encodes the
// coordinates it was written at (invented data).
func ncLonNorm(lon float64) float64    { return math.Mod(math.Mod(lon, 360)+360, 360) }
func ncF2(lon, lat, _ float64) float64 { return ncLonNorm(lon) + 1000*(lat+90) }
func ncF3(lon, lat, d float64) float64 {
	return ncF2(lon, lat, 0) + 1e6*math.Round((d-2691)/100)
}
func ncPacked(lon, lat, d float64) float64 {
	s := math.Floor(ncLonNorm(lon)/45) + 10*math.Floor((lat+90)/45) + 100*math.Round((d-2691)/100)
	return s*float64(float32(0.01)) + float64(float32(-1)) // CF-1.8 section 8.1: unpacked = packed*scale_factor + add_offset
}

func TestReadNetCDFFromNcgen(t *testing.T) {
	const tol = 1e-9 // values are exact in float32; packed values carry float32 scale_factor rounding only
	tests := []struct {
		cdl     string
		format  string
		lon     []float64
		lat     []float64
		depth   []float64
		reg     Registration
		f       func(lon, lat, d float64) float64
		invalid func(lon, lat, d float64) bool
	}{
		{cdl: "grid_node_cdf1.cdl", format: "netcdf-cdf1",
			lon: []float64{0, 45, 90, 135, 180, 225, 270, 315}, lat: []float64{-90, -45, 0, 45, 90},
			reg: NodeRegistered, f: ncF2},
		{cdl: "grid_desc_cdf2.cdl", format: "netcdf-cdf2",
			lon: []float64{0, 45, 90, 135, 180, 225, 270, 315}, lat: []float64{-90, -45, 0, 45, 90},
			reg: NodeRegistered, f: ncF2,
			invalid: func(lon, lat, _ float64) bool { // missing_value and valid_range, CF-1.8 section 2.5.1
				return lat == 45 && lon == 90 || lat == -45 && lon == 180
			}},
		{cdl: "grid_depth_m_cdf5.cdl", format: "netcdf-cdf5",
			lon: []float64{22.5, 67.5, 112.5, 157.5, 202.5, 247.5, 292.5, 337.5}, lat: []float64{-67.5, -22.5, 22.5, 67.5},
			depth: []float64{2691, 2791, 2891}, reg: CellRegistered, f: ncF3,
			invalid: func(_, lat, d float64) bool { return d == 2791 && lat == 22.5 }}, // _FillValue, CF-1.8 section 2.5.1
		{cdl: "grid_radius_packed_cdf1.cdl", format: "netcdf-cdf1",
			lon: []float64{22.5, 67.5, 112.5, 157.5, 202.5, 247.5, 292.5, 337.5}, lat: []float64{-67.5, -22.5, 22.5, 67.5},
			depth: []float64{2691, 2791, 2891}, reg: CellRegistered, f: ncPacked}, // depth = 6371 km - radius (PREM)
		{cdl: "grid_record_cdf2.cdl", format: "netcdf-cdf2",
			lon: []float64{0, 90, 180, 270}, lat: []float64{-90, 0, 90},
			depth: []float64{2691, 2791}, reg: NodeRegistered, f: ncF3,
			invalid: func(lon, lat, _ float64) bool { return lat == 0 && lon == 270 }}, // default fill of double, netCDF spec
	}
	for _, tt := range tests {
		t.Run(tt.cdl, func(t *testing.T) {
			path, data := ncgenFile(t, tt.cdl)
			g, err := ReadNetCDF(path, data, ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if g.Source.Format != tt.format || g.Source.Path != path || len(g.Source.SHA256) != 64 {
				t.Errorf("Source = %+v, want format %s", g.Source, tt.format)
			}
			if g.Name != "dvs" || g.Units != "percent" {
				t.Errorf("Name, Units = %q, %q; want dvs, percent", g.Name, g.Units)
			}
			if g.Reg != tt.reg {
				t.Errorf("Reg = %v, want %v", g.Reg, tt.reg)
			}
			eq := func(what string, got, want []float64) {
				if len(got) != len(want) {
					t.Fatalf("%s = %v, want %v", what, got, want)
				}
				for i := range got {
					if math.Abs(got[i]-want[i]) > 1e-9 {
						t.Fatalf("%s = %v, want %v", what, got, want)
					}
				}
			}
			eq("Lon", g.Lon, tt.lon)
			eq("Lat", g.Lat, tt.lat)
			eq("Depth", g.Depth, tt.depth)
			nbad := 0
			for k := range g.NDepth() {
				d := math.NaN()
				if g.Depth != nil {
					d = g.Depth[k]
				}
				for j, lat := range g.Lat {
					for i, lon := range g.Lon {
						v, ok := g.At(k, j, i)
						wantBad := tt.invalid != nil && tt.invalid(lon, lat, d)
						if ok == wantBad {
							t.Errorf("depth %g lat %g lon %g: valid = %v, want %v", d, lat, lon, ok, !wantBad)
						}
						if !ok {
							nbad++
							continue
						}
						if want := tt.f(lon, lat, d); math.Abs(v-want) > tol*math.Max(1, math.Abs(want)) {
							t.Errorf("depth %g lat %g lon %g: value %v, want %v", d, lat, lon, v, want)
						}
					}
				}
			}
			if (g.Valid == nil) != (nbad == 0) {
				t.Errorf("Valid is nil = %v with %d invalid points", g.Valid == nil, nbad)
			}
		})
	}
}

// ncCDL writes CDL text to a temporary file and runs ncgen on it.
func ncCDL(t *testing.T, kind, cdl string) []byte {
	t.Helper()
	dir := t.TempDir()
	p := filepath.Join(dir, "x.cdl")
	if err := os.WriteFile(p, []byte("// ncgen -k "+kind+"\n"+cdl), 0o644); err != nil {
		t.Fatal(err)
	}
	ncgen, err := exec.LookPath("ncgen")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("ncgen (Debian package netcdf-bin) is required under CI=true")
		}
		t.Skip("ncgen not installed (Debian package netcdf-bin)")
	}
	out := filepath.Join(dir, "x.nc")
	if msg, err := exec.Command(ncgen, "-k", kind, "-o", out, p).CombinedOutput(); err != nil {
		t.Fatalf("ncgen: %v\n%s", err, msg)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestReadNetCDFBadGrids(t *testing.T) {
	const head = `netcdf x {
dimensions: lon = 4 ; lat = 3 ;
variables:
`
	tests := []struct {
		name string
		cdl  string
		opts ReadOptions
		want []string // substrings of the message
	}{
		{name: "non-monotonic latitude", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double v(lat, lon) ;
data: lon = 0, 90, 180, 270 ; lat = -45, 45, 0 ; v = 1,2,3,4,5,6,7,8,9,10,11,12 ; }`,
			want: []string{"variable lat", "not strictly monotonic", "index 2", "CF-1.8 section 1.2"}},
		{name: "missing latitude coordinate", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double v(lat, lon) ;
data: lon = 0, 90, 180, 270 ; v = 1,2,3,4,5,6,7,8,9,10,11,12 ; }`,
			want: []string{"no latitude coordinate variable", "degrees_north", "v(lat,lon)"}},
		{name: "all fill", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 float v(lat, lon) ; v:_FillValue = -1.f ;
data: lon = 0, 90, 180, 270 ; lat = -45, 0, 45 ; v = -1,-1,-1,-1,-1,-1,-1,-1,-1,-1,-1,-1 ; }`,
			want: []string{"variable v", "every value is missing"}},
		{name: "two candidates", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double a(lat, lon) ; double b(lat, lon) ;
data: lon = 0, 90, 180, 270 ; lat = -45, 0, 45 ; }`,
			want: []string{"2 candidate value variables (a, b)", "variable option"}},
		{name: "unknown variable option", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double a(lat, lon) ;
data: lon = 0, 90, 180, 270 ; lat = -45, 0, 45 ; }`, opts: ReadOptions{Var: "dvs"},
			want: []string{"variable dvs", "no such variable", "a(lat,lon)"}},
		{name: "fill in coordinate", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double a(lat, lon) ;
data: lon = 0, 90, _, 270 ; lat = -45, 0, 45 ; a = 1,2,3,4,5,6,7,8,9,10,11,12 ; }`,
			want: []string{"variable lon", "missing", "CF-1.8 section 1.2"}},
		{name: "uneven longitude", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double a(lat, lon) ;
data: lon = 0, 90, 100, 270 ; lat = -45, 0, 45 ; a = 1,2,3,4,5,6,7,8,9,10,11,12 ; }`,
			want: []string{"variable lon", "not evenly spaced"}},
		{name: "regional grid across 0 E", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double a(lat, lon) ;
data: lon = -20, -10, 0, 10 ; lat = -45, 0, 45 ; a = 1,2,3,4,5,6,7,8,9,10,11,12 ; }`,
			want: []string{"variable lon", "cross 0 E on a regional grid"}},
		{name: "empty record dimension", cdl: `netcdf x {
dimensions: lon = 4 ; lat = 3 ; depth = UNLIMITED ;
variables:
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double depth(depth) ; depth:units = "km" ;
 double a(depth, lat, lon) ;
data: lon = 0, 90, 180, 270 ; lat = -45, 0, 45 ; }`,
			want: []string{"variable a", "dimension depth has length 0"}},
		{name: "curvilinear coordinates", cdl: head + `
 double lon(lat, lon) ; lon:units = "degrees_east" ;
 double lat(lat, lon) ; lat:units = "degrees_north" ;
 double a(lat, lon) ;
data: a = 1,2,3,4,5,6,7,8,9,10,11,12 ; }`,
			want: []string{"variable lon", "curvilinear grid", "resample"}},
		{name: "repeated dimension", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double a(lat, lon, lon) ;
data: lon = 0, 90, 180, 270 ; lat = -45, 0, 45 ; }`,
			want: []string{"variable a", "dimension lon appears twice"}},
		{name: "infinite value", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double a(lat, lon) ;
data: lon = 0, 90, 180, 270 ; lat = -45, 0, 45 ; a = 1,2,3,4,5,Infinity,7,8,9,10,11,12 ; }`,
			want: []string{"variable a", "1 values are infinite"}},
		{name: "valid_range with valid_min", cdl: head + `
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double a(lat, lon) ; a:valid_range = 0., 1. ; a:valid_min = 0. ;
data: lon = 0, 90, 180, 270 ; lat = -45, 0, 45 ; a = 1,2,3,4,5,6,7,8,9,10,11,12 ; }`,
			want: []string{"variable a", "valid_range given together with valid_min"}},
		{name: "third dimension without units", cdl: `netcdf x {
dimensions: lon = 4 ; lat = 3 ; t = 2 ;
variables:
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double t(t) ;
 double a(t, lat, lon) ;
data: lon = 0, 90, 180, 270 ; lat = -45, 0, 45 ; t = 1, 2 ; }`,
			want: []string{"variable a", "dimension t", "not longitude, latitude, or a depth"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			data := ncCDL(t, "classic", tt.cdl)
			_, err := ReadNetCDF("bad.nc", data, tt.opts)
			if err == nil {
				t.Fatal("no error")
			}
			if !errors.Is(err, ErrBadInput) {
				t.Errorf("error %v does not wrap ErrBadInput", err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "bad.nc: ") {
				t.Errorf("message %q does not start with the file name", msg)
			}
			for _, w := range tt.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q lacks %q", msg, w)
				}
			}
		})
	}
}

func TestReadNetCDFOptions(t *testing.T) {
	// Coordinates without CF units, named by the options; depth named too.
	data := ncCDL(t, "classic", `netcdf x {
dimensions: x = 4 ; y = 3 ; z = 2 ;
variables:
 double x(x) ; double y(y) ; double z(z) ; z:units = "km" ;
 float a(z, y, x) ; float b(y, x) ;
data: x = 0, 90, 180, 270 ; y = -60, 0, 60 ; z = 2800, 2700 ;
 a = 1,2,3,4,5,6,7,8,9,10,11,12, 13,14,15,16,17,18,19,20,21,22,23,24 ; }`)
	g, err := ReadNetCDF("opt.nc", data, ReadOptions{Var: "a", LonName: "x", LatName: "y", DepthName: "z"})
	if err != nil {
		t.Fatal(err)
	}
	// Depth 2700 km is the second level in the file: values 13..24.
	if v, _ := g.At(0, 0, 0); v != 13 || g.Depth[0] != 2700 || g.Reg != NodeRegistered {
		t.Errorf("At(0,0,0) = %v, Depth = %v, Reg = %v; want 13, [2700 2800], node", v, g.Depth, g.Reg)
	}
}

func TestReadNetCDFHeaderErrorsCarryFile(t *testing.T) {
	_, err := ReadNetCDF("x.nc", []byte("\x89HDF\r\n\x1a\n0000000000"), ReadOptions{})
	if !errors.Is(err, netcdf.ErrHDF5) || !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), "nccopy -k classic") ||
		!strings.HasPrefix(err.Error(), "x.nc: ") {
		t.Errorf("HDF5 error = %v", err)
	}
}

func TestReadNetCDFTransposed(t *testing.T) {
	// Dimensions in (lon, lat) order, latitude descending: the general
	// reordering path. Values encode coordinates: v = lon + 1000*(lat+90).
	data := ncCDL(t, "64-bit-offset", `netcdf x {
dimensions: lon = 4 ; lat = 3 ;
variables:
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 int v(lon, lat) ;
data: lon = -90, 0, 90, 180 ; lat = 60, 0, -60 ;
 v = 150270, 90270, 30270, 150000, 90000, 30000, 150090, 90090, 30090, 150180, 90180, 30180 ; }`)
	g, err := ReadNetCDF("t.nc", data, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for j, lat := range g.Lat {
		for i, lon := range g.Lon {
			if v, ok := g.At(0, j, i); !ok || v != ncF2(lon, lat, 0) {
				t.Errorf("lat %g lon %g: %v, %v; want %v", lat, lon, v, ok, ncF2(lon, lat, 0))
			}
		}
	}
}

// TestReadNetCDFWriterRoundTrip reads grids written by package netcdf's
// Encode in every version: latitude north to south, longitude from -180,
// depth descending in m; the values encode their coordinates (ncF3).
func TestReadNetCDFWriterRoundTrip(t *testing.T) {
	lon := []float64{-180, -90, 0, 90}
	lat := []float64{60, 0, -60}
	dep := []float64{2891000, 2791000, 2691000}
	var v []float32
	for _, d := range dep {
		for _, la := range lat {
			for _, lo := range lon {
				v = append(v, float32(ncF3(lo, la, d/1000)))
			}
		}
	}
	f := &netcdf.File{}
	f.AddDim("depth", 3).AddDim("lat", 3).AddDim("lon", 4)
	f.AddVar("depth", netcdf.Double, []string{"depth"}, dep).SetAttr("units", "m").SetAttr("positive", "down")
	f.AddVar("lat", netcdf.Double, []string{"lat"}, lat).SetAttr("standard_name", "latitude")
	f.AddVar("lon", netcdf.Double, []string{"lon"}, lon).SetAttr("standard_name", "longitude")
	f.AddVar("dvs", netcdf.Float, []string{"depth", "lat", "lon"}, v).SetAttr("units", "percent")
	for _, ver := range []netcdf.Version{netcdf.CDF1, netcdf.CDF2, netcdf.CDF5} {
		var buf bytes.Buffer
		if err := netcdf.Encode(&buf, f, ver); err != nil {
			t.Fatal(err)
		}
		g, err := ReadNetCDF("rt.nc", buf.Bytes(), ReadOptions{})
		if err != nil {
			t.Fatalf("%v: %v", ver, err)
		}
		if !slices.Equal(g.Lon, []float64{0, 90, 180, 270}) || !slices.Equal(g.Lat, []float64{-60, 0, 60}) ||
			!slices.Equal(g.Depth, []float64{2691, 2791, 2891}) {
			t.Fatalf("%v: Lon %v Lat %v Depth %v", ver, g.Lon, g.Lat, g.Depth)
		}
		for k, d := range g.Depth {
			for j, la := range g.Lat {
				for i, lo := range g.Lon {
					if x, ok := g.At(k, j, i); !ok || x != ncF3(lo, la, d) {
						t.Errorf("%v: depth %g lat %g lon %g: %v %v, want %v", ver, d, la, lo, x, ok, ncF3(lo, la, d))
					}
				}
			}
		}
	}
}

func TestReadNetCDFUnsignedCDF5(t *testing.T) {
	// ushort (CDF-5) packed values; 65535 is the default fill of ushort
	// (netCDF classic format specification, NC_FILL_USHORT) and marks the
	// one missing point, as no _FillValue is given.
	data := ncCDL(t, "cdf5", `netcdf x {
dimensions: lon = 4 ; lat = 2 ;
variables:
 float lon(lon) ; lon:units = "degrees_east" ;
 float lat(lat) ; lat:units = "degrees_north" ;
 ushort v(lat, lon) ; v:scale_factor = 0.5 ; v:add_offset = -100. ; v:units = "m s-1" ;
data: lon = 0, 90, 180, 270 ; lat = -45, 45 ;
 v = 0, 1, 2, 3, 60000, 65534, 65535, 7 ; }`)
	g, err := ReadNetCDF("u.nc", data, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{-100, -99.5, -99, -98.5, 29900, 32667, math.NaN(), -96.5} // packed*0.5 - 100, CF-1.8 section 8.1
	for n, w := range want {
		v, ok := g.At(0, n/4, n%4)
		if math.IsNaN(w) != !ok || (ok && v != w) {
			t.Errorf("point %d: %v %v, want %v", n, v, ok, w)
		}
	}
	if g.Source.Format != "netcdf-cdf5" || g.Units != "m s-1" || g.Reg != NodeRegistered { // lon 0 E sits on a node
		t.Errorf("Format %q Units %q Reg %v", g.Source.Format, g.Units, g.Reg)
	}
}

func TestReadNetCDFFloat32TenthDegree(t *testing.T) {
	// A 0.1-degree grid with float coordinates: rounding to binary32
	// (IEEE 754) makes neighbouring steps differ by up to about 3e-5
	// degrees near 360 E, which must still count as evenly spaced.
	const nlon, nlat = 3600, 5
	lon := make([]float32, nlon)
	for i := range lon {
		lon[i] = float32(0.05 + 0.1*float64(i))
	}
	lat := []float32{-0.2, -0.1, 0, 0.1, 0.2}
	f := &netcdf.File{}
	f.AddDim("lat", nlat).AddDim("lon", nlon)
	f.AddVar("lat", netcdf.Float, []string{"lat"}, lat).SetAttr("units", "degrees_north")
	f.AddVar("lon", netcdf.Float, []string{"lon"}, lon).SetAttr("units", "degrees_east")
	f.AddVar("v", netcdf.Float, []string{"lat", "lon"}, make([]float32, nlon*nlat))
	var buf bytes.Buffer
	if err := netcdf.Encode(&buf, f, netcdf.CDF1); err != nil {
		t.Fatal(err)
	}
	g, err := ReadNetCDF("tenth.nc", buf.Bytes(), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if g.NLon() != nlon || g.Lon[nlon-1] != float64(lon[nlon-1]) {
		t.Errorf("NLon %d, last %v", g.NLon(), g.Lon[nlon-1])
	}
	// An uneven step of 1e-3 degrees (1 % of the step) is still caught.
	lon[1000] += 1e-3
	buf.Reset()
	if err := netcdf.Encode(&buf, f, netcdf.CDF1); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadNetCDF("tenth.nc", buf.Bytes(), ReadOptions{}); err == nil || !strings.Contains(err.Error(), "not evenly spaced") {
		t.Errorf("uneven grid: error %v", err)
	}
}

// TestReadNetCDFValidMinMax checks valid_min and valid_max alone (CF-1.8
// section 2.5.1: values below valid_min or above valid_max are missing),
// and a valid_range given in the packed type, compared with the stored
// values before scale_factor and add_offset (CF-1.8 sections 2.5.1 and
// 8.1: the valid range is in the units of the packed data when its type is
// that of the variable).
func TestReadNetCDFValidMinMax(t *testing.T) {
	data := ncCDL(t, "classic", `netcdf x {
dimensions: lon = 4 ; lat = 2 ;
variables:
 double lon(lon) ; lon:units = "degrees_east" ;
 double lat(lat) ; lat:units = "degrees_north" ;
 double lo(lat, lon) ; lo:valid_min = -2. ; lo:units = "percent" ;
 double hi(lat, lon) ; hi:valid_max = 2. ; hi:units = "percent" ;
 short pk(lat, lon) ; pk:valid_range = -100s, 100s ; pk:scale_factor = 0.01 ; pk:units = "percent" ;
data: lon = 0, 90, 180, 270 ; lat = -45, 45 ;
 lo = -3, -2, -1, 0, 1, 2, 3, -2.5 ;
 hi = -3, -2, -1, 0, 1, 2, 3, 2.5 ;
 pk = -150, -100, -50, 0, 50, 100, 150, 99 ; }`)
	for _, tc := range []struct {
		v    string
		want []float64 // NaN: missing
	}{
		{"lo", []float64{math.NaN(), -2, -1, 0, 1, 2, 3, math.NaN()}},
		{"hi", []float64{-3, -2, -1, 0, 1, 2, math.NaN(), math.NaN()}},
		// Packed -150 and 150 are outside the packed valid_range -100..100;
		// the rest unpack as packed*0.01.
		{"pk", []float64{math.NaN(), -1, -0.5, 0, 0.5, 1, math.NaN(), 0.99}},
	} {
		g, err := ReadNetCDF("v.nc", data, ReadOptions{Var: tc.v})
		if err != nil {
			t.Fatalf("%s: %v", tc.v, err)
		}
		for n, w := range tc.want {
			v, ok := g.At(0, n/4, n%4)
			if math.IsNaN(w) != !ok || (ok && math.Abs(v-w) > 1e-12) {
				t.Errorf("%s point %d: %v %v, want %v", tc.v, n, v, ok, w)
			}
		}
	}
}
