package export

import (
	"bytes"
	"fmt"
	"io"
	"testing"

	"cmbflux/flux/sh"
)

// Target: a degree-1000 table (about 500 000 rows) written and read in well
// under a second, so that coefficient files are never the slow part of a
// sweep point.
func BenchmarkCoeffsText(b *testing.B) {
	for _, lmax := range []int{32, 256, 1000} {
		c := randomCoeffs(lmax, sh.Canonical, 1)
		var buf bytes.Buffer
		WriteCoeffsText(&buf, c, testMeta(), &CoeffOptions{Conv: sh.Convention{Norm: sh.Schmidt}})
		data := buf.Bytes()
		b.Run(fmt.Sprintf("write/lmax=%d", lmax), func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				WriteCoeffsText(io.Discard, c, testMeta(), &CoeffOptions{Conv: sh.Convention{Norm: sh.Schmidt}})
			}
		})
		b.Run(fmt.Sprintf("read/lmax=%d", lmax), func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(data)))
			for b.Loop() {
				if _, err := ReadCoeffs(bytes.NewReader(data), "bench", nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// Target: a 0.5-degree grid (720 x 360) as netCDF in a few milliseconds.
func BenchmarkGridNetCDF(b *testing.B) {
	for _, n := range []int{90, 360} {
		g := &Grid{Kind: "equiangular", Name: "q"}
		for j := range n {
			g.Lat = append(g.Lat, 90-(float64(j)+0.5)*180/float64(n))
		}
		for i := range 2 * n {
			g.Lon = append(g.Lon, float64(i)*180/float64(n))
		}
		g.Values = make([]float64, 2*n*n)
		b.Run(fmt.Sprintf("nlat=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := WriteGridNetCDF(io.Discard, g, testMeta()); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// Target: outlines with 100 000 vertices (a fine contour) in well under a
// second.
func BenchmarkOutlines(b *testing.B) {
	for _, n := range []int{1000, 100000} {
		rings := [][][2]float64{smallCircle(180, 10, 30, n, true), smallCircle(175, 12, 5, n/10, false)}
		b.Run(fmt.Sprintf("vertices=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := WriteOutlines(io.Discard, []Outline{{Rings: rings}}, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
