package sh

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// TaperKind selects the form of a Taper.
type TaperKind int

const (
	// NoTaper keeps every degree: w_l = 1.
	NoTaper TaperKind = iota
	// CutTaper is the hard truncation at degree L: w_l = 1 for l <= L and 0
	// above.
	CutTaper
	// CosineTaper keeps degrees up to L1, removes degrees from L2 on and
	// rolls off in between with a raised cosine (Hann window, common
	// practice):
	//
	//	w_l = 1                                  l <= L1
	//	w_l = (1 + cos(pi (l - L1)/(L2 - L1)))/2   L1 < l < L2
	//	w_l = 0                                  l >= L2
	CosineTaper
	// GaussTaper is Gaussian averaging on the sphere (Jekeli 1981, Ohio
	// State Univ. Rep. 327; Wahr, Molenaar & Bryan 1998, JGR 103, 30205,
	// eqs. 30-34, equation numbers from memory): convolution with the kernel
	//
	//	W(gamma) proportional to exp(-b (1 - cos gamma)),  b = ln 2 / (1 - cos r),
	//
	// of the angular distance gamma, where r (HalfWidth, in degrees of arc)
	// is the angle at which the kernel falls to half its central value.
	// The weights, normalized to w_0 = 1, are ratios of modified spherical
	// Bessel functions of the first kind,
	//
	//	w_l = i_l(b) / i_0(b),
	//
	// (from integral of exp(b x) P_l(x) dx over [-1, 1] = 2 i_l(b), A&S 10.2.2
	// and 10.2.5 with the Legendre expansion of exp(b x), from memory), which
	// satisfy the recursion of Wahr et al. 1998,
	// w_(l+1) = -(2l+1)/b w_l + w_(l-1), w_0 = 1, w_1 = coth b - 1/b.
	// That forward recursion loses all accuracy once w_l is small; the
	// weights are instead computed from the ratios rho_l = w_l/w_(l-1) by the
	// backward recursion (continued fraction) rho_l = 1/((2l+1)/b + rho_(l+1)),
	// the minimal-solution method for three-term recurrences (Gautschi 1967,
	// SIAM Review 9, 24, from memory), which is stable at every degree:
	// weights decay smoothly to zero (roughly exp(-l(l+1)/(2b)) for large b)
	// and underflow to exactly 0.
	GaussTaper
)

// Taper is a degree-dependent weight w_l applied to the coefficients of
// degree l (a zonal, i.e. isotropic, filter). The zero value is NoTaper.
// The fields used depend on Kind: L (CutTaper), L1 < L2 (CosineTaper),
// HalfWidth in degrees of arc, MinHalfWidth <= HalfWidth <= 180
// (GaussTaper).
type Taper struct {
	Kind      TaperKind
	L, L1, L2 int
	HalfWidth float64
}

// MinHalfWidth is the smallest accepted Gaussian half-width, in degrees of
// arc (0.6 km on the core-mantle boundary). Narrower kernels change
// nothing a tomography model resolves (at 0.01 degrees w_l > 0.999 up to
// degree 300, from w_l ~ exp(-l(l+1)/(2b))); use no taper instead.
const MinHalfWidth = 0.01

// ParseTaper reads a taper from the command-line forms
//
//	none          no taper
//	cut:L         hard truncation above degree L
//	cos:L1:L2     raised-cosine roll-off from degree L1 (kept) to L2 (removed)
//	gauss:DEG     Gaussian averaging with half-width DEG degrees of arc
//
// and returns an error saying what is wrong and what is accepted.
func ParseTaper(s string) (Taper, error) {
	const want = `want "none", "cut:L", "cos:L1:L2" or "gauss:DEG"`
	f := strings.Split(strings.TrimSpace(s), ":")
	bad := func(why string) (Taper, error) {
		return Taper{}, fmt.Errorf("sh: taper %q: %s; %s", s, why, want)
	}
	degree := func(x, name string) (int, error) {
		v, err := strconv.Atoi(x)
		if err != nil || v < 0 {
			return 0, fmt.Errorf("%s %q is not a degree (a whole number >= 0)", name, x)
		}
		return v, nil
	}
	switch strings.ToLower(f[0]) {
	case "none", "":
		if len(f) != 1 || f[0] == "" {
			if f[0] == "" {
				return bad("empty")
			}
			return bad("none takes no parameters")
		}
		return Taper{}, nil
	case "cut":
		if len(f) != 2 {
			return bad("cut takes one degree")
		}
		l, err := degree(f[1], "L")
		if err != nil {
			return bad(err.Error())
		}
		return Taper{Kind: CutTaper, L: l}, nil
	case "cos", "cosine":
		if len(f) != 3 {
			return bad("cos takes two degrees")
		}
		l1, err := degree(f[1], "L1")
		if err != nil {
			return bad(err.Error())
		}
		l2, err := degree(f[2], "L2")
		if err != nil {
			return bad(err.Error())
		}
		if l2 <= l1 {
			return bad(fmt.Sprintf("L2 = %d must be larger than L1 = %d", l2, l1))
		}
		return Taper{Kind: CosineTaper, L1: l1, L2: l2}, nil
	case "gauss", "gaussian":
		if len(f) != 2 {
			return bad("gauss takes one half-width in degrees")
		}
		w, err := strconv.ParseFloat(f[1], 64)
		if err != nil || !(w >= MinHalfWidth && w <= 180) {
			return bad(fmt.Sprintf("half-width %q must be a number of degrees from %g to 180 (use none for no smoothing)", f[1], MinHalfWidth))
		}
		return Taper{Kind: GaussTaper, HalfWidth: w}, nil
	}
	return bad(fmt.Sprintf("unknown kind %q", f[0]))
}

