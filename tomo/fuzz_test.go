package tomo

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// checkGrid fails the test unless g satisfies the invariants documented on
// Grid and ReadText, and reads back unchanged after WriteText.
func checkGrid(t *testing.T, g *Grid) { checkGridReg(t, g, true) }

// checkGridReg is checkGrid when checkReg is set; otherwise it checks only
// what Grid.Check does and the validity of the values (the netCDF reader
// also honours CF cell bounds, accepts regional grids and float
// coordinates).
func checkGridReg(t *testing.T, g *Grid, checkReg bool) {
	t.Helper()
	if !checkReg {
		// Grids from the netCDF reader: the general invariants only (they
		// may be regional and carry single-precision coordinates).
		if err := g.Check(); err != nil {
			t.Fatal(err)
		}
		for s, v := range g.Values {
			if (g.Valid == nil || g.Valid[s]) && (math.IsNaN(v) || math.IsInf(v, 0)) {
				t.Fatalf("valid point %d holds %v", s, v)
			}
		}
		return
	}
	nlon, nlat, nd := g.NLon(), g.NLat(), g.NDepth()
	if nlon < 2 || nlat < 2 || len(g.Values) != nd*nlat*nlon {
		t.Fatalf("shape %d x %d x %d with %d values", nlon, nlat, nd, len(g.Values))
	}
	d := 360 / float64(nlon)
	for i, v := range g.Lon {
		if v < 0 || v >= 360 || (i > 0 && !(v > g.Lon[i-1])) || math.Abs(v-g.Lon[0]-float64(i)*d) > 1e-6*d+1e-8 {
			t.Fatalf("Lon %v not ascending, regular and in [0, 360)", g.Lon)
		}
	}
	dl := g.DLat()
	for j, v := range g.Lat {
		if v < -90 || v > 90 || (j > 0 && !(v > g.Lat[j-1])) || math.Abs(v-g.Lat[0]-float64(j)*dl) > 1e-6*dl+1e-8 {
			t.Fatalf("Lat %v not ascending, regular and in [-90, 90]", g.Lat)
		}
	}
	for k, v := range g.Depth {
		if v < 0 || v >= EarthRadiusKm || (k > 0 && !(v > g.Depth[k-1])) {
			t.Fatalf("Depth %v not ascending in [0, 6371)", g.Depth)
		}
	}
	if g.Valid != nil && len(g.Valid) != len(g.Values) {
		t.Fatalf("%d mask entries for %d values", len(g.Valid), len(g.Values))
	}
	nvalid := 0
	for s, v := range g.Values {
		ok := g.Valid == nil || g.Valid[s]
		if ok {
			nvalid++
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("valid point %d holds %v", s, v)
			}
		}
	}
	if nvalid == 0 {
		t.Fatal("no valid point")
	}
	if g.Reg != registration(g.Lon, g.Lat) {
		t.Fatalf("Reg %v disagrees with the latitudes %v", g.Reg, g.Lat)
	}
	var buf bytes.Buffer
	if err := WriteText(&buf, g); err != nil {
		t.Fatal(err)
	}
	h, err := ReadText("roundtrip", buf.Bytes(), ReadOptions{Vertical: "depth"})
	if err != nil {
		t.Fatalf("written grid does not read back: %v", err)
	}
	if len(h.Values) != len(g.Values) || len(h.Lon) != nlon || len(h.Lat) != nlat {
		t.Fatalf("round trip changed the shape")
	}
	for s, v := range g.Values {
		ok := g.Valid == nil || g.Valid[s]
		hok := h.Valid == nil || h.Valid[s]
		if ok != hok || (ok && v != h.Values[s]) {
			t.Fatalf("round trip changed point %d: %v,%v -> %v,%v", s, v, ok, h.Values[s], hok)
		}
	}
}

// checkReadErr fails the test unless err is a located input error.
func checkReadErr(t *testing.T, name string, err error) {
	t.Helper()
	var ie *InputError
	if !errors.As(err, &ie) || !errors.Is(err, ErrBadInput) || ie.File != name || !strings.HasPrefix(err.Error(), name+":") {
		t.Fatalf("error is not a located *InputError: %T %v", err, err)
	}
}

// addSeeds adds the committed bad files with the given suffix, the demo
// file cut short, and a few small valid grids.
func addSeeds(f *testing.F, suffix string, valid []string) {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "bad", "*"+suffix))
	for _, p := range files {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	if b, err := os.ReadFile(filepath.Join("..", "testdata", "demo", "brindle"+suffix)); err == nil {
		f.Add(b[:min(len(b), 4000)])
	}
	for _, s := range valid {
		f.Add([]byte(s))
	}
}

func FuzzReadText(f *testing.F) {
	addSeeds(f, ".txt", []string{
		"0 -45 1\n180 -45 2\n0 45 3\n180 45 4\n",
		"# columns: lat lon radius v\n# missing: -1\n-45 -90 3480 1\n-45 90 3480 -1\n45 -90 3480 NaN\n45 90 3480 2\n",
		"0 -90 2891 1\n120 -90 2891 1\n240 -90 2891 1\n0 90 2891 2\n120 90 2891 2\n240 90 2891 2\n360 90 2891 2\n",
	})
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := ReadText("fuzz.txt", data, ReadOptions{})
		if err != nil {
			checkReadErr(t, "fuzz.txt", err)
			return
		}
		checkGrid(t, g)
	})
}

func FuzzReadCSV(f *testing.F) {
	addSeeds(f, ".csv", []string{
		"lon,lat,dvs\n0,-45,1\n180,-45,2\n0,45,3\n180,45,4\n",
		"\"Latitude\",\"Longitude\",\"Radius (km)\",\"dVs (%)\"\r\n-45,-90,3480,1\r\n-45,90,3480,\r\n45,-90,3480,NA\r\n45,90,3480,2\r\n",
	})
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := ReadCSV("fuzz.csv", data, ReadOptions{})
		if err != nil {
			checkReadErr(t, "fuzz.csv", err)
			return
		}
		checkGrid(t, g)
	})
}

// FuzzReadBytes exercises the format dispatch of ReadBytes (gzip, UTF-16,
// HDF5, netCDF, CSV and text detection) on arbitrary bytes.
func FuzzReadBytes(f *testing.F) {
	addSeeds(f, ".csv", nil)
	addSeeds(f, ".txt", []string{"CDF\x01", "\x89HDF\r\n\x1a\n", "\xff\xfe0\x00"})
	if b, err := os.ReadFile(filepath.Join("..", "testdata", "bad", "corrupt.txt.gz")); err == nil {
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := ReadBytes("fuzz", data, ReadOptions{})
		if err != nil {
			checkReadErr(t, "fuzz", err)
			return
		}
		checkGridReg(t, g, false)
	})
}
