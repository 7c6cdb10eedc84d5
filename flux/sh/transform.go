package sh

// Fast spherical-harmonic transforms on rings.
//
// Algorithm. A field on rings of constant colatitude theta_i with equally
// spaced longitudes is, ring by ring, a Fourier series in longitude whose
// order-m coefficient is a Legendre sum over degree:
//
//	f(theta_i, phi) = sum_m Re[(A_im - i B_im) e^{i m phi}],
//	A_im = sum_l C_lm Pbar_lm(cos theta_i),  B_im = sum_l S_lm Pbar_lm(cos theta_i),
//
// with Pbar_lm the orthonormal associated Legendre functions of the
// canonical convention (sqrt(2) included for m > 0, no Condon-Shortley
// phase). Synthesis evaluates the Legendre sums (O(L^2) per ring pair) and
// then one real FFT per ring (fft.go); analysis does the FFTs
// first and then the transposed Legendre sums weighted by the quadrature
// weights. Rings symmetric about the equator are processed as pairs:
// Pbar_lm(-x) = (-1)^(l-m) Pbar_lm(x), so one recursion serves both rings
// and the sums split into even and odd l-m (north = even + odd,
// south = even - odd).
//
// Recursion. For each order m the degree recursion of Holmes & Featherstone
// (2002, J. Geodesy 76, 279-299, eqs. 11-13),
//
//	Pbar_lm = a_lm x Pbar_{l-1,m} - b_lm Pbar_{l-2,m},
//	a_lm = sqrt((4l^2 - 1)/(l^2 - m^2)),
//	b_lm = sqrt((2l+1)((l-1)^2 - m^2)/((2l-3)(l^2 - m^2))),
//
// is rescaled once per plan: with Pbar_lm = c_lm Q_lm, c_mm = c_{m+1,m} = 1
// and c_lm = -b_lm c_{l-2,m}, it becomes Q_lm = alpha_lm x Q_{l-1,m} +
// Q_{l-2,m} with alpha_lm = a_lm c_{l-1,m}/c_lm, two multiplications and an
// addition per degree and ring pair (|c_lm| lies between 0.18 and 1.2 for
// all l <= 2700). The coefficients are multiplied by c_lm
// before synthesis and the sums by c_lm after analysis. The inner loop runs
// over the ring pairs (independent, so the processor overlaps them) for four
// degrees at a time, with the per-pair recursion state and sums in short
// slices that stay in the L1 cache.
//
// Underflow. The sectoral start Pbar_mm = N_m sin^m(theta) underflows double
// precision near the poles at high m (sin theta = 1e-3 and m = 500 give
// 1e-1500). When the plan is made, start values are kept as a mantissa and
// a power of 2^600 and the recursion runs in that scaled form, pair by pair
// and order by order, up to the first degree where the function exceeds
// 2^-200 (the same idea as the scaling of Holmes & Featherstone 2002, who
// use a fixed factor of about 1e-280, from memory). The plan stores, per
// order and pair, the degree (a multiple of four above m) at which the pair
// joins the fast loop and the unscaled recursion state there; terms below
// about 2^-200 (6e-61) are dropped, far below the rounding of the O(1)
// terms of the same sums. This keeps the transforms stable to degree 2700
// (tested) and beyond, and skips 14 % of the (l, m, pair) work at lmax 511.
//
// Memory. A plan holds alpha_lm and c_lm (2 (L+1)(L+2)/2 floats), the
// entry table (at most (L+1) nlat/2 entries of 24 bytes) and the ring
// geometry; a call uses one array of ring spectra, nlat x (nlon/2+1)
// complex values, plus O(nlat + L) scratch per goroutine, taken from a free
// list in the plan so that repeated calls do not allocate. No table grows
// like L^3 or like nlat x L^2: at lmax 511 a plan and one analysis allocate
// about 21 MB in total.
//
// Accuracy. Round trip synthesis then analysis on a Gauss-Legendre grid
// returns the coefficients to 6e-14 (max |error| / max |coefficient|) at
// lmax 63, 2e-13 at 255 and 8e-13 at 511 (libsharp 1.0: 1.4e-14, 1.3e-13,
// 3.2e-13); the
// error is largest at low order and high degree, where the three-term
// recursion near the poles amplifies rounding like l^2. Synthesis agrees
// with the pointwise evaluator (Coeffs.Evaluate) to 1e-12 at lmax 700 and
// 2e-11 at lmax 2700.
//
// Speed. One scalar core does four multiplications per (l, m, ring pair)
// at about 3 cycles; the longitude FFTs (fft.go) take under a tenth of the
// time at lmax 511. Against libsharp 1.0 (8-wide vectors) one call takes
// 2-4 times as long, more at higher degree; the measured ratios are beside
// the benchmarks (transform_bench_test.go). Workers > 1 splits a call by
// order and by ring.