// String returns the form accepted by ParseTaper.
func (t Taper) String() string {
	switch t.Kind {
	case NoTaper:
		return "none"
	case CutTaper:
		return fmt.Sprintf("cut:%d", t.L)
	case CosineTaper:
		return fmt.Sprintf("cos:%d:%d", t.L1, t.L2)
	case GaussTaper:
		return "gauss:" + strconv.FormatFloat(t.HalfWidth, 'g', -1, 64)
	}
	return fmt.Sprintf("Taper(%d)", int(t.Kind))
}

// validate panics on a Taper that ParseTaper would not produce.
func (t Taper) validate() {
	switch t.Kind {
	case NoTaper:
	case CutTaper:
		if t.L < 0 {
			panic("sh: cut taper with negative degree")
		}
	case CosineTaper:
		if t.L1 < 0 || t.L2 <= t.L1 {
			panic("sh: cosine taper needs 0 <= L1 < L2")
		}
	case GaussTaper:
		if !(t.HalfWidth >= MinHalfWidth && t.HalfWidth <= 180) {
			panic("sh: Gaussian taper needs MinHalfWidth <= HalfWidth <= 180 degrees")
		}
	default:
		panic(fmt.Sprintf("sh: unknown taper kind %d", int(t.Kind)))
	}
}

// Weight returns w_l of the taper at degree l >= 0 (see TaperKind for the
// formulas). For a GaussTaper each call costs O(l + b); use Weights for many
// degrees. It panics if l < 0 or the taper is invalid.
func (t Taper) Weight(l int) float64 {
	if l < 0 {
		panic("sh: negative degree")
	}
	if t.Kind == GaussTaper {
		return t.Weights(nil, l)[l]
	}
	t.validate()
	switch t.Kind {
	case CutTaper:
		if l > t.L {
			return 0
		}
	case CosineTaper:
		switch {
		case l <= t.L1:
			return 1
		case l >= t.L2:
			return 0
		}
		return 0.5 * (1 + math.Cos(math.Pi*float64(l-t.L1)/float64(t.L2-t.L1)))
	}
	return 1
}

// Weights returns w_0..w_lmax in dst (used if it has room). It panics if
// lmax < 0 or the taper is invalid.
func (t Taper) Weights(dst []float64, lmax int) []float64 {
	if lmax < 0 {
		panic("sh: negative lmax")
	}
	t.validate()
	if cap(dst) < lmax+1 {
		dst = make([]float64, lmax+1)
	}
	dst = dst[:lmax+1]
	if t.Kind != GaussTaper {
		for l := range dst {
			dst[l] = t.Weight(l)
		}
		return dst
	}
	b := GaussianB(t.HalfWidth)
	// Backward recursion for rho_l = i_l(b)/i_(l-1)(b), started at N with
	// rho_(N+1) = 0. The starting error is damped by the ratio of the
	// minimal to the dominant solution, i_l/k_l, which falls by about
	// exp(-2 l/b) per degree for l < b and faster beyond; N^2 >= lmax^2 + 80 b
	// gives a damping below exp(-40), i.e. nothing of the start is left.
	n := lmax + 40 + int(math.Sqrt(80*b))
	rho := 0.0
	for l := n; l > lmax; l-- {
		rho = 1 / (float64(2*l+1)/b + rho)
	}
	// Store the ratios, then accumulate products forward.
	for l := lmax; l >= 1; l-- {
		rho = 1 / (float64(2*l+1)/b + rho)
		dst[l] = rho
	}
	dst[0] = 1
	for l := 1; l <= lmax; l++ {
		dst[l] *= dst[l-1]
	}
	return dst
}

// GaussianB returns b = ln 2 / (1 - cos r) of the Gaussian averaging kernel
// exp(-b (1 - cos gamma)) whose value falls to half its central value at
// the angle r = halfWidth degrees of arc (Wahr, Molenaar & Bryan 1998,
// eq. 34). 1 - cos r is computed as 2 sin^2(r/2) for accuracy at small r.
func GaussianB(halfWidth float64) float64 {
	s := math.Sin(halfWidth * math.Pi / 360)
	return math.Ln2 / (2 * s * s)
}

// Filtered returns a copy of c with the coefficients of degree l multiplied
// by t's weight w_l. Because the weight depends on degree only, the result
// does not depend on the convention c is stored in. A CutTaper below LMax
// leaves LMax unchanged (the cut degrees are zero); use Truncate to shorten.
// It panics if the taper is invalid (see Taper).
func (c *Coeffs) Filtered(t Taper) *Coeffs {
	w := t.Weights(nil, c.LMax)
	d := c.Clone()
	for l := 0; l <= c.LMax; l++ {
		i0 := Index(l, 0)
		for i := i0; i <= i0+l; i++ {
			d.C[i] *= w[l]
			d.S[i] *= w[l]
		}
	}
	return d
}
