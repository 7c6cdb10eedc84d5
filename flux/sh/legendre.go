package sh

import (
	"fmt"
	"math"
	"sync"
	"sync/atomic"
)

// The associated Legendre functions are computed by the forward column
// recursion in degree l at fixed order m, started from the sectoral values
// P_mm (Holmes & Featherstone 2002, J. Geodesy 76, 279-299, eqs. 11-13; equation
// numbers from memory),
// for orthonormal functions without the Condon-Shortley phase:
//
//	P_00 = 1/sqrt(4 pi)
//	P_11 = sqrt(3) u P_00,  P_mm = sqrt((2m+1)/(2m)) u P_(m-1)(m-1)   (m >= 2)
//	P_lm = a_lm t P_(l-1)m - b_lm P_(l-2)m
//	a_lm = sqrt((2l-1)(2l+1) / ((l-m)(l+m)))
//	b_lm = sqrt((2l+1)(l-1-m)(l-1+m) / ((2l-3)(l-m)(l+m)))
//
// with t = cos(colat) and u = sin(colat). Against underflow near the poles
// (u^m is below the smallest double for m*log10(1/u) > 308) each column
// carries its own binary exponent: the recursion runs on a mantissa that is
// rescaled by an exact power of two whenever it exceeds 2^400, in the spirit
// of the extended-range arithmetic of Fukushima 2012 (J. Geodesy 86,
// 271-285, pages from memory), so no value overflows and values below the
// double range come out as zero.
//
// Within 60 degrees of either pole (|t| > 1/2) the three-term recursion is
// ill-conditioned with respect to the rounding of t = cos(colat): an error of
// one ulp in t near 1 changes P_l0 by about l^2/2 ulp. There the recursion is
// rewritten, as in Reinsch's modification of the Goertzel-Clenshaw
// recurrence (Stoer & Bulirsch, Introduction to Numerical Analysis, sec. 2.3,
// from memory), in terms of h = 1 - |t| = u^2/(1+|t|), which is computed to
// full relative precision from u, and of the differences
// D_l = P_lm - r_lm P_(l-1)m, where r_lm = P_lm(1)/P_(l-1)m(1) is the ratio of
// the solutions at the pole (P_lm / u^m at u -> 0):
//
//	r_lm = a_lm (l+m)/(2l-1),  a_lm - r_lm = a_lm (l-m-1)/(2l-1),
//	D_l = (a_lm - r_lm) D_(l-1) - a_lm h P_(l-1)m,  P_lm = r_lm P_(l-1)m + D_l.
//
// (Both identities follow from b_lm = (a_lm - r_lm) r_(l-1)m.) In the southern
// cap the functions are computed at pi - colat and the symmetry
// P_lm(-t) = (-1)^(l+m) P_lm(t) is applied. Measured with the mpmath table
// (testdata), this polar-cap form lowers the worst error up to degree 2700
// from 9e-11 (plain recursion in t) to 3e-13 of the local amplitude.

const (
	// rescaleExp is the binary exponent above which a column mantissa is
	// scaled down by 2^-rescaleExp.
	rescaleExp = 400
)

var (
	rescaleBig   = math.Ldexp(1, rescaleExp)
	rescaleSmall = math.Ldexp(1, -rescaleExp)
	inv4Pi       = 1 / math.Sqrt(4*math.Pi)
	sqrt4Pi      = math.Sqrt(4 * math.Pi)
)

// plm generates rows of orthonormal associated Legendre functions without
// the Condon-Shortley phase, one degree at a time.
type plm struct {
	lmax    int
	x, u, h float64 // x = t (middle zone) or |t| (polar caps); h = 1 - |t|
	reinsch bool    // polar-cap form of the recursion
	south   bool    // apply (-1)^(l+m)
	l       int     // degree of the row last produced
	p, q    []float64
	ex      []int     // binary exponent of column m
	lo, hi  []float64 // output multipliers: value = p * lo * hi
	sm      float64   // sectoral mantissa of P_ll / 2^se
	se      int
	sq, isq []float64 // shared sqrtTable entries, k = 0..2 lmax+1
}

