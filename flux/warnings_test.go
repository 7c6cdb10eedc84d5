package flux

import (
	"math"
	"testing"
)

func TestSuperAdiabaticNeedsSuperadiabaticMean(t *testing.T) {
	// (q - q_ad)/(q_mean - q_ad) is promised positive where q > q_ad
	// (Quantity.Info). With q_mean < q_ad its denominator is negative and
	// the sign would flip (arithmetic): at the flux maximum of a Y_1^0
	// pattern, q > q_ad, the value would be negative. It must be refused,
	// and accepted when q_mean > q_ad with the value of the definition.
	p, _ := Ideal(nil, Term{L: 1, M: 0, Weight: 1})
	r, _ := p.WithQStar(1, Reference{QMean: 0.05, QAd: 0.06})
	if _, err := r.Coeffs(SuperAdiabatic); err == nil {
		t.Error("super-adiabatic quantity with q_mean < q_ad must be refused")
	}
	if _, err := r.At(SuperAdiabatic, 0, 90); err == nil {
		t.Error("super-adiabatic value with q_mean < q_ad must be refused")
	}
	r, _ = p.WithQStar(1, Reference{QMean: 0.05, QAd: 0.04})
	// q at the north pole is q_mean (1 + q*/2) = 0.075 (TestZonalY10ClosedForms).
	if v, err := r.At(SuperAdiabatic, 0, 90); err != nil || !near(v, (0.075-0.04)/(0.05-0.04), 1e-12) {
		t.Errorf("super-adiabatic value at the pole %g (%v), want %g", v, err, (0.075-0.04)/(0.05-0.04))
	}
}

func TestWastefulSettingWarnings(t *testing.T) {
	// Settings that run but would waste a simulation: q* = 0 (a uniform
	// boundary condition), an idealised term above lmax (silently
	// dropped otherwise), a blend weight outside [0, 1] (extrapolation).
	p, _ := Ideal(nil, Term{L: 2, M: 2, Weight: 1})
	r, _ := p.WithQStar(0, Reference{QMean: 0.05})
	if !hasWarning(r, "uniform flux") {
		t.Errorf("q* = 0: no warning in %q", r.Warnings)
	}
	r, _ = p.WithQStar(1, Reference{QMean: 0.05})
	if hasWarning(r, "uniform flux") {
		t.Errorf("q* = 1 drew the uniform-flux warning: %q", r.Warnings)
	}
	q, err := Ideal(&PatternOptions{LMax: 2}, Term{L: 2, M: 2, Weight: 1}, Term{L: 4, M: 1, Weight: 1})
	if err != nil {
		t.Fatal(err)
	}
	if w := q.Warnings(); len(w) != 1 || !contains(w[0], "harmonic dropped") {
		t.Errorf("a term above lmax: warnings %q", w)
	}
	if got := q.Coeffs(); got.LMax != 2 || math.Abs(got.C[5]-1) > 0 {
		t.Errorf("the pattern must keep Y_2^2 only, to lmax 2: lmax %d, C_22 %g", got.LMax, got.C[5])
	}
	b, _ := Ideal(nil, Term{L: 1, M: 0, Weight: 1})
	for _, w := range []float64{-0.5, 1.5} {
		m, err := Blend(p, b, w)
		if err != nil {
			t.Fatal(err)
		}
		r, _ := m.WithQStar(1, Reference{QMean: 0.05})
		if !hasWarning(r, "blend extrapolates") {
			t.Errorf("blend weight %g: no warning in %q", w, r.Warnings)
		}
	}
	m, _ := Blend(p, b, 0.5)
	if len(m.Warnings()) != 0 {
		t.Errorf("blend weight 0.5 drew warnings %q", m.Warnings())
	}
}

