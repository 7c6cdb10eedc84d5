package flux

import (
	"errors"
	"fmt"
	"math"

	"cmbflux/flux/sh"
)

// Reference holds the mean flux and the optional adiabatic reference and
// core conductivity of a boundary condition. Set QMean or HeatFlow.
type Reference struct {
	// QMean is the mean CMB heat flux in W/m^2. When 0, HeatFlow is used.
	QMean float64
	// HeatFlow is the total CMB heat flow in W (TW at the edge), turned
	// into QMean = HeatFlow / CMBArea.
	HeatFlow float64
	// QAd is the adiabatic heat flux at the top of the core in W/m^2. When
	// 0, AdiabaticHeatFlow is used; when both are 0 there is no adiabatic
	// reference and sub-adiabatic diagnostics are left out.
	QAd float64
	// AdiabaticHeatFlow is the adiabatic heat flow in W, turned into
	// QAd = AdiabaticHeatFlow / CMBArea.
	AdiabaticHeatFlow float64
	// KCore is the thermal conductivity of the outermost core in W/m/K,
	// needed only for the CoreGradient quantity.
	KCore float64
}

// ErrSetting is wrapped by errors about unusable settings.
var ErrSetting = errors.New("flux: bad setting")

// resolve returns q_mean and q_ad (W/m^2) and whether q_ad is set.
func (r Reference) resolve() (qm, qad float64, hasAd bool, err error) {
	switch {
	case r.QMean != 0 && r.HeatFlow != 0:
		return 0, 0, false, fmt.Errorf("%w: both the mean flux and the heat flow are set; give one", ErrSetting)
	case r.QMean != 0:
		qm = r.QMean
	case r.HeatFlow != 0:
		qm = FluxFromHeatFlow(r.HeatFlow)
	default:
		return 0, 0, false, fmt.Errorf("%w: no mean flux: set the mean CMB heat flux (mW/m^2) or the total CMB heat flow (TW, 5-15 TW after Lay, Hernlund & Buffett 2008)", ErrSetting)
	}
	if math.IsNaN(qm) || math.IsInf(qm, 0) || qm <= 0 {
		return 0, 0, false, fmt.Errorf("%w: mean flux %g W/m^2: it must be positive (heat leaving the core); for a core heated from the mantle no q* is defined", ErrSetting, qm)
	}
	switch {
	case r.QAd != 0 && r.AdiabaticHeatFlow != 0:
		return 0, 0, false, fmt.Errorf("%w: both the adiabatic flux and the adiabatic heat flow are set; give one", ErrSetting)
	case r.QAd != 0:
		qad, hasAd = r.QAd, true
	case r.AdiabaticHeatFlow != 0:
		qad, hasAd = FluxFromHeatFlow(r.AdiabaticHeatFlow), true
	}
	if hasAd && (math.IsNaN(qad) || qad < 0) {
		return 0, 0, false, fmt.Errorf("%w: adiabatic flux %g W/m^2 must be positive", ErrSetting, qad)
	}
	if r.KCore < 0 || math.IsNaN(r.KCore) {
		return 0, 0, false, fmt.Errorf("%w: core conductivity %g W/m/K must be positive", ErrSetting, r.KCore)
	}
	return qm, qad, hasAd, nil
}

// Physical holds the constants of the physical mode, in which the flux
// anomaly follows from a temperature anomaly across a conductive thermal
// boundary layer:
//
//	dT = dlnVs / (dlnVs/dT),   dq = -(k / h) dT,
//
// with dlnVs the band-limited pattern. Check value: k = 10 W/m/K,
// dT = 1000 K, h = 200 km give dq = 50 mW/m^2 in magnitude.
type Physical struct {
	// Conductivity k of the lowermost mantle in W/m/K (8.4 +- 1.2 after
	// Manthilake et al. 2011; 5-12 after Manga & Jeanloz 1997).
	Conductivity float64
	// Thickness h of the thermal boundary layer in m (about 200 km after
	// Manthilake et al. 2011).
	Thickness float64
	// DlnVsDT is the sensitivity dlnVs/dT in 1/K, negative (about -1e-5 to
	// -4e-5 after Karato 1993).
	DlnVsDT float64
}