// sqrtTable holds sqrt(k) and 1/sqrt(k) for k = 0..n-1 (1/sqrt(0) unused).
// The recursion coefficients are products of these:
//
//	a_lm = sqrt(2l-1) sqrt(2l+1) / (sqrt(l-m) sqrt(l+m)),
//	b_lm = sqrt(2l+1) sqrt(l-1-m) sqrt(l-1+m) / (sqrt(2l-3) sqrt(l-m) sqrt(l+m)),
//
// a few roundings each, which is as accurate as forming them with one
// division and one square root (checked against the mpmath table) and
// several times faster. Tables only grow and are shared read-only.
type sqrtTable struct {
	sq, isq []float64
}

var sqrtCache atomic.Pointer[sqrtTable]

// sqrtFor returns a table with at least n entries.
func sqrtFor(n int) *sqrtTable {
	if t := sqrtCache.Load(); t != nil && len(t.sq) >= n {
		return t
	}
	n = max(n, 512)
	t := &sqrtTable{sq: make([]float64, n), isq: make([]float64, n)}
	for k := 1; k < n; k++ {
		t.sq[k] = math.Sqrt(float64(k))
		t.isq[k] = 1 / t.sq[k]
	}
	// Concurrent callers may each build a table; any of them is correct.
	if old := sqrtCache.Load(); old == nil || len(old.sq) < n {
		sqrtCache.Store(t)
	}
	return t
}

// reset prepares the generator for degrees 0..lmax at colatitude colat
// (radians; any finite value, with sin(colat) < 0 meaning the point beyond
// the pole).
func (g *plm) reset(lmax int, colat float64) {
	if lmax < 0 {
		panic("sh: negative lmax")
	}
	if math.IsNaN(colat) || math.IsInf(colat, 0) {
		panic(fmt.Sprintf("sh: colatitude %v is not finite", colat))
	}
	g.lmax = lmax
	u, t := math.Sincos(colat)
	g.u = u
	at := math.Abs(t)
	g.reinsch = at > 0.5
	g.south = false
	if g.reinsch {
		g.x = at
		g.h = u * u / (1 + at)
		g.south = t < 0
	} else {
		g.x = t
		g.h = 1 - at
	}
	n := lmax + 1
	if cap(g.p) < n {
		g.p = make([]float64, n)
		g.q = make([]float64, n)
		g.ex = make([]int, n)
		g.lo = make([]float64, n)
		g.hi = make([]float64, n)
	}
	g.p, g.q, g.ex, g.lo, g.hi = g.p[:n], g.q[:n], g.ex[:n], g.lo[:n], g.hi[:n]
	g.l = -1
	tab := sqrtFor(2*lmax + 2)
	g.sq, g.isq = tab.sq, tab.isq
}

// setScale sets the output multipliers of column m from its exponent. The
// multipliers are exact powers of two and normal numbers, so the product
// p*lo*hi is rounded once. A column whose values are all below the smallest
// normal double (|p| <= 2^rescaleExp and 2^(e+rescaleExp) < 2^-1022) gets
// zero multipliers: such values are returned as 0 rather than as subnormal
// numbers, whose arithmetic is slow on common processors.
func (g *plm) setScale(m int) {
	e := g.ex[m]
	switch {
	case e >= -1022:
		g.lo[m], g.hi[m] = 1, math.Ldexp(1, e)
	case e >= -1022-rescaleExp:
		g.lo[m], g.hi[m] = rescaleSmall, math.Ldexp(1, e+rescaleExp)
	default:
		g.lo[m], g.hi[m] = 0, 0
	}
}

func (g *plm) rescale(m int) {
	g.p[m] *= rescaleSmall
	g.q[m] *= rescaleSmall
	g.ex[m] += rescaleExp
	g.setScale(m)
}

