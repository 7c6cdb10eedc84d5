package sh

import (
	"math"
	"math/cmplx"
)

// realFFT computes unnormalized real discrete Fourier transforms of one
// length n in gonum's conventions (dsp/fourier.FFT):
//
//	forward:  X_k = sum_j x_j e^{-2 pi i jk/n},  k = 0..n/2,
//	backward: x_j = sum_{k=0}^{n-1} X_k e^{+2 pi i jk/n} (Hermitian X),
//
// so backward(forward(x)) = n x. Even lengths use a complex FFT of length
// n/2 (self-sorting Stockham form, radices 4, 2, 3, 5 and direct sums for
// other primes; Van Loan 1992, Computational Frameworks for the FFT,
// sec. 1.7, from memory) on x_{2j} + i x_{2j+1} with the usual split
// (Press et al., Numerical Recipes, sec. 12.3). Odd lengths use the same
// complex FFT of length n on x_j + 0i (twice the work of a real FFT, but
// accurate: gonum's FFTPACK port, used here before, loses digits at large
// prime lengths, 2e-12 of the largest value at n = 599 and 2e-10 at 4001,
// where the direct sums of this file stay near 1e-15; see
// TestRealFFTAllLengths). A realFFT holds scratch space: one per goroutine.
type realFFT struct {
	n    int
	c    *cfft        // n/2 (even n) or n (odd n)
	tw   []complex128 // e^{-2 pi i k/n}, k = 0..n/2 (even n)
	z, y []complex128 // scratch of length n/2 (even n) or n (odd n)
}

func newRealFFT(n int) *realFFT {
	f := &realFFT{n: n}
	if n%2 == 1 {
		f.c = newCFFT(n)
		f.z = make([]complex128, n)
		f.y = make([]complex128, n)
		return f
	}
	h := n / 2
	f.c = newCFFT(h)
	f.tw = make([]complex128, h+1)
	for k := range f.tw {
		s, c := math.Sincos(-2 * math.Pi * float64(k) / float64(n))
		f.tw[k] = complex(c, s)
	}
	f.z = make([]complex128, h)
	f.y = make([]complex128, h)
	return f
}

// forward sets dst[0..n/2] to the transform of x (len n).
func (f *realFFT) forward(dst []complex128, x []float64) {
	if f.n%2 == 1 {
		z := f.z[:f.n]
		for j, v := range x[:f.n] {
			z[j] = complex(v, 0)
		}
		copy(dst[:f.n/2+1], f.c.transform(z, f.y))
		return
	}
	h := f.n / 2
	z := f.z[:h]
	for j := range z {
		z[j] = complex(x[2*j], x[2*j+1])
	}
	z = f.c.transform(z, f.y)
	dst = dst[:h+1]
	tw := f.tw[:h+1]
	for k := 0; k <= h/2; k++ {
		zk := z[k%h]
		zm := cmplx.Conj(z[(h-k)%h])
		sum, dif := zk+zm, zk-zm
		e := complex(0.5*real(sum), 0.5*imag(sum))
		o := complex(0.5*imag(dif), -0.5*real(dif)) // (zk - zm)/(2i)
		dst[k] = e + tw[k]*o
		// Mirror: X_{h-k} from the same pair.
		if k > 0 && h-k != k {
			e2 := cmplx.Conj(e)
			o2 := cmplx.Conj(o)
			dst[h-k] = e2 + tw[h-k]*o2
		}
	}
	dst[h] = complex(real(z[0])-imag(z[0]), 0)
	dst[0] = complex(real(z[0])+imag(z[0]), 0)
}

// backward sets x (len n) to the inverse transform of X[0..n/2]
// (imaginary parts of X_0 and, for even n, X_{n/2} ignored).
func (f *realFFT) backward(x []float64, X []complex128) {
	if f.n%2 == 1 {
		// x_j = conj(sum_k conj(X_k) e^{-2 pi i jk/n}) with X_{n-k} = conj(X_k);
		// the sum is real, so x_j is its real part.
		n, z := f.n, f.z[:f.n]
		z[0] = complex(real(X[0]), 0)
		for k := 1; k <= n/2; k++ {
			z[k] = cmplx.Conj(X[k])
			z[n-k] = X[k]
		}
		for j, v := range f.c.transform(z, f.y) {
			x[j] = real(v)
		}
		return
	}
	h := f.n / 2
	z := f.z[:h]
	tw := f.tw[:h+1]
	X = X[:h+1]
	for k := range z {
		xk := X[k]
		if k == 0 {
			xk = complex(real(xk), 0)
		}
		xm := X[h-k]
		if h-k == 0 || h-k == h {
			xm = complex(real(xm), 0)
		}
		xm = cmplx.Conj(xm)
		e := xk + xm
		o := (xk - xm) * cmplx.Conj(tw[k])
		// Z_k = E_k + i O_k; conjugate for the inverse via the forward FFT.
		z[k] = cmplx.Conj(e + complex(-imag(o), real(o)))
	}
	z = f.c.transform(z, f.y)
	for j, v := range z {
		x[2*j] = real(v)
		x[2*j+1] = -imag(v)
	}
}

// cfft is an unnormalized forward complex FFT of one length.
type cfft struct {
	n      int
	stages []fftStage
}

