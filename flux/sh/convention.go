package sh

import "math"

// Convert returns a copy of c expressed in convention to. The field is
// unchanged: since C_lm Y_lm is the same in both conventions,
//
//	C_lm(to) = C_lm(from) N_lm(from) / N_lm(to),
//
// with N_lm including the Condon-Shortley sign (-1)^m where the convention
// has it (so switching the phase alone negates the odd orders). The ratios
// are formed from the factors of each convention relative to orthonormal
// (see Normalization), kept as mantissa and binary exponent so that no
// intermediate overflows; a round trip restores every coefficient to within
// a few ulp.
//
// Convert returns a *DegreeError if either convention cannot represent
// degree c.LMax (Unnormalized beyond UnnormalizedMaxDegree).
func (c *Coeffs) Convert(to Convention) (*Coeffs, error) {
	if err := c.Conv.CheckDegree(c.LMax); err != nil {
		return nil, err
	}
	if err := to.CheckDegree(c.LMax); err != nil {
		return nil, err
	}
	d := c.Clone()
	d.Conv = to
	if c.Conv == to {
		return d, nil
	}
	n := c.LMax + 1
	ff, tf := make([]float64, n), make([]float64, n)
	fe, te := make([]int, n), make([]int, n)
	for l := 0; l <= c.LMax; l++ {
		normRow(ff, fe, l, c.Conv)
		normRow(tf, te, l, to)
		i0 := Index(l, 0)
		for m := 0; m <= l; m++ {
			r := ff[m] / tf[m]
			e := fe[m] - te[m]
			i := i0 + m
			d.C[i] = math.Ldexp(c.C[i]*r, e)
			d.S[i] = math.Ldexp(c.S[i]*r, e)
		}
	}
	return d, nil
}

// MustConvert is like Convert but panics on error; use it only where both
// conventions are normalized (never Unnormalized), so no error can occur.
func (c *Coeffs) MustConvert(to Convention) *Coeffs {
	d, err := c.Convert(to)
	if err != nil {
		panic(err.Error())
	}
	return d
}

// ConversionFactor returns N_lm(from) / N_lm(to), the factor that turns a
// coefficient of degree l and order m in convention from into convention to
// (see Convert). It returns +Inf or 0 where the ratio is not representable
// (Unnormalized at high degree) and panics if (l, m) is outside
// 0 <= m <= l.
func ConversionFactor(l, m int, from, to Convention) float64 {
	if l < 0 || m < 0 || m > l {
		panic("sh: (l, m) outside 0 <= m <= l")
	}
	n := l + 1
	ff, tf := make([]float64, n), make([]float64, n)
	fe, te := make([]int, n), make([]int, n)
	normRow(ff, fe, l, from)
	normRow(tf, te, l, to)
	return math.Ldexp(ff[m]/tf[m], fe[m]-te[m])
}
