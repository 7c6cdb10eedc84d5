package sh

// Least-squares fits of coefficients to sampled values.
//
// The fit minimises
//
//	J(c) = sum_p w_p (f_p - (Y c)_p)^2 + lambda sum_lm l(l+1) (C_lm^2 + S_lm^2)
//
// over the canonical coefficients c of degree <= lmax, where the weights
// w_p are the areas (steradians) that the samples represent (times optional
// relative weights), so that the first sum approximates the integral of the
// squared misfit over the covered part of the sphere and a regular
// longitude-latitude grid does not over-weight the poles. The damping term
// is lambda times the integral of |grad f|^2 (Sobolev seminorm; degree 0 is
// never damped). With complete coverage and weights that integrate exactly
// (a Gauss-Legendre or Driscoll-Healy grid) the damped solution is
// c_lm = c_lm^(undamped) / (1 + lambda l(l+1)), which documents lambda's
// scale: lambda = 1/(L(L+1)) halves degree L.
//
// Method. On whole rings with weights constant along each ring (the usual
// tomography grid, with or without missing rings) the longitude FFT
// decouples the problem by order m, and each order is a small dense
// least-squares problem (rings x degrees) solved by QR (gonum/mat) after a
// singular value decomposition for its condition number. With masked points
// inside rings, point weights that vary along rings, or scattered points,
// the normal equations (Y^T W Y + lambda D) c = Y^T W f are solved by
// conjugate gradients with the fast operators (Transform or Points),
// preconditioned by the per-order normal matrices of the same rings with
// each ring's weight spread evenly along it (exact for whole rings); the
// condition number is bounded by sqrt(cond(M) cond(M^-1 N)), the first from
// the blocks' eigenvalues and the second from the Lanczos tridiagonal
// matrix of the iteration (Golub & Van Loan, Matrix Computations, 4th ed.,
// sec. 11.3, from memory), so it may overstate the true value.
//
// Memory. The per-order path holds one order's dense problem at a time,
// (rings + degrees) x degrees, so O(nlat L + L^2) besides the field. The
// conjugate-gradient path keeps the Cholesky factor of every order's block
// of the preconditioner, sum over m of (L - m + 1)^2 doubles, about L^3/3:
// 2.8 MB at L = 100, 22 MB at 200, 360 MB at 511 (and building it costs
// O(nlat L^3/3 + L^4/4) operations, the last for the blocks' eigenvalues).
// Unlike the transforms (transform.go), this path is meant for the degrees
// that irregular tomography coverage supports, well below those.
//
// Refusal. The fit returns a *FitError when the requested degree is
// ill-posed: above the longitude sampling limit m < nlon/2, or with a
// condition number of the weighted (damped) design above
// FitOptions.MaxCondition. The error names the largest safe degree found by
// bisection (condition numbers only grow with the degree).

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// FitOptions are the settings of FitGrid and FitPoints. The zero value (or
// nil) means all points valid, area weights, no damping, and the defaults
// below.
type FitOptions struct {
	// Valid marks the points to use (nil: all). NaN values are always left
	// out and counted in the report.
	Valid []bool
	// Weights are relative weights per point (e.g. inverse variances),
	// multiplied with the area weights (nil: all 1). Zero leaves a point out.
	Weights []float64
	// Damping is lambda >= 0 of the gradient-norm damping (see the package
	// note in fit.go); 0 means none.
	Damping float64
	// MaxCondition is the largest accepted condition number of the
	// weighted design matrix (0: 1e6).
	MaxCondition float64
	// Tol is the relative residual at which the iterative solver stops
	// (0: 1e-12); MaxIter bounds its iterations (0: 500; a well-posed
	// problem converges in a few tens with the preconditioner of fit.go).
	Tol     float64
	MaxIter int
}

