package tomo

import (
	"bytes"
	"compress/gzip"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// coordTol is the tolerance on coordinates recovered from a file (degrees
// or km): they are snapped to the regular lattice and rounded to 1e-9.
const coordTol = 1e-9

// field is an invented test function of position whose value identifies
// the point it was written at.
func field(lon, lat, depth float64) float64 {
	return math.Round(1000*(0.01*lon+0.1*lat+0.001*depth)) / 1000
}

// gridText writes the points of the lattice as text lines "lon lat [depth]
// value" in a shuffled order (fixed seed), with the value from f.
func gridText(lons, lats, depths []float64, f func(lon, lat, d float64) string, seed uint64) string {
	var lines []string
	ds := depths
	if ds == nil {
		ds = []float64{math.NaN()}
	}
	for _, d := range ds {
		for _, la := range lats {
			for _, lo := range lons {
				if math.IsNaN(d) {
					lines = append(lines, fmt.Sprintf("%g %g %s", lo, la, f(lo, la, 0)))
				} else {
					lines = append(lines, fmt.Sprintf("%g %g %g %s", lo, la, d, f(lo, la, d)))
				}
			}
		}
	}
	r := rand.New(rand.NewPCG(seed, 7))
	r.Shuffle(len(lines), func(i, j int) { lines[i], lines[j] = lines[j], lines[i] })
	return strings.Join(lines, "\n") + "\n"
}

func fieldText(lon, lat, d float64) string { return fmt.Sprint(field(lon, lat, d)) }

func steps(first, step float64, n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = first + step*float64(i)
	}
	return v
}

func near(a, b []float64, tol float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > tol {
			return false
		}
	}
	return true
}

// checkField checks every valid value of g against field at the grid's
// coordinates, where the file's longitude lonOf(i) was written.
func checkField(t *testing.T, g *Grid, fileLon func(lon float64) float64) {
	t.Helper()
	for k := 0; k < g.NDepth(); k++ {
		d := 0.0
		if g.Depth != nil {
			d = g.Depth[k]
		}
		for j, la := range g.Lat {
			for i, lo := range g.Lon {
				v, ok := g.At(k, j, i)
				if !ok {
					continue
				}
				if want := field(fileLon(lo), la, d); v != want {
					t.Fatalf("value at lon %g lat %g depth %g = %g, want %g", lo, la, d, v, want)
				}
			}
		}
	}
}

