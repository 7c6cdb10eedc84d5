package tomo_test

import (
	"fmt"
	"strings"

	"cmbflux/tomo"
)

// Reduce the embedded demo scenario to the average of its levels between
// 2700 and 2891 km depth, and ask which spherical-harmonic degree
// its sampling supports.
func ExampleSelectLayer() {
	g := tomo.Demo()
	l, err := tomo.SelectLayer(g, tomo.LayerOptions{Top: 2700, Bottom: 2891})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(l.Description)
	fmt.Println("units:", l.Units.From, "-", l.Units.Reason)
	fmt.Printf("mean dlnVs %.4f %%, coverage %.3f\n", 100*l.Mean, l.Coverage())
	lim := tomo.SafeDegree(l)
	fmt.Println("safe degree:", lim.Lmax)
	// Output:
	// average over 2700..2891 km of 4 levels, weights r^2 x trapezoidal thickness: 2700 km (weight 0.2759), 2800 km (weight 0.3916), 2850 km (weight 0.2309), 2891 km (weight 0.1016)
	// units: percent - from the file's units "percent"
	// mean dlnVs 0.2368 %, coverage 1.000
	// safe degree: 90
}

// Read scattered points in the -180..180 convention with one missing
// value; the reader wraps the longitudes and masks the gap.
func ExampleReadBytes() {
	data := `# units: percent
-90 -45 -1.5
 90 -45  0.5
-90  45  NaN
 90  45  1.0
`
	g, err := tomo.ReadBytes("points.txt", []byte(data), tomo.ReadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("lon", g.Lon, "lat", g.Lat, g.Reg)
	fmt.Println(strings.Join(g.Notes, "; "))
	for j := range g.Lat {
		for i := range g.Lon {
			v, ok := g.At(0, j, i)
			fmt.Printf("(%g, %g): %v %v\n", g.Lon[i], g.Lat[j], v, ok)
		}
	}
	// Output:
	// lon [90 270] lat [-45 45] cell
	// longitudes converted from the -180..180 convention to 0..360
	// (90, -45): 0.5 true
	// (270, -45): -1.5 true
	// (90, 45): 1 true
	// (270, 45): NaN false
}

// A malformed file gives an error that names the file and the line.
func ExampleReadText_error() {
	_, err := tomo.ReadText("model.txt", []byte("0 0 1\n90 0 x\n"), tomo.ReadOptions{})
	fmt.Println(err)
	// Output:
	// model.txt:2: column 3 (value): "x" is not a number (write NaN for missing data)
}
