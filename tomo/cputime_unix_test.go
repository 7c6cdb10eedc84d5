//go:build unix

package tomo

import (
	"syscall"
	"time"
)

// cpuTime returns the CPU time (user + system, all threads) used by the
// process so far, for throughput figures that do not depend on how busy a
// shared machine is.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
