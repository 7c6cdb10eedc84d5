package sh

import (
	"fmt"
	"math"
	"math/cmplx"
)

// ComplexIndex returns the position of degree l, order m (-l <= m <= l) in
// the layout of ComplexCoeffs: l*l + l + m.
func ComplexIndex(l, m int) int { return l*l + l + m }

// NumComplexCoeffs returns (lmax+1)^2, the number of (l, m) pairs with
// 0 <= l <= lmax and -l <= m <= l.
func NumComplexCoeffs(lmax int) int { return (lmax + 1) * (lmax + 1) }

// ComplexCoeffs holds the coefficients of a (possibly complex) field in
// complex spherical harmonics,
//
//	f(theta, phi) = sum_{l=0}^{LMax} sum_{m=-l}^{l} A_lm Y_l^m(theta, phi),
//
// with, for m >= 0,
//
//	Y_l^m = Nc_lm P_l^m(cos theta) exp(i m phi),
//	Y_l^-m = s_m conj(Y_l^m),  s_m = (-1)^m with the Condon-Shortley phase, 1 without,
//
// where P_l^m includes the phase (-1)^m if Conv.CondonShortley and Nc_lm
// is the complex normalization belonging to Conv.Norm (for the normalized
// conventions Nc_lm = N_lm / sqrt(2 - delta_m0), with N_lm the real one; the
// unnormalized complex harmonic is P_l^m exp(i m phi) like the real one):
//
//	orthonormal:  Nc_lm = sqrt((2l+1)/(4 pi) (l-m)!/(l+m)!), integral of |Y|^2 = 1,
//	fully-normalized: Nc_lm = sqrt((2l+1) (l-m)!/(l+m)!),   integral = 4 pi,
//	schmidt:      Nc_lm = sqrt((l-m)!/(l+m)!),               integral = 4 pi/(2l+1),
//	unnormalized: Nc_lm = 1,                                  integral = 4 pi/(2l+1) (l+m)!/(l-m)!.
//
// Orthonormal with the phase is the convention of SciPy's
// scipy.special.sph_harm and of most physics texts. In both phase
// conventions Y_l^-m = Nc_lm P_l^m(cos theta) exp(-i m phi) with P_l^m
// taken without the phase. A is indexed by ComplexIndex(l, m) and has
// length NumComplexCoeffs(LMax).
type ComplexCoeffs struct {
	LMax int
	Conv Convention
	A    []complex128
}

// NewComplexCoeffs returns zero coefficients up to degree lmax in convention
// conv. It panics if lmax < 0.
func NewComplexCoeffs(lmax int, conv Convention) *ComplexCoeffs {
	if lmax < 0 {
		panic("sh: negative lmax")
	}
	return &ComplexCoeffs{LMax: lmax, Conv: conv, A: make([]complex128, NumComplexCoeffs(lmax))}
}

// At returns A_lm. It panics if (l, m) is outside -l <= m <= l <= LMax.
func (z *ComplexCoeffs) At(l, m int) complex128 {
	z.check(l, m)
	return z.A[ComplexIndex(l, m)]
}

// Set sets A_lm. It panics if (l, m) is out of range.
func (z *ComplexCoeffs) Set(l, m int, a complex128) {
	z.check(l, m)
	z.A[ComplexIndex(l, m)] = a
}

func (z *ComplexCoeffs) check(l, m int) {
	if l < 0 || l > z.LMax || m < -l || m > l {
		panic(fmt.Sprintf("sh: (l, m) = (%d, %d) outside -l <= m <= l <= %d", l, m, z.LMax))
	}
}

// phaseSign returns s_m of ComplexCoeffs: (-1)^m with the Condon-Shortley
// phase, 1 without.
func phaseSign(m int, conv Convention) float64 {
	if conv.CondonShortley && m&1 == 1 {
		return -1
	}
	return 1
}

// realToComplexNorm returns kappa_m = N_lm / Nc_lm, the ratio of the real to
// the complex normalization: 1 at m = 0 and for Unnormalized (N = Nc = 1),
// sqrt(2) for m > 0 in the normalized conventions.
func realToComplexNorm(m int, n Normalization) float64 {
	if m == 0 || n == Unnormalized {
		return 1
	}
	return math.Sqrt2
}

// Complex returns the complex coefficients of the real field c, in the same
// normalization and phase convention. From cos(m phi) and sin(m phi) in terms
// of exp(+-i m phi), with kappa_m = N_lm/Nc_lm (sqrt(2) for m > 0 in the
// normalized conventions, 1 for Unnormalized):
//
//	A_l0 = C_l0,
//	A_lm = kappa_m (C_lm - i S_lm) / 2,  A_l,-m = s_m conj(A_lm),  m > 0,
//
// i.e. A_lm = (C_lm - i S_lm)/sqrt(2) except for unnormalized harmonics,
// where it is (C_lm - i S_lm)/2.
func (c *Coeffs) Complex() *ComplexCoeffs {
	z := NewComplexCoeffs(c.LMax, c.Conv)
	for l := 0; l <= c.LMax; l++ {
		i := Index(l, 0)
		z.A[ComplexIndex(l, 0)] = complex(c.C[i], 0)
		for m := 1; m <= l; m++ {
			i := Index(l, m)
			h := realToComplexNorm(m, c.Conv.Norm) / 2
			a := complex(h*c.C[i], -h*c.S[i])
			z.A[ComplexIndex(l, m)] = a
			z.A[ComplexIndex(l, -m)] = complex(phaseSign(m, c.Conv), 0) * cmplx.Conj(a)
		}
	}
	return z
}

