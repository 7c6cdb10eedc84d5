package sh

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// TestRealFFT compares the own real FFT with gonum's dsp/fourier (a port of
// FFTPACK, an independent implementation) for lengths with radices 2, 3, 4,
// 5 and other primes, both directions.
func TestRealFFT(t *testing.T) {
	// Rounding of an FFT grows like eps log n relative to the largest
	// value (common practice); direct sums for prime factors and gonum's
	// odd lengths like eps sqrt(p).
	const tol = 5e-13
	r := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 2, 3, 4, 6, 8, 10, 14, 16, 22, 26, 30, 36, 64, 90, 128, 180, 360, 1024, 1022, 2000, 5402, 7, 101, 127} {
		x := make([]float64, n)
		for i := range x {
			x[i] = r.NormFloat64()
		}
		g := fourier.NewFFT(n)
		want := g.Coefficients(nil, x)
		f := newRealFFT(n)
		got := make([]complex128, n/2+1)
		f.forward(got, x)
		var scale float64
		for _, v := range want {
			scale = math.Max(scale, cmplx.Abs(v))
		}
		for k := range want {
			if d := cmplx.Abs(got[k] - want[k]); d > tol*scale {
				t.Errorf("n=%d forward bin %d: %v, gonum %v", n, k, got[k], want[k])
				break
			}
		}
		back := make([]float64, n)
		f.backward(back, got)
		wantBack := g.Sequence(nil, want)
		scale = 0
		for _, v := range wantBack {
			scale = math.Max(scale, math.Abs(v))
		}
		for j := range back {
			if d := math.Abs(back[j] - wantBack[j]); d > tol*scale {
				t.Errorf("n=%d backward sample %d: %v, gonum %v", n, j, back[j], wantBack[j])
				break
			}
			if d := math.Abs(back[j] - float64(n)*x[j]); d > tol*scale {
				t.Errorf("n=%d round trip sample %d: %v, want %v", n, j, back[j], float64(n)*x[j])
				break
			}
		}
	}
}

func BenchmarkRealFFT(b *testing.B) {
	for _, n := range []int{256, 1024} {
		x := make([]float64, n)
		for i := range x {
			x[i] = float64(i % 7)
		}
		X := make([]complex128, n/2+1)
		b.Run(fmt.Sprintf("own/n=%d", n), func(b *testing.B) {
			f := newRealFFT(n)
			for b.Loop() {
				f.forward(X, x)
			}
		})
		b.Run(fmt.Sprintf("gonum/n=%d", n), func(b *testing.B) {
			f := fourier.NewFFT(n)
			for b.Loop() {
				f.Coefficients(X, x)
			}
		})
	}
}

// dftReference returns the forward transform X_k = sum_j x_j e^{-2 pi i jk/n},
// k = 0..n/2, and the backward transform x_j = sum_{k=0}^{n-1} X_k
// e^{2 pi i jk/n} of a Hermitian spectrum given by X[0..n/2], both summed
// directly from the definition of the discrete Fourier transform (e.g.
// Press et al., Numerical Recipes, eq. 12.1.7, from memory) with the angle
// reduced as 2 pi (jk mod n)/n so that the twiddle factors are exact to
// rounding. It shares no code with fft.go or gonum.
func dftReference(x []float64, X []complex128) (fwd []complex128, bwd []float64) {
	n := len(x)
	cs := make([]complex128, n)
	for k := range cs {
		s, c := math.Sincos(2 * math.Pi * float64(k) / float64(n))
		cs[k] = complex(c, s) // e^{+2 pi i k/n}
	}
	fwd = make([]complex128, n/2+1)
	for k := range fwd {
		var s complex128
		for j, v := range x {
			s += complex(v, 0) * cmplx.Conj(cs[(j*k)%n])
		}
		fwd[k] = s
	}
	bwd = make([]float64, n)
	for j := range bwd {
		var s float64
		for k := 0; k < n; k++ {
			// X_k for k > n/2 is conj(X_{n-k}) (Hermitian symmetry).
			xk := X[min(k, n-k)]
			if k > n/2 {
				xk = cmplx.Conj(xk)
			}
			s += real(xk * cs[(j*k)%n])
		}
		bwd[j] = s
	}
	return fwd, bwd
}