import (
	"fmt"
	"math"
	"math/cmplx"
	"sync"
	"sync/atomic"
)

// Scaling constants for the underflow-safe start of the recursion.
var (
	scaleBig   = math.Ldexp(1, 600)  // 2^600: one unit of the scaled exponent
	scaleSmall = math.Ldexp(1, -600) // 2^-600
	scaleHigh  = math.Ldexp(1, 400)  // rescale a scaled value above this
	scaleLow   = math.Ldexp(1, -300) // rescale a sectoral value below this
	startMin   = math.Ldexp(1, -200) // a ring joins the fast loop above this
)

// Transform is a reusable plan for synthesis and analysis between
// coefficients of degree <= LMax (canonical convention) and fields on one
// Grid. Apart from Workers, a Transform is immutable after NewTransform;
// its methods are safe
// for concurrent use by several goroutines (scratch space comes from an
// internal free list), and a single call can itself use several goroutines
// (Workers).
type Transform struct {
	lmax int
	grid *Grid
	nlon int
	rc   *recursion
	rg   *ringSet
	st   *startTable

	// Workers is the number of goroutines one call may use (0 or 1: the
	// calling goroutine only). Set it before the plan is shared.
	Workers int

	mu   sync.Mutex
	free []*workspace
}

// NewTransform returns a plan for degree lmax on grid g. It panics if
// lmax < 0, the grid is empty, its colatitudes are not strictly ascending
// within [0, pi], or its Weight (when set) has the wrong length. A grid that
// cannot resolve lmax (see Grid.MaxDegree) is allowed for synthesis;
// Analysis on it is then only approximate (aliased). The plan keeps g: do
// not change the grid afterwards.
func NewTransform(lmax int, g *Grid) *Transform {
	if lmax < 0 {
		panic("sh: NewTransform with negative lmax")
	}
	if g == nil || g.NLat() == 0 || g.NLon < 1 {
		panic("sh: NewTransform on an empty grid")
	}
	for i, c := range g.Colat {
		if !(c >= 0 && c <= math.Pi) || (i > 0 && !(c > g.Colat[i-1])) {
			panic(fmt.Sprintf("sh: grid ring %d at colatitude %v: rings must ascend strictly within [0, pi]", i, c))
		}
	}
	if g.Weight != nil && len(g.Weight) != g.NLat() {
		panic(fmt.Sprintf("sh: grid has %d weights for %d rings", len(g.Weight), g.NLat()))
	}
	t := &Transform{lmax: lmax, grid: g, nlon: g.NLon, rc: newRecursion(lmax)}
	t.rg = newRingSet(g.Colat)
	t.st = newStartTable(t.rg, t.rc, lmax)
	return t
}

// LMax returns the degree of the plan.
func (t *Transform) LMax() int { return t.lmax }

// Grid returns the grid of the plan.
func (t *Transform) Grid() *Grid { return t.grid }

