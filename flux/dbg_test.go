package flux

import (
	"fmt"
	"syscall"
	"testing"
	"time"
)

func cpu() time.Duration {
	var r syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &r)
	return time.Duration(r.Utime.Nano() + r.Stime.Nano())
}

func TestDbgCPU(t *testing.T) {
	const lmax = 16
	in := randomDlnVs(11, 2*lmax)
	t0 := cpu()
	const nb = 30
	for range nb {
		p, _ := NewPattern(in, &PatternOptions{LMax: lmax})
		r, _ := p.WithQStar(3, benchRef)
		_ = r.Outlines()
	}
	build := (cpu() - t0) / nb
	p, _ := NewPattern(in, &PatternOptions{LMax: lmax})
	t0 = cpu()
	for k := range 1000 {
		p.WithQStar(0.5+5.5*float64(k)/999, benchRef)
	}
	sweep := cpu() - t0
	t0 = cpu()
	for k := range 1000 {
		r, _ := p.WithQStar(0.5+5.5*float64(k)/999, benchRef)
		r.Outlines()
	}
	sweepO := cpu() - t0
	fmt.Println("build", build, "sweep", sweep, "ratio", float64(sweep)/float64(build), "with outlines", sweepO, float64(sweepO)/float64(build))
}