// next computes the row of degree l = g.l+1 into out[0..l] and returns l.
func (g *plm) next(out []float64) int {
	g.l++
	l := g.l
	if l > g.lmax {
		panic("sh: Legendre row beyond lmax")
	}
	out = out[:l+1]
	if l == 0 {
		g.sm, g.se = math.Frexp(inv4Pi)
		g.p[0], g.q[0], g.ex[0] = g.sm, 0, g.se
		g.setScale(0)
		out[0] = inv4Pi
		return 0
	}
	fl := float64(l)
	p, q, lo, hi := g.p[:l+1], g.q[:l+1], g.lo[:l+1], g.hi[:l+1]
	if g.reinsch {
		k := 1 / (2*fl - 1)
		h := g.h
		r1 := g.sq[2*l-1] * g.sq[2*l+1]
		for m := 0; m < l; m++ {
			fm := float64(m)
			a := r1 * g.isq[l-m] * g.isq[l+m]
			c := a * k
			r := c * (fl + fm)
			amr := c * (fl - fm - 1)
			d := amr*q[m] - a*h*p[m]
			v := r*p[m] + d
			p[m], q[m] = v, d
			if math.Abs(v) > rescaleBig {
				g.rescale(m)
				v = p[m]
			}
			out[m] = v * lo[m] * hi[m]
		}
	} else {
		x := g.x
		r1 := g.sq[2*l-1] * g.sq[2*l+1]
		var r2 float64
		if l >= 2 {
			r2 = g.sq[2*l+1] * g.isq[2*l-3]
		}
		for m := 0; m < l; m++ {
			w := g.isq[l-m] * g.isq[l+m]
			a := r1 * w
			var b float64
			if m < l-1 {
				b = r2 * w * g.sq[l-1-m] * g.sq[l-1+m]
			}
			v := a*x*p[m] - b*q[m]
			p[m], q[m] = v, p[m]
			if math.Abs(v) > rescaleBig {
				g.rescale(m)
				v = p[m]
			}
			out[m] = v * lo[m] * hi[m]
		}
	}
	// New sectoral column m = l.
	f := math.Sqrt((2*fl + 1) / (2 * fl))
	if l == 1 {
		f = math.Sqrt(3)
	}
	fr, e := math.Frexp(g.sm * f * g.u)
	g.sm = fr
	g.se += e
	p[l], q[l], g.ex[l] = g.sm, 0, g.se
	g.setScale(l)
	out[l] = g.sm * lo[l] * hi[l]
	if g.south {
		for m := 1 - l&1; m <= l; m += 2 {
			out[m] = -out[m]
		}
	}
	return l
}

// value returns P_lm * fm * 2^fe for column m of the current row, computed
// from the scaled mantissa so that it neither overflows nor underflows
// before the final rounding.
func (g *plm) value(m int, fm float64, fe int) float64 {
	v := math.Ldexp(g.p[m]*fm, g.ex[m]+fe)
	if g.south && (g.l+m)&1 == 1 {
		v = -v
	}
	return v
}

// derivRow computes d P_lm / d colat, m = 0..l, from the row of values
// P_l0..P_ll (orthonormal or any normalization whose ratio to orthonormal
// depends on l only) by the non-singular relation, valid at the poles,
//
//	dP_l0/dtheta = -sqrt(l(l+1)/2) P_l1
//	dP_lm/dtheta = (k_m g_m P_l(m-1) - g_(m+1) P_l(m+1)) / 2,  m >= 1,
//	g_m = sqrt((l+m)(l-m+1)),  k_1 = sqrt(2), k_m = 1 otherwise,
//
// obtained by normalizing dP_l^m/dtheta = ((l+m)(l-m+1) P_l^(m-1) - P_l^(m+1))/2
// for the Ferrers functions without the phase (from the derivative of the
// Rodrigues form; see also Abramowitz & Stegun sec. 8.5, from memory).
func derivRow(dst, row []float64, l int) {
	if l == 0 {
		dst[0] = 0
		return
	}
	fl := float64(l)
	dst[0] = -math.Sqrt(fl*(fl+1)/2) * row[1]
	sq := sqrtFor(2*l + 2).sq
	gm := math.Sqrt(2 * fl * (fl + 1)) // sqrt(2) g_1
	for m := 1; m < l; m++ {
		gn := sq[l+m+1] * sq[l-m] // g_(m+1)
		dst[m] = 0.5 * (gm*row[m-1] - gn*row[m+1])
		gm = gn
	}
	dst[l] = 0.5 * gm * row[l-1]
}

// plmPool recycles generators (and their per-order buffers) between calls
// of Legendre and LegendreDeriv.
var plmPool = sync.Pool{New: func() any { return new(plm) }}

