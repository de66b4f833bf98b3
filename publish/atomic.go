package publish

import (
	"bufio"
	"fmt"
	"os"
	"path/filepath"
)

// WriteFile writes path through write into a temporary file in the same
// directory and renames it over path only when write and the flush succeed,
// so a failed write leaves any earlier file at path untouched. The file is
// on disk (fsync) before the rename; its data are flushed behind the writes
// (flushWriter).
func WriteFile(path string, write func(w *bufio.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("create temporary file for %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	fw := newFlushWriter(f)
	defer fw.flushed()
	w := bufio.NewWriterSize(fw, 1<<20)
	if err = write(w); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = w.Flush(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = fw.flushed(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = f.Sync(); err != nil { // on disk before the rename makes it the file
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = f.Chmod(0o644); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = f.Close(); err != nil {
		return fmt.Errorf("close %s: %w", path, err)
	}
	if err = os.Rename(tmp, path); err != nil {
		return fmt.Errorf("rename %s: %w", path, err)
	}
	return nil
}

// flushWriter writes to a file, starts each chunk's writeback at once and,
// every flushBehind bytes, flushes the file's data in another goroutine
// (one flush at a time) while the next chunks are written: on a virtual
// disk the fsync's cost follows the bytes written since the last flush
// (BENCHMARKS.md, "Flushing behind the writes").
type flushWriter struct {
	f       *os.File
	n       int64
	flushAt int64         // bytes written when the last flush behind began
	idle    chan struct{} // holds a token while no flush behind runs
	err     error         // of a flush behind: an fsync reports an error only once
}

// flushBehind is how many bytes are written between flushes behind.
const flushBehind = 4 << 20

// flushData is syncData (writeback_linux.go), a variable for the tests.
var flushData = syncData

func newFlushWriter(f *os.File) *flushWriter {
	t := &flushWriter{f: f, idle: make(chan struct{}, 1)}
	t.idle <- struct{}{}
	return t
}

// Write writes p to the file and starts a flush behind when one is due.
func (t *flushWriter) Write(p []byte) (int, error) {
	n, err := t.f.Write(p)
	startWriteback(t.f, t.n, int64(n))
	t.n += int64(n)
	if t.n-t.flushAt >= flushBehind {
		select {
		case <-t.idle:
			t.flushAt = t.n
			go func() {
				if err := flushData(t.f); err != nil && t.err == nil {
					t.err = err
				}
				t.idle <- struct{}{}
			}()
		default: // one is running; the next chunk starts another
		}
	}
	return n, err
}

// flushed waits for the flush behind and returns the first error of one
// (again is harmless).
func (t *flushWriter) flushed() error {
	<-t.idle
	t.idle <- struct{}{}
	return t.err
}