// FitReport describes a fit.
type FitReport struct {
	LMax      int
	Method    string  // "per-order QR" or "conjugate gradients"
	Points    int     // points given
	Used      int     // points used (valid, finite, positive weight)
	NaN       int     // points left out for a NaN value
	Coverage  float64 // fraction of the sphere's area represented by the used points
	RMS       float64 // weighted rms residual, sqrt(sum w r^2 / sum w)
	MaxResid  float64 // largest |residual| at a used point
	Condition float64 // condition number of the weighted (damped) design
	Iter      int     // solver iterations (conjugate gradients), 0 otherwise
	Warnings  []string
}

// FitError reports a fit refused as ill-posed.
type FitError struct {
	LMax      int     // requested degree
	SafeLMax  int     // largest degree that passes the checks (-1: none)
	Condition float64 // condition number at LMax (0 when not computed)
	Reason    string
}

// ErrIllPosed is wrapped by every *FitError.
var ErrIllPosed = errors.New("sh: fit ill-posed")

// Error implements the error interface.
func (e *FitError) Error() string {
	s := fmt.Sprintf("sh: cannot fit degree %d: %s", e.LMax, e.Reason)
	if e.SafeLMax >= 0 {
		s += fmt.Sprintf("; the largest safe degree is %d (lower lmax, or add damping)", e.SafeLMax)
	} else {
		s += "; no degree is safe on these points"
	}
	return s
}

// Unwrap returns ErrIllPosed.
func (e *FitError) Unwrap() error { return ErrIllPosed }

func (o *FitOptions) maxCond() float64 {
	if o == nil || o.MaxCondition <= 0 {
		return 1e6
	}
	return o.MaxCondition
}

func (o *FitOptions) tol() float64 {
	if o == nil || o.Tol <= 0 {
		return 1e-12
	}
	return o.Tol
}

func (o *FitOptions) maxIter() int {
	if o == nil || o.MaxIter <= 0 {
		return 500
	}
	return o.MaxIter
}

func (o *FitOptions) damping() float64 {
	if o == nil {
		return 0
	}
	return o.Damping
}

// pointWeights combines validity, NaN, relative and area weights.
func pointWeights(f []float64, area func(i int) float64, o *FitOptions, rep *FitReport) ([]float64, error) {
	n := len(f)
	if o != nil && o.Valid != nil && len(o.Valid) != n {
		panic(fmt.Sprintf("sh: FitOptions.Valid has length %d, want %d", len(o.Valid), n))
	}
	if o != nil && o.Weights != nil && len(o.Weights) != n {
		panic(fmt.Sprintf("sh: FitOptions.Weights has length %d, want %d", len(o.Weights), n))
	}
	w := make([]float64, n)
	for i, v := range f {
		if o != nil && o.Valid != nil && !o.Valid[i] {
			continue
		}
		if math.IsNaN(v) {
			rep.NaN++
			continue
		}
		if math.IsInf(v, 0) {
			return nil, &PointError{Index: i, Reason: fmt.Sprintf("value is %v; mark it invalid or give a finite value", v)}
		}
		rw := 1.0
		if o != nil && o.Weights != nil {
			rw = o.Weights[i]
			if rw < 0 || math.IsNaN(rw) || math.IsInf(rw, 0) {
				return nil, &PointError{Index: i, Reason: fmt.Sprintf("weight is %v; weights must be finite and >= 0", rw)}
			}
		}
		w[i] = rw * area(i)
		if w[i] > 0 {
			rep.Used++
		}
	}
	if rep.NaN > 0 {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("%d of %d values are NaN and were left out", rep.NaN, n))
	}
	return w, nil
}

// PointError reports an unusable sample: its index in the values given to
// the fit (for FitLonLat, the table index j*len(lon)+i) and what is wrong.
type PointError struct {
	Index  int
	Reason string
}

// Error implements the error interface.
func (e *PointError) Error() string {
	return fmt.Sprintf("sh: sample %d: %s", e.Index, e.Reason)
}