// UnnormalizedMaxDegree is the largest degree for which unnormalized
// (Ferrers) functions and coefficients are representable in double
// precision for every order: the conversion factor to orthonormal,
// sqrt((l+m)!/(l-m)!) / sqrt((2 - delta_m0)(2l+1)/(4 pi)), and its reciprocal
// are finite normal numbers for l <= 150 (at l = m = 151 the factor
// sqrt(302!) already exceeds the largest double, about 1.8e308). The largest
// value, P_150^150(0) = 299!! = 3.8e306, is finite.
const UnnormalizedMaxDegree = 150

// DegreeError reports a maximum degree that a convention cannot represent.
type DegreeError struct {
	LMax int
	Conv Convention
	Max  int // largest representable degree
}

// Error says which degree is too high and what to do.
func (e *DegreeError) Error() string {
	return fmt.Sprintf("sh: degree %d is beyond %d, the largest degree representable in double precision with %s harmonics; use a normalized convention (orthonormal, fully-normalized or schmidt) or lmax <= %d",
		e.LMax, e.Max, e.Conv.Norm, e.Max)
}

// MaxDegree returns the largest degree representable in the convention:
// UnnormalizedMaxDegree for Unnormalized, math.MaxInt32 otherwise (the
// normalized functions are bounded by sqrt((2l+1)/(2 pi)) times the
// normalization constant and stay finite; accuracy is tested to degree 2700).
func (c Convention) MaxDegree() int {
	if c.Norm == Unnormalized {
		return UnnormalizedMaxDegree
	}
	return math.MaxInt32
}

// CheckDegree returns a *DegreeError if degrees up to lmax cannot be
// represented in the convention, and nil otherwise. It panics if lmax < 0.
func (c Convention) CheckDegree(lmax int) error {
	if lmax < 0 {
		panic("sh: negative lmax")
	}
	if lmax > c.MaxDegree() {
		return &DegreeError{LMax: lmax, Conv: c, Max: c.MaxDegree()}
	}
	return nil
}

// normRow sets f[m] (mantissa) and e[m] (binary exponent) so that
// f[m]*2^e[m] = N_lm(conv) / N_lm(Canonical), the factor turning an
// orthonormal phase-free function of degree l, order m = 0..l into one of
// convention conv (phase included):
//
//	orthonormal: 1, fully-normalized: sqrt(4 pi),
//	schmidt: sqrt(4 pi/(2l+1)),
//	unnormalized: sqrt(4 pi/((2 - delta_m0)(2l+1))) sqrt((l+m)!/(l-m)!),
//
// each times (-1)^m with the Condon-Shortley phase.
func normRow(f []float64, e []int, l int, conv Convention) {
	fl := float64(l)
	var base float64
	switch conv.Norm {
	case Orthonormal:
		base = 1
	case FourPi:
		base = sqrt4Pi
	case Schmidt, Unnormalized:
		base = sqrt4Pi / math.Sqrt(2*fl+1)
	default:
		panic(fmt.Sprintf("sh: unknown normalization %d", int(conv.Norm)))
	}
	if conv.Norm != Unnormalized {
		for m := 0; m <= l; m++ {
			f[m], e[m] = base, 0
		}
	} else {
		// Running product of g_k = sqrt((l+k)(l-k+1)), kept as mantissa and
		// exponent so that it cannot overflow.
		mant, ex := base, 0
		f[0], e[0] = mant, 0
		mant *= math.Sqrt(0.5)
		for m := 1; m <= l; m++ {
			fm := float64(m)
			mant *= math.Sqrt((fl + fm) * (fl - fm + 1))
			var de int
			mant, de = math.Frexp(mant)
			ex += de
			f[m], e[m] = mant, ex
		}
	}
	if conv.CondonShortley {
		for m := 1; m <= l; m += 2 {
			f[m] = -f[m]
		}
	}
}

