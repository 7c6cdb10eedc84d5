package export_test

import (
	"fmt"
	"math"
	"os"

	"cmbflux/export"
	"cmbflux/flux/sh"
)

// A heat-flux pattern with one degree-2 sectoral term, of 10 mW/m^2 rms
// over the core-mantle boundary, written for a code that wants Schmidt
// semi-normalized coefficients with the Condon-Shortley phase. In the
// canonical orthonormal convention an rms of 10 is a coefficient of
// 10 * sqrt(4 pi); Schmidt harmonics are sqrt(4 pi / (2l+1)) times smaller in
// rms, so the coefficient grows to 10 * sqrt(5) = 22.36.
func ExampleWriteCoeffsText() {
	c := sh.NewCoeffs(2, sh.Canonical)
	c.Set(2, 2, 10*math.Sqrt(4*math.Pi), 0)
	meta := &export.Meta{
		Quantity: "heat flux anomaly through the core-mantle boundary",
		Units:    "mW/m^2",
		Sign:     "positive = heat out of the core",
		Version:  "example",
		Params:   map[string]string{"lmax": "2"},
	}
	opt := &export.CoeffOptions{Conv: sh.Convention{Norm: sh.Schmidt, CondonShortley: true}, OmitDegree0: true}
	if err := export.WriteCoeffsText(os.Stdout, c, meta, opt); err != nil {
		fmt.Println(err)
	}
	// Output:
	// # cmbflux spherical-harmonic coefficients
	// # header_lines = 24
	// # format = cmbflux-coefficients/1
	// # quantity = heat flux anomaly through the core-mantle boundary
	// # units = mW/m^2
	// # sign = positive = heat out of the core
	// # form = real
	// # normalization = schmidt
	// # condon_shortley_phase = included
	// # expansion = f(theta, phi) = sum_{l} sum_{m=0..l} N_lm P_l^m(cos theta) [cos_lm cos(m phi) + sin_lm sin(m phi)]
	// # normalization_factor = N_lm = sqrt((2 - delta_m0) (l-m)!/(l+m)!)
	// # legendre = P_l^m(x) = (-1)^m (1 - x^2)^(m/2) d^m/dx^m P_l(x), Condon-Shortley phase included
	// # colatitude = theta = 0 at the north pole, pi at the south pole
	// # longitude_origin = phi = 0 at the Greenwich meridian
	// # longitude_direction = phi increases eastward
	// # reference_radius_km = 3480
	// # lmax = 2
	// # degree_0 = omitted
	// # orders = 0..l
	// # row_order = l-major
	// # rows = 5
	// # columns = l m cos sin
	// # cmbflux_version = example
	// # param.lmax = 2
	// 1 0 0 0
	// 1 1 0 0
	// 2 0 0 0
	// 2 1 0 0
	// 2 2 22.360679774997898 0
}
