//go:build !unix

package tomo

import "time"

// cpuTime is not available on this system; benchmarks then report no CPU
// throughput.
func cpuTime() time.Duration { return 0 }
