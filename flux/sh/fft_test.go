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
