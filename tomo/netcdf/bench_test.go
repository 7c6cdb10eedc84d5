package netcdf

import (
	"io"
	"math"
	"testing"
)

// BenchmarkEncode writes a 0.5-degree global grid (720 x 361) with 20
// depth levels of doubles, about 41.6 MB.
func BenchmarkEncode(b *testing.B) {
	const nlon, nlat, ndep = 720, 361, 20
	v := make([]float64, nlon*nlat*ndep)
	for i := range v {
		v[i] = math.Sin(float64(i))
	}
	for _, ver := range []Version{CDF1, CDF5} {
		b.Run(ver.String(), func(b *testing.B) {
			f := &File{}
			f.AddDim("depth", ndep).AddDim("lat", nlat).AddDim("lon", nlon)
			f.AddVar("dvs", Double, []string{"depth", "lat", "lon"}, v).SetAttr("units", "percent")
			b.SetBytes(int64(8 * len(v)))
			b.ReportAllocs()
			for b.Loop() {
				if err := Encode(io.Discard, f, ver); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkFloat64s decodes the values of the same grid from bytes.
func BenchmarkFloat64s(b *testing.B) {
	const n = 720 * 361 * 20
	f := &File{}
	f.AddDim("n", n)
	f.AddVar("dvs", Double, []string{"n"}, make([]float64, n))
	data := encode(b, f, CDF2)
	g, err := DecodeBytes(data)
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		if _, err := g.Float64s(g.Vars[0]); err != nil {
			b.Fatal(err)
		}
	}
}