// Synthesis evaluates the field of c on the plan's grid,
// f(theta_i, phi_j) = sum_lm C_lm Y_lm^c + S_lm Y_lm^s, into dst
// (length Grid.Len(), allocated when nil) and returns it. Degrees of c above
// the plan's LMax are ignored, missing ones count as zero. It panics if c is
// not in the canonical convention or dst has the wrong length.
func (t *Transform) Synthesis(dst []float64, c *Coeffs) []float64 {
	if c.Conv != Canonical {
		panic("sh: Synthesis needs canonical coefficients (convert with the convention tools first)")
	}
	n := t.grid.Len()
	if dst == nil {
		dst = make([]float64, n)
	} else if len(dst) != n {
		panic(fmt.Sprintf("sh: Synthesis destination has length %d, grid has %d points", len(dst), n))
	}
	ws := t.get()
	defer t.put(ws)
	clear(ws.spec)
	nw := t.workers()
	if 2*t.lmax >= t.nlon {
		nw = 1 // aliased orders share FFT bins
	}
	next := &ws.next
	next.Store(0)
	if nw == 1 {
		t.synthOrders(ws.w[0], ws.spec, c, next)
	} else {
		t.parallel(ws, nw, func(w *workerScratch) { t.synthOrders(w, ws.spec, c, next) })
	}
	next.Store(0)
	if t.workers() == 1 {
		t.ringsBackward(ws.w[0], ws.spec, dst, next)
	} else {
		t.parallel(ws, t.workers(), func(w *workerScratch) { t.ringsBackward(w, ws.spec, dst, next) })
	}
	return dst
}

// parallel runs f on nw workers (the calling goroutine and nw-1 others).
func (t *Transform) parallel(ws *workspace, nw int, f func(w *workerScratch)) {
	if nw <= 1 {
		f(ws.w[0])
		return
	}
	var wg sync.WaitGroup
	for i := 1; i < nw; i++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			f(ws.w[i])
		}()
	}
	f(ws.w[0])
	wg.Wait()
}

// orderChunk is the number of orders a worker takes at a time.
const orderChunk = 4

// synthOrders computes the Legendre sums of the orders it takes from next
// and adds them to the bin-major spectra.
func (t *Transform) synthOrders(w *workerScratch, spec []complex128, c *Coeffs, next *atomic.Int64) {
	nlat := t.grid.NLat()
	for {
		m0 := int(next.Add(orderChunk)) - orderChunk
		if m0 > t.lmax {
			return
		}
		for m := m0; m < min(m0+orderChunk, t.lmax+1); m++ {
			t.legendreSynth(w, c, m)
			// Fold order m into the FFT bins (aliasing when nlon <= 2m).
			sn, cs := math.Sincos(float64(m) * t.grid.Lon0)
			rot := complex(cs, sn)
			kb, mode := binOf(m%t.nlon, t.nlon)
			row := spec[kb*nlat : (kb+1)*nlat]
			lw := &w.leg
			for p, in := range t.rg.north {
				a, b := lw.er[p]+lw.or[p], lw.ei[p]+lw.oi[p]
				row[in] += foldValue(complex(a, -b)*rot, mode)
				if s := t.rg.south[p]; s >= 0 {
					a, b := lw.er[p]-lw.or[p], lw.ei[p]-lw.oi[p]
					row[s] += foldValue(complex(a, -b)*rot, mode)
				}
			}
		}
	}
}

// ringChunk is the number of rings a worker transforms at a time.
const ringChunk = 8

func (t *Transform) ringsBackward(w *workerScratch, spec []complex128, dst []float64, next *atomic.Int64) {
	nlat := t.grid.NLat()
	buf := w.ring
	for {
		i0 := int(next.Add(ringChunk)) - ringChunk
		if i0 >= nlat {
			return
		}
		for i := i0; i < min(i0+ringChunk, nlat); i++ {
			for k := range buf {
				buf[k] = spec[k*nlat+i]
			}
			w.fft.backward(dst[i*t.nlon:(i+1)*t.nlon], buf)
		}
	}
}

func (t *Transform) ringsForward(w *workerScratch, spec []complex128, field []float64, next *atomic.Int64) {
	nlat := t.grid.NLat()
	buf := w.ring
	for {
		i0 := int(next.Add(ringChunk)) - ringChunk
		if i0 >= nlat {
			return
		}
		for i := i0; i < min(i0+ringChunk, nlat); i++ {
			w.fft.forward(buf, field[i*t.nlon:(i+1)*t.nlon])
			for k, v := range buf {
				spec[k*nlat+i] = v
			}
		}
	}
}

// binOf returns the real-FFT bin that carries frequency k (0 <= k < n) and
// how a term Re(z e^{i 2 pi k j/n}) enters it (gonum's Sequence convention:
// x_j = X_0 + 2 sum Re(X_k e^{i 2 pi jk/n}) + X_{n/2} (-1)^j for even n):
// mode 0 adds Re z, mode 1 adds z/2, mode 2 adds conj(z)/2 at bin n-k.
func binOf(k, n int) (bin, mode int) {
	switch {
	case k == 0 || 2*k == n:
		return k, 0
	case 2*k < n:
		return k, 1
	}
	return n - k, 2
}

