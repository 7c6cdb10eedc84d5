package netcdf_test

import (
	"bytes"
	"fmt"
	"log"

	"cmbflux/tomo/netcdf"
)

// Writing a CF-1.8 grid: a heat-flux pattern on (depth, lat, lon) with
// coordinate variables carrying units, standard_name and axis (CF-1.8
// sections 4.1, 4.2, 4.3), a _FillValue of the variable's type (section
// 2.5.1) and the global attributes of section 2.6.2. The numbers are an
// invented scenario.
func Example_cfGrid() {
	f := cfGrid()

	var buf bytes.Buffer // an os.File in real use
	if err := netcdf.Encode(&buf, f, netcdf.CDF2); err != nil {
		log.Fatal(err)
	}

	g, err := netcdf.DecodeBytes(buf.Bytes())
	if err != nil {
		log.Fatal(err)
	}
	v := g.Var("q")
	vals, err := g.Float64s(v)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(g.Version, g.Attr("Conventions").Text(), v.Dims, g.Shape(v))
	fmt.Println(v.Attr("units").Text(), vals[1], vals[6] == netcdf.FillDouble)
	// Output:
	// CDF-2 CF-1.8 [depth lat lon] [1 3 4]
	// mW m-2 70 true
}

// cfGrid builds the grid of Example_cfGrid (also in testdata/cdl/cf_grid.cdl).
func cfGrid() *netcdf.File {
	lat := []float64{-45, 0, 45}
	lon := []float64{0, 90, 180, 270}
	depth := []float64{2891}
	q := []float64{ // mW m-2, south to north, east from 0 E
		60, 70, 80, 90,
		40, 50, netcdf.FillDouble, 70,
		65, 75, 85, 95,
	}
	f := &netcdf.File{}
	f.AddDim("depth", 1).AddDim("lat", 3).AddDim("lon", 4)
	f.SetAttr("Conventions", "CF-1.8")
	f.SetAttr("title", "CMB heat flux (invented example)")
	f.SetAttr("history", "cmbflux example")
	f.SetAttr("source", "invented tomography scenario")
	f.AddVar("depth", netcdf.Double, []string{"depth"}, depth).
		SetAttr("units", "km").SetAttr("standard_name", "depth").
		SetAttr("positive", "down").SetAttr("axis", "Z")
	f.AddVar("lat", netcdf.Double, []string{"lat"}, lat).
		SetAttr("units", "degrees_north").SetAttr("standard_name", "latitude").SetAttr("axis", "Y")
	f.AddVar("lon", netcdf.Double, []string{"lon"}, lon).
		SetAttr("units", "degrees_east").SetAttr("standard_name", "longitude").SetAttr("axis", "X")
	f.AddVar("q", netcdf.Double, []string{"depth", "lat", "lon"}, q).
		SetAttr("units", "mW m-2").
		SetAttr("long_name", "heat flux out of the core").
		SetAttr("_FillValue", netcdf.FillDouble)
	return f
}