// Real returns the real coefficients of the real part of the field,
// Re f = (f + conj f)/2, in the same convention; for the coefficients of a
// real field (A_l,-m = s_m conj(A_lm)) this is the exact inverse of
// Coeffs.Complex. With B_lm = (A_lm + s_m conj(A_l,-m))/2, the coefficient
// of Y_l^m in Re f, and kappa_m as in Coeffs.Complex:
//
//	C_l0 = Re B_l0,  C_lm = (2/kappa_m) Re B_lm,  S_lm = -(2/kappa_m) Im B_lm,  m > 0.
//
// Use ImagPart to see how far the field is from real.
func (z *ComplexCoeffs) Real() *Coeffs {
	c := NewCoeffs(z.LMax, z.Conv)
	for l := 0; l <= z.LMax; l++ {
		c.C[Index(l, 0)] = real(z.A[ComplexIndex(l, 0)])
		for m := 1; m <= l; m++ {
			b := (z.A[ComplexIndex(l, m)] + complex(phaseSign(m, z.Conv), 0)*cmplx.Conj(z.A[ComplexIndex(l, -m)])) / 2
			i := Index(l, m)
			k := 2 / realToComplexNorm(m, z.Conv.Norm)
			c.C[i] = k * real(b)
			c.S[i] = -k * imag(b)
		}
	}
	return c
}

// ImagPart returns the real coefficients of the imaginary part of the
// field, Im f = (f - conj f)/(2i); it is zero for the coefficients of a real
// field.
func (z *ComplexCoeffs) ImagPart() *Coeffs {
	w := NewComplexCoeffs(z.LMax, z.Conv)
	for i, a := range z.A {
		w.A[i] = a * complex(0, -1) // f/i
	}
	// Re(f/i) = Im f.
	return w.Real()
}

// Convert returns a copy of z in convention to (the field is unchanged):
// A_lm(to) = A_lm(from) Nc_lm(from)/Nc_lm(to), where for m < 0 the factor
// carries no phase (see ComplexCoeffs). It returns a *DegreeError if either
// convention cannot represent degree z.LMax.
func (z *ComplexCoeffs) Convert(to Convention) (*ComplexCoeffs, error) {
	if err := z.Conv.CheckDegree(z.LMax); err != nil {
		return nil, err
	}
	if err := to.CheckDegree(z.LMax); err != nil {
		return nil, err
	}
	w := NewComplexCoeffs(z.LMax, to)
	n := z.LMax + 1
	ff, tf := make([]float64, n), make([]float64, n)
	fe, te := make([]int, n), make([]int, n)
	for l := 0; l <= z.LMax; l++ {
		normRow(ff, fe, l, z.Conv)
		normRow(tf, te, l, to)
		for m := 0; m <= l; m++ {
			// Nc(from)/Nc(to) = (N(from)/N(to)) kappa_m(to)/kappa_m(from).
			r := math.Ldexp(ff[m]/tf[m], fe[m]-te[m]) * realToComplexNorm(m, to.Norm) / realToComplexNorm(m, z.Conv.Norm)
			i := ComplexIndex(l, m)
			w.A[i] = mulReal(z.A[i], r)
			if m > 0 {
				j := ComplexIndex(l, -m)
				w.A[j] = mulReal(z.A[j], math.Abs(r))
			}
		}
	}
	return w, nil
}

func mulReal(a complex128, r float64) complex128 { return complex(real(a)*r, imag(a)*r) }

// Evaluate returns f(colat, lon) at colatitude colat and east longitude lon
// (radians). It allocates; it panics if z's convention cannot represent its
// degree or colat is not finite.
func (z *ComplexCoeffs) Evaluate(colat, lon float64) complex128 {
	p := Legendre(nil, z.LMax, colat, z.Conv)
	var f complex128
	for l := 0; l <= z.LMax; l++ {
		f += z.A[ComplexIndex(l, 0)] * complex(p[Index(l, 0)], 0)
		for m := 1; m <= l; m++ {
			nc := p[Index(l, m)] / realToComplexNorm(m, z.Conv.Norm) // Nc P_l^m (phase included)
			s, c := math.Sincos(float64(m) * lon)
			e := complex(c, s)
			f += z.A[ComplexIndex(l, m)] * complex(nc, 0) * e
			f += z.A[ComplexIndex(l, -m)] * complex(phaseSign(m, z.Conv)*nc, 0) * cmplx.Conj(e)
		}
	}
	return f
}
