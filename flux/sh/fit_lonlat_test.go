package sh

import (
	"math"
	"strings"
	"testing"
)

// table samples c on a latitude-longitude table in degrees with the
// pointwise evaluator (independent of the fit).
func table(c *Coeffs, lat, lon []float64) []float64 {
	ev := NewEvaluator(c)
	v := make([]float64, len(lat)*len(lon))
	for j, la := range lat {
		for i, lo := range lon {
			v[j*len(lon)+i] = ev.Value((90-la)*math.Pi/180, lo*math.Pi/180)
		}
	}
	return v
}

func degrees(from, step float64, n int) []float64 {
	s := make([]float64, n)
	for i := range s {
		s[i] = from + step*float64(i)
	}
	return s
}

// TestFitLonLat: node-registered tables with both poles, ascending
// latitudes and the seam column at 360 degrees, and a table covering half
// the longitudes, recover band-limited fields (least squares on exact data,
// common practice, as in TestFitBandLimited).
func TestFitLonLat(t *testing.T) {
	t.Run("node-registered/seam", func(t *testing.T) {
		const lmax, tol = 20, 1e-10
		lat, lon := degrees(-90, 2, 91), degrees(0, 2, 181)
		c := trRandCoeffs(lmax, 31)
		got, rep, err := FitLonLat(lmax, lat, lon, table(c, lat, lon), nil)
		if err != nil {
			t.Fatal(err)
		}
		if d := trMaxRel(got, c); d > tol {
			t.Errorf("coefficients off by %.3g > %.1g", d, tol)
		}
		if !strings.Contains(strings.Join(rep.Warnings, "\n"), "repeats the first") || rep.Method != "per-order QR" {
			t.Errorf("report: %s, warnings %q", rep.Method, rep.Warnings)
		}
	})
	t.Run("partial-longitudes", func(t *testing.T) {
		const lmax, tol = 4, 1e-8
		lat, lon := degrees(89, -2, 90), degrees(-180, 2, 91) // -180..0
		c := trRandCoeffs(lmax, 32)
		got, rep, err := FitLonLat(lmax, lat, lon, table(c, lat, lon), nil)
		if err != nil {
			t.Fatal(err)
		}
		if d := trMaxRel(got, c); d > tol {
			t.Errorf("coefficients off by %.3g > %.1g (condition %.3g)", d, tol, rep.Condition)
		}
		// 91 of 180 columns, each the width of a 2-degree cell.
		if math.Abs(rep.Coverage-91.0/180) > 1e-3 {
			t.Errorf("coverage %.4f, want %.4f", rep.Coverage, 91.0/180)
		}
	})
	for _, tc := range []struct {
		name     string
		lat, lon []float64
		want     string
	}{
		{"uneven", degrees(-80, 20, 9), []float64{0, 10, 25, 30}, "equally spaced"},
		{"step-not-dividing-360", degrees(-80, 20, 9), degrees(0, 7, 10), "does not divide 360"},
		{"latitude-order", []float64{10, 20, 15}, degrees(0, 10, 36), "monotonic"},
		{"latitude-range", []float64{-95, 0}, degrees(0, 10, 36), "outside"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := NewLonLatLayout(tc.lat, tc.lon)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("got error %v, want one mentioning %q", err, tc.want)
			}
		})
	}
}

// FuzzLonLatLayout feeds arbitrary axes (decoded from bytes) to the layout:
// it must either return an error or a layout whose indices are a one-to-one
// map into the grid (every grid point used at most once).
func FuzzLonLatLayout(f *testing.F) {
	f.Add(-90.0, 2.0, uint8(91), 0.0, 2.0, uint8(181))
	f.Add(89.0, -2.0, uint8(90), -180.0, 2.0, uint8(91))
	f.Add(0.0, 1.0, uint8(1), 0.0, 7.0, uint8(10))
	f.Fuzz(func(t *testing.T, lat0, dlat float64, nlat uint8, lon0, dlon float64, nlon uint8) {
		lat := degrees(lat0, dlat, int(nlat))
		lon := degrees(lon0, dlon, int(nlon))
		ly, err := NewLonLatLayout(lat, lon)
		if err != nil {
			return
		}
		if len(ly.Index) != len(lat)*len(lon) || ly.Grid.NLat() != len(lat) {
			t.Fatalf("layout sizes %d, %d for %d x %d", len(ly.Index), ly.Grid.NLat(), len(lat), len(lon))
		}
		seen := make(map[int]bool)
		for _, k := range ly.Index {
			if k < 0 {
				continue
			}
			if k >= ly.Grid.Len() || seen[k] {
				t.Fatalf("grid index %d out of range or repeated", k)
			}
			seen[k] = true
		}
		for i := 1; i < ly.Grid.NLat(); i++ {
			if !(ly.Grid.Colat[i] > ly.Grid.Colat[i-1]) {
				t.Fatalf("rings not north to south: %v", ly.Grid.Colat)
			}
		}
	})
}

func TestLonLatLayoutNaN(t *testing.T) {
	if _, err := NewLonLatLayout([]float64{0, 10}, []float64{0, 10, math.NaN(), 30}); err == nil {
		t.Error("NaN longitude accepted")
	}
	if _, err := NewLonLatLayout([]float64{0, 10}, []float64{0, 1e-9, 2e-9}); err == nil {
		t.Error("a 1e-9 degree step accepted")
	}
}
