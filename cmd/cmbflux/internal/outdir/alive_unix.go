//go:build unix

package outdir

import (
	"errors"
	"syscall"
)

// alive reports whether process pid exists on this host.
func alive(pid int) bool {
	if pid <= 0 {
		return false
	}
	err := syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM)
}
