// Package export writes drygrid's layers: GeoTIFF (COG), GeoJSON, CSV/JSON
// statistics, the map picture, the web page and the manifest.
package export

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"hash"
	"io"
	"os"
	"path/filepath"
	"sync"
	"time"
)

// WriteFileAtomic writes path through write into a temporary file in the same
// directory and renames it over path only when write and the flush succeed,
// so a failed write leaves any earlier file at path untouched. The file is
// on disk (fsync) before the rename. Its SHA-256 is computed from the bytes
// as they are written, each chunk beside its write (hashTee), and kept for
// HashFile (writtenSums).
func WriteFileAtomic(path string, write func(w *bufio.Writer) error) (err error) {
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
	tee := newHashTee(f)
	defer tee.stop()
	w := bufio.NewWriterSize(tee, 1<<20)
	if err = write(w); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = w.Flush(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	h := tee.sum()
	if err = tee.flushed(); err != nil {
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
	if h.err == nil {
		writtenSums.put(path, h)
	}
	return nil
}

// fileSum is a file's size and SHA-256 (hex), with the modification time
// it had when they were taken.
type fileSum struct {
	size int64
	sum  string
	mod  time.Time
	err  error
}

// hashTee writes to a file and hashes the same bytes in a goroutine of its
// own, each chunk while it is being written, so that the sum is ready when
// the last write returns. It starts each chunk's writeback at once and,
// every flushBehind bytes, flushes the file's data in another goroutine
// (one flush at a time) while the next chunks are written: on a virtual
// disk the fsync's cost follows the bytes written since the last flush
// (30 ms for the 25 MB of a global index COG, 11 ms with the flushes
// behind; BENCHMARKS.md).
type hashTee struct {
	f       *os.File
	h       hash.Hash
	n       int64
	in      chan []byte
	done    chan struct{}
	flushAt int64         // bytes written when the last flush behind began
	idle    chan struct{} // holds a token while no flush behind runs
	err     error         // of a flush behind: an fsync reports an error only once
}

// flushBehind is how many bytes are written between flushes behind.
const flushBehind = 4 << 20

// flushData is syncData (writeback_linux.go), a variable for the tests.
var flushData = syncData

func newHashTee(f *os.File) *hashTee {
	t := &hashTee{f: f, h: sha256.New(), in: make(chan []byte), done: make(chan struct{}), idle: make(chan struct{}, 1)}
	t.idle <- struct{}{}
	in := t.in // stop clears the field
	go func() {
		for p := range in {
			t.h.Write(p)
			t.done <- struct{}{}
		}
	}()
	return t
}

// Write writes p and returns once p is also hashed (the caller may reuse it
// then).
func (t *hashTee) Write(p []byte) (int, error) {
	t.in <- p
	n, err := t.f.Write(p)
	startWriteback(t.f, t.n, int64(n))
	<-t.done
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

// flushed waits for the flush behind and returns the first error of one.
func (t *hashTee) flushed() error {
	<-t.idle
	t.idle <- struct{}{}
	return t.err
}

// sum is the size and SHA-256 of what was written; the tee takes no more.
func (t *hashTee) sum() fileSum {
	t.stop()
	return fileSum{size: t.n, sum: hex.EncodeToString(t.h.Sum(nil))}
}

// stop ends the hashing goroutine and waits for the flush behind (again
// is harmless).
func (t *hashTee) stop() {
	if t.in != nil {
		close(t.in)
		t.in = nil
	}
	t.flushed()
}

// hashReader is the size and SHA-256 of what r holds.
func hashReader(r io.Reader) fileSum {
	h := sha256.New()
	n, err := io.Copy(h, r)
	return fileSum{size: n, sum: hex.EncodeToString(h.Sum(nil)), err: err}
}

// writtenSums holds the sums of the files WriteFileAtomic wrote, by path,
// until HashFile asks for them once: a manifest then need not read them
// again. HashFile uses a sum only while the file still has the size and
// modification time it had when written; otherwise it reads the file.
var writtenSums sumCache

type sumCache struct {
	mu sync.Mutex
	m  map[string]fileSum
}

func (c *sumCache) put(path string, s fileSum) {
	abs, err := filepath.Abs(path)
	st, serr := os.Stat(path)
	if err != nil || serr != nil || st.Size() != s.size {
		return
	}
	s.mod = st.ModTime()
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.m == nil {
		c.m = map[string]fileSum{}
	}
	c.m[abs] = s
}

// take removes and returns the sum kept for path, if the file is still as
// it was written.
func (c *sumCache) take(path string) (fileSum, bool) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return fileSum{}, false
	}
	c.mu.Lock()
	s, ok := c.m[abs]
	delete(c.m, abs)
	c.mu.Unlock()
	if !ok {
		return fileSum{}, false
	}
	st, err := os.Stat(path)
	if err != nil || !st.Mode().IsRegular() || st.Size() != s.size || !st.ModTime().Equal(s.mod) {
		return fileSum{}, false
	}
	return s, true
}