func TestReadTextAssembly(t *testing.T) {
	same := func(lon float64) float64 { return lon }
	tests := []struct {
		name     string
		text     string
		opts     ReadOptions
		lon, lat []float64
		depth    []float64
		reg      Registration
		fileLon  func(float64) float64
		notes    []string // substrings expected among Notes
		warnings []string // substrings expected among Warnings
	}{
		{
			// Node registration: latitudes on whole steps from the poles,
			// poles included (common practice for grid registration).
			name: "node global shuffled",
			text: gridText(steps(0, 90, 4), steps(90, -45, 5), nil, fieldText, 1),
			lon:  steps(0, 90, 4), lat: steps(-90, 45, 5), reg: NodeRegistered, fileLon: same,
			// The synthetic field varies with longitude at the poles.
			warnings: []string{"range from -9 to -6.3, yet they are all the south pole, one point (2 pole rows differ"},
		},
		{
			// Cell registration: latitudes at half steps, no pole point.
			name: "cell global",
			text: gridText(steps(45, 90, 4), steps(-67.5, 45, 4), nil, fieldText, 2),
			lon:  steps(45, 90, 4), lat: steps(-67.5, 45, 4), reg: CellRegistered, fileLon: same,
		},
		{
			// Half steps in latitude but whole steps in longitude: the
			// registration rule says node; Lon and Lat say the rest.
			name: "-180..180 converted",
			text: gridText(steps(-180, 90, 4), steps(-45, 90, 2), nil, fieldText, 3),
			lon:  steps(0, 90, 4), lat: []float64{-45, 45}, reg: NodeRegistered,
			fileLon: func(lon float64) float64 {
				if lon >= 180 {
					return lon - 360
				}
				return lon
			},
			notes: []string{"converted from the -180..180 convention"},
		},
		{
			name: "seam 0 and 360 merged",
			text: gridText(steps(0, 90, 5), steps(-45, 90, 2), nil, func(lo, la, d float64) string {
				return fieldText(math.Mod(lo, 360), la, d)
			}, 4),
			lon: steps(0, 90, 4), lat: []float64{-45, 45}, reg: NodeRegistered, fileLon: same,
			notes: []string{"2 points of a repeated seam column"},
		},
		{
			name: "seam -180 and 180 merged",
			text: gridText(steps(-180, 90, 5), steps(-45, 90, 2), nil, func(lo, la, d float64) string {
				if lo == 180 {
					lo = -180
				}
				return fieldText(lo, la, d)
			}, 5),
			lon: steps(0, 90, 4), lat: []float64{-45, 45}, reg: NodeRegistered,
			fileLon: func(lon float64) float64 {
				if lon >= 180 {
					return lon - 360
				}
				return lon
			},
			notes: []string{"seam column"},
		},
		{
			name: "partial latitude coverage",
			text: gridText(steps(0, 120, 3), steps(-60, 30, 5), nil, fieldText, 6),
			lon:  steps(0, 120, 3), lat: steps(-60, 30, 5), reg: NodeRegistered, fileLon: same,
			warnings: []string{"latitudes -60..60 cover only -75..75 degrees"},
		},
		{
			name: "depth axis",
			text: gridText(steps(0, 120, 3), steps(-45, 90, 2), []float64{2891, 2600, 2750}, fieldText, 7),
			lon:  steps(0, 120, 3), lat: []float64{-45, 45}, depth: []float64{2600, 2750, 2891}, reg: NodeRegistered, fileLon: same,
		},
		{
			// Coordinates printed with two decimals on a 1/3-degree lattice.
			name: "printing noise",
			text: func() string {
				var b strings.Builder
				for _, la := range []float64{-45, 45} {
					for i := 0; i < 1080; i++ {
						fmt.Fprintf(&b, "%.2f %g 1\n", float64(i)/3, la)
					}
				}
				return b.String()
			}(),
			lon: steps(0, 1.0/3, 1080), lat: []float64{-45, 45}, reg: NodeRegistered,
			fileLon: nil,
		},
		{
			name: "columns line reorders",
			text: "# columns: lat lon dvs\n" + swapFirstTwo(gridText(steps(0, 90, 4), steps(-45, 90, 2), nil, fieldText, 8)),
			lon:  steps(0, 90, 4), lat: []float64{-45, 45}, reg: NodeRegistered, fileLon: same,
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			g, err := ReadText("test.txt", []byte(tc.text), tc.opts)
			if err != nil {
				t.Fatal(err)
			}
			if !near(g.Lon, tc.lon, coordTol) {
				t.Errorf("Lon = %v, want %v", g.Lon, tc.lon)
			}
			if !near(g.Lat, tc.lat, coordTol) {
				t.Errorf("Lat = %v, want %v", g.Lat, tc.lat)
			}
			if !near(g.Depth, tc.depth, coordTol) || (g.Depth == nil) != (tc.depth == nil) {
				t.Errorf("Depth = %v, want %v", g.Depth, tc.depth)
			}
			if g.Reg != tc.reg {
				t.Errorf("Reg = %v, want %v", g.Reg, tc.reg)
			}
			if tc.fileLon != nil {
				checkField(t, g, tc.fileLon)
			}
			for _, n := range tc.notes {
				if !containsAny(g.Notes, n) {
					t.Errorf("Notes %q lack %q", g.Notes, n)
				}
			}
			for _, w := range tc.warnings {
				if !containsAny(g.Warnings, w) {
					t.Errorf("Warnings %q lack %q", g.Warnings, w)
				}
			}
			if len(tc.warnings) == 0 && len(g.Warnings) > 0 {
				t.Errorf("unexpected warnings %q", g.Warnings)
			}
		})
	}
}

func swapFirstTwo(text string) string {
	lines := strings.Split(strings.TrimSpace(text), "\n")
	for n, l := range lines {
		f := strings.Fields(l)
		f[0], f[1] = f[1], f[0]
		lines[n] = strings.Join(f, " ")
	}
	return strings.Join(lines, "\n") + "\n"
}

func containsAny(list []string, sub string) bool {
	for _, s := range list {
		if strings.Contains(s, sub) {
			return true
		}
	}
	return false
}