func TestMeasuresOnGrid(t *testing.T) {
	// With q* measured on a grid, every extremum measure is measured there
	// too. Y_2^2c = N sin^2 cos 2lon (closed form) on the grid of
	// TestMeasuredOnGrid (longitudes 15 + 30 k, the equator) reaches
	// +-N cos 30 deg, so the continuous field's measures are those set on
	// the grid over cos 30 deg, and the grid warning is given.
	p, _ := Ideal(nil, Term{L: 2, M: 2, Weight: 1})
	g := &SampleGrid{Name: "offset 30-degree grid", Lat: []float64{-60, -30, 0, 30, 60}}
	for lon := 15.0; lon < 360; lon += 30 {
		g.Lon = append(g.Lon, lon)
	}
	pg, err := p.MeasuredOn(g)
	if err != nil {
		t.Fatal(err)
	}
	c30 := math.Cos(30 / rad2deg)
	ref := Reference{QMean: 0.05, QAd: 0.02}
	for _, tc := range []struct {
		m          Measure
		value      float64
		continuous func(d Diagnostics) float64
	}{
		{PeakToPeak, 2, func(d Diagnostics) float64 { return d.QStarContinuous }},
		{PeakToPeakSuperadiabatic, 2, func(d Diagnostics) float64 { return *d.QStarSuperadiabatic }},
		{MaxDeviation, 0.6, func(d Diagnostics) float64 { return d.MaxDeviationOverMean }},
	} {
		r, err := pg.WithMeasure(tc.m, tc.value, ref)
		if err != nil {
			t.Fatal(err)
		}
		if got := tc.continuous(r.Diagnostics); !near(got, tc.value/c30, 1e-8) {
			t.Errorf("%s = %g on the grid: continuous field %g, want %g", tc.m, tc.value, got, tc.value/c30)
		}
		if !hasWarning(r, "measured on grid") {
			t.Errorf("%s: no grid warning in %q", tc.m, r.Warnings)
		}
	}
}

func TestConductivityUnitWarnings(t *testing.T) {
	// Lowermost-mantle conductivity 5-12 W/m/K (Manga & Jeanloz 1997;
	// Manthilake et al. 2011), outermost core about 20-150 W/m/K
	// (Konopkova et al. 2016; Pozzo et al. 2012; references.md): values far
	// outside, e.g. given in mW/m/K or in kW/m/K, draw a unit warning, the
	// published ones do not.
	p, _ := Ideal(nil, Term{L: 2, M: 0, Weight: 1})
	for _, tc := range []struct {
		kMantle, kCore float64
		warn           bool
	}{
		{8.4, 40, false}, {8.4, 150, false}, {0.0084, 40, true}, {8.4, 0.04, true}, {8.4, 40000, true},
	} {
		r, err := p.WithPhysical(Physical{Conductivity: tc.kMantle, Thickness: 2e5, DlnVsDT: -2e-5}, Reference{QMean: 0.08, KCore: tc.kCore})
		if err != nil {
			t.Fatal(err)
		}
		if got := hasWarning(r, "units:"); got != tc.warn {
			t.Errorf("k_mantle %g, k_core %g: unit warning %v, want %v: %q", tc.kMantle, tc.kCore, got, tc.warn, r.Warnings)
		}
	}
}

func TestAdiabaticFromHeatFlow(t *testing.T) {
	// q_ad from an adiabatic heat flow: Q_ad / (4 pi rc^2), rc = 3480 km
	// (PREM). With 10 TW and 7 TW, r = q_ad / q_mean = 0.7, and for Y_1^0
	// at q* = 3 the sub-adiabatic fraction is (1 - 2 (1 - r)/q*)/2 = 0.4
	// (Archimedes, see TestZonalY10ClosedForms).
	p, _ := Ideal(nil, Term{L: 1, M: 0, Weight: 1})
	r, err := p.WithQStar(3, Reference{HeatFlow: 10 * TW, AdiabaticHeatFlow: 7 * TW})
	if err != nil {
		t.Fatal(err)
	}
	d := r.Diagnostics
	area := 4 * math.Pi * 3480e3 * 3480e3
	if !near(*d.QAd, 7e12/area*1e3, 1e-12) || !near(*d.AdiabaticHeatFlowTW, 7, 1e-12) || !near(d.QMean, 10e12/area*1e3, 1e-12) {
		t.Errorf("q_ad %g mW/m^2 (%g TW), q_mean %g; want %g (7 TW), %g", *d.QAd, *d.AdiabaticHeatFlowTW, d.QMean, 7e12/area*1e3, 10e12/area*1e3)
	}
	if math.Abs(*d.AreaFractionSubadiabatic-0.4) > 1e-5 {
		t.Errorf("sub-adiabatic fraction %g, want 0.4", *d.AreaFractionSubadiabatic)
	}
	if _, err := p.WithQStar(3, Reference{HeatFlow: 10 * TW, QAd: 0.04, AdiabaticHeatFlow: 7 * TW}); err == nil {
		t.Error("both an adiabatic flux and an adiabatic heat flow must be refused")
	}
}
