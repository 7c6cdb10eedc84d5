package sh

import (
	"fmt"
	"testing"
)

// benchSizes are the degrees of the transform benchmarks; the grid is
// Gauss-Legendre with nlat = lmax+1 and nlon = 2 lmax + 2, the layout of the
// libsharp reference harness in /work/shared/bench/libsharp.
var benchSizes = []int{63, 127, 255, 511}

func BenchmarkSynthesis(b *testing.B) {
	for _, lmax := range benchSizes {
		b.Run(fmt.Sprintf("GL/lmax=%d", lmax), func(b *testing.B) {
			tr := NewTransform(lmax, NewGaussLegendre(lmax+1, 2*lmax+2))
			c := trRandCoeffs(lmax, 1)
			f := tr.Synthesis(nil, c)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				tr.Synthesis(f, c)
			}
		})
	}
}

func BenchmarkAnalysis(b *testing.B) {
	for _, lmax := range benchSizes {
		b.Run(fmt.Sprintf("GL/lmax=%d", lmax), func(b *testing.B) {
			tr := NewTransform(lmax, NewGaussLegendre(lmax+1, 2*lmax+2))
			f := tr.Synthesis(nil, trRandCoeffs(lmax, 1))
			c := NewCoeffs(lmax, Canonical)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				tr.Analysis(c, f)
			}
		})
	}
}
