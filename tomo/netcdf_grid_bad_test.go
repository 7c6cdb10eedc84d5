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
		auto []string // through ReadFile's format detection, when not want
	}{
		{file: "nc-truncated.nc", want: []string{"variable dvs", "file truncated", "beyond the end of the file"}},
		{file: "nc-truncated-header.nc", want: []string{"byte offset 44", "gatt_list nelems", "file truncated"}},
		{file: "nc-dim-length-absurd.nc", want: []string{"variable lat", "vsize", "needs more than"}},
		{file: "nc-begin-beyond-end.nc", want: []string{"variable dvs", "begin", "beyond the end"}},
		{file: "nc-dim-count-billions.nc", want: []string{"byte offset 12", "dim_list nelems", "negative value"}},
		{file: "nc-dim-count-two-billion.nc", want: []string{"dim_list nelems", "claims 2000000000 entries"}},
		{file: "nc-attr-count-billions.nc", want: []string{"attribute nelems of title", "1500000000 values"}},
		{file: "nc-numrecs-billions.nc", want: []string{"variable v", "numrecs", "2000000000 records"}},
		{file: "nc-bad-magic.nc", want: []string{"magic", "not a netCDF classic file"}, auto: []string{"a binary file", "43 44 58 01", "netCDF classic (magic \"CDF\" then version byte 1, 2 or 5)"}},
		{file: "nc-bad-version.nc", want: []string{"magic", "version byte 0x03"}},
		{file: "nc-hdf5.nc", want: []string{"netCDF-4/HDF5", "nccopy -k classic in.nc out.nc", "-k cdf5"}, auto: []string{"netCDF-4 (HDF5)", "nccopy -k classic in.nc out.nc"}},
		{file: "nc-bad-name.nc", want: []string{"dimension name", "\"l/n\""}},
		{file: "nc-bad-tag.nc", want: []string{"dim_list tag", "0xB"}},
		{file: "nc-lat-nonmonotonic.nc", want: []string{"variable lat", "not strictly monotonic", "CF-1.8 section 1.2"}},
		{file: "nc-no-lat-coordinate.nc", want: []string{"no latitude coordinate variable", "degrees_north"}},
		{file: "nc-all-fill.nc", want: []string{"variable dvs", "every value is missing"}},
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
			// The same file through ReadFile, whose format detection must
			// hand it to the netCDF reader (or, for a file that is not
			// netCDF at all, say it is binary) rather than to the text
			// reader.
			_, err2 := ReadFile(path, ReadOptions{})
			if err2 == nil {
				t.Fatal("ReadFile: no error")
			}
			if !errors.Is(err2, ErrBadInput) || !strings.HasPrefix(err2.Error(), path+":") {
				t.Errorf("ReadFile: error %v does not name %s or wrap ErrBadInput", err2, path)
			}
			if tt.auto == nil {
				if err2.Error() != err.Error() {
					t.Errorf("ReadFile: %v\nReadNetCDF: %v", err2, err)
				}
			}
			for _, w := range tt.auto {
				if !strings.Contains(err2.Error(), w) {
					t.Errorf("ReadFile: message %q lacks %q", err2, w)
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
