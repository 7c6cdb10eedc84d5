package export

import (
	"bytes"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// needTool returns the path of an outside tool, skipping the test when it is
// missing, except under CI=true, where a missing tool is a failure.
func needTool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("%s is required under CI=true (Debian package netcdf-bin): %v", name, err)
		}
		t.Skipf("%s not installed (Debian package netcdf-bin)", name)
	}
	return p
}

// testGrid is a small equiangular grid, north to south as flux/sh lays it
// out, with values that need all 17 digits.
func testGrid() *Grid {
	g := &Grid{Kind: "equiangular", Name: "heat_flux"}
	for j := range 4 {
		g.Lat = append(g.Lat, 67.5-45*float64(j))
	}
	for i := range 8 {
		g.Lon = append(g.Lon, 45*float64(i))
	}
	for j := range g.Lat {
		for i := range g.Lon {
			g.Values = append(g.Values, 80*math.Cos(float64(i))*math.Sin(float64(j)+0.1)+1/3.0)
		}
	}
	return g
}

func TestGridText(t *testing.T) {
	g := testGrid()
	var a, b bytes.Buffer
	if err := WriteGridText(&a, g, testMeta()); err != nil {
		t.Fatal(err)
	}
	WriteGridText(&b, g, testMeta())
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Error("two writes differ")
	}
	s := a.String()
	for _, want := range []string{"# format = cmbflux-grid/1\n", "# units = mW/m^2\n", "# sign = positive = heat out of the core\n",
		"# grid = equiangular\n", "# nlon = 8\n", "# nlat = 4\n", "# row_order = latitude north to south, longitude varies fastest\n",
		"# columns = lon lat heat_flux\n"} {
		if !strings.Contains(s, want) {
			t.Errorf("text grid lacks %q", want)
		}
	}
	// Every value reads back exactly.
	n := 0
	for _, line := range strings.Split(s, "\n") {
		if line == "" || line[0] == '#' {
			continue
		}
		f := strings.Fields(line)
		v, err := strconv.ParseFloat(f[2], 64)
		if err != nil || v != g.Values[n] {
			t.Fatalf("line %q: value %v, want %v", line, v, g.Values[n])
		}
		n++
	}
	if n != len(g.Values) {
		t.Errorf("%d rows, want %d", n, len(g.Values))
	}
	var c bytes.Buffer
	if err := WriteGridCSV(&c, g, testMeta()); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(c.String(), "\nlon,lat,heat_flux\n0,67.5,") {
		t.Errorf("CSV heading or first record wrong:\n%s", c.String())
	}
}

func TestGridRejects(t *testing.T) {
	for name, mod := range map[string]func(g *Grid){
		"short":    func(g *Grid) { g.Values = g.Values[1:] },
		"nan":      func(g *Grid) { g.Values[3] = math.NaN() },
		"lat":      func(g *Grid) { g.Lat[0] = 91 },
		"monotone": func(g *Grid) { g.Lon[2] = g.Lon[1] },
		"name":     func(g *Grid) { g.Name = "heat flux" },
	} {
		g := testGrid()
		mod(g)
		if err := WriteGridText(&bytes.Buffer{}, g, nil); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
}

// The netCDF file is read back by the netCDF reference tool ncdump
// (Debian's netcdf-bin) and carries the CF-1.8 attributes: Conventions,
// coordinate variables with units degrees_north/degrees_east, standard_name
// and axis (CF Conventions 1.8, sections 2.6.1, 4.1, 4.2).
func TestGridNetCDFWithNcdump(t *testing.T) {
	ncdump := needTool(t, "ncdump")
	g := testGrid()
	dir := t.TempDir()
	path := filepath.Join(dir, "flux.nc")
	if err := WriteGridFile(path, g, testMeta()); err != nil {
		t.Fatal(err)
	}
	again := filepath.Join(dir, "again.nc")
	if err := WriteGridFile(again, g, testMeta()); err != nil {
		t.Fatal(err)
	}
	b1, _ := os.ReadFile(path)
	b2, _ := os.ReadFile(again)
	if !bytes.Equal(b1, b2) {
		t.Error("two netCDF writes differ")
	}
	if string(b1[:4]) != "CDF\x01" {
		t.Errorf("magic %q, want CDF\\x01 (netCDF classic format specification)", b1[:4])
	}
	out, err := exec.Command(ncdump, "-p", "17,17", path).CombinedOutput()
	if err != nil {
		t.Fatalf("ncdump: %v\n%s", err, out)
	}
	s := string(out)
	for _, want := range []string{
		"lat = 4 ;", "lon = 8 ;", "double lat(lat) ;", "double lon(lon) ;", "double heat_flux(lat, lon) ;",
		`lat:units = "degrees_north" ;`, `lat:standard_name = "latitude" ;`, `lat:axis = "Y" ;`,
		`lon:units = "degrees_east" ;`, `lon:standard_name = "longitude" ;`, `lon:axis = "X" ;`,
		`heat_flux:units = "mW/m^2" ;`, `heat_flux:long_name = "heat flux through the core-mantle boundary" ;`,
		`:Conventions = "CF-1.8" ;`, `:title = "heat flux through the core-mantle boundary" ;`,
		`:source = "cmbflux 0.0.0-test" ;`, `:history = "written by cmbflux 0.0.0-test`,
		`:cmbflux_reference_radius_km = 3480. ;`, "qstar = 0.8", `heat_flux:cell_methods = "lat: point lon: point" ;`,
	} {
		if !strings.Contains(s, want) {
			t.Errorf("ncdump output lacks %q", want)
		}
	}
	// The data section: ncdump prints doubles with 17 significant digits
	// (-p 17,17), enough to recover every float64 exactly.
	i := strings.Index(s, "heat_flux =")
	if i < 0 {
		t.Fatalf("no heat_flux data in ncdump output:\n%s", s)
	}
	body := s[i+len("heat_flux =") : strings.Index(s[i:], ";")+i]
	nums := regexp.MustCompile(`[-+0-9.eE]+`).FindAllString(body, -1)
	if len(nums) != len(g.Values) {
		t.Fatalf("ncdump shows %d values, want %d", len(nums), len(g.Values))
	}
	for k, n := range nums {
		v, err := strconv.ParseFloat(n, 64)
		if err != nil || v != g.Values[k] {
			t.Errorf("value %d: ncdump %q, want %v", k, n, g.Values[k])
		}
	}
}
