package tomo

import (
	"bytes"
	"math"
	"testing"

	"cmbflux/tomo/netcdf"
)

// ncBenchFile builds a 0.5-degree global grid (720 x 361) with 20 depth
// levels as a CDF-2 file of type t. With flip it stores latitude north to
// south and longitude from -180, so that the reader must reorder.
func ncBenchFile(tb testing.TB, t netcdf.Type, flip bool) []byte {
	const nlon, nlat, ndep = 720, 361, 20
	lon := make([]float64, nlon)
	lat := make([]float64, nlat)
	dep := make([]float64, ndep)
	for i := range lon {
		lon[i] = 0.5 * float64(i)
		if flip {
			lon[i] -= 180
		}
	}
	for j := range lat {
		lat[j] = -90 + 0.5*float64(j)
		if flip {
			lat[j] = -lat[j]
		}
	}
	for k := range dep {
		dep[k] = 2000 + 50*float64(k)
	}
	n := nlon * nlat * ndep
	f := &netcdf.File{}
	f.AddDim("depth", ndep).AddDim("lat", nlat).AddDim("lon", nlon)
	f.AddVar("depth", netcdf.Double, []string{"depth"}, dep).SetAttr("units", "km")
	f.AddVar("lat", netcdf.Double, []string{"lat"}, lat).SetAttr("units", "degrees_north")
	f.AddVar("lon", netcdf.Double, []string{"lon"}, lon).SetAttr("units", "degrees_east")
	dims := []string{"depth", "lat", "lon"}
	if t == netcdf.Float {
		v := make([]float32, n)
		for i := range v {
			v[i] = float32(math.Sin(float64(i)))
		}
		f.AddVar("dvs", t, dims, v).SetAttr("_FillValue", float32(-999))
	} else {
		v := make([]float64, n)
		for i := range v {
			v[i] = math.Sin(float64(i))
		}
		f.AddVar("dvs", t, dims, v).SetAttr("_FillValue", -999.0)
	}
	var buf bytes.Buffer
	if err := netcdf.Encode(&buf, f, netcdf.CDF2); err != nil {
		tb.Fatal(err)
	}
	return buf.Bytes()
}

// BenchmarkReadNetCDF reads the grid through ReadNetCDF (decode, mask,
// reorder, sha256). Target: at least 200 MB/s of file bytes; on a loaded
// machine compare MB/cpu-s, the throughput per CPU second.
func BenchmarkReadNetCDF(b *testing.B) {
	for _, tc := range []struct {
		name string
		t    netcdf.Type
		flip bool
	}{
		{"double", netcdf.Double, false},
		{"float", netcdf.Float, false},
		{"double-reordered", netcdf.Double, true},
	} {
		b.Run(tc.name, func(b *testing.B) {
			data := ncBenchFile(b, tc.t, tc.flip)
			b.SetBytes(int64(len(data)))
			b.ReportAllocs()
			cpu0 := ncCPUSeconds()
			for b.Loop() {
				g, err := ReadNetCDF("bench.nc", data, ReadOptions{})
				if err != nil || len(g.Values) != 720*361*20 {
					b.Fatal(err)
				}
			}
			// Throughput per CPU second (all goroutines, garbage collector
			// included): steadier than MB/s on a shared, loaded machine.
			if cpu := ncCPUSeconds() - cpu0; cpu > 0 {
				b.ReportMetric(float64(len(data))*float64(b.N)/cpu/1e6, "MB/cpu-s")
			}
		})
	}
}
