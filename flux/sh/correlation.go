package sh

import "math"

// DegreeCorrelation returns the degree correlation of two expansions
// (Becker & Boschi 2002, G-cubed 3),
//
//	r_l = sum_m (a_lm b_lm) / sqrt( sum_m a_lm^2 * sum_m b_lm^2 ),
//
// for l = 0..min(a.LMax, b.LMax), where the sums run over the cosine and
// sine coefficients of order m = 0..l after converting both expansions to
// Canonical (the orthonormal, phase-free convention; the ratio does not
// depend on the normalization within one degree, but a mismatch of phase
// conventions would flip the odd orders, which the conversion prevents).
// r_l is NaN where either expansion has no power at degree l. dst is used
// if it has room.
func DegreeCorrelation(dst []float64, a, b *Coeffs) []float64 {
	ao, bo := canonicalView(a), canonicalView(b)
	lmax := min(a.LMax, b.LMax)
	if cap(dst) < lmax+1 {
		dst = make([]float64, lmax+1)
	}
	dst = dst[:lmax+1]
	for l := 0; l <= lmax; l++ {
		ab, aa, bb := degreeSums(ao, bo, l)
		dst[l] = ratio(ab, aa, bb)
	}
	return dst
}

// TotalCorrelation returns the correlation of two expansions over the
// degrees lmin..lmax (Becker & Boschi 2002),
//
//	r = sum_{l,m} a_lm b_lm / sqrt( sum_{l,m} a_lm^2 * sum_{l,m} b_lm^2 ),
//
// with both converted to Canonical first. With lmin = 1 this is the
// Pearson correlation over the sphere of the two fields with their means
// removed. It is NaN if either has no power in the range, and it panics
// unless 0 <= lmin <= lmax <= min(a.LMax, b.LMax).
func TotalCorrelation(a, b *Coeffs, lmin, lmax int) float64 {
	if lmin < 0 || lmin > lmax || lmax > min(a.LMax, b.LMax) {
		panic("sh: TotalCorrelation needs 0 <= lmin <= lmax <= min(a.LMax, b.LMax)")
	}
	ao, bo := canonicalView(a), canonicalView(b)
	var ab, aa, bb float64
	for l := lmin; l <= lmax; l++ {
		x, y, z := degreeSums(ao, bo, l)
		ab, aa, bb = ab+x, aa+y, bb+z
	}
	return ratio(ab, aa, bb)
}

func degreeSums(a, b *Coeffs, l int) (ab, aa, bb float64) {
	i0 := Index(l, 0)
	for i := i0; i <= i0+l; i++ {
		ab += a.C[i]*b.C[i] + a.S[i]*b.S[i]
		aa += a.C[i]*a.C[i] + a.S[i]*a.S[i]
		bb += b.C[i]*b.C[i] + b.S[i]*b.S[i]
	}
	return ab, aa, bb
}

func ratio(ab, aa, bb float64) float64 {
	if aa == 0 || bb == 0 {
		return math.NaN()
	}
	r := ab / (math.Sqrt(aa) * math.Sqrt(bb))
	// Rounding can push |r| a hair beyond 1 for proportional expansions.
	return math.Max(-1, math.Min(1, r))
}
