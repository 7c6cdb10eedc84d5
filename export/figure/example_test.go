package figure_test

import (
	"bytes"
	"fmt"
	"image/png"
	"math"

	"cmbflux/export/figure"
)

// A point on the equator a quarter turn east of the central meridian lies
// at x = sqrt(2) on a Mollweide map of the unit sphere, half way to the
// edge at 2 sqrt(2) (Snyder 1987, eq. 31-1 with theta = 0).
func ExampleProjection_Forward() {
	p := figure.Projection{Kind: figure.Mollweide, CentralLon: 0}
	x, y := p.Forward(90, 0)
	fmt.Printf("x = %.6f, y = %.6f\n", x, y)
	lon, lat, ok := p.Inverse(x, y)
	fmt.Printf("back: lon %.6f, lat %.6f, %v\n", lon, lat, ok)
	// Output:
	// x = 1.414214, y = 0.000000
	// back: lon 90.000000, lat 0.000000, true
}

// A map of an invented heat-flux pattern, 65 mW/m² on average with a low
// over the Pacific, drawn as PNG.
func ExampleMap() {
	m := &figure.Map{
		Title: "CMB heat flux (invented example)",
		Field: func(lon, lat float64) float64 {
			d := math.Hypot(lon-180, lat) / 40
			return 65 - 30*math.Exp(-d*d)
		},
		Center: 65,
		Label:  "heat flux",
		Units:  "mW/m²",
		Levels: []figure.Level{{Value: 50, Label: "q_ad"}},
	}
	b, err := figure.PNG(m)
	if err != nil {
		fmt.Println(err)
		return
	}
	cfg, _ := png.DecodeConfig(bytes.NewReader(b))
	fmt.Printf("%d x %d PNG\n", cfg.Width, cfg.Height)
	// Output: 900 x 540 PNG
}

// The centre of the diverging scale is a light warm off-white and the two
// ends are dark.
func ExampleDiverging() {
	for _, t := range []float64{-1, 0, 1} {
		c := figure.Diverging(t)
		fmt.Printf("t = %+.0f: #%02x%02x%02x\n", t, c.R, c.G, c.B)
	}
	// Output:
	// t = -1: #103d84
	// t = +0: #f4f0e9
	// t = +1: #742513
}

// A degree power spectrum of two invented patterns on a log scale, as SVG.
func ExampleSpectrum() {
	s := &figure.Spectrum{
		Title:  "Degree power (invented example)",
		YLabel: "power per degree (mW/m²)²",
		Series: []figure.Series{
			{Label: "pattern A", Y: []float64{0, 12, 150, 40, 22, 9}},
			{Label: "pattern B", Y: []float64{0, 30, 90, 20, 10, 6}},
		},
	}
	b, err := figure.SVG(s)
	fmt.Println(err, bytes.HasPrefix(b, []byte("<?xml")))
	// Output: <nil> true
}

// Two invented patterns side by side on one colour scale, hatched where
// the flux is below an adiabatic value of 45 mW/m².
func ExamplePanel() {
	low := func(lon0 float64) func(lon, lat float64) float64 {
		return func(lon, lat float64) float64 {
			d := math.Hypot(math.Remainder(lon-lon0, 360), lat) / 40
			return 65 - 30*math.Exp(-d*d)
		}
	}
	p := &figure.Panel{
		Title:   "Two invented patterns",
		Maps:    []*figure.Map{{Title: "low at 180°", Field: low(180)}, {Title: "low at 0°", Field: low(0)}},
		Center:  65,
		Label:   "heat flux",
		Units:   "mW/m²",
		Hatches: []figure.Hatch{{Below: 45, Label: "below q_ad"}},
	}
	b, err := figure.PNG(p)
	if err != nil {
		fmt.Println(err)
		return
	}
	cfg, _ := png.DecodeConfig(bytes.NewReader(b))
	fmt.Printf("%d x %d PNG\n", cfg.Width, cfg.Height)
	// Output: 900 x 370 PNG
}

// A sweep summary: achieved q* against requested q* for two truncation
// degrees, with the line y = x for reference (invented numbers).
func ExampleSweep() {
	q := []float64{0.5, 1, 1.5, 2}
	s := &figure.Sweep{
		Title:  "q* sweep (invented numbers)",
		XLabel: "requested q*",
		Panels: []figure.SweepPanel{{
			YLabel:   "achieved q*",
			Identity: true,
			Series: []figure.XYSeries{
				{Label: "lmax 4", X: q, Y: []float64{0.46, 0.93, 1.39, 1.86}},
				{Label: "lmax 12", X: q, Y: []float64{0.5, 1, 1.5, 2}},
			},
		}},
	}
	_, err := figure.PNG(s)
	fmt.Println(err)
	// Output: <nil>
}
