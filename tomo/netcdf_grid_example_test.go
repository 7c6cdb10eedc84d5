package tomo_test

import (
	"bytes"
	"fmt"
	"log"

	"cmbflux/tomo"
	"cmbflux/tomo/netcdf"
)

// Reading a grid stored north to south with longitudes from -180 E and a
// radius axis: ReadNetCDF returns it south to north, in [0, 360) E, with
// depths below the surface (6371 km minus the radius, PREM). The values
// are an invented scenario, in percent.
func ExampleReadNetCDF() {
	f := &netcdf.File{}
	f.AddDim("radius", 2).AddDim("lat", 2).AddDim("lon", 4)
	f.SetAttr("Conventions", "CF-1.8")
	f.AddVar("radius", netcdf.Float, []string{"radius"}, []float32{3480, 3580}).SetAttr("units", "km")
	f.AddVar("lat", netcdf.Float, []string{"lat"}, []float32{45, -45}).SetAttr("units", "degrees_north")
	f.AddVar("lon", netcdf.Float, []string{"lon"}, []float32{-180, -90, 0, 90}).SetAttr("units", "degrees_east")
	f.AddVar("dvs", netcdf.Float, []string{"radius", "lat", "lon"}, []float32{
		-1.5, -0.5, 0.5, 1.0, // radius 3480 km, 45 N
		-2.0, -1.0, 0.0, 1.5, // radius 3480 km, 45 S
		-0.7, -0.2, 0.2, 0.4, // radius 3580 km, 45 N
		-0.9, -0.4, 0.1, 0.6, // radius 3580 km, 45 S
	}).SetAttr("units", "percent").SetAttr("_FillValue", float32(-999))
	var buf bytes.Buffer
	if err := netcdf.Encode(&buf, f, netcdf.CDF1); err != nil {
		log.Fatal(err)
	}

	g, err := tomo.ReadNetCDF("example.nc", buf.Bytes(), tomo.ReadOptions{})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("lon", g.Lon, "lat", g.Lat, "depth", g.Depth)
	v, _ := g.At(1, 0, 0) // 2891 km, 45 S, 0 E
	fmt.Println(g.Name, g.Units, g.Reg, g.Source.Format, v)
	// Output:
	// lon [0 90 180 270] lat [-45 45] depth [2791 2891]
	// dvs percent node netcdf-cdf1 0
}