func foldValue(z complex128, mode int) complex128 {
	switch mode {
	case 0:
		return complex(real(z), 0)
	case 1:
		return complex(0.5*real(z), 0.5*imag(z))
	}
	return complex(0.5*real(z), -0.5*imag(z))
}

// Analysis computes the coefficients of degree <= LMax of the field on the
// plan's grid by the grid's quadrature,
// C_lm = integral f Y_lm^c dOmega ~ sum_i w_i (2 pi/nlon) sum_j f_ij Y_lm^c(theta_i, phi_j),
// into dst (allocated when nil; its LMax must equal the plan's) and returns
// it. The result is exact for band-limited fields when the grid resolves
// LMax (Gauss-Legendre with nlat > LMax and nlon > 2 LMax, Driscoll-Healy
// with N >= 2 LMax + 2). It panics if the grid has no quadrature weights
// (use FitGrid) or the sizes do not match.
func (t *Transform) Analysis(dst *Coeffs, field []float64) *Coeffs {
	if t.grid.Weight == nil {
		panic("sh: Analysis on a grid without quadrature weights; use FitGrid")
	}
	return t.adjoint(dst, field, t.grid.Weight, 2*math.Pi/float64(t.nlon))
}

// adjoint computes dst_lm = sum_i ringw[i]*scale * sum_j field_ij Y_lm(theta_i, phi_j):
// the quadrature analysis when ringw are quadrature weights, the transpose
// of Synthesis when they are all one and scale is one.
func (t *Transform) adjoint(dst *Coeffs, field []float64, ringw []float64, scale float64) *Coeffs {
	if len(field) != t.grid.Len() {
		panic(fmt.Sprintf("sh: field has length %d, grid has %d points", len(field), t.grid.Len()))
	}
	if dst == nil {
		dst = NewCoeffs(t.lmax, Canonical)
	} else if dst.LMax != t.lmax || dst.Conv != Canonical {
		panic(fmt.Sprintf("sh: Analysis destination has lmax %d (%v), plan has %d (canonical)", dst.LMax, dst.Conv, t.lmax))
	}
	ws := t.get()
	defer t.put(ws)
	next := &ws.next
	next.Store(0)
	if t.workers() == 1 {
		t.ringsForward(ws.w[0], ws.spec, field, next)
		next.Store(0)
		t.adjOrders(ws.w[0], ws.spec, dst, ringw, scale, next)
		return dst
	}
	t.parallel(ws, t.workers(), func(w *workerScratch) { t.ringsForward(w, ws.spec, field, next) })
	next.Store(0)
	t.parallel(ws, t.workers(), func(w *workerScratch) { t.adjOrders(w, ws.spec, dst, ringw, scale, next) })
	return dst
}

// adjOrders forms the even and odd ring-pair inputs of the orders it takes
// from next and runs the transposed Legendre sums into dst.
func (t *Transform) adjOrders(w *workerScratch, spec []complex128, dst *Coeffs, ringw []float64, scale float64, next *atomic.Int64) {
	nlat := t.grid.NLat()
	lw := &w.leg
	for {
		m0 := int(next.Add(orderChunk)) - orderChunk
		if m0 > t.lmax {
			return
		}
		for m := m0; m < min(m0+orderChunk, t.lmax+1); m++ {
			sn, cs := math.Sincos(-float64(m) * t.grid.Lon0)
			rot := complex(cs, sn)
			kb, mode := binOf(m%t.nlon, t.nlon)
			row := spec[kb*nlat : (kb+1)*nlat]
			for p, in := range t.rg.north {
				v := row[in]
				if mode == 2 {
					v = cmplx.Conj(v)
				}
				gn := rot * v * complex(ringw[in]*scale, 0)
				var gs complex128
				if s := t.rg.south[p]; s >= 0 {
					v := row[s]
					if mode == 2 {
						v = cmplx.Conj(v)
					}
					gs = rot * v * complex(ringw[s]*scale, 0)
				}
				lw.er[p], lw.ei[p] = real(gn+gs), imag(gn+gs)
				lw.or[p], lw.oi[p] = real(gn-gs), imag(gn-gs)
			}
			t.legendreAdj(w, dst, m)
		}
	}
}

