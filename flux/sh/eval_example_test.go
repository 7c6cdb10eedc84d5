package sh_test

import (
	"fmt"
	"math"

	"cmbflux/flux/sh"
)

// A zonal degree-2 pattern, the simplest polar-versus-equatorial contrast of
// boundary heat flux: f = Y_20 in the orthonormal convention,
// sqrt(5/(4 pi)) (3 cos^2 theta - 1)/2, is largest at the poles and half as
// large, with opposite sign, on the equator. Its colatitude derivative
// vanishes at both.
func ExampleEvaluator() {
	c := sh.NewCoeffs(2, sh.Canonical)
	c.Set(2, 0, 1, 0)
	e := sh.NewEvaluator(c)
	for _, lat := range []float64{90, 45, 0} {
		colat := (90 - lat) * math.Pi / 180
		f, dth, _ := e.Grad(colat, 0)
		fmt.Printf("lat %2.0f: f = %+.4f, df/dcolat = %+.4f\n", lat, f, dth+0) // +0 turns -0 into 0
	}
	// Output:
	// lat 90: f = +0.6308, df/dcolat = +0.0000
	// lat 45: f = +0.1577, df/dcolat = -0.9462
	// lat  0: f = -0.3154, df/dcolat = -0.0000
}

// Converting to Schmidt semi-normalized coefficients with the
// Condon-Shortley phase, as some simulation codes read them, changes the
// numbers but not the field.
func ExampleCoeffs_Convert() {
	c := sh.NewCoeffs(1, sh.Canonical)
	c.Set(1, 1, 1, 0) // orthonormal Y_11^c = sqrt(3/(4 pi)) sin theta cos phi
	s, err := c.Convert(sh.Convention{Norm: sh.Schmidt, CondonShortley: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	g, _ := s.At(1, 1)
	fmt.Printf("g_11 = %.6f (= -sqrt(3/(4 pi)))\n", g)
	fmt.Printf("field at the equator, lon 0: %.6f and %.6f\n", c.Evaluate(math.Pi/2, 0), s.Evaluate(math.Pi/2, 0))
	// Output:
	// g_11 = -0.488603 (= -sqrt(3/(4 pi)))
	// field at the equator, lon 0: 0.488603 and 0.488603
}
