//go:build !unix

package flux

import "time"

// processCPU is unavailable here; benchmarks then report 0 CPU time.
func processCPU() time.Duration { return 0 }