// workspace is the scratch space of one call: the ring spectra and one
// scratch per worker.
type workspace struct {
	spec []complex128 // (nlon/2+1) * nlat ring spectra, bin-major
	w    []*workerScratch
	next atomic.Int64 // work counter shared by the workers
}

// workerScratch is the scratch of one goroutine within a call.
type workerScratch struct {
	fft  *realFFT
	ring []complex128 // one ring's spectrum
	leg  legWork
}

// legWork is the scratch of the Legendre sums for one order at a time.
type legWork struct {
	q1, q2         []float64 // recursion state per ring pair
	er, ei, or, oi []float64 // even/odd sums (synthesis) or inputs (analysis)
	sv             []float64 // sectoral mantissa per ring pair (Points)
	se             []int     // sectoral exponent (powers of 2^600) per ring pair
	st             orderStarts
	cr, ci         []float64 // scaled coefficients or sums, per degree
}

func newLegWork(npair, lmax int) legWork {
	f := make([]float64, 7*npair+2*(lmax+1))
	w := legWork{
		q1: f[0*npair : 1*npair], q2: f[1*npair : 2*npair],
		er: f[2*npair : 3*npair], ei: f[3*npair : 4*npair],
		or: f[4*npair : 5*npair], oi: f[5*npair : 6*npair],
		sv: f[6*npair : 7*npair],
		cr: f[7*npair : 7*npair+lmax+1], ci: f[7*npair+lmax+1:],
	}
	w.se = make([]int, npair)
	return w
}

// workers returns the number of goroutines a call uses.
func (t *Transform) workers() int {
	return max(1, min(t.Workers, t.lmax+1))
}

// get takes a workspace from the plan's free list or makes one. The list is
// not emptied by the garbage collector (unlike sync.Pool), so repeated
// calls do not allocate.
func (t *Transform) get() *workspace {
	t.mu.Lock()
	var ws *workspace
	if n := len(t.free); n > 0 {
		ws = t.free[n-1]
		t.free = t.free[:n-1]
	}
	t.mu.Unlock()
	if ws == nil {
		ws = &workspace{spec: make([]complex128, t.grid.NLat()*(t.nlon/2+1))}
	}
	for len(ws.w) < t.workers() {
		ws.w = append(ws.w, &workerScratch{
			fft:  newRealFFT(t.nlon),
			ring: make([]complex128, t.nlon/2+1),
			leg:  newLegWork(len(t.rg.north), t.lmax),
		})
	}
	return ws
}

// maxFree bounds the workspaces a plan keeps for reuse.
const maxFree = 4

func (t *Transform) put(ws *workspace) {
	t.mu.Lock()
	if len(t.free) < maxFree {
		t.free = append(t.free, ws)
	}
	t.mu.Unlock()
}

func (t *Transform) legendreSynth(ws *workerScratch, c *Coeffs, m int) {
	lw := &ws.leg
	n := t.lmax - m + 1
	cr, ci := lw.cr[:n], lw.ci[:n]
	clear(cr)
	clear(ci)
	if m <= c.LMax {
		cf := t.rc.cfac[t.rc.off[m] : t.rc.off[m]+min(t.lmax, c.LMax)-m+1]
		for j := range cf {
			i := Index(m+j, m)
			cr[j], ci[j] = c.C[i]*cf[j], c.S[i]*cf[j]
		}
	}
	t.rg.legendre(lw, t.rc, m, t.lmax, false, t.st.order(m))
}

func (t *Transform) legendreAdj(ws *workerScratch, dst *Coeffs, m int) {
	lw := &ws.leg
	n := t.lmax - m + 1
	clear(lw.cr[:n])
	clear(lw.ci[:n])
	t.rg.legendre(lw, t.rc, m, t.lmax, true, t.st.order(m))
	cf := t.rc.cfac[t.rc.off[m] : t.rc.off[m]+n]
	for j := range cf {
		i := Index(m+j, m)
		dst.C[i] = lw.cr[j] * cf[j]
		if m > 0 {
			dst.S[i] = -lw.ci[j] * cf[j]
		} else {
			dst.S[i] = 0
		}
	}
}
