//go:build !linux

package outdir

import "errors"

// exchange is not available on this system; Commit falls back to two renames.
func exchange(a, b string) error { return errors.New("atomic exchange not supported") }
