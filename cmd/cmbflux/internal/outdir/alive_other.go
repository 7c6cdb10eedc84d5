//go:build !unix

package outdir

// alive cannot tell on this system, so it keeps every temporary folder.
func alive(pid int) bool { return true }
