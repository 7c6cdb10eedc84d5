package flux

import (
	"fmt"
	"testing"
	"time"

	"cmbflux/flux/sh"
)

// benchRef is the reference used by the benchmarks: 10 TW over the CMB and
// an adiabatic flow of 7 TW, so that both area diagnostics are exercised.
var benchRef = Reference{HeatFlow: 10 * TW, AdiabaticHeatFlow: 7 * TW, KCore: 40}

// BenchmarkBuild is one full build from dlnVs coefficients of degree 20:
// conversion, truncation to lmax, cosine taper, grid synthesis, extremum search,
// amplitude for q* = 3 and all diagnostics (areas and outlines).
func BenchmarkBuild(b *testing.B) {
	for _, lmax := range []int{8, 16, 32} {
		in := randomDlnVs(11, 2*lmax)
		taper := sh.Taper{Kind: sh.CosineTaper, L1: lmax / 2, L2: lmax + 1}
		b.Run(fmt.Sprintf("lmax=%d", lmax), func(b *testing.B) {
			b.ReportAllocs()
			c0 := processCPU()
			for b.Loop() {
				p, err := NewPattern(in, &PatternOptions{LMax: lmax, Taper: taper})
				if err != nil {
					b.Fatal(err)
				}
				r, err := p.WithQStar(3, benchRef)
				if err != nil {
					b.Fatal(err)
				}
				_ = r.Outlines()
			}
			reportCPU(b, c0)
		})
	}
}

// BenchmarkQstarSweep builds many q* values, 0.5 to 6, from one Pattern
// (made once outside the timer), with the scalar diagnostics of every point
// (extrema, negative and sub-adiabatic area fractions). The outlines are
// left to the caller (Result.Outlines); BenchmarkQstarSweepOutlines
// includes them.
func BenchmarkQstarSweep(b *testing.B) {
	const lmax = 16
	p, err := NewPattern(randomDlnVs(11, 2*lmax), &PatternOptions{LMax: lmax})
	if err != nil {
		b.Fatal(err)
	}
	for _, n := range []int{1000} {
		b.Run(fmt.Sprintf("points=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			c0 := processCPU()
			for b.Loop() {
				for k := range n {
					if _, err := p.WithQStar(0.5+5.5*float64(k)/float64(n-1), benchRef); err != nil {
						b.Fatal(err)
					}
				}
			}
			reportCPU(b, c0)
		})
	}
}

// BenchmarkQstarSweepOutlines is BenchmarkQstarSweep with the outlines of
// every point.
func BenchmarkQstarSweepOutlines(b *testing.B) {
	const lmax = 16
	p, err := NewPattern(randomDlnVs(11, 2*lmax), &PatternOptions{LMax: lmax})
	if err != nil {
		b.Fatal(err)
	}
	const n = 1000
	b.Run(fmt.Sprintf("points=%d", n), func(b *testing.B) {
		b.ReportAllocs()
		c0 := processCPU()
		for b.Loop() {
			for k := range n {
				r, err := p.WithQStar(0.5+5.5*float64(k)/float64(n-1), benchRef)
				if err != nil {
					b.Fatal(err)
				}
				_ = r.Outlines()
			}
		}
		reportCPU(b, c0)
	})
}

// reportCPU adds the process CPU time per operation since c0 ("cpu-ns/op",
// garbage collection included), steadier than wall time on a loaded machine.
func reportCPU(b *testing.B, c0 time.Duration) {
	if c := processCPU() - c0; c > 0 {
		b.ReportMetric(float64(c.Nanoseconds())/float64(b.N), "cpu-ns/op")
	}
}
