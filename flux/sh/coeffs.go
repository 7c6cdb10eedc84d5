package sh

import (
	"fmt"
	"math"
	"strings"
)

// Normalization selects the scaling of the real spherical harmonics
// Y_lm(theta, phi) = N_lm P_l^m(cos theta) {cos m phi, sin m phi}.
type Normalization int

const (
	// Orthonormal harmonics have integral of Y_lm^2 over the unit sphere = 1:
	// N_lm = sqrt((2 - delta_m0) (2l+1) / (4 pi) * (l-m)!/(l+m)!).
	Orthonormal Normalization = iota
	// FourPi (geodesy's "fully normalized") harmonics have integral = 4 pi:
	// N_lm = sqrt((2 - delta_m0) (2l+1) (l-m)!/(l+m)!).
	FourPi
	// Schmidt semi-normalized harmonics (geomagnetism) have integral
	// 4 pi / (2l+1): N_lm = sqrt((2 - delta_m0) (l-m)!/(l+m)!).
	Schmidt
	// Unnormalized harmonics use N_lm = 1, i.e. the Ferrers functions
	// P_l^m(x) = (1 - x^2)^(m/2) d^m P_l(x) / dx^m (times the phase, if any).
	Unnormalized
)

var normNames = [...]string{"orthonormal", "fully-normalized", "schmidt", "unnormalized"}

// String returns the name used in files and on the command line.
func (n Normalization) String() string {
	if n < 0 || int(n) >= len(normNames) {
		return fmt.Sprintf("Normalization(%d)", int(n))
	}
	return normNames[n]
}

// ParseNormalization accepts the names returned by String and a few common
// synonyms ("4pi", "geodesy", "schmidt-semi", "ortho", "none").
func ParseNormalization(s string) (Normalization, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "orthonormal", "ortho":
		return Orthonormal, nil
	case "fully-normalized", "fully-normalised", "4pi", "four-pi", "geodesy":
		return FourPi, nil
	case "schmidt", "schmidt-semi", "schmidt-semi-normalized", "semi-normalized":
		return Schmidt, nil
	case "unnormalized", "unnormalised", "none":
		return Unnormalized, nil
	}
	return 0, fmt.Errorf("sh: unknown normalization %q (want orthonormal, fully-normalized, schmidt or unnormalized)", s)
}

// Convention is the full description of how a set of real coefficients is to
// be read: normalization and whether the Condon-Shortley phase (-1)^m is
// included in P_l^m.
type Convention struct {
	Norm           Normalization
	CondonShortley bool
}

// Canonical is the convention used inside cmbflux: orthonormal harmonics
// without the Condon-Shortley phase.
var Canonical = Convention{Norm: Orthonormal, CondonShortley: false}

// String describes the convention, e.g. "schmidt, no Condon-Shortley phase".
func (c Convention) String() string {
	if c.CondonShortley {
		return c.Norm.String() + ", with Condon-Shortley phase"
	}
	return c.Norm.String() + ", no Condon-Shortley phase"
}

// Index returns the position of degree l, order m (0 <= m <= l) in the
// triangular l-major layout used by Coeffs: l*(l+1)/2 + m.
func Index(l, m int) int { return l*(l+1)/2 + m }

// NumCoeffs returns the number of (l, m) pairs with 0 <= m <= l <= lmax.
func NumCoeffs(lmax int) int { return (lmax + 1) * (lmax + 2) / 2 }

// Coeffs holds the real spherical-harmonic coefficients of a real field,
//
//	f(theta, phi) = sum_{l=0}^{LMax} sum_{m=0}^{l} C_lm Y_lm^c + S_lm Y_lm^s,
//
// with Y_lm^c = N_lm P_l^m(cos theta) cos(m phi) and
// Y_lm^s = N_lm P_l^m(cos theta) sin(m phi) in the convention Conv.
// C and S have length NumCoeffs(LMax) and are indexed by Index(l, m);
// S at m = 0 is always zero.
type Coeffs struct {
	LMax int
	Conv Convention
	C, S []float64
}

