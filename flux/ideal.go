package flux

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"cmbflux/flux/sh"
)

// Term is one real spherical harmonic of an idealised pattern:
// Weight * Y_lm^c (or Y_lm^s when Sin), canonical (orthonormal, no
// Condon-Shortley phase), so that Y_lm^c = N_lm P_l^m(cos colat) cos(m lon).
type Term struct {
	// L and M are the degree (1 or more) and order (0 to L).
	L, M int
	// Sin selects the sine harmonic (M > 0 only).
	Sin bool
	// Weight multiplies the harmonic.
	Weight float64
}

// Harmonics returns the canonical coefficients of the sum of the terms.
// Terms with the same (l, m, sin) add. It returns an error for degree 0,
// m outside 0..l, or a sine term of order 0.
func Harmonics(terms ...Term) (*sh.Coeffs, error) {
	if len(terms) == 0 {
		return nil, fmt.Errorf("%w: no harmonic terms; give at least one, e.g. degree 2, order 2", ErrSetting)
	}
	lmax := 0
	for _, t := range terms {
		if t.L < 1 || t.M < 0 || t.M > t.L {
			return nil, fmt.Errorf("%w: harmonic (l, m) = (%d, %d): need 1 <= l and 0 <= m <= l", ErrSetting, t.L, t.M)
		}
		if t.Sin && t.M == 0 {
			return nil, fmt.Errorf("%w: harmonic (%d, 0) has no sine part; use the cosine part", ErrSetting, t.L)
		}
		lmax = max(lmax, t.L)
	}
	c := sh.NewCoeffs(lmax, sh.Canonical)
	for _, t := range terms {
		k := sh.Index(t.L, t.M)
		if t.Sin {
			c.S[k] += t.Weight
		} else {
			c.C[k] += t.Weight
		}
	}
	return c, nil
}

// Ideal returns the pattern of a sum of harmonics: the flux anomaly has the
// sign of the sum (positive terms raise the flux), with the same amplitude
// control as tomographic patterns. opt may be nil; its LMax defaults to the
// highest degree of the terms. Terms above a smaller LMax are dropped, with a
// warning (Pattern.Warnings).
func Ideal(opt *PatternOptions, terms ...Term) (*Pattern, error) {
	c, err := Harmonics(terms...)
	if err != nil {
		return nil, err
	}
	p, err := NewPattern(c, opt)
	if err != nil {
		return nil, err
	}
	if opt != nil && opt.LMax > 0 {
		for _, t := range terms {
			if t.L > opt.LMax && t.Weight != 0 {
				p.warn = append(p.warn, fmt.Sprintf("harmonic dropped: the term (l, m) = (%d, %d) lies above lmax %d and is not in the pattern; raise lmax to %d or remove the term", t.L, t.M, opt.LMax, t.L))
			}
		}
	}
	return p, nil
}

// ParseTerm reads a harmonic term written L:M[:cos|sin][:WEIGHT], for
// example "2:2", "3:1:sin" or "1:0:cos:0.5" (cos and weight 1 by default).
func ParseTerm(s string) (Term, error) {
	parts := strings.Split(strings.TrimSpace(s), ":")
	bad := func(why string) (Term, error) {
		return Term{}, fmt.Errorf("%w: harmonic %q: %s; want L:M[:cos|sin][:WEIGHT], e.g. 2:2 or 3:1:sin:0.5", ErrSetting, s, why)
	}
	if len(parts) < 2 || len(parts) > 4 {
		return bad("wrong number of fields")
	}
	l, err1 := strconv.Atoi(parts[0])
	m, err2 := strconv.Atoi(parts[1])
	if err1 != nil || err2 != nil {
		return bad("degree and order must be integers")
	}
	t := Term{L: l, M: m, Weight: 1}
	for _, p := range parts[2:] {
		switch strings.ToLower(p) {
		case "cos", "c":
			t.Sin = false
		case "sin", "s":
			t.Sin = true
		default:
			w, err := strconv.ParseFloat(p, 64)
			if err != nil || math.IsNaN(w) || math.IsInf(w, 0) {
				return bad("the weight must be a finite number")
			}
			t.Weight = w
		}
	}
	if l < 1 || m < 0 || m > l {
		return bad("need 1 <= L and 0 <= M <= L")
	}
	if t.Sin && m == 0 {
		return bad("order 0 has no sine part")
	}
	return t, nil
}
