package sh

import "math"

// canonicalView returns c itself if it is in Canonical convention, and a
// converted copy otherwise. It panics if c's convention cannot represent its
// degree.
func canonicalView(c *Coeffs) *Coeffs {
	if c.Conv == Canonical {
		return c
	}
	return c.MustConvert(Canonical)
}

// PowerSpectrum returns the degree power spectrum
//
//	S_l = sum_{m=0}^{l} (C_lm^2 + S_lm^2),  l = 0..LMax,
//
// of the coefficients converted to orthonormal form (Canonical), whatever
// c.Conv is. With that normalization S_l is the contribution of degree l to
// the integral of f^2 over the unit sphere (Parseval):
// sum_l S_l = integral f^2 dOmega, so sum_l S_l / (4 pi) is the mean square
// of f. (In the 4-pi convention the same number is 4 pi times the sum of the
// squared coefficients; in the Schmidt convention it is 4 pi/(2l+1) times.)
// Units: the square of the field's unit times steradian. dst is used if it
// has room for LMax+1 values. It panics if c's convention cannot represent
// its degree.
func (c *Coeffs) PowerSpectrum(dst []float64) []float64 {
	o := canonicalView(c)
	n := c.LMax + 1
	if cap(dst) < n {
		dst = make([]float64, n)
	}
	dst = dst[:n]
	for l := 0; l <= c.LMax; l++ {
		i0 := Index(l, 0)
		s := 0.0
		for i := i0; i <= i0+l; i++ {
			s += o.C[i]*o.C[i] + o.S[i]*o.S[i]
		}
		dst[l] = s
	}
	return dst
}

// RMS returns the root-mean-square over the sphere of the part of the field
// made of degrees lmin..lmax,
//
//	sqrt( sum_{l=lmin}^{lmax} S_l / (4 pi) ),
//
// with S_l from PowerSpectrum; RMS(1, LMax) is the standard deviation of the
// field about its mean. It panics unless 0 <= lmin <= lmax <= LMax.
func (c *Coeffs) RMS(lmin, lmax int) float64 {
	if lmin < 0 || lmin > lmax || lmax > c.LMax {
		panic("sh: RMS needs 0 <= lmin <= lmax <= LMax")
	}
	s := c.PowerSpectrum(nil)
	t := 0.0
	for l := lmin; l <= lmax; l++ {
		t += s[l]
	}
	return math.Sqrt(t / (4 * math.Pi))
}

// MeanSquareSpectrum returns S_l / (4 pi), l = 0..LMax, the contribution of
// degree l to the mean square of f over the sphere; it equals
// sum_m (C_lm^2 + S_lm^2) of the coefficients in the 4-pi (fully
// normalized) convention. dst is used if it has room. It panics like
// PowerSpectrum.
func (c *Coeffs) MeanSquareSpectrum(dst []float64) []float64 {
	dst = c.PowerSpectrum(dst)
	for l := range dst {
		dst[l] /= 4 * math.Pi
	}
	return dst
}