func (ph Physical) check() error {
	if !(ph.Conductivity > 0) {
		return fmt.Errorf("%w: mantle conductivity %g W/m/K must be positive (typically 5-12)", ErrSetting, ph.Conductivity)
	}
	if !(ph.Thickness > 0) {
		return fmt.Errorf("%w: boundary-layer thickness %g m must be positive (typically about 200 km)", ErrSetting, ph.Thickness)
	}
	if !(ph.DlnVsDT < 0) {
		return fmt.Errorf("%w: dlnVs/dT = %g /K must be negative (velocity falls as temperature rises, about -1e-5 to -4e-5 /K); a positive value would flip the flux pattern", ErrSetting, ph.DlnVsDT)
	}
	return nil
}

// Result is one boundary condition: q = QMean (1 + Amplitude g) with g the
// Pattern, and its diagnostics and warnings.
type Result struct {
	// Pattern is the shape the result was built from.
	Pattern *Pattern
	// QMean is the mean heat flux in W/m^2.
	QMean float64
	// Amplitude is a in q = QMean (1 + a g), dimensionless per unit of g.
	Amplitude float64
	// QAd is the adiabatic flux in W/m^2 when HasAdiabatic.
	QAd float64
	// HasAdiabatic reports whether an adiabatic reference was given.
	HasAdiabatic bool
	// KCore is the core conductivity in W/m/K (0 if not given).
	KCore float64
	// Diagnostics summarises the result at the edge (degrees, mW/m^2, TW).
	Diagnostics Diagnostics
	// Warnings lists settings that could waste a simulation; print them.
	// Each starts with a short class and a colon ("negative heat flux: ..."),
	// by which a sweep may group them.
	Warnings []string
}

// WithQStar builds the boundary condition whose heterogeneity ratio
// q* = (q_max - q_min) / q_mean equals qstar, with q_max and q_min the
// extrema of the continuous band-limited field (or of the grid of
// MeasuredOn): a = q* / (g_max - g_min). The extrema scale with a, so no
// search is repeated: a sweep over q* costs little per point.
func (p *Pattern) WithQStar(qstar float64, ref Reference) (*Result, error) {
	return p.WithMeasure(PeakToPeak, qstar, ref)
}

// Measure names a measure of the flux heterogeneity that can set the
// amplitude. All are linear in the amplitude a of q = q_mean (1 + a g).
type Measure int

const (
	// PeakToPeak is q* = (q_max - q_min) / q_mean (the usual definition).
	PeakToPeak Measure = iota
	// PeakToPeakSuperadiabatic is (q_max - q_min) / (q_mean - q_ad), the
	// ratio over the mean super-adiabatic flux; needs q_ad < q_mean.
	PeakToPeakSuperadiabatic
	// RMS is the root mean square of q - q_mean over q_mean.
	RMS
	// MaxDeviation is max |q - q_mean| / q_mean.
	MaxDeviation
)

var measureNames = [...]string{"qstar", "qstar-superadiabatic", "rms", "max-deviation"}

var measureFormulas = [...]string{
	"(q_max - q_min)/q_mean",
	"(q_max - q_min)/(q_mean - q_ad)",
	"rms(q - q_mean)/q_mean",
	"max|q - q_mean|/q_mean",
}

// String returns the measure's name (as ParseMeasure accepts it).
func (m Measure) String() string {
	if m < 0 || int(m) >= len(measureNames) {
		return fmt.Sprintf("Measure(%d)", int(m))
	}
	return measureNames[m]
}

// Formula returns the measure's definition, e.g. "(q_max - q_min)/q_mean".
func (m Measure) Formula() string {
	if m < 0 || int(m) >= len(measureFormulas) {
		return "unknown"
	}
	return measureFormulas[m]
}

// ParseMeasure accepts the names of the measures: qstar,
// qstar-superadiabatic, rms, max-deviation.
func ParseMeasure(s string) (Measure, error) {
	for k, n := range measureNames {
		if s == n {
			return Measure(k), nil
		}
	}
	return 0, fmt.Errorf("%w: unknown amplitude measure %q (want qstar, qstar-superadiabatic, rms or max-deviation)", ErrSetting, s)
}

