package flux

import (
	"fmt"
	"math"
)

// Diagnostics summarises a boundary condition in the units of the edge:
// heat flux in mW/m^2, heat flow in TW, positions as [lon, lat] in degrees
// (lon in [-180, 180)), area fractions of the CMB in [0, 1]. Optional
// entries are nil when their inputs were not given.
type Diagnostics struct {
	// Mode is "ratio" (amplitude from q*) or "physical" (from constants).
	Mode string `json:"mode"`
	// AmplitudeSetBy states what fixed the amplitude, e.g.
	// "(q_max - q_min)/q_mean = 3" or the physical-mode relation.
	AmplitudeSetBy string `json:"amplitude_set_by"`
	// QStarDefinition is the definition of QStar,
	// "(q_max - q_min)/q_mean".
	QStarDefinition string `json:"qstar_definition"`
	// QStar is (q_max - q_min) / q_mean where the amplitude was set: on the
	// continuous field, or on the grid named by QStarMeasuredOn.
	QStar float64 `json:"qstar"`
	// QStarMeasuredOn is "continuous field" or the name of the grid.
	QStarMeasuredOn string `json:"qstar_measured_on"`
	// QStarContinuous is q* of the continuous band-limited field exported.
	QStarContinuous float64 `json:"qstar_continuous"`
	// QStarSuperadiabatic is (q_max - q_min) / (q_mean - q_ad) of the
	// continuous field.
	QStarSuperadiabatic *float64 `json:"qstar_superadiabatic,omitempty"`
	// RMSOverMean is the root mean square of q - q_mean over q_mean (over
	// the sphere, of the continuous field).
	RMSOverMean float64 `json:"rms_over_mean"`
	// MaxDeviationOverMean is max |q - q_mean| / q_mean of the continuous
	// field.
	MaxDeviationOverMean float64 `json:"max_deviation_over_mean"`
	// FluxUnits names the unit of the flux entries, "mW/m^2".
	FluxUnits string `json:"flux_units"`
	// FluxSign states the sign convention of the flux entries: positive
	// where heat leaves the core (HeatFlux.Info().Sign).
	FluxSign string `json:"flux_sign"`
	// QMean is the mean heat flux, mW/m^2.
	QMean float64 `json:"q_mean"`
	// QMax is the maximum of the continuous field, mW/m^2.
	QMax float64 `json:"q_max"`
	// QMin is the minimum of the continuous field, mW/m^2.
	QMin float64 `json:"q_min"`
	// QMaxLonLat locates the maximum, [lon, lat] in degrees.
	QMaxLonLat [2]float64 `json:"q_max_lonlat"`
	// QMinLonLat locates the minimum, [lon, lat] in degrees.
	QMinLonLat [2]float64 `json:"q_min_lonlat"`
	// HeatFlowTW is the CMB heat flow q_mean * 4 pi rc^2 in TW.
	HeatFlowTW float64 `json:"heat_flow_tw"`
	// QAd is the adiabatic flux in mW/m^2.
	QAd *float64 `json:"q_ad,omitempty"`
	// AdiabaticHeatFlowTW is the adiabatic heat flow in TW.
	AdiabaticHeatFlowTW *float64 `json:"adiabatic_heat_flow_tw,omitempty"`
	// AreaFractionNegative is the fraction of the CMB where q < 0 (the
	// core gains heat).
	AreaFractionNegative float64 `json:"area_fraction_negative"`
	// AreaFractionSubadiabatic is the fraction of the CMB where q < q_ad
	// (sub-adiabatic, thermally stratified).
	AreaFractionSubadiabatic *float64 `json:"area_fraction_subadiabatic,omitempty"`
	// LMax is the truncation degree.
	LMax int `json:"lmax"`
	// LMaxInput is the degree of the input expansion.
	LMaxInput int `json:"lmax_input"`
	// Taper names the taper applied (PatternOptions.TaperName).
	Taper string `json:"taper"`
	// Degree2PowerFraction is the fraction of the power of the anomaly in
	// degree 2.
	Degree2PowerFraction float64 `json:"degree2_power_fraction"`
	// SlowestLonLat is where the input dlnVs (all its degrees up to 128)
	// is lowest, [lon, lat] in degrees.
	SlowestLonLat [2]float64 `json:"slowest_lonlat"`
	// MinToSlowestDeg is the angle in degrees from the slowest point of the
	// input to the flux minimum.
	MinToSlowestDeg float64 `json:"min_to_slowest_deg"`
	// Amplitude is a in q = q_mean (1 + a g).
	Amplitude float64 `json:"amplitude"`
	// Conductivity is the lowermost-mantle conductivity k in W/m/K
	// (physical mode only).
	Conductivity float64 `json:"k_mantle,omitempty"`
	// ThicknessKm is the boundary-layer thickness h in km (physical mode).
	ThicknessKm float64 `json:"tbl_thickness_km,omitempty"`
	// DlnVsDT is dlnVs/dT in 1/K (physical mode).
	DlnVsDT float64 `json:"dlnvs_dt,omitempty"`
	// TemperatureMax is the mantle temperature anomaly in K where the flux
	// is highest (cold, negative; physical mode).
	TemperatureMax float64 `json:"dt_at_q_max_k,omitempty"`
	// TemperatureMin is the mantle temperature anomaly in K where the flux
	// is lowest (hot, positive; physical mode).
	TemperatureMin float64 `json:"dt_at_q_min_k,omitempty"`
}

