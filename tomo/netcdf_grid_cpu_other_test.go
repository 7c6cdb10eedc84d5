//go:build !unix

package tomo

// ncCPUSeconds is not measured on this system; benchmarks then report
// wall-clock throughput only.
func ncCPUSeconds() float64 { return 0 }
