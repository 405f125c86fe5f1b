package outdir

import "golang.org/x/sys/unix"

// exchange atomically swaps two paths (renameat2 with RENAME_EXCHANGE). It
// fails on file systems that do not support it.
func exchange(a, b string) error {
	return unix.Renameat2(unix.AT_FDCWD, a, unix.AT_FDCWD, b, unix.RENAME_EXCHANGE)
}
