package contour_test

import (
	"fmt"
	"math"

	"cmbflux/flux/contour"
)

// The region within 30 degrees of a point on the CMB (radius 3480 km) that
// straddles the 0/360 seam: its outline, area and centroid.
func Example() {
	const nlat, nlon, rcmb = 90, 180, 3480.0
	f := contour.Field{NLon: nlon}
	for i := range nlat {
		f.Lat = append(f.Lat, 90-180*(float64(i)+0.5)/nlat)
	}
	deg := math.Pi / 180
	for _, lat := range f.Lat {
		for j := range nlon {
			lon := 360 * float64(j) / nlon
			f.Values = append(f.Values, contour.Distance(lon, lat, 350, 20)) // degrees from (350 E, 20 N)
		}
	}
	rings, err := contour.Below(f, 30)
	if err != nil {
		fmt.Println(err)
		return
	}
	lon, lat, _ := contour.Centroid(rings)
	a := contour.RegionArea(rings) * rcmb * rcmb
	exact := 2 * math.Pi * (1 - math.Cos(30*deg)) * rcmb * rcmb
	fmt.Printf("%d ring, area %.3g km^2 (cap formula %.3g), centroid (%.1f, %.1f)\n", len(rings), a, exact, lon, lat)
	// Output:
	// 1 ring, area 1.02e+07 km^2 (cap formula 1.02e+07), centroid (-10.0, 20.0)
}