// FitGrid fits coefficients of degree <= lmax to the field sampled on g
// (layout field[i*g.NLon+j]) by weighted, optionally damped least squares
// (see the package note in fit.go). Area weights come from the grid's
// quadrature weights when it has them and from Grid.AreaWeights otherwise.
// It returns a *FitError (wrapping ErrIllPosed) when the degree is not
// resolved by the coverage and a *PointError for an infinite value or a
// negative, NaN or infinite weight; it panics on programmer errors
// (negative lmax, slices of the wrong length).
func FitGrid(lmax int, g *Grid, field []float64, opt *FitOptions) (*Coeffs, *FitReport, error) {
	if lmax < 0 {
		panic("sh: FitGrid with negative lmax")
	}
	if len(field) != g.Len() {
		panic(fmt.Sprintf("sh: FitGrid field has length %d, grid has %d points", len(field), g.Len()))
	}
	rep := &FitReport{LMax: lmax, Points: len(field)}
	ringA := g.AreaWeights()
	if g.Weight != nil {
		for i := range ringA {
			ringA[i] = g.Weight[i] * 2 * math.Pi / float64(g.NLon)
		}
	}
	nlon := g.NLon
	w, err := pointWeights(field, func(i int) float64 { return ringA[i/nlon] }, opt, rep)
	if err != nil {
		return nil, rep, err
	}
	var area float64
	for i, wi := range w {
		if wi > 0 {
			area += ringA[i/nlon]
		}
	}
	rep.Coverage = area / (4 * math.Pi)
	if rep.Used == 0 {
		return nil, rep, &FitError{LMax: lmax, SafeLMax: -1, Reason: "no valid points"}
	}
	if lon := (nlon - 1) / 2; lmax > lon {
		return nil, rep, &FitError{LMax: lmax, SafeLMax: lon,
			Reason: fmt.Sprintf("%d longitudes per ring resolve orders below %d only (m < nlon/2)", nlon, nlon/2+nlon%2)}
	}
	// Whole rings with constant weight along the ring decouple by order.
	ringW := make([]float64, g.NLat())
	decoupled := true
	for i := range ringW {
		r := w[i*nlon : (i+1)*nlon]
		ringW[i] = r[0]
		for _, v := range r {
			if v != r[0] {
				decoupled = false
			}
		}
	}
	var c *Coeffs
	if decoupled {
		rep.Method = "per-order QR"
		c, err = fitRings(lmax, g, field, ringW, opt, rep)
	} else {
		rep.Method = "conjugate gradients"
		tr := NewTransform(lmax, g)
		ones := make([]float64, g.NLat())
		for i := range ones {
			ones[i] = 1
		}
		ringTot := make([]float64, g.NLat())
		for i := range ringTot {
			for _, v := range w[i*nlon : (i+1)*nlon] {
				ringTot[i] += v
			}
		}
		op := linOp{
			lmax:  lmax,
			synth: func(dst []float64, c *Coeffs) { tr.Synthesis(dst, c) },
			adj:   func(dst *Coeffs, v []float64) { tr.adjoint(dst, v, ones, 1) },
			prec:  newBlockPrec(lmax, g.Colat, ringTot, opt.damping()),
		}
		c, err = fitCG(op, field, w, opt, rep)
		if fe, ok := err.(*FitError); ok {
			fe.SafeLMax = safeDegree(lmax, func(l int) bool {
				if l > (nlon-1)/2 {
					return false
				}
				t := NewTransform(l, g)
				o := linOp{lmax: l,
					synth: func(dst []float64, c *Coeffs) { t.Synthesis(dst, c) },
					adj:   func(dst *Coeffs, v []float64) { t.adjoint(dst, v, ones, 1) },
					prec:  newBlockPrec(l, g.Colat, ringTot, opt.damping())}
				_, e := fitCG(o, field, w, opt, &FitReport{})
				return e == nil
			})
		}
	}
	if err != nil {
		return nil, rep, err
	}
	fitWarnings(rep, opt)
	// Residuals on the grid.
	fit := NewTransform(lmax, g).Synthesis(nil, c)
	residuals(rep, field, fit, w)
	return c, rep, nil
}

