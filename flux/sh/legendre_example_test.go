package sh_test

import (
	"fmt"
	"math"

	"cmbflux/flux/sh"
)

// Schmidt semi-normalized functions at 60 degrees colatitude, as
// geomagnetism tabulates them, with and without the Condon-Shortley phase:
// P_1^1 = sin(60 deg) = 0.866 and P_2^1 = sqrt(3) sin cos = 0.750
// (A&S 8.6.6 times the Schmidt factor sqrt(2 (l-m)!/(l+m)!)).
func ExampleLegendre() {
	colat := 60 * math.Pi / 180
	for _, cs := range []bool{false, true} {
		p := sh.Legendre(nil, 2, colat, sh.Convention{Norm: sh.Schmidt, CondonShortley: cs})
		fmt.Printf("phase %-5v P10 %.3f P11 %+.3f P20 %.3f P21 %+.3f P22 %.3f\n", cs,
			p[sh.Index(1, 0)], p[sh.Index(1, 1)], p[sh.Index(2, 0)], p[sh.Index(2, 1)], p[sh.Index(2, 2)])
	}
	// Output:
	// phase false P10 0.500 P11 +0.866 P20 -0.125 P21 +0.750 P22 0.650
	// phase true  P10 0.500 P11 -0.866 P20 -0.125 P21 -0.750 P22 0.650
}
