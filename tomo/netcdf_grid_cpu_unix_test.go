//go:build unix

package tomo

import "syscall"

// ncCPUSeconds returns the user plus system CPU time of this process, so
// that benchmarks on a shared machine can report throughput per CPU
// second as well as per wall-clock second.
func ncCPUSeconds() float64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return float64(ru.Utime.Sec+ru.Stime.Sec) + float64(ru.Utime.Usec+ru.Stime.Usec)/1e6
}