func TestReadMissingValues(t *testing.T) {
	lons, lats := steps(0, 90, 4), []float64{-45, 45}
	// Point (90, -45) is NaN, (180, -45) NA, (270, 45) the sentinel -999.
	f := func(lo, la, d float64) string {
		switch {
		case lo == 90 && la == -45:
			return "NaN"
		case lo == 180 && la == -45:
			return "NA"
		case lo == 270 && la == 45:
			return "-999"
		}
		return fieldText(lo, la, d)
	}
	text := gridText(lons, lats, nil, f, 9)
	check := func(t *testing.T, g *Grid, sentinelMasked bool) {
		t.Helper()
		nvalid := 0
		for j := range g.Lat {
			for i := range g.Lon {
				if _, ok := g.At(0, j, i); ok {
					nvalid++
				}
			}
		}
		want := 6
		if sentinelMasked {
			want = 5
		}
		if nvalid != want {
			t.Errorf("%d valid points, want %d", nvalid, want)
		}
	}
	g, err := ReadText("m.txt", []byte(text), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	check(t, g, false)
	g, err = ReadText("m.txt", []byte(text), ReadOptions{Missing: []float64{-999}})
	if err != nil {
		t.Fatal(err)
	}
	check(t, g, true)
	g, err = ReadText("m.txt", []byte("# missing: -999\n"+text), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	check(t, g, true)
	// CSV: an empty value field is missing too.
	csv := "lon,lat,dvs\n" + strings.ReplaceAll(strings.ReplaceAll(strings.ReplaceAll(text, " ", ","), "NA", ""), ",-999", ",-999")
	g, err = ReadCSV("m.csv", []byte(csv), ReadOptions{Missing: []float64{-999}})
	if err != nil {
		t.Fatal(err)
	}
	check(t, g, true)
}

func TestReadIdenticalDuplicates(t *testing.T) {
	text := gridText(steps(0, 90, 4), []float64{-45, 45}, nil, fieldText, 10)
	text += "90 45 " + fieldText(90, 45, 0) + "\n"
	g, err := ReadText("d.txt", []byte(text), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !containsAny(g.Warnings, "1 duplicate points with identical values merged (the first at line 9)") {
		t.Errorf("Warnings = %q", g.Warnings)
	}
}

func TestReadRadius(t *testing.T) {
	// depth = 6371 km - r (PREM Earth radius, from memory).
	body := gridText(steps(0, 120, 3), []float64{-45, 45}, []float64{3480, 3580}, func(lo, la, r float64) string {
		return fieldText(lo, la, EarthRadiusKm-r)
	}, 11)
	for _, tc := range []struct {
		name string
		text string
		opts ReadOptions
	}{
		{"columns line", "# columns: lon lat radius dvs\n" + body, ReadOptions{}},
		{"option", body, ReadOptions{Vertical: "radius"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			g, err := ReadText("r.txt", []byte(tc.text), tc.opts)
			if err != nil {
				t.Fatal(err)
			}
			if !near(g.Depth, []float64{2791, 2891}, coordTol) {
				t.Errorf("Depth = %v, want [2791 2891]", g.Depth)
			}
			checkField(t, g, func(l float64) float64 { return l })
			if !containsAny(g.Notes, "radius converted to depth") {
				t.Errorf("Notes = %q", g.Notes)
			}
		})
	}
}

func TestReadCSVColumns(t *testing.T) {
	rows := strings.Split(strings.TrimSpace(gridText(steps(0, 90, 4), []float64{-45, 45}, []float64{2800, 2891}, fieldText, 12)), "\n")
	body := func(f func([]string) []string) string {
		var b strings.Builder
		for _, r := range rows {
			b.WriteString(strings.Join(f(strings.Fields(r)), ",") + "\r\n")
		}
		return b.String()
	}
	plain := body(func(f []string) []string { return f })
	extra := body(func(f []string) []string { return append(f, "7") })
	reordered := body(func(f []string) []string { return []string{f[3], f[2], f[1], f[0]} })
	tests := []struct {
		name  string
		data  string
		opts  ReadOptions
		vname string
		units string
	}{
		{"names with units", "Longitude,Latitude,Depth (km),dVs (%)\r\n" + plain, ReadOptions{}, "dvs", "%"},
		{"byte order mark and quotes", "\xef\xbb\xbf\"lon\",\"lat\",\"depth\",\"dvs [percent]\"\n" + plain, ReadOptions{}, "dvs", "percent"},
		{"explicit value column", "lon,lat,depth,dvs,quality\n" + extra, ReadOptions{Var: "dvs"}, "dvs", ""},
		{"explicit coordinates", "v,z,b,a\n" + reordered, ReadOptions{LonName: "a", LatName: "b", DepthName: "z"}, "v", ""},
		{"comments and settings", "# title: test\n# units: percent\nlon,lat,depth,dvs\n# a comment row\n" + plain, ReadOptions{}, "dvs", "percent"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			g, err := ReadCSV("c.csv", []byte(tc.data), tc.opts)
			if err != nil {
				t.Fatal(err)
			}
			if g.Name != tc.vname || g.Units != tc.units {
				t.Errorf("Name, Units = %q, %q; want %q, %q", g.Name, g.Units, tc.vname, tc.units)
			}
			if !near(g.Depth, []float64{2800, 2891}, coordTol) || !near(g.Lon, steps(0, 90, 4), coordTol) {
				t.Errorf("axes %v %v", g.Lon, g.Depth)
			}
			checkField(t, g, func(l float64) float64 { return l })
		})
	}
}

// TestWriteReadRoundTrip writes random grids (fixed seed) with missing
// points and reads them back: WriteText and WriteCSV must reproduce every
// value bit for bit and every mask entry.
func TestWriteReadRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for n, shape := range [][3]int{{4, 2, 0}, {36, 18, 1}, {72, 37, 3}} {
		g := &Grid{Lon: steps(0, 360/float64(shape[0]), shape[0]), Name: "dvs", Units: "percent"}
		if shape[1] == 37 {
			g.Lat = steps(-90, 5, 37)
		} else {
			d := 180 / float64(shape[1])
			g.Lat = steps(-90+d/2, d, shape[1])
		}
		if shape[2] > 0 {
			g.Depth = steps(2700, 95.5, shape[2])
		}
		size := g.NDepth() * g.NLat() * g.NLon()
		g.Values = make([]float64, size)
		g.Valid = make([]bool, size)
		for s := range g.Values {
			g.Values[s] = r.NormFloat64()
			g.Valid[s] = r.IntN(10) > 0
		}
		g.Valid[0] = true
		for _, w := range []struct {
			name  string
			write func(*bytes.Buffer, *Grid) error
		}{
			{"text", func(b *bytes.Buffer, g *Grid) error { return WriteText(b, g) }},
			{"csv", func(b *bytes.Buffer, g *Grid) error { return WriteCSV(b, g) }},
		} {
			var buf bytes.Buffer
			if err := w.write(&buf, g); err != nil {
				t.Fatal(err)
			}
			h, err := ReadBytes(fmt.Sprintf("rt%d.%s", n, w.name), buf.Bytes(), ReadOptions{})
			if err != nil {
				t.Fatalf("%s %v: %v", w.name, shape, err)
			}
			if h.Source.Format != w.name {
				t.Errorf("format detected as %q, want %q", h.Source.Format, w.name)
			}
			if !near(h.Lon, g.Lon, coordTol) || !near(h.Lat, g.Lat, coordTol) || !near(h.Depth, g.Depth, coordTol) {
				t.Fatalf("%s %v: axes differ", w.name, shape)
			}
			for s := range g.Values {
				hv, hok := h.Values[s], h.Valid == nil || h.Valid[s]
				if hok != g.Valid[s] || (hok && hv != g.Values[s]) {
					t.Fatalf("%s %v: point %d = %v,%v; want %v,%v", w.name, shape, s, hv, hok, g.Values[s], g.Valid[s])
				}
			}
		}
	}
}

func TestDetectFormat(t *testing.T) {
	tests := []struct {
		data, want string
	}{
		{"CDF\x01\x00", "netcdf"},         // netCDF classic format specification: magic "CDF" 0x01
		{"CDF\x02\x00", "netcdf"},         // 64-bit offset variant
		{"CDF\x05\x00", "netcdf"},         // 64-bit data variant
		{"CDF\x03\x00", "netcdf"},         // not a netCDF version, but the netCDF reader names it
		{"CDF 1 2\n", "text"},             // "CDF" then a space: a text line
		{"CDX\x01\x00\x00", "binary"},     // NUL bytes: neither text nor CSV (common practice)
		{"\x1f\x8b\x08\x00", "binary"},    // gzip (RFC 1952) is unpacked before detection
		{"\x89HDF\r\n\x1a\n\x00", "hdf5"}, // HDF5 format specification, superblock signature
		{"# a, comment\n\n0 0 1\n", "text"},
		{"# comment\nlon,lat,v\n", "csv"},
		{"", "text"},
	}
	for _, tc := range tests {
		if got := DetectFormat([]byte(tc.data)); got != tc.want {
			t.Errorf("DetectFormat(%q) = %q, want %q", tc.data, got, tc.want)
		}
	}
}

// TestReadFileProvenance reads a committed file and checks the provenance:
// the sha256 (FIPS 180-4) of the file's bytes as stored on disk.
func TestReadFileProvenance(t *testing.T) {
	path := filepath.Join("..", "testdata", "demo", "brindle.csv")
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	g, err := ReadFile(path, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256(data)
	if g.Source.Path != path || g.Source.Format != "csv" || g.Source.SHA256 != hex.EncodeToString(sum[:]) {
		t.Errorf("Source = %+v", g.Source)
	}
	if _, err := ReadFile(filepath.Join(t.TempDir(), "absent.txt"), ReadOptions{}); err == nil || !strings.Contains(err.Error(), "absent.txt: cannot read the file") {
		t.Errorf("missing file: %v", err)
	}
	h, err := Read("-", bytes.NewReader(data), ReadOptions{})
	if err != nil || h.Source.Path != "-" || !slices.Equal(h.Values, g.Values) {
		t.Errorf("Read from a reader: %v", err)
	}
}

func TestReadDepthInMetresAndLatitudeOrder(t *testing.T) {
	// Rows written north to south, depth in metres (1 km = 1000 m).
	var b strings.Builder
	b.WriteString("lon,lat,depth (m),dvs\n")
	for _, d := range []float64{2800, 2891} {
		for _, la := range []float64{45, -45} {
			for _, lo := range steps(0, 90, 4) {
				fmt.Fprintf(&b, "%g,%g,%g,%g\n", lo, la, d*1000, field(lo, la, d))
			}
		}
	}
	g, err := ReadCSV("m.csv", []byte(b.String()), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(g.Depth, []float64{2800, 2891}) || !slices.Equal(g.Lat, []float64{-45, 45}) {
		t.Errorf("Depth %v Lat %v", g.Depth, g.Lat)
	}
	checkField(t, g, func(l float64) float64 { return l })
	if !containsAny(g.Notes, "latitudes run from north to south in the file") {
		t.Errorf("Notes = %q", g.Notes)
	}
	if _, err := ReadCSV("f.csv", []byte("lon,lat,depth (furlong),v\n0,0,1,1\n"), ReadOptions{}); err == nil || !strings.Contains(err.Error(), `units "furlong" of the depth or radius not understood`) {
		t.Errorf("unknown depth units: %v", err)
	}
	// Swapped columns get a hint.
	if _, err := ReadText("s.txt", []byte("45 200 1\n"), ReadOptions{}); err == nil || !strings.Contains(err.Error(), "swapped") {
		t.Errorf("swapped columns: %v", err)
	}
}

// TestReadGzip reads the demo text compressed with GNU gzip (Debian
// package gzip, an implementation of RFC 1952 independent of ours) when
// it is installed, else with the standard library's compress/gzip.
func TestReadGzip(t *testing.T) {
	path := filepath.Join("..", "testdata", "demo", "brindle.txt")
	plain, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var packed []byte
	if gz, err := exec.LookPath("gzip"); err == nil {
		if packed, err = exec.Command(gz, "-c", "-9", path).Output(); err != nil {
			t.Fatal(err)
		}
	} else {
		var buf bytes.Buffer
		zw := gzip.NewWriter(&buf)
		zw.Write(plain)
		zw.Close()
		packed = buf.Bytes()
	}
	g, err := ReadBytes("brindle.txt.gz", packed, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(g.Values, Demo().Values) || g.Source.Format != "text" || !containsAny(g.Notes, "decompressed from gzip") {
		t.Errorf("gzip: format %q notes %q", g.Source.Format, g.Notes)
	}
	sum := sha256.Sum256(packed)
	if g.Source.SHA256 != hex.EncodeToString(sum[:]) {
		t.Error("sha256 is not that of the compressed bytes")
	}
}

// TestReadFileStdin reads "-" from standard input.
func TestReadFileStdin(t *testing.T) {
	r, w, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	old := os.Stdin
	os.Stdin = r
	defer func() { os.Stdin = old; r.Close() }()
	go func() {
		w.WriteString("lon,lat,dvs\n0,-45,1\n180,-45,2\n0,45,3\n180,45,4\n")
		w.Close()
	}()
	g, err := ReadFile("-", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if g.Source.Path != "-" || g.Source.Format != "csv" || !slices.Equal(g.Values, []float64{1, 2, 3, 4}) {
		t.Errorf("stdin grid %+v", g)
	}
}
