package publish

import (
	"errors"
	"fmt"
	"os"
	"strconv"
	"strings"
	"syscall"
)

// ErrBusy marks a lock held by another process (Lock with wait false).
var ErrBusy = errors.New("locked by another process")

// BusyError is the error of Lock when another process holds the lock.
type BusyError struct {
	Path string // the lock file
	Pid  int    // the holder's pid, 0 if unknown
}

func (e *BusyError) Error() string { return fmt.Sprintf("%s is %v (%s)", e.Path, ErrBusy, e.holder()) }

// holder says who holds the lock and where.
func (e *BusyError) holder() string {
	if e.Pid > 0 {
		return fmt.Sprintf("pid %d, lock file %s", e.Pid, e.Path)
	}
	return "lock file " + e.Path
}

// Is makes errors.Is(err, ErrBusy) true.
func (e *BusyError) Is(target error) bool { return target == ErrBusy }

// Lock takes an exclusive lock (flock) on the file at path, creating it,
// and returns the function that releases it. With wait it waits for
// another holder to release it; without, it fails at once with an error
// (*BusyError, errors.Is ErrBusy) that names the holder's pid when the holder wrote it.
//
// The file holds the holder's pid and is removed on release, so that no
// lock file is left behind: the remover still holds the lock when it
// removes the file, and a process that obtains the lock on a file that
// has meanwhile been removed (or replaced) starts over on the file now
// at path. A crash leaves the file (the system drops the lock itself);
// the next holder takes it over and removes it.
func Lock(path string, wait bool) (release func(), err error) {
	for {
		f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o644)
		if err != nil {
			return nil, err
		}
		how := syscall.LOCK_EX
		if !wait {
			how |= syscall.LOCK_NB
		}
		for {
			err = syscall.Flock(int(f.Fd()), how)
			if err != syscall.EINTR {
				break
			}
		}
		if err != nil {
			pid := holder(f)
			f.Close()
			if errors.Is(err, syscall.EWOULDBLOCK) {
				return nil, &BusyError{Path: path, Pid: pid}
			}
			return nil, err
		}
		if !samePath(f, path) { // released and removed while this one waited
			f.Close()
			continue
		}
		f.Truncate(0)
		f.WriteAt([]byte(strconv.Itoa(os.Getpid())+"\n"), 0)
		return func() {
			os.Remove(path) // still held: nobody locks this file after it
			syscall.Flock(int(f.Fd()), syscall.LOCK_UN)
			f.Close()
		}, nil
	}
}

// samePath reports whether the open file f is still the file at path.
func samePath(f *os.File, path string) bool {
	a, err := f.Stat()
	if err != nil {
		return false
	}
	b, err := os.Stat(path)
	return err == nil && os.SameFile(a, b)
}

// holder reads the pid a lock's holder wrote into its file (0 if none).
func holder(f *os.File) int {
	var b [32]byte
	n, _ := f.ReadAt(b[:], 0)
	pid, err := strconv.Atoi(strings.TrimSpace(string(b[:n])))
	if err != nil || pid <= 0 {
		return 0
	}
	return pid
}
