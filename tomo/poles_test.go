package tomo

import (
	"fmt"
	"strings"
	"testing"
)

// TestPoleRows checks the warning for pole rows that hold different values:
// on the sphere every longitude at latitude +-90 is the same point
// (spherical coordinates, common practice), so such a file contradicts
// itself, like a repeated seam column with another value.
func TestPoleRows(t *testing.T) {
	grid := func(north, south func(lon float64) float64) string {
		var b strings.Builder
		for lat := -90; lat <= 90; lat += 45 {
			for lon := 0; lon < 360; lon += 90 {
				v := 0.5 + float64(lat)/100 // percent
				switch lat {
				case 90:
					v = north(float64(lon))
				case -90:
					v = south(float64(lon))
				}
				fmt.Fprintf(&b, "%d %d %g\n", lon, lat, v)
			}
		}
		return b.String()
	}
	flat := func(v float64) func(float64) float64 { return func(float64) float64 { return v } }
	tests := []struct {
		name  string
		north func(float64) float64
		south func(float64) float64
		want  string // "" for no warning
	}{
		{"equal pole values", flat(1.4), flat(-0.4), ""},
		// 1e-5 % against a largest magnitude of 1.4 %: printing noise,
		// below poleTol.
		{"rounding noise", func(lon float64) float64 { return 1.4 + 1e-5*lon/90 }, flat(-0.4), ""},
		{"north differs", func(lon float64) float64 { return 1 + lon/100 }, flat(-0.4),
			"the 4 values at latitude 90 range from 1 to 3.7, yet they are all the north pole, one point: the file contradicts itself"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			g, err := ReadText("poles.txt", []byte(grid(tc.north, tc.south)), ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if tc.want == "" {
				if len(g.Warnings) != 0 {
					t.Errorf("unexpected warnings %q", g.Warnings)
				}
				return
			}
			if !containsAny(g.Warnings, tc.want) {
				t.Errorf("Warnings %q lack %q", g.Warnings, tc.want)
			}
		})
	}
	// A cell-registered grid has no pole rows (half-step latitudes).
	g := &Grid{Lon: []float64{45, 135, 225, 315}, Lat: []float64{-45, 45}, Values: []float64{1, 2, 3, 4, 5, 6, 7, 8}}
	if w := poleWarning(g); w != "" {
		t.Errorf("cell grid: %q", w)
	}
}

// TestPoleRowsNetCDF reads a node grid made by ncgen whose pole rows vary
// with longitude (testdata/cdl/grid_node_cdf1.cdl, values lon + 1000 (lat
// + 90)): the netCDF reader warns as the text reader does.
func TestPoleRowsNetCDF(t *testing.T) {
	path, data := ncgenFile(t, "grid_node_cdf1.cdl")
	g, err := ReadNetCDF(path, data, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !containsAny(g.Warnings, "the 8 values at latitude -90 range from 0 to 315, yet they are all the south pole") {
		t.Errorf("Warnings %q", g.Warnings)
	}
}
