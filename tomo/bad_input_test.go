package tomo

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"
)

// TestBadInput reads every malformed file of testdata/bad (text and CSV
// cases; the netCDF cases nc-* are tested in netcdf_grid_test.go) through
// the whole tomo front end, ReadFile then SelectLayer with default options,
// and checks that the error is an *InputError wrapping ErrBadInput, that it
// names the file and the line (where the cause has one), and that it says
// what is wrong.
func TestBadInput(t *testing.T) {
	tests := []struct {
		file string
		line int      // expected InputError.Line; 0 when the cause has no line
		want []string // substrings of the message
	}{
		{"empty.txt", 0, []string{"the file is empty"}},
		{"comments-only.txt", 3, []string{"no data lines"}},
		{"header-only.csv", 1, []string{"a header row but no data rows"}},
		{"csv-no-header.csv", 1, []string{"is numbers, not column titles"}},
		{"non-numeric.txt", 6, []string{"column 3", `"abc" is not a number`}},
		{"text-with-header.txt", 1, []string{"a row of words (lon lat dvs)", "# columns: lon lat dvs"}},
		{"all-nan.txt", 0, []string{"all 8 values are missing"}},
		{"lat-out-of-range.txt", 5, []string{"latitude 95 is outside -90..90"}},
		{"lon-out-of-range.txt", 4, []string{"longitude 400 is outside -180..360"}},
		{"duplicate-conflict.txt", 9, []string{"duplicate point (lon 135, lat 45) conflicts with line 6", "0.999 here, 0.45 there"}},
		{"ragged.txt", 0, []string{"the grid is incomplete: 1 of 8 points are missing", "lon 225, lat 45"}},
		{"mixed-lon.txt", 8, []string{"mixed longitude conventions", "line 1 has longitude -135", "line 8 has 200"}},
		{"seam-conflict.txt", 10, []string{"longitude 360 duplicates longitude 0 of line 6", "latitude 45", "0.9, not 0.5"}},
		{"wrong-column-count.txt", 6, []string{"3 fields, but line 1 has 4"}},
		{"two-columns.txt", 1, []string{"2 fields", "3 columns (lon lat value) or 4"}},
		{"inconsistent-spacing.txt", 5, []string{"latitude step from -40 to 10 is 50, but the smallest step is 30"}},
		{"missing-column.txt", 4, []string{"longitudes jump from 60 to 120", "1 longitude value(s) are missing"}},
		{"regional-longitudes.txt", 0, []string{"longitudes cover 0..90 in 4 columns at spacing 30", "a global grid at this spacing has 12 columns"}},
		{"incomplete-depth.csv", 0, []string{"1 of 8 points are missing, the first at lon 180, lat 45, depth 3000 km", "lon-lat-depth combination"}},
		{"single-latitude.txt", 1, []string{"every point has latitude 10", "at least two latitudes"}},
		{"negative-depth.txt", 1, []string{"depth -5 km is outside 0..6371", "positive downwards"}},
		{"radius-as-depth.txt", 1, []string{"looks like a radius"}},
		{"infinite-value.txt", 6, []string{`"Inf" is infinite`}},
		{"wrong-field-count.csv", 5, []string{"4 fields, but the header (line 1) has 3 columns"}},
		{"no-lon-column.csv", 1, []string{"no longitude column", "columns: x, lat, dvs"}},
		{"ambiguous-value.csv", 1, []string{"several candidate value columns (dvs, dvp)"}},
		{"empty-coordinate.csv", 4, []string{"column 2 (lat)", `"" is not a number`}},
		{"bad-quote.csv", 2, []string{`"`}},
		{"hdf5.nc", 0, []string{"netCDF-4 (HDF5)", "nccopy -k classic in.nc out.nc"}},
		{"implausible-amplitude.txt", 0, []string{"1 values exceed the plausible 20 %", "largest 35 % at lon 225, lat 45", "force"}},
		{"undeclared-sentinel.txt", 0, []string{"3 values exceed", "the value -9999 occurs 3 times", "# missing: -9999"}},
		{"utf16.txt", 0, []string{"encoded as UTF-16", "save it as UTF-8"}},
		{"corrupt.txt.gz", 0, []string{"gzip-compressed but cannot be decompressed"}},
		{"unknown-units.csv", 0, []string{`units "furlongs" are not understood`}},
		{"absolute-no-reference.txt", 0, []string{"need a reference velocity"}},
	}
	if len(tests) < 15 {
		t.Fatalf("only %d bad-input cases", len(tests))
	}
	seen := map[string]bool{}
	for _, tc := range tests {
		seen[tc.file] = true
		t.Run(tc.file, func(t *testing.T) {
			path := filepath.Join("..", "testdata", "bad", tc.file)
			g, err := ReadFile(path, ReadOptions{})
			if err == nil {
				_, err = SelectLayer(g, LayerOptions{})
			}
			if err == nil {
				t.Fatal("no error")
			}
			var ie *InputError
			if !errors.As(err, &ie) {
				t.Fatalf("error %T is not an *InputError: %v", err, err)
			}
			if !errors.Is(err, ErrBadInput) {
				t.Errorf("error does not wrap ErrBadInput: %v", err)
			}
			if ie.File != path {
				t.Errorf("File = %q, want %q", ie.File, path)
			}
			if ie.Line != tc.line {
				t.Errorf("Line = %d, want %d (%v)", ie.Line, tc.line, err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, path+":") {
				t.Errorf("message does not start with the file name: %s", msg)
			}
			for _, w := range tc.want {
				if !strings.Contains(msg, w) {
					t.Errorf("message lacks %q:\n%s", w, msg)
				}
			}
		})
	}
	// Every text/CSV file in testdata/bad must have a case here.
	all, _ := filepath.Glob(filepath.Join("..", "testdata", "bad", "*"))
	for _, p := range all {
		b := filepath.Base(p)
		if !strings.HasPrefix(b, "nc-") && !seen[b] {
			t.Errorf("testdata/bad/%s has no case in TestBadInput", b)
		}
	}
}