// Legendre returns the normalized associated Legendre functions
// N_lm P_l^m(cos colat) (times (-1)^m if conv.CondonShortley) for
// 0 <= m <= l <= lmax at colatitude colat (radians), at dst[Index(l, m)],
// with N_lm the normalization of conv.Norm (see Normalization). dst is used
// if it has room for NumCoeffs(lmax) values and allocated otherwise; the
// returned slice has length NumCoeffs(lmax).
//
// Any finite colat is accepted; sin(colat) < 0 continues the functions
// through the pole. The functions are computed by a scaled forward column
// recursion (Holmes & Featherstone 2002) with per-order binary exponents and,
// within 60 degrees of the poles, a form of the recursion in 1 - |cos colat|
// (see the comment at the top of legendre.go). No value overflows at any
// degree; values below the smallest normal double (2.2e-308) come out as 0
// or a subnormal number. Against a 60-digit mpmath table (degrees 0-2700,
// colatitudes 1e-6 to pi - 1e-6, all normalizations) the error is below
// 3e-13 of the local amplitude sqrt(P^2 + (P'/(l+1/2))^2) (tested at 1e-12).
//
// Legendre is safe for concurrent use. It panics if lmax < 0, if colat is
// not finite, or if conv.CheckDegree(lmax) reports an error (Unnormalized
// beyond UnnormalizedMaxDegree); check first when lmax comes from input.
func Legendre(dst []float64, lmax int, colat float64, conv Convention) []float64 {
	p, _ := legendre(dst, nil, lmax, colat, conv, false)
	return p
}

// LegendreDeriv returns the functions of Legendre in p and their derivatives
// with respect to colatitude, d/dcolat [N_lm P_l^m(cos colat)], in dp, both
// indexed by Index(l, m); p and dp are reused when large enough. The
// derivatives are computed from the values of the same degree by the
// relation
//
//	dP_l^m/dtheta = ((l+m)(l-m+1) P_l^(m-1) - P_l^(m+1)) / 2
//
// (normalized accordingly), which has no 1/sin(colat) and is exact at the
// poles. LegendreDeriv panics under the same conditions as Legendre.
func LegendreDeriv(p, dp []float64, lmax int, colat float64, conv Convention) ([]float64, []float64) {
	return legendre(p, dp, lmax, colat, conv, true)
}

func legendre(dst, ddst []float64, lmax int, colat float64, conv Convention, deriv bool) ([]float64, []float64) {
	if err := conv.CheckDegree(lmax); err != nil {
		panic(err.Error())
	}
	n := NumCoeffs(lmax)
	if cap(dst) < n {
		dst = make([]float64, n)
	}
	dst = dst[:n]
	if deriv {
		if cap(ddst) < n {
			ddst = make([]float64, n)
		}
		ddst = ddst[:n]
	}
	g := plmPool.Get().(*plm)
	defer plmPool.Put(g)
	g.reset(lmax, colat)
	var f []float64
	var fe []int
	if conv != Canonical {
		f = make([]float64, lmax+1)
		fe = make([]int, lmax+1)
	}
	for l := 0; l <= lmax; l++ {
		i0 := Index(l, 0)
		row := dst[i0 : i0+l+1]
		g.next(row)
		if deriv {
			derivRow(ddst[i0:i0+l+1], row, l)
		}
		if conv == Canonical {
			continue
		}
		normRow(f, fe, l, conv)
		if conv.Norm == Unnormalized {
			if deriv {
				unnormDeriv(ddst[i0:i0+l+1], g, f, fe, l)
			}
			for m := 0; m <= l; m++ {
				row[m] = g.value(m, f[m], fe[m])
			}
			continue
		}
		for m := 0; m <= l; m++ {
			row[m] *= f[m]
		}
		if deriv {
			d := ddst[i0 : i0+l+1]
			for m := 0; m <= l; m++ {
				d[m] *= f[m]
			}
		}
	}
	return dst, ddst
}

// unnormDeriv recomputes the derivative row for the unnormalized
// convention from the scaled mantissas, so that values that underflow in
// orthonormal scaling but not in unnormalized scaling keep their precision.
func unnormDeriv(d []float64, g *plm, f []float64, fe []int, l int) {
	if l == 0 {
		d[0] = 0
		return
	}
	fl := float64(l)
	// m = 0: -sqrt(l(l+1)/2) f_0 P_l1.
	d[0] = -g.value(1, math.Sqrt(fl*(fl+1)/2)*f[0], fe[0])
	gm := math.Sqrt(2 * fl * (fl + 1))
	for m := 1; m <= l; m++ {
		fm := float64(m)
		gn := math.Sqrt((fl + fm + 1) * (fl - fm))
		v := g.value(m-1, 0.5*gm*f[m], fe[m])
		if m < l {
			v -= g.value(m+1, 0.5*gn*f[m], fe[m])
		}
		d[m] = v
		gm = gn
	}
}
