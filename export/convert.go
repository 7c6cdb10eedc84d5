package export

import (
	"fmt"
	"math"
	"math/cmplx"

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

// complexDivisor is d in A_lm = (C_lm - i S_lm) / d, m > 0, between the
// real coefficients C, S (functions N_lm P_l^m cos, sin) and the complex
// ones A (functions Nc_lm P_l^m exp(+-i m phi), Nc_lm as the header's
// normalization_factor states it). From cos x = (e^ix + e^-ix)/2 and
// sin x = (e^ix - e^-ix)/(2i), d = 2 Nc_lm / N_lm: sqrt(2) for the
// normalized conventions, whose real N_lm carries sqrt(2 - delta_m0) and
// the complex one not, and 2 for unnormalized functions, where both
// factors are 1.
func complexDivisor(n sh.Normalization) float64 {
	if n == sh.Unnormalized {
		return 2
	}
	return math.Sqrt2
}

// toComplex returns the complex coefficients of the real field c in its
// own normalization and phase: A_l0 = C_l0, A_lm = (C_lm - i S_lm) / d and
// A_l,-m = s_m conj(A_lm) for m > 0 (d from complexDivisor, s_m from
// phaseSign). It is written here rather than taken from
// (*sh.Coeffs).Complex so that the unnormalized case matches the header
// (Nc_lm = 1, d = 2).
func toComplex(c *sh.Coeffs) *sh.ComplexCoeffs {
	z := sh.NewComplexCoeffs(c.LMax, c.Conv)
	d := complexDivisor(c.Conv.Norm)
	for l := 0; l <= c.LMax; l++ {
		z.Set(l, 0, complex(c.C[sh.Index(l, 0)], 0))
		for m := 1; m <= l; m++ {
			i := sh.Index(l, m)
			a := complex(c.C[i]/d, -c.S[i]/d)
			z.Set(l, m, a)
			z.Set(l, -m, complex(phaseSign(m, c.Conv.CondonShortley), 0)*cmplx.Conj(a))
		}
	}
	return z
}

// fromComplex is the inverse of toComplex for the coefficients of a real
// field: with B_lm = (A_lm + s_m conj(A_l,-m))/2, C_l0 = Re B_l0 and
// C_lm = d Re B_lm, S_lm = -d Im B_lm for m > 0.
func fromComplex(z *sh.ComplexCoeffs) *sh.Coeffs {
	c := sh.NewCoeffs(z.LMax, z.Conv)
	d := complexDivisor(z.Conv.Norm)
	for l := 0; l <= z.LMax; l++ {
		c.C[sh.Index(l, 0)] = real(z.At(l, 0))
		for m := 1; m <= l; m++ {
			b := (z.At(l, m) + complex(phaseSign(m, z.Conv.CondonShortley), 0)*cmplx.Conj(z.At(l, -m))) / 2
			i := sh.Index(l, m)
			c.C[i], c.S[i] = d*real(b), -d*imag(b)
		}
	}
	return c
}
