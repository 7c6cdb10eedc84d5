package export

import (
	"math"

	"cmbflux/flux/sh"
)

// convertCoeffs returns c in convention to (c itself when it already is).
//
// A real field f = sum N_lm P_l^m {C cos, S sin} keeps its value when the
// coefficients are multiplied by N_from/N_to and by (-1)^m when exactly one
// of the two conventions carries the Condon-Shortley phase.
// TODO(export): switch to (*sh.Coeffs).Convert once flux/sh has it.
func convertCoeffs(c *sh.Coeffs, to sh.Convention) *sh.Coeffs {
	if c.Conv == to {
		return c
	}
	d := sh.NewCoeffs(c.LMax, to)
	for l := 0; l <= c.LMax; l++ {
		for m := 0; m <= l; m++ {
			f := math.Exp(logNorm(c.Conv.Norm, l, m) - logNorm(to.Norm, l, m))
			if c.Conv.CondonShortley != to.CondonShortley && m%2 == 1 {
				f = -f
			}
			i := sh.Index(l, m)
			d.C[i], d.S[i] = c.C[i]*f, c.S[i]*f
		}
	}
	return d
}

// logNorm returns log N_lm for the real harmonics of normalization n.
func logNorm(n sh.Normalization, l, m int) float64 {
	if n == sh.Unnormalized {
		return 0
	}
	lg := func(x float64) float64 { v, _ := math.Lgamma(x); return v }
	v := lg(float64(l-m+1)) - lg(float64(l+m+1))
	if m != 0 {
		v += math.Ln2
	}
	switch n {
	case sh.FourPi:
		v += math.Log(float64(2*l + 1))
	case sh.Orthonormal:
		v += math.Log(float64(2*l+1) / (4 * math.Pi))
	}
	return v / 2
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