type fftStage struct {
	r, m, s int          // radix, remaining length / r, stride
	w       []complex128 // w[p*(r-1)+u-1] = e^{-2 pi i p u/(r m)}
	root    []complex128 // e^{-2 pi i u/r}, u = 0..r-1 (generic radix)
	buf     []complex128 // scratch of length r for radices above 16 (generic radix)
}

func newCFFT(n int) *cfft {
	f := &cfft{n: n}
	var radices []int
	k := n
	for k%4 == 0 {
		radices = append(radices, 4)
		k /= 4
	}
	for _, p := range []int{2, 3, 5} {
		for k%p == 0 {
			radices = append(radices, p)
			k /= p
		}
	}
	for p := 7; k > 1; p += 2 {
		for k%p == 0 {
			radices = append(radices, p)
			k /= p
		}
	}
	cur, s := n, 1
	for _, r := range radices {
		m := cur / r
		st := fftStage{r: r, m: m, s: s, w: make([]complex128, m*(r-1)), root: make([]complex128, r)}
		if r > 16 {
			st.buf = make([]complex128, r)
		}
		for p := range m {
			for u := 1; u < r; u++ {
				sn, cs := math.Sincos(-2 * math.Pi * float64(p*u) / float64(cur))
				st.w[p*(r-1)+u-1] = complex(cs, sn)
			}
		}
		for u := range r {
			sn, cs := math.Sincos(-2 * math.Pi * float64(u) / float64(r))
			st.root[u] = complex(cs, sn)
		}
		f.stages = append(f.stages, st)
		cur, s = m, s*r
	}
	return f
}

// transform computes the DFT of x using y as scratch (both len n) and
// returns the slice holding the result (x or y).
func (f *cfft) transform(x, y []complex128) []complex128 {
	for i := range f.stages {
		st := &f.stages[i]
		switch st.r {
		case 4:
			radix4(st, x, y)
		case 2:
			radix2(st, x, y)
		default:
			radixG(st, x, y)
		}
		x, y = y, x
	}
	return x
}

// Stockham step (decimation in frequency): for p < m, q < s,
// a_t = x[q + s(p + t m)], y[q + s(r p + u)] = w_p^u sum_t a_t e^{-2 pi i tu/r}.
func radix2(st *fftStage, x, y []complex128) {
	m, s := st.m, st.s
	for p := range m {
		w := st.w[p]
		xa := x[s*p : s*p+s]
		xb := x[s*(p+m) : s*(p+m)+s]
		y0 := y[s*2*p : s*2*p+s]
		y1 := y[s*(2*p+1) : s*(2*p+1)+s]
		for q := range xa {
			a, b := xa[q], xb[q]
			y0[q] = a + b
			y1[q] = (a - b) * w
		}
	}
}

func radix4(st *fftStage, x, y []complex128) {
	m, s := st.m, st.s
	if s < 8 {
		// Short inner runs: loop over p inside, without reslicing.
		w := st.w[:3*m]
		for q := range s {
			for p := range m {
				a0, a1 := x[q+s*p], x[q+s*(p+m)]
				a2, a3 := x[q+s*(p+2*m)], x[q+s*(p+3*m)]
				s02, d02 := a0+a2, a0-a2
				s13, d13 := a1+a3, a1-a3
				md := complex(imag(d13), -real(d13))
				o := q + s*4*p
				y[o] = s02 + s13
				y[o+s] = (d02 + md) * w[3*p]
				y[o+2*s] = (s02 - s13) * w[3*p+1]
				y[o+3*s] = (d02 - md) * w[3*p+2]
			}
		}
		return
	}
	for p := range m {
		w1, w2, w3 := st.w[3*p], st.w[3*p+1], st.w[3*p+2]
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		x2 := x[s*(p+2*m) : s*(p+2*m)+s]
		x3 := x[s*(p+3*m) : s*(p+3*m)+s]
		y0 := y[s*4*p : s*4*p+s]
		y1 := y[s*(4*p+1) : s*(4*p+1)+s]
		y2 := y[s*(4*p+2) : s*(4*p+2)+s]
		y3 := y[s*(4*p+3) : s*(4*p+3)+s]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		y0, y1, y2, y3 = y0[:len(x0)], y1[:len(x0)], y2[:len(x0)], y3[:len(x0)]
		for q, a0 := range x0 {
			a1, a2, a3 := x1[q], x2[q], x3[q]
			s02, d02 := a0+a2, a0-a2
			s13, d13 := a1+a3, a1-a3
			// -i * d13
			md := complex(imag(d13), -real(d13))
			y0[q] = s02 + s13
			y1[q] = (d02 + md) * w1
			y2[q] = (s02 - s13) * w2
			y3[q] = (d02 - md) * w3
		}
	}
}

func radixG(st *fftStage, x, y []complex128) {
	r, m, s := st.r, st.m, st.s
	var buf [16]complex128
	a := buf[:0]
	if r > len(buf) {
		a = st.buf[:r]
	} else {
		a = buf[:r]
	}
	for p := range m {
		for q := range s {
			for t := range r {
				a[t] = x[q+s*(p+t*m)]
			}
			for u := range r {
				var sum complex128
				for t := range r {
					sum += a[t] * st.root[(t*u)%r]
				}
				if u > 0 {
					sum *= st.w[p*(r-1)+u-1]
				}
				y[q+s*(r*p+u)] = sum
			}
		}
	}
}