// WithMeasure builds the boundary condition whose heterogeneity measure m
// equals value; the extrema (continuous, or on the grid of MeasuredOn, for
// all three extremum measures) and the rms (always of the continuous field)
// come from the Pattern, so a sweep costs little per point. Results
// set by a measure other than PeakToPeak say so in
// Diagnostics.AmplitudeSetBy and warn, since simulation codes usually quote
// the peak-to-peak q*.
func (p *Pattern) WithMeasure(m Measure, value float64, ref Reference) (*Result, error) {
	if math.IsNaN(value) || math.IsInf(value, 0) || value < 0 {
		return nil, fmt.Errorf("%w: %s = %g: give a value of 0 or more (%s = %s)", ErrSetting, m, value, m, m.Formula())
	}
	qm, qad, hasAd, err := ref.resolve()
	if err != nil {
		return nil, err
	}
	var unit float64 // the measure per unit amplitude a
	switch m {
	case PeakToPeak:
		unit = p.refMax - p.refMin
	case PeakToPeakSuperadiabatic:
		if !hasAd || qad >= qm {
			return nil, fmt.Errorf("%w: %s needs an adiabatic flux below the mean flux", ErrSetting, m)
		}
		unit = (p.refMax - p.refMin) * qm / (qm - qad)
	case RMS:
		unit = p.rms
	case MaxDeviation:
		unit = math.Max(p.refMax, -p.refMin)
	default:
		return nil, fmt.Errorf("%w: unknown measure %d", ErrSetting, int(m))
	}
	r := p.result(value/unit, qm, qad, hasAd, ref.KCore)
	d := &r.Diagnostics
	d.Mode = "ratio"
	d.AmplitudeSetBy = fmt.Sprintf("%s = %.6g", m.Formula(), value)
	if m != PeakToPeak {
		r.Warnings = append(r.Warnings, fmt.Sprintf("q* definition: the amplitude is set by %s = %.4g, not by q* = (q_max - q_min)/q_mean, which is %.4g; check which definition the simulation code quotes", m.Formula(), value, d.QStar))
	}
	return r, nil
}

// WithPhysical builds the boundary condition of the physical mode (see
// Physical): q = q_mean + dq with dq = -(k/h) g / (dlnVs/dT), that is
// a = -k / (h (dlnVs/dT) q_mean). The resulting q* is reported.
func (p *Pattern) WithPhysical(ph Physical, ref Reference) (*Result, error) {
	if err := ph.check(); err != nil {
		return nil, err
	}
	qm, qad, hasAd, err := ref.resolve()
	if err != nil {
		return nil, err
	}
	a := -ph.Conductivity / (ph.Thickness * ph.DlnVsDT * qm)
	r := p.result(a, qm, qad, hasAd, ref.KCore)
	d := &r.Diagnostics
	d.Mode = "physical"
	d.AmplitudeSetBy = "dq = -(k/h) dT, dT = dlnVs/(dlnVs/dT)"
	d.Conductivity = ph.Conductivity
	d.ThicknessKm = ph.Thickness / 1e3
	d.DlnVsDT = ph.DlnVsDT
	d.TemperatureMax = p.max.value / ph.DlnVsDT
	d.TemperatureMin = p.min.value / ph.DlnVsDT
	if ph.Thickness < 1e3 || ph.Thickness > 1e6 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("units: boundary-layer thickness %.4g km is outside 1-1000 km (about 200 km is usual): check that it was given in metres", ph.Thickness/1e3))
	}
	if ph.Conductivity < 1 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("units: mantle conductivity %.4g W/m/K is far below lowermost-mantle values (5-12 W/m/K): check that it is in W/m/K", ph.Conductivity))
	}
	if ph.Conductivity > 50 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("units: mantle conductivity %.4g W/m/K is far above lowermost-mantle values (5-12 W/m/K): is it the core's?", ph.Conductivity))
	}
	if ph.DlnVsDT < -1e-3 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("units: dlnVs/dT = %.4g /K is large in magnitude (about -1e-5 to -4e-5 /K is usual): was it given in percent per kelvin?", ph.DlnVsDT))
	}
	return r, nil
}

