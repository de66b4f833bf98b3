package publish

import (
	"os"

	"golang.org/x/sys/unix"
)

// startWriteback asks the kernel to begin writing bytes off .. off+n of f
// to disk without waiting (sync_file_range with SYNC_FILE_RANGE_WRITE), so
// that the fsync before the rename finds most of the file written already.
// It is only a hint: an error is ignored, the fsync still decides.
func startWriteback(f *os.File, off, n int64) {
	unix.SyncFileRange(int(f.Fd()), off, n, unix.SYNC_FILE_RANGE_WRITE)
}

// syncData puts the data written to f so far on disk (fdatasync), while
// the file is still being written.
func syncData(f *os.File) error {
	return unix.Fdatasync(int(f.Fd()))
}
