package sh

import (
	"fmt"
	"testing"
)

// benchSizes are the degrees of the transform benchmarks; the grid is
// Gauss-Legendre with nlat = lmax+1 and nlon = 2 lmax + 2, the layout of the
// libsharp reference harness in /work/shared/bench/libsharp.
//
// Measured against that harness (libsharp 1.0.0, AVX-512 kernel, one
// thread) on the 2-vCPU Zen 4 guest, 2026-12-01, while other jobs loaded
// the machine (load average 10-20): wall-clock times varied by 3x between
// runs, so both sides were also timed by thread CPU time
// (CLOCK_THREAD_CPUTIME_ID; a copy of the harness with that clock), best of
// three back-to-back sessions. Ratio Go/C of the best single-call times:
//
//	lmax        63   127   255   511
//	synthesis  2.1   2.6   3.1   3.3
//	analysis   2.6   2.9   3.9   3.9
//
// Re-measured by wall clock on 2026-12-02 (same machine, load average 3-4,
// go test -bench -count=5 against the harness's run.sh in the same session;
// best Go call time over best C call time):
//
//	lmax        63   127   255   511
//	synthesis  1.7   2.8   3.2   3.7
//	analysis   2.2   2.9   4.3   4.5
//
// so the target (within 2x at lmax 255 and 511) is not met yet.
//
// The Legendre sums are about 85 % of the time; they run near 3 cycles per
// (l, m, ring pair) in scalar code, against 8-wide vectors in libsharp.
// The threads=2 variants (Workers = 2) showed no reliable speed-up in
// that session: with both vCPUs busy with other jobs a second goroutine
// found no idle core; measure again on a quiet machine.
var benchSizes = []int{63, 127, 255, 511}

func BenchmarkSynthesis(b *testing.B) {
	for _, lmax := range benchSizes {
		for _, threads := range []int{1, 2} {
			name := fmt.Sprintf("GL/lmax=%d", lmax)
			if threads > 1 {
				name += fmt.Sprintf("/threads=%d", threads)
			}
			b.Run(name, func(b *testing.B) {
				tr := NewTransform(lmax, NewGaussLegendre(lmax+1, 2*lmax+2))
				tr.Workers = threads
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
}

func BenchmarkAnalysis(b *testing.B) {
	for _, lmax := range benchSizes {
		for _, threads := range []int{1, 2} {
			name := fmt.Sprintf("GL/lmax=%d", lmax)
			if threads > 1 {
				name += fmt.Sprintf("/threads=%d", threads)
			}
			b.Run(name, func(b *testing.B) {
				tr := NewTransform(lmax, NewGaussLegendre(lmax+1, 2*lmax+2))
				tr.Workers = threads
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
}

// BenchmarkAnalysisTotal511 measures everything an analysis at lmax 511
// costs from scratch, plan included (the memory target is < 64 MiB in
// total, see -benchmem).
func BenchmarkAnalysisTotal511(b *testing.B) {
	const lmax = 511
	g := NewGaussLegendre(lmax+1, 2*lmax+2)
	f := NewTransform(lmax, g).Synthesis(nil, trRandCoeffs(lmax, 1))
	b.ReportAllocs()
	for b.Loop() {
		NewTransform(lmax, g).Analysis(nil, f)
	}
}