// Coeffs returns the coefficients (canonical, degree Pattern.LMax(), SI
// units of q.Info()) of the quantity.
func (r *Result) Coeffs(q Quantity) (*sh.Coeffs, error) {
	scale, mean, err := r.affine(q)
	if err != nil {
		return nil, err
	}
	c := r.Pattern.g.Clone()
	for k := range c.C {
		c.C[k] *= scale
		c.S[k] *= scale
	}
	c.C[0] = mean * math.Sqrt(4*math.Pi) // Y_00 = 1/sqrt(4 pi)
	return c, nil
}

// affine returns s and m with quantity = m + s g.
func (r *Result) affine(q Quantity) (s, m float64, err error) {
	qa := r.QMean * r.Amplitude
	switch q {
	case HeatFlux:
		return qa, r.QMean, nil
	case FluxAnomaly:
		return qa, 0, nil
	case FluxRelative:
		return r.Amplitude, 1, nil
	case SuperAdiabatic:
		if !r.HasAdiabatic {
			return 0, 0, fmt.Errorf("%w: %s needs an adiabatic reference: set the adiabatic flux or heat flow", ErrSetting, q)
		}
		if !(r.QMean > r.QAd) {
			// With q_mean < q_ad the denominator is negative and the
			// quantity would be positive where the flux is sub-adiabatic,
			// the opposite of what its sign text (Quantity.Info) promises.
			return 0, 0, fmt.Errorf("%w: %s = (q - q_ad)/(q_mean - q_ad) needs a mean flux above the adiabatic flux (q_mean %.4g mW/m^2, q_ad %.4g mW/m^2): otherwise its sign is reversed or it is undefined; write the heat flux or the flux anomaly instead", ErrSetting, q, r.QMean*1e3, r.QAd*1e3)
		}
		return qa / (r.QMean - r.QAd), 1, nil
	case CoreGradient:
		if !(r.KCore > 0) {
			return 0, 0, fmt.Errorf("%w: %s needs the core conductivity k_core (W/m/K)", ErrSetting, q)
		}
		return -qa / r.KCore, -r.QMean / r.KCore, nil
	}
	return 0, 0, fmt.Errorf("%w: unknown quantity %d", ErrSetting, int(q))
}

// At returns the quantity q (SI units) at (lon, lat) in degrees.
func (r *Result) At(q Quantity, lon, lat float64) (float64, error) {
	s, m, err := r.affine(q)
	if err != nil {
		return 0, err
	}
	return m + s*r.Pattern.g.Evaluate((90-lat)/rad2deg, lon/rad2deg), nil
}

// OnGrid returns the quantity q (SI units) on the rings of grid g, laid out
// as sh.Grid describes (ring by ring north to south).
func (r *Result) OnGrid(q Quantity, g *sh.Grid) ([]float64, error) {
	c, err := r.Coeffs(q)
	if err != nil {
		return nil, err
	}
	return sh.NewTransform(c.LMax, g).Synthesis(nil, c), nil
}

// Sweep builds one Result per value of the measure m (WithMeasure), in
// order, using up to workers goroutines (workers < 1 means one). The
// Pattern is shared; each point costs a few contour passes.
func (p *Pattern) Sweep(m Measure, values []float64, ref Reference, workers int) ([]*Result, error) {
	out := make([]*Result, len(values))
	errs := make([]error, len(values))
	workers = max(1, min(workers, len(values)))
	next := make(chan int)
	done := make(chan struct{})
	for range workers {
		go func() {
			for k := range next {
				out[k], errs[k] = p.WithMeasure(m, values[k], ref)
			}
			done <- struct{}{}
		}()
	}
	for k := range values {
		next <- k
	}
	close(next)
	for range workers {
		<-done
	}
	for k, err := range errs {
		if err != nil {
			return nil, fmt.Errorf("sweep point %d (%s = %g): %w", k, m, values[k], err)
		}
	}
	return out, nil
}