// fractionBelow returns the fraction of the sphere where g < level: the
// contoured area, plus the regions around refined minima (minus the islands
// around refined maxima) too small to cut an edge of their grid cell, each
// by its quadratic model, an ellipse of area 2 pi |level - g_ext| /
// sqrt(det H) (H the Hessian on the unit sphere), at most the cell's area.
func (p *Pattern) fractionBelow(level float64) float64 {
	switch {
	case level <= p.min.value:
		return 0
	case level >= p.max.value:
		return 1
	}
	a := p.surf.AreaBelow(level)
	blob := func(e extremum, wantCorners int) float64 {
		ll := e.at.lonLat()
		if e.det <= 0 {
			return 0
		}
		if n, cut := p.surf.CellBelow(ll[0], ll[1], level); cut || n != wantCorners {
			return 0
		}
		return math.Min(2*math.Pi*math.Abs(level-e.value)/math.Sqrt(e.det), p.surf.CellArea(ll[0], ll[1]))
	}
	for _, e := range p.mins {
		if e.value >= level {
			break
		}
		a += blob(e, 0)
	}
	for _, e := range p.maxs {
		if e.value <= level {
			break
		}
		a -= blob(e, 4)
	}
	return math.Max(0, math.Min(1, a/(4*math.Pi)))
}

// level returns the level of g where q = target, for q = qm (1 + a g), and
// whether such a level exists (a != 0).
func level(target, qm, a float64) (float64, bool) {
	if a == 0 {
		return 0, false
	}
	return (target/qm - 1) / a, true
}

// fractionWhereBelow returns the fraction of the CMB with q < target.
func (p *Pattern) fractionWhereBelow(target, qm, a float64) float64 {
	c, ok := level(target, qm, a)
	if !ok {
		if qm < target {
			return 1
		}
		return 0
	}
	return p.fractionBelow(c)
}

