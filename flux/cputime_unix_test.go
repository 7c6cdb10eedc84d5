//go:build unix

package flux

import (
	"syscall"
	"time"
)

// processCPU returns the user plus system CPU time of the process, so that
// benchmarks can report CPU time per operation beside wall time on a shared,
// loaded machine.
func processCPU() time.Duration {
	var r syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &r) != nil {
		return 0
	}
	return time.Duration(r.Utime.Nano() + r.Stime.Nano())
}
