package sh_test

import (
	"fmt"

	"cmbflux/flux/sh"
)

// Gaussian averaging with a 20-degree half-width (b = ln 2/(1 - cos 20 deg)
// = 11.49, so w_1 = coth b - 1/b = 0.913): degree 1 is almost kept,
// degree 12 is strongly damped.
func ExampleParseTaper() {
	t, err := sh.ParseTaper("gauss:20")
	if err != nil {
		fmt.Println(err)
		return
	}
	w := t.Weights(nil, 12)
	fmt.Printf("%v: w_1 = %.3f, w_4 = %.3f, w_12 = %.2g\n", t, w[1], w[4], w[12])
	_, err = sh.ParseTaper("cos:12:8")
	fmt.Println(err)
	// Output:
	// gauss:20: w_1 = 0.913, w_4 = 0.407, w_12 = 0.0015
	// sh: taper "cos:12:8": L2 = 8 must be larger than L1 = 12; want "none", "cut:L", "cos:L1:L2" or "gauss:DEG"
}