func (p *Pattern) result(a, qm, qad float64, hasAd bool, kcore float64) *Result {
	r := &Result{Pattern: p, QMean: qm, Amplitude: a, QAd: qad, HasAdiabatic: hasAd, KCore: kcore}
	d := &r.Diagnostics
	const mw = 1e3
	qmax, qmin := qm*(1+a*p.max.value), qm*(1+a*p.min.value)
	d.QStarDefinition = PeakToPeak.Formula()
	d.QStar = a * (p.refMax - p.refMin)
	d.QStarContinuous = a * (p.max.value - p.min.value)
	d.QStarMeasuredOn = "continuous field"
	if p.refOn != "" {
		d.QStarMeasuredOn = p.refOn
	}
	d.RMSOverMean = a * p.rms
	d.MaxDeviationOverMean = a * math.Max(p.max.value, -p.min.value)
	d.FluxUnits = "mW/m^2"
	d.FluxSign = HeatFlux.Info().Sign
	d.QMean, d.QMax, d.QMin = qm*mw, qmax*mw, qmin*mw
	d.QMaxLonLat, d.QMinLonLat = p.max.at.lonLat(), p.min.at.lonLat()
	d.HeatFlowTW = HeatFlowFromFlux(qm) / TW
	d.AreaFractionNegative = p.fractionWhereBelow(0, qm, a)
	d.LMax, d.LMaxInput, d.Taper = p.g.LMax, p.input.LMax, p.opts.TaperName
	d.Degree2PowerFraction = p.deg2
	d.SlowestLonLat = p.slow.lonLat()
	d.MinToSlowestDeg = angle(p.min.at, p.slow) * rad2deg
	d.Amplitude = a
	r.Warnings = append(r.Warnings, p.warn...)
	if a == 0 {
		r.Warnings = append(r.Warnings, "uniform flux: the amplitude is zero (q* = 0), so the boundary condition is homogeneous and carries no pattern; check that q* or the physical constants were set")
	}
	if qm < 1e-3 || qm > 1 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("units: mean flux %.4g mW/m^2 (%.4g TW) is far outside the usual 10-300 mW/m^2 (3-45 TW): check the units (flux in W/m^2 inside the library, mW/m^2 at the edge; heat flow in W, TW at the edge)", qm*mw, HeatFlowFromFlux(qm)/TW))
	}
	if kcore > 0 && (kcore < 5 || kcore > 500) {
		r.Warnings = append(r.Warnings, fmt.Sprintf("units: core conductivity %.4g W/m/K is outside 5-500 W/m/K (published values for the outermost core are about 20-150 W/m/K: Konopkova et al. 2016, Pozzo et al. 2012): check the units of k_core, which sets dT/dr = -q / k_core", kcore))
	}
	if hasAd {
		v, tw := qad*mw, HeatFlowFromFlux(qad)/TW
		d.QAd, d.AdiabaticHeatFlowTW = &v, &tw
		f := p.fractionWhereBelow(qad, qm, a)
		d.AreaFractionSubadiabatic = &f
		if qm > qad {
			s := (qmax - qmin) / (qm - qad)
			d.QStarSuperadiabatic = &s
		}
		if qm <= qad {
			r.Warnings = append(r.Warnings, fmt.Sprintf("sub-adiabatic mean: the mean flux %.4g mW/m^2 is not above the adiabatic flux %.4g mW/m^2: the top of the core is sub-adiabatic on average (thermally stratified); check the heat flow and the adiabatic reference", qm*mw, qad*mw))
		} else if qmin < qad {
			r.Warnings = append(r.Warnings, fmt.Sprintf("sub-adiabatic heat flux: q < q_ad = %.4g mW/m^2 over %.3g%% of the CMB: sub-adiabatic, thermally stratified patches under the slow mantle (q_min = %.4g mW/m^2)", qad*mw, 100*f, qmin*mw))
		}
	}
	if qmin < 0 {
		crit := -(p.refMax - p.refMin) / p.min.value
		r.Warnings = append(r.Warnings, fmt.Sprintf("negative heat flux: q_min = %.4g mW/m^2 is negative: the core gains heat over %.3g%% of the CMB (q* = %.4g; this pattern turns negative above q* = %.4g); make sure the simulation code is meant to run with inward flux, or lower the amplitude", qmin*mw, 100*d.AreaFractionNegative, d.QStar, crit))
	}
	if p.refOn != "" && d.QStarContinuous > d.QStar*(1+1e-9) {
		r.Warnings = append(r.Warnings, fmt.Sprintf("q* measured on a grid: q* = %.4g is measured on grid %q; the continuous field exported reaches q* = %.4g (%.1f%% more), which is what a code evaluating the expansion sees", d.QStar, p.refOn, d.QStarContinuous, 100*(d.QStarContinuous/d.QStar-1)))
	}
	return r
}

// Outlines are the boundaries of the regions of a result where the flux is
// negative and where it is sub-adiabatic, as rings of [lon, lat] in degrees
// with the region on the left (exterior rings counter-clockwise seen from
// outside, holes clockwise); see package contour.
type Outlines struct {
	// Negative bounds the regions where q < 0.
	Negative [][][2]float64 `json:"negative"`
	// Subadiabatic bounds the regions where q < q_ad.
	Subadiabatic [][][2]float64 `json:"subadiabatic,omitempty"`
}

// Outlines returns the outlines of the negative and sub-adiabatic regions
// (Subadiabatic is nil without an adiabatic reference). They are the plain
// polygons of the search grid, accurate to its spacing; the area fractions in
// Diagnostics are computed more precisely. Longitudes are in [-180, 180):
// a ring crossing the antimeridian jumps by about 360 degrees between two
// vertices (edges are the short great-circle arcs), and a ring around a
// pole runs once through all longitudes; cut them for flat formats (RFC
// 7946, section 3.1.9). A region covering the whole CMB has no outline (nil
// rings with area fraction 1).
func (r *Result) Outlines() Outlines {
	p := r.Pattern
	var o Outlines
	rings := func(target float64) [][][2]float64 {
		c, ok := level(target, r.QMean, r.Amplitude)
		if !ok || c <= p.min.value || c >= p.max.value {
			return nil
		}
		rs := p.surf.Rings(c)
		for _, ring := range rs {
			for k, v := range ring {
				pt := point{(90 - v[1]) / rad2deg, v[0] / rad2deg}
				if p.rot != nil {
					pt.colat, pt.lon = p.rot.ApplyPoint(pt.colat, pt.lon)
				}
				ring[k] = pt.lonLat()
			}
		}
		return rs
	}
	o.Negative = rings(0)
	if r.HasAdiabatic {
		o.Subadiabatic = rings(r.QAd)
	}
	return o
}
