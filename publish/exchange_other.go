//go:build !linux

package publish

import "golang.org/x/sys/unix"

// exchange is not available here: the caller renames twice.
func exchange(a, b string) (ok bool, err error) { return false, nil }

// access checks that the process may write into and search dir.
func access(dir string) error {
	return unix.Access(dir, unix.W_OK|unix.X_OK)
}
