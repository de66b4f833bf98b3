package publish

import (
	"errors"

	"golang.org/x/sys/unix"
)

// exchange swaps the directories a and b in one step (renameat2 with
// RENAME_EXCHANGE). ok is false, with a nil error, where the kernel or the
// file system lacks it: the caller then renames twice.
func exchange(a, b string) (ok bool, err error) {
	err = unix.Renameat2(unix.AT_FDCWD, a, unix.AT_FDCWD, b, unix.RENAME_EXCHANGE)
	switch {
	case err == nil:
		return true, nil
	case errors.Is(err, unix.ENOSYS), errors.Is(err, unix.EINVAL), errors.Is(err, unix.EOPNOTSUPP):
		return false, nil
	}
	return false, err
}

// access checks that the process may write into and search dir.
func access(dir string) error {
	return unix.Access(dir, unix.W_OK|unix.X_OK)
}