// NewCoeffs returns zero coefficients up to degree lmax in convention conv.
// It panics if lmax < 0.
func NewCoeffs(lmax int, conv Convention) *Coeffs {
	if lmax < 0 {
		panic("sh: negative lmax")
	}
	n := NumCoeffs(lmax)
	return &Coeffs{LMax: lmax, Conv: conv, C: make([]float64, n), S: make([]float64, n)}
}

// At returns the cosine and sine coefficients of degree l and order m.
// It panics if (l, m) is outside 0 <= m <= l <= LMax.
func (c *Coeffs) At(l, m int) (cos, sin float64) {
	c.check(l, m)
	i := Index(l, m)
	return c.C[i], c.S[i]
}

// Set sets the cosine and sine coefficients of degree l and order m. The sine
// coefficient at m = 0 must be zero; Set panics otherwise or if (l, m) is out
// of range.
func (c *Coeffs) Set(l, m int, cos, sin float64) {
	c.check(l, m)
	if m == 0 && sin != 0 {
		panic("sh: nonzero sine coefficient at m = 0")
	}
	i := Index(l, m)
	c.C[i], c.S[i] = cos, sin
}

func (c *Coeffs) check(l, m int) {
	if l < 0 || l > c.LMax || m < 0 || m > l {
		panic(fmt.Sprintf("sh: (l, m) = (%d, %d) outside 0 <= m <= l <= %d", l, m, c.LMax))
	}
}

// Clone returns a deep copy.
func (c *Coeffs) Clone() *Coeffs {
	d := &Coeffs{LMax: c.LMax, Conv: c.Conv, C: make([]float64, len(c.C)), S: make([]float64, len(c.S))}
	copy(d.C, c.C)
	copy(d.S, c.S)
	return d
}

// Truncate returns a copy limited to degrees 0..lmax (padded with zeros if
// lmax > LMax).
func (c *Coeffs) Truncate(lmax int) *Coeffs {
	d := NewCoeffs(lmax, c.Conv)
	n := NumCoeffs(min(lmax, c.LMax))
	copy(d.C, c.C[:n])
	copy(d.S, c.S[:n])
	return d
}

// Validate reports the first inconsistency of c as an error, or nil: a
// negative LMax, C or S of a length other than NumCoeffs(LMax), a nonzero
// sine coefficient at m = 0, a coefficient that is NaN or infinite, or a
// degree its convention cannot represent (see Convention.CheckDegree).
// Readers of coefficient files should call it before handing c on.
func (c *Coeffs) Validate() error {
	if c.LMax < 0 {
		return fmt.Errorf("sh: coefficients with negative lmax %d", c.LMax)
	}
	n := NumCoeffs(c.LMax)
	if len(c.C) != n || len(c.S) != n {
		return fmt.Errorf("sh: coefficients up to degree %d need %d cosine and sine values, have %d and %d", c.LMax, n, len(c.C), len(c.S))
	}
	if err := c.Conv.CheckDegree(c.LMax); err != nil {
		return err
	}
	for l := 0; l <= c.LMax; l++ {
		for m := 0; m <= l; m++ {
			i := Index(l, m)
			if math.IsNaN(c.C[i]) || math.IsInf(c.C[i], 0) || math.IsNaN(c.S[i]) || math.IsInf(c.S[i], 0) {
				return fmt.Errorf("sh: coefficient (l, m) = (%d, %d) is not finite: %v, %v", l, m, c.C[i], c.S[i])
			}
			if m == 0 && c.S[i] != 0 {
				return fmt.Errorf("sh: sine coefficient at (l, m) = (%d, 0) is %v; it must be 0 (sin(0 phi) = 0)", l, c.S[i])
			}
		}
	}
	return nil
}