// TestRealFFTAllLengths compares the own real FFT with the direct sums of
// the definition (dftReference) for every length 1..600 (every mix of the
// radices 4, 2, 3, 5 and of the direct-sum fallback for other primes up to
// 300 in the half length, and all odd lengths, which go through gonum's
// FFTPACK port) and for the longitude counts of the grids in use: the
// benchmark Gauss-Legendre grids (nlon = 2 lmax + 2 and 2 lmax + 1 for lmax
// 63, 127, 255, 511, i.e. 128, 256, 512, 1024 and 127, 255, 511, 1023),
// Driscoll-Healy grids (2 lmax + 2), regular grids at 0.25, 0.5, 1, 1.5, 2
// and 5 degrees (1440, 720, 360, 240, 180, 72) and half lengths with large
// prime factors (2 x 1009, 2 x 7^3, 2 x 11 x 13, 2 x 7 x 73, 2 x 37 x 73).
// Lengths without prime factors above 100 are also compared with gonum's
// dsp/fourier (whose FFTPACK passes for large prime factors lose digits:
// 2e-12 of the largest value at n = 599, 2e-10 at 4001, against the direct
// sums). Each plan is used
// twice to check that its scratch space carries nothing over, and the
// documented indifference of backward to the imaginary parts of X_0 and
// X_{n/2} is checked.
//
// The tolerance is set a little above the measured worst error (logged).
func TestRealFFTAllLengths(t *testing.T) {
	const tol, tolGonum = 2e-14, 2e-12
	var lengths []int
	for n := 1; n <= 600; n++ {
		lengths = append(lengths, n)
	}
	lengths = append(lengths, 1024, 1023, 1022, 2018, 686, 286, 5402, 1440, 720, 2*1000+2, 2*1000+1, 4001)
	r := rand.New(rand.NewPCG(3, 4))
	maxAbs := func(v []complex128) float64 {
		var s float64
		for _, z := range v {
			s = math.Max(s, cmplx.Abs(z))
		}
		return s
	}
	var worst [2]float64 // even, odd
	for _, n := range lengths {
		f := newRealFFT(n)
		for pass := range 2 {
			x := make([]float64, n)
			for i := range x {
				x[i] = r.NormFloat64()
			}
			X := make([]complex128, n/2+1)
			for k := range X {
				X[k] = complex(r.NormFloat64(), r.NormFloat64())
			}
			X[0] = complex(real(X[0]), 0)
			if n%2 == 0 {
				X[n/2] = complex(real(X[n/2]), 0)
			}
			wantF, wantB := dftReference(x, X)
			got := make([]complex128, n/2+1)
			f.forward(got, x)
			scale := maxAbs(wantF)
			for k := range wantF {
				d := cmplx.Abs(got[k]-wantF[k]) / scale
				worst[n%2] = math.Max(worst[n%2], d)
				if d > tol {
					t.Fatalf("n=%d pass %d forward bin %d: %v, direct sum %v (diff %.2g of max)", n, pass, k, got[k], wantF[k], d)
				}
			}
			if largestPrimeFactor(n) <= 100 {
				g := fourier.NewFFT(n).Coefficients(nil, x)
				for k := range g {
					if d := cmplx.Abs(got[k] - g[k]); d > tolGonum*scale {
						t.Fatalf("n=%d forward bin %d: %v, gonum %v", n, k, got[k], g[k])
					}
				}
			}
			back := make([]float64, n)
			f.backward(back, X)
			scale = 0
			for _, v := range wantB {
				scale = math.Max(scale, math.Abs(v))
			}
			for j := range wantB {
				d := math.Abs(back[j]-wantB[j]) / scale
				worst[n%2] = math.Max(worst[n%2], d)
				if d > tol {
					t.Fatalf("n=%d pass %d backward sample %d: %v, direct sum %v (diff %.2g of max)", n, pass, j, back[j], wantB[j], d)
				}
			}
			// Imaginary parts of X_0 and X_{n/2} (even n) are ignored.
			Y := append([]complex128(nil), X...)
			Y[0] += 0.75i
			if n%2 == 0 {
				Y[n/2] -= 1.5i
			}
			back2 := make([]float64, n)
			f.backward(back2, Y)
			for j := range back {
				if back2[j] != back[j] {
					t.Fatalf("n=%d backward sample %d changed from %v to %v by imaginary parts of X_0, X_n/2", n, j, back[j], back2[j])
				}
			}
		}
	}
	t.Logf("worst error relative to the largest value: even lengths %.2g, odd lengths %.2g", worst[0], worst[1])
}

// largestPrimeFactor returns the largest prime factor of n >= 1 (1 for 1).
func largestPrimeFactor(n int) int {
	p := 1
	for d := 2; d*d <= n; d++ {
		for n%d == 0 {
			p, n = d, n/d
		}
	}
	return max(p, n)
}

// TestRealFFTNoAlloc: a plan's transforms allocate nothing, also for
// lengths with a prime factor above 16 that takes the generic radix (127 is
// the nlon = 2 lmax + 1 of lmax 63; 2 x 127, 2 x 37 x 73), so that repeated
// transforms do not allocate (as transform.go documents).
func TestRealFFTNoAlloc(t *testing.T) {
	for _, n := range []int{127, 254, 5402, 360, 1023} {
		f := newRealFFT(n)
		x := make([]float64, n)
		X := make([]complex128, n/2+1)
		for i := range x {
			x[i] = float64(i%5) - 2
		}
		if a := testing.AllocsPerRun(5, func() { f.forward(X, x); f.backward(x, X) }); a != 0 {
			t.Errorf("n=%d: %v allocations per forward+backward, want 0", n, a)
		}
	}
}
