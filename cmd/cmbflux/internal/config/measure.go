package config

import (
	"strconv"
	"strings"

	"cmbflux/flux"
)

// MeasureHelp describes each amplitude measure of --measure with its
// formula, for help texts and README.
const MeasureHelp = "qstar: (q_max - q_min)/q_mean; qstar-superadiabatic: (q_max - q_min)/(q_mean - q_ad); " +
	"rms: rms(q - q_mean)/q_mean over the sphere; max-deviation: max|q - q_mean|/q_mean"

// resolveMeasure reads --measure and --amplitude: --amplitude X sets the
// measure named by --measure (default qstar) to X; --qstar X is short for
// --measure qstar --amplitude X and refuses another measure, so that a
// value called q* is always (q_max - q_min)/q_mean.
func resolveMeasure(s Set, sp *Spec) error {
	sp.Measure = flux.PeakToPeak
	mv, hasM := s["measure"]
	if hasM {
		m, err := flux.ParseMeasure(strings.TrimSpace(mv.Raw))
		if err != nil {
			return mv.errorf("measure", "%q is not one of qstar, qstar-superadiabatic, rms, max-deviation (%s)", mv.Raw, MeasureHelp)
		}
		sp.Measure = m
		if sp.Physical {
			return mv.errorf("measure", "only used without --physical (physical mode sets the amplitude from the constants)")
		}
	}
	if av, ok := s["amplitude"]; ok {
		if _, q := s["qstar"]; q {
			return av.errorf("amplitude", "give either --qstar or --amplitude, not both (--qstar X is --measure qstar --amplitude X)")
		}
		if sp.Physical {
			return av.errorf("amplitude", "give either --amplitude or --physical, not both (physical mode sets the amplitude from the constants)")
		}
		x, _ := strconv.ParseFloat(av.Raw, 64) // syntax checked when set
		if x < 0 {
			return av.errorf("amplitude", "%g is negative; %s is at least 0", x, sp.Measure.Formula())
		}
		sp.QStar, sp.HasQStar = x, true
	} else if q, ok := s["qstar"]; ok && sp.Measure != flux.PeakToPeak {
		return q.errorf("qstar", "--qstar sets q* = (q_max - q_min)/q_mean, but --measure is %s; give the value of %s as --amplitude X", sp.Measure, sp.Measure.Formula())
	}
	if sp.Measure == flux.PeakToPeakSuperadiabatic {
		if !sp.HasQAd {
			return mv.errorf("measure", "qstar-superadiabatic, (q_max - q_min)/(q_mean - q_ad), needs the adiabatic flux: give --qad MW_M2 or --adiabatic-heatflow TW")
		}
		if sp.HasQMean && sp.QAd >= sp.QMean {
			return mv.errorf("measure", "qstar-superadiabatic needs q_ad below q_mean (here q_ad = %.4g and q_mean = %.4g mW/m^2)", sp.QAd*1e3, sp.QMean*1e3)
		}
	}
	if !sp.HasQStar && hasM && !sp.Physical {
		return mv.errorf("measure", "%s needs its value: give --amplitude X", sp.Measure)
	}
	return nil
}
