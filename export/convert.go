package export

import (
	"fmt"

	"cmbflux/flux/sh"
)

// convertCoeffs returns c in convention to (c itself when it already is),
// through (*sh.Coeffs).Convert.
func convertCoeffs(c *sh.Coeffs, to sh.Convention) (*sh.Coeffs, error) {
	if c.Conv == to {
		return c, nil
	}
	d, err := c.Convert(to)
	if err != nil {
		return nil, fmt.Errorf("export: converting coefficients from %v to %v: %w", c.Conv, to, err)
	}
	return d, nil
}

// complexExpansion and complexNegativeRule describe sh.ComplexCoeffs.
func complexExpansion(cs bool) string {
	neg := "Y_l^-m = conj(Y_l^m)"
	if cs {
		neg = "Y_l^-m = (-1)^m conj(Y_l^m)"
	}
	return "f(theta, phi) = sum_{l} sum_{m=-l..l} c_lm Y_l^m(theta, phi), Y_l^m = N_lm P_l^m(cos theta) exp(i m phi) for m >= 0, " + neg
}

func complexNegativeRule(cs bool) string {
	if cs {
		return "c_l,-m = (-1)^m conj(c_lm) for this real field"
	}
	return "c_l,-m = conj(c_lm) for this real field"
}

// phaseSign is s_m of sh.ComplexCoeffs: (-1)^m with the Condon-Shortley
// phase, 1 without.
func phaseSign(m int, cs bool) float64 {
	if cs && m%2 != 0 {
		return -1
	}
	return 1
}
