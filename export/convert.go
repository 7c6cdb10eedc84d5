package export

import (
	"fmt"
	"math"

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

const complexExpansion = "f(theta, phi) = sum_{l} sum_{m=-l..l} c_lm N_l|m| P_l^|m|(cos theta) exp(i m phi)"
const complexNegativeRule = "c_l,-m = conj(c_lm) for this real field"

// complexTable holds the complex coefficients of a real field for m >= 0.
type complexTable struct {
	re, im []float64 // indexed by sh.Index(l, m)
}

// toComplex returns the complex coefficients of the real field c, in the
// same normalization and phase: for m > 0 the real N_lm carries an extra
// sqrt(2) (the (2 - delta_m0) factor), so c_lm = (C_lm - i S_lm)/sqrt(2);
// c_l0 = C_l0.
func toComplex(c *sh.Coeffs) *complexTable {
	t := &complexTable{re: make([]float64, len(c.C)), im: make([]float64, len(c.S))}
	for l := 0; l <= c.LMax; l++ {
		for m := 0; m <= l; m++ {
			i := sh.Index(l, m)
			if m == 0 {
				t.re[i] = c.C[i]
				continue
			}
			t.re[i], t.im[i] = c.C[i]/math.Sqrt2, -c.S[i]/math.Sqrt2
		}
	}
	return t
}

// at returns c_lm for -l <= m <= l.
func (t *complexTable) at(l, m int) (re, im float64) {
	if m < 0 {
		i := sh.Index(l, -m)
		return t.re[i], -t.im[i]
	}
	i := sh.Index(l, m)
	return t.re[i], t.im[i]
}
