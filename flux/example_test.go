package flux_test

import (
	"fmt"
	"math"

	"cmbflux/flux"
)

// A controlled experiment: a pure degree-2, order-2 pattern at q* = 3 over a
// core losing 10 TW, with an adiabatic heat flow of 7 TW. Where the
// sectoral pattern dips, the flux goes negative and sub-adiabatic.
func Example() {
	p, err := flux.Ideal(nil, flux.Term{L: 2, M: 2, Weight: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := p.WithQStar(3, flux.Reference{HeatFlow: 10 * flux.TW, AdiabaticHeatFlow: 7 * flux.TW})
	if err != nil {
		fmt.Println(err)
		return
	}
	d := r.Diagnostics
	fmt.Printf("q_mean %.1f mW/m^2, q_max %.1f at (%.0f, %.0f), q_min %.1f at (%.0f, %.0f)\n",
		d.QMean, d.QMax, round(d.QMaxLonLat[0]), round(d.QMaxLonLat[1]), d.QMin, round(d.QMinLonLat[0]), round(d.QMinLonLat[1]))
	fmt.Printf("negative over %.1f %%, sub-adiabatic over %.1f %% of the CMB\n",
		100*d.AreaFractionNegative, 100*(*d.AreaFractionSubadiabatic))
	fmt.Println(len(r.Warnings), "warnings")
	// Output:
	// q_mean 65.7 mW/m^2, q_max 164.3 at (0, 0), q_min -32.9 at (90, 0)
	// negative over 12.6 %, sub-adiabatic over 35.1 % of the CMB
	// 2 warnings
}

// A sweep over q* reuses one pattern: only the amplitude changes.
func ExamplePattern_WithQStar() {
	p, _ := flux.Ideal(nil, flux.Term{L: 1, M: 0, Weight: 1})
	for _, qs := range []float64{1, 2, 4} {
		r, _ := p.WithQStar(qs, flux.Reference{QMean: 0.06})
		fmt.Printf("q* %.0f: q_min %.0f mW/m^2, negative over %.0f %%\n", qs, r.Diagnostics.QMin, 100*r.Diagnostics.AreaFractionNegative)
	}
	// Output:
	// q* 1: q_min 30 mW/m^2, negative over 0 %
	// q* 2: q_min 0 mW/m^2, negative over 0 %
	// q* 4: q_min -60 mW/m^2, negative over 25 %
}

// round rounds to whole degrees without printing -0.
func round(x float64) float64 { return math.Round(x) + 0 }
