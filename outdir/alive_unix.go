//go:build unix

package outdir

import (
	"errors"
	"syscall"
)

// processAlive reports whether a process with this id exists (a signal-0
// probe; EPERM means it exists but belongs to someone else).
func processAlive(pid int) bool {
	err := syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM)
}
