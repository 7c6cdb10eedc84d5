package tomo

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestReadNetCDFBadFiles reads the committed testdata/bad/nc-* files (made
// by the helpers in tomo/netcdf/bad_test.go) and checks that each error
// names the file, wraps ErrBadInput and says what is wrong.
func TestReadNetCDFBadFiles(t *testing.T) {
	tests := []struct {
		file string
		want []string
	}{
		{"nc-truncated.nc", []string{"variable dvs", "file truncated", "beyond the end of the file"}},
		{"nc-truncated-header.nc", []string{"byte offset 44", "gatt_list nelems", "file truncated"}},
		{"nc-dim-length-absurd.nc", []string{"variable lat", "vsize", "needs more than"}},
		{"nc-begin-beyond-end.nc", []string{"variable dvs", "begin", "beyond the end"}},
		{"nc-dim-count-billions.nc", []string{"byte offset 12", "dim_list nelems", "negative value"}},
		{"nc-dim-count-two-billion.nc", []string{"dim_list nelems", "claims 2000000000 entries"}},
		{"nc-attr-count-billions.nc", []string{"attribute nelems of title", "1500000000 values"}},
		{"nc-numrecs-billions.nc", []string{"variable v", "numrecs", "2000000000 records"}},
		{"nc-bad-magic.nc", []string{"magic", "not a netCDF classic file"}},
		{"nc-bad-version.nc", []string{"magic", "version byte 0x03"}},
		{"nc-hdf5.nc", []string{"netCDF-4/HDF5", "nccopy -k classic in.nc out.nc", "-k cdf5"}},
		{"nc-bad-name.nc", []string{"dimension name", "\"l/n\""}},
		{"nc-bad-tag.nc", []string{"dim_list tag", "0xB"}},
		{"nc-lat-nonmonotonic.nc", []string{"variable lat", "not strictly monotonic", "CF-1.8 section 1.2"}},
		{"nc-no-lat-coordinate.nc", []string{"no latitude coordinate variable", "degrees_north"}},
		{"nc-all-fill.nc", []string{"variable dvs", "every value is missing"}},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			path := filepath.Join("..", "testdata", "bad", tt.file)
			data, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			_, err = ReadNetCDF(path, data, ReadOptions{})
			if err == nil {
				t.Fatal("no error")
			}
			var ie *InputError
			if !errors.As(err, &ie) || !errors.Is(err, ErrBadInput) || ie.File != path {
				t.Errorf("error %v is not an InputError for %s wrapping ErrBadInput", err, path)
			}
			for _, w := range tt.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("message %q lacks %q", err, w)
				}
			}
		})
	}
}

// FuzzReadNetCDF feeds arbitrary bytes to ReadNetCDF: it must return a
// grid or an error, never panic, and a grid must satisfy the invariants
// documented on Grid.
func FuzzReadNetCDF(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "bad", "nc-*.nc"))
	for _, p := range files {
		if b, err := os.ReadFile(p); err == nil {
			f.Add(b)
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := ReadNetCDF("fuzz.nc", data, ReadOptions{})
		if err != nil {
			if !errors.Is(err, ErrBadInput) {
				t.Fatalf("error %v does not wrap ErrBadInput", err)
			}
			return
		}
		if len(g.Values) != g.NDepth()*g.NLat()*g.NLon() {
			t.Fatalf("%d values for %d x %d x %d", len(g.Values), g.NDepth(), g.NLat(), g.NLon())
		}
		for i := 1; i < len(g.Lon); i++ {
			if !(g.Lon[i] > g.Lon[i-1]) || g.Lon[i] >= 360 || g.Lon[0] < 0 {
				t.Fatalf("Lon not ascending in [0, 360): %v", g.Lon)
			}
		}
		for i := 1; i < len(g.Lat); i++ {
			if !(g.Lat[i] > g.Lat[i-1]) {
				t.Fatalf("Lat not ascending: %v", g.Lat)
			}
		}
		for i := 1; i < len(g.Depth); i++ {
			if !(g.Depth[i] > g.Depth[i-1]) {
				t.Fatalf("Depth not ascending: %v", g.Depth)
			}
		}
	})
}
