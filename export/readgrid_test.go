package export

import (
	"bytes"
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
)

// Every grid format reads back to the same float64 bits and metadata.
func TestGridRoundTrip(t *testing.T) {
	g := testGrid()
	for _, f := range []Format{FormatText, FormatCSV, FormatNetCDF} {
		var buf bytes.Buffer
		if err := WriteGrid(&buf, f, g, testMeta()); err != nil {
			t.Fatal(err)
		}
		tab, err := ReadGrid(&buf, "g")
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		h := tab.Grid
		if !sameBits(h.Lon, g.Lon) || !sameBits(h.Lat, g.Lat) || !sameBits(h.Values, g.Values) {
			t.Errorf("%s: grid not read back exactly", f)
		}
		m := testMeta()
		if h.Name != g.Name || h.Kind != g.Kind || tab.Meta.Units != m.Units || tab.Meta.Sign != m.Sign ||
			tab.Meta.Quantity != m.Quantity || tab.Meta.Version != m.Version || tab.Meta.RadiusKm != DefaultRadiusKm ||
			len(tab.Meta.Inputs) != 1 || tab.Meta.Inputs[0] != m.Inputs[0] || tab.Meta.Params["zeta"] != "x y" || len(tab.Meta.Params) != len(m.Params) {
			t.Errorf("%s: metadata read back as %+v, name %q kind %q", f, tab.Meta, h.Name, h.Kind)
		}
	}
}

func TestReadGridErrors(t *testing.T) {
	var buf bytes.Buffer
	WriteGridText(&buf, testGrid(), nil)
	good := buf.String()
	lines := strings.Split(good, "\n")
	first := 0
	for i, l := range lines {
		if l != "" && l[0] != '#' {
			first = i + 1
			break
		}
	}
	row := func(k int) string { return lines[first-1+k] }
	for _, tc := range []struct{ in, want string }{
		{strings.Replace(good, row(1)+"\n", "", 1), "g.txt:"},
		{strings.Replace(good, row(2), "45 67.5 x", 1), `g.txt:` + itoa(first+2) + `: value: "x" is not a number`},
		{strings.Replace(good, row(8), "45 22.5 1", 1), `g.txt:` + itoa(first+8) + `: longitude 45 where 0 was expected`},
		{strings.Replace(good, row(3), "135 67.5", 1), `g.txt:` + itoa(first+3) + `: 2 columns, want 3`},
		{strings.Replace(good, "# nlat = 4", "# nlat = 5", 1), "header nlat = 5 but the data have 4"},
		{"# nothing\n", "g.txt: no grid points"},
		{"CDF\x01garbage", "g.txt:"},
	} {
		_, err := ReadGrid(strings.NewReader(tc.in), "g.txt")
		if err == nil || !strings.Contains(err.Error(), tc.want) || !errors.Is(err, ErrBadInput) {
			t.Errorf("error %v, want %q", err, tc.want)
		}
	}
}

func itoa(i int) string { return strconv.Itoa(i) }

func FuzzReadGrid(f *testing.F) {
	for _, fm := range []Format{FormatText, FormatCSV, FormatNetCDF} {
		var buf bytes.Buffer
		WriteGrid(&buf, fm, testGrid(), testMeta())
		f.Add(buf.Bytes())
	}
	f.Add([]byte("0 0 1\n90 0 2\n0 10 3\n90 10 4\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		maxGridPoints = 1 << 16
		tab, err := ReadGrid(bytes.NewReader(data), "fuzz")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fuzz") {
				t.Fatalf("error does not name the file: %v", err)
			}
			return
		}
		g := tab.Grid
		if len(g.Values) != len(g.Lon)*len(g.Lat) {
			t.Fatalf("%d values for %d x %d", len(g.Values), len(g.Lat), len(g.Lon))
		}
		for _, v := range g.Values {
			if math.IsInf(v, 0) {
				return // netCDF may hold infinities; writers refuse them
			}
		}
	})
}