// noiseCond is the condition number above which a fit warns that it
// amplifies noise in the data.
const noiseCond = 1e3

func fitWarnings(rep *FitReport, opt *FitOptions) {
	if rep.Coverage < 0.999 {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("the used points cover %.1f%% of the sphere; in the gaps the fitted field is extrapolated", 100*rep.Coverage))
	}
	if rep.Condition > noiseCond {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("condition number %.3g: noise in the data may be amplified up to that factor; lower lmax or add damping", rep.Condition))
	}
}

func residuals(rep *FitReport, f, fit, w []float64) {
	var sw, swr float64
	for i, wi := range w {
		if wi > 0 {
			r := f[i] - fit[i]
			sw += wi
			swr += wi * r * r
			rep.MaxResid = math.Max(rep.MaxResid, math.Abs(r))
		}
	}
	rep.RMS = math.Sqrt(swr / sw)
}

// safeDegree returns the largest l in [0, lmax) with ok(l), assuming ok is
// monotone (true up to some degree, false above), or -1.
func safeDegree(lmax int, ok func(int) bool) int {
	lo, hi := -1, lmax // ok(lo) true (or lo = -1), ok(hi) false
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if ok(mid) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// fitRings solves the per-order problems for whole rings with ring weights
// ringW (0 for rings left out).
func fitRings(lmax int, g *Grid, field, ringW []float64, opt *FitOptions, rep *FitReport) (*Coeffs, error) {
	nlon := g.NLon
	var rings []int
	for i, w := range ringW {
		if w > 0 {
			rings = append(rings, i)
		}
	}
	// Fourier coefficients a_im, b_im of each used ring:
	// f(phi) = sum_m a_m cos(m phi) + b_m sin(m phi).
	// The package's real FFT (fft.go), accurate at any length.
	fft := newRealFFT(nlon)
	nk := nlon/2 + 1
	spec := make([]complex128, len(rings)*nk)
	for r, i := range rings {
		fft.forward(spec[r*nk:(r+1)*nk], field[i*nlon:(i+1)*nlon])
	}
	rc := newRecursion(lmax)
	lambda := opt.damping()
	c := NewCoeffs(lmax, Canonical)
	var smax, smin = 0.0, math.Inf(1)
	// sigma extremes per degree prefix, for the safe degree: for each m,
	// singular values of the leading columns are not cheap to reuse, so the
	// safe degree is found by recomputing (only on failure).
	col := make([]float64, lmax+1)
	solve := func(m, L int, wantSol bool) (lo, hi float64, ok bool) {
		nl := L - m + 1
		nr := len(rings)
		A := mat.NewDense(nr+nl, nl, nil)
		nm := float64(nlon) / 2
		if m == 0 {
			nm = float64(nlon)
		}
		var B *mat.Dense
		if wantSol {
			B = mat.NewDense(nr+nl, 2, nil)
		}
		sn, cs := math.Sincos(-float64(m) * g.Lon0)
		rot := complex(cs, sn)
		for r, i := range rings {
			rc.column(col[:nl], m, L, g.Colat[i])
			sw := math.Sqrt(ringW[i] * nm)
			for j := range nl {
				A.Set(r, j, sw*col[j])
			}
			if wantSol {
				z := rot * spec[r*nk+m] / complex(nm, 0)
				B.Set(r, 0, sw*real(z))
				B.Set(r, 1, -sw*imag(z))
			}
		}
		for j := range nl {
			l := float64(m + j)
			A.Set(nr+j, j, math.Sqrt(lambda*l*(l+1)))
		}
		var svd mat.SVD
		if !svd.Factorize(A, mat.SVDNone) {
			return 0, 0, false
		}
		s := svd.Values(nil)
		lo, hi = s[len(s)-1], s[0]
		if !wantSol {
			return lo, hi, true
		}
		var qr mat.QR
		qr.Factorize(A)
		var X mat.Dense
		if err := qr.SolveTo(&X, false, B); err != nil {
			return lo, hi, false
		}
		for j := range nl {
			i := Index(m+j, m)
			c.C[i] = X.At(j, 0)
			if m > 0 {
				c.S[i] = X.At(j, 1)
			}
		}
		return lo, hi, true
	}
	for m := 0; m <= lmax; m++ {
		lo, hi, ok := solve(m, lmax, true)
		if !ok {
			smin = 0
			continue
		}
		smax = math.Max(smax, hi)
		smin = math.Min(smin, lo)
	}
	rep.Condition = smax / smin
	if !(rep.Condition <= opt.maxCond()) {
		safe := safeDegree(lmax, func(L int) bool {
			hi, lo := 0.0, math.Inf(1)
			for m := 0; m <= L; m++ {
				l, h, ok := solve(m, L, false)
				if !ok {
					return false
				}
				hi, lo = math.Max(hi, h), math.Min(lo, l)
			}
			return hi/lo <= opt.maxCond()
		})
		return nil, &FitError{LMax: lmax, SafeLMax: safe, Condition: rep.Condition,
			Reason: fmt.Sprintf("condition number %.3g exceeds %.3g (the rings do not resolve this degree)", rep.Condition, opt.maxCond())}
	}
	return c, nil
}

// column sets dst[l-m] = Pbar_lm(cos colat) for l = m..L (canonical
// normalization), with the scaled start of transform.go against underflow.
func (r *recursion) column(dst []float64, m, L int, colat float64) {
	x, s := math.Cos(colat), math.Sin(colat)
	if colat == 0 || colat == math.Pi {
		s = 0
	}
	clear(dst)
	v, e := 1/math.Sqrt(4*math.Pi), 0
	for k := 1; k <= m; k++ {
		v *= r.sect[k] * s
		if v < scaleLow && v != 0 {
			v *= scaleBig
			e--
		}
	}
	if v == 0 {
		return
	}
	al := r.alpha[r.off[m]:]
	cf := r.cfac[r.off[m]:]
	qa, qb := v, 0.0
	for l := m; l <= L; l++ {
		if l > m {
			qa, qb = al[l-m]*x*qa+qb, qa
		}
		if e < 0 && math.Abs(qa) >= scaleHigh {
			qa *= scaleSmall
			qb *= scaleSmall
			e++
		}
		if e == 0 {
			dst[l-m] = cf[l-m] * qa
		}
	}
}

// linOp is a design operator Y and its transpose, with an optional
// preconditioner for the normal equations.
type linOp struct {
	lmax  int
	synth func(dst []float64, c *Coeffs)
	adj   func(dst *Coeffs, v []float64)
	prec  *blockPrec
}

// blockPrec is the block-diagonal preconditioner of the normal equations
// obtained by spreading each ring's total weight evenly along the ring:
// then the longitudes decouple and the order-m block is
// B_m = f_m sum_i W_i P_m(theta_i) P_m(theta_i)^T + lambda D_m with W_i the
// ring's total weight, f_0 = 1 and f_m = 1/2 (mean of cos^2) otherwise.
// For whole rings it is the exact normal matrix (see fitRings).
type blockPrec struct {
	lmax  int
	chol  []mat.Cholesky
	cond  float64 // lambda_max / lambda_min over all blocks
	v, xs *mat.VecDense
}

// newBlockPrec builds the preconditioner for rings at colat with total
// weights W.
func newBlockPrec(lmax int, colat, W []float64, lambda float64) *blockPrec {
	rc := newRecursion(lmax)
	bp := &blockPrec{lmax: lmax, chol: make([]mat.Cholesky, lmax+1)}
	col := make([]float64, lmax+1)
	lo, hi := math.Inf(1), 0.0
	var eig mat.EigenSym
	for m := 0; m <= lmax; m++ {
		nl := lmax - m + 1
		f := 0.5
		if m == 0 {
			f = 1
		}
		B := mat.NewSymDense(nl, nil)
		for i, th := range colat {
			if W[i] <= 0 {
				continue
			}
			rc.column(col[:nl], m, lmax, th)
			for a := range nl {
				if col[a] == 0 {
					continue
				}
				for b := a; b < nl; b++ {
					B.SetSym(a, b, B.At(a, b)+f*W[i]*col[a]*col[b])
				}
			}
		}
		for a := range nl {
			l := float64(m + a)
			B.SetSym(a, a, B.At(a, a)+lambda*l*(l+1))
		}
		if eig.Factorize(B, false) {
			ev := eig.Values(nil)
			lo, hi = math.Min(lo, ev[0]), math.Max(hi, ev[len(ev)-1])
		}
		if !bp.chol[m].Factorize(B) {
			// Singular block (no data constrains these functions): a small
			// ridge keeps the preconditioner positive definite.
			var tr float64
			for a := range nl {
				tr += B.At(a, a)
			}
			for a := range nl {
				B.SetSym(a, a, B.At(a, a)+1e-12*tr/float64(nl)+1e-300)
			}
			bp.chol[m].Factorize(B)
		}
	}
	if lo > 0 {
		bp.cond = hi / lo
	} else {
		bp.cond = math.Inf(1)
	}
	bp.v = mat.NewVecDense(lmax+1, nil)
	bp.xs = mat.NewVecDense(lmax+1, nil)
	return bp
}

// apply sets dst = M^-1 src (dst may equal src).
func (bp *blockPrec) apply(dst, src *Coeffs) {
	for m := 0; m <= bp.lmax; m++ {
		nl := bp.lmax - m + 1
		v := bp.v.SliceVec(0, nl).(*mat.VecDense)
		x := bp.xs.SliceVec(0, nl).(*mat.VecDense)
		for part := 0; part < 2; part++ {
			if part == 1 && m == 0 {
				for j := range nl {
					dst.S[Index(m+j, m)] = 0
				}
				continue
			}
			s, d := src.C, dst.C
			if part == 1 {
				s, d = src.S, dst.S
			}
			for j := range nl {
				v.SetVec(j, s[Index(m+j, m)])
			}
			if err := bp.chol[m].SolveVecTo(x, v); err != nil {
				x.CopyVec(v)
			}
			for j := range nl {
				d[Index(m+j, m)] = x.AtVec(j)
			}
		}
	}
}

// fitCG solves (Y^T W Y + lambda D) c = Y^T W f by conjugate gradients
// (Hestenes & Stiefel 1952) and estimates the condition number of
// W^(1/2) Y (damped) from the Lanczos tridiagonal matrix of the iteration.
func fitCG(op linOp, f, w []float64, opt *FitOptions, rep *FitReport) (*Coeffs, error) {
	lambda := opt.damping()
	n := len(f)
	tmp := make([]float64, n)
	for i := range f {
		if w[i] > 0 {
			tmp[i] = w[i] * f[i]
		}
	}
	b := NewCoeffs(op.lmax, Canonical)
	op.adj(b, tmp)
	apply := func(dst, p *Coeffs) {
		op.synth(tmp, p)
		for i := range tmp {
			tmp[i] *= w[i]
		}
		op.adj(dst, tmp)
		for l := 0; l <= op.lmax; l++ {
			d := lambda * float64(l*(l+1))
			for m := 0; m <= l; m++ {
				i := Index(l, m)
				dst.C[i] += d * p.C[i]
				dst.S[i] += d * p.S[i]
			}
		}
	}
	dot := func(a, b *Coeffs) float64 {
		var s float64
		for i := range a.C {
			s += a.C[i]*b.C[i] + a.S[i]*b.S[i]
		}
		return s
	}
	axpy := func(y *Coeffs, a float64, x *Coeffs) {
		for i := range y.C {
			y.C[i] += a * x.C[i]
			y.S[i] += a * x.S[i]
		}
	}
	x := NewCoeffs(op.lmax, Canonical)
	r := b.Clone()
	z := b.Clone()
	if op.prec != nil {
		op.prec.apply(z, r)
	}
	p := z.Clone()
	q := NewCoeffs(op.lmax, Canonical)
	rz := dot(r, z)
	bnorm := math.Sqrt(dot(b, b))
	if bnorm == 0 {
		rep.Condition = 1
		return x, nil
	}
	var alphas, betas []float64
	tol := opt.tol()
	converged := false
	for it := 0; it < opt.maxIter(); it++ {
		apply(q, p)
		pq := dot(p, q)
		if pq <= 0 {
			break
		}
		a := rz / pq
		axpy(x, a, p)
		axpy(r, -a, q)
		rep.Iter = it + 1
		if math.Sqrt(dot(r, r)) <= tol*bnorm {
			converged = true
			alphas = append(alphas, a)
			betas = append(betas, 0)
			break
		}
		if op.prec != nil {
			op.prec.apply(z, r)
		} else {
			copy(z.C, r.C)
			copy(z.S, r.S)
		}
		rzNew := dot(r, z)
		beta := rzNew / rz
		alphas = append(alphas, a)
		betas = append(betas, beta)
		rz = rzNew
		for i := range p.C {
			p.C[i] = z.C[i] + beta*p.C[i]
			p.S[i] = z.S[i] + beta*p.S[i]
		}
	}
	// The Lanczos matrix of preconditioned CG describes M^-1 N; the design
	// condition number is at most sqrt(cond(M) cond(M^-1 N)).
	kappa := lanczosCond(alphas, betas)
	if op.prec != nil {
		kappa *= math.Sqrt(op.prec.cond)
	}
	rep.Condition = kappa
	if !converged || !(rep.Condition <= opt.maxCond()) {
		reason := fmt.Sprintf("condition number about %.3g exceeds %.3g (coverage %.0f%% does not resolve this degree)", rep.Condition, opt.maxCond(), 100*rep.Coverage)
		if !converged {
			reason = fmt.Sprintf("conjugate gradients did not converge in %d iterations: the points do not determine this degree well (the sampling within rings is too sparse or too uneven)", rep.Iter)
		}
		return nil, &FitError{LMax: op.lmax, SafeLMax: -1, Condition: rep.Condition, Reason: reason}
	}
	return x, nil
}

// lanczosCond returns sqrt(theta_max/theta_min) of the Ritz values of the
// Lanczos matrix built from the conjugate-gradient coefficients:
// T_jj = 1/alpha_j + beta_{j-1}/alpha_{j-1}, T_{j,j+1} = sqrt(beta_j)/alpha_j.
func lanczosCond(alphas, betas []float64) float64 {
	k := len(alphas)
	if k == 0 {
		return math.Inf(1)
	}
	d := make([]float64, k)
	e := make([]float64, k)
	for j := range k {
		d[j] = 1 / alphas[j]
		if j > 0 {
			d[j] += betas[j-1] / alphas[j-1]
		}
		if j < k-1 {
			e[j] = math.Sqrt(betas[j]) / alphas[j]
		}
	}
	if !(gonum.Implementation{}).Dsterf(k, d, e[:max(k-1, 0)]) {
		return math.Inf(1)
	}
	lo, hi := d[0], d[k-1]
	if lo <= 0 {
		return math.Inf(1)
	}
	return math.Sqrt(hi / lo)
}

// FitPoints fits coefficients of degree <= lmax to values at scattered
// points (colatitude, east longitude in radians) by the conjugate-gradient
// method of fit.go. Without area information every point stands for
// 4 pi / n steradians (give relative Weights for uneven sampling); the
// coverage reported is estimated as the area of the cells of a regular
// grid with about n cells that contain a used point. Errors and panics as
// for FitGrid.
func FitPoints(lmax int, colat, lon, values []float64, opt *FitOptions) (*Coeffs, *FitReport, error) {
	if lmax < 0 {
		panic("sh: FitPoints with negative lmax")
	}
	if len(colat) != len(values) || len(lon) != len(values) {
		panic(fmt.Sprintf("sh: FitPoints with %d colatitudes, %d longitudes, %d values", len(colat), len(lon), len(values)))
	}
	n := len(values)
	rep := &FitReport{LMax: lmax, Points: n, Method: "conjugate gradients"}
	if n == 0 {
		return nil, rep, &FitError{LMax: lmax, SafeLMax: -1, Reason: "no points"}
	}
	for i := range colat {
		if !(colat[i] >= 0 && colat[i] <= math.Pi) || math.IsNaN(lon[i]) || math.IsInf(lon[i], 0) {
			return nil, rep, &PointError{Index: i, Reason: fmt.Sprintf("colatitude %v, longitude %v is not a point on the sphere (colatitude in [0, pi], finite longitude, radians)", colat[i], lon[i])}
		}
	}
	a := 4 * math.Pi / float64(n)
	w, err := pointWeights(values, func(int) float64 { return a }, opt, rep)
	if err != nil {
		return nil, rep, err
	}
	rep.Coverage = pointCoverage(colat, lon, w)
	if rep.Used == 0 {
		return nil, rep, &FitError{LMax: lmax, SafeLMax: -1, Reason: "no valid points"}
	}
	if nc := (lmax + 1) * (lmax + 1); rep.Used < nc && opt.damping() == 0 {
		return nil, rep, &FitError{LMax: lmax, SafeLMax: int(math.Sqrt(float64(rep.Used))) - 1,
			Reason: fmt.Sprintf("%d points cannot determine %d coefficients", rep.Used, nc)}
	}
	// Total weight per distinct colatitude, for the preconditioner.
	tot := make(map[float64]float64)
	for i, v := range w {
		if v > 0 {
			tot[colat[i]] += v
		}
	}
	rcol, rw := make([]float64, 0, len(tot)), make([]float64, 0, len(tot))
	for c, v := range tot {
		rcol = append(rcol, c)
		rw = append(rw, v)
	}
	mk := func(l int) linOp {
		p := NewPoints(l, colat, lon)
		return linOp{lmax: l,
			synth: func(dst []float64, c *Coeffs) { p.Synthesis(dst, c) },
			adj:   func(dst *Coeffs, v []float64) { p.Adjoint(dst, v) },
			prec:  newBlockPrec(l, rcol, rw, opt.damping())}
	}
	c, err := fitCG(mk(lmax), values, w, opt, rep)
	if fe, ok := err.(*FitError); ok {
		fe.SafeLMax = safeDegree(lmax, func(l int) bool {
			_, e := fitCG(mk(l), values, w, opt, &FitReport{})
			return e == nil
		})
		return nil, rep, fe
	}
	fitWarnings(rep, opt)
	fit := NewPoints(lmax, colat, lon).Synthesis(nil, c)
	residuals(rep, values, fit, w)
	return c, rep, nil
}

// pointCoverage estimates the covered fraction of the sphere as the area
// of the cells of a regular grid with about n cells that contain a used point.
func pointCoverage(colat, lon, w []float64) float64 {
	nlat := max(1, int(math.Sqrt(float64(len(w))/2)))
	nlon := 2 * nlat
	hit := make([]bool, nlat*nlon)
	for i, v := range w {
		if v <= 0 {
			continue
		}
		r := min(nlat-1, int(colat[i]/math.Pi*float64(nlat)))
		l := math.Mod(lon[i], 2*math.Pi)
		if l < 0 {
			l += 2 * math.Pi
		}
		c := min(nlon-1, int(l/(2*math.Pi)*float64(nlon)))
		hit[r*nlon+c] = true
	}
	var area float64
	for r := range nlat {
		band := math.Cos(math.Pi*float64(r)/float64(nlat)) - math.Cos(math.Pi*float64(r+1)/float64(nlat))
		for c := range nlon {
			if hit[r*nlon+c] {
				area += band * 2 * math.Pi / float64(nlon)
			}
		}
	}
	return area / (4 * math.Pi)
}
