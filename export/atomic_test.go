package export

import (
	"bufio"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// TestHashFileAfterWrite: HashFile gives the SHA-256 of the file as it is
// (crypto/sha256 of its bytes, read here independently): the sum kept from
// the write while the file is unchanged, and a fresh one after the file
// was changed in place, even to the same size.
func TestHashFileAfterWrite(t *testing.T) {
	path := filepath.Join(t.TempDir(), "layer.bin")
	want := func() (int64, string) {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		h := sha256.Sum256(b)
		return int64(len(b)), hex.EncodeToString(h[:])
	}
	write := func(s string) {
		if err := WriteFileAtomic(path, func(w *bufio.Writer) error { _, err := w.WriteString(s); return err }); err != nil {
			t.Fatal(err)
		}
	}
	check := func(what string) {
		t.Helper()
		n, sum, err := HashFile(path)
		wn, wsum := want()
		if err != nil || n != wn || sum != wsum {
			t.Errorf("%s: HashFile %d %s %v, file %d %s", what, n, sum, err, wn, wsum)
		}
	}
	write("first contents")
	check("as written")
	// Many chunks of the 1 MiB buffer, and a write larger than it, which
	// goes past the buffer to the file (and to the hash) directly.
	big := make([]byte, 3<<20+12345)
	for i := range big {
		big[i] = byte(i*7 + i>>13)
	}
	if err := WriteFileAtomic(path, func(w *bufio.Writer) error {
		for i := 0; i < 1<<20; i += 1000 {
			w.Write(big[i:min(i+1000, 1<<20)])
		}
		_, err := w.Write(big[1<<20:])
		return err
	}); err != nil {
		t.Fatal(err)
	}
	check("written in chunks")
	write("second contents, longer")
	// Changed in place to the same size, with a later modification time.
	if err := os.WriteFile(path, []byte("SECOND CONTENTS, LONGER"), 0o644); err != nil {
		t.Fatal(err)
	}
	later := time.Now().Add(2 * time.Second)
	if err := os.Chtimes(path, later, later); err != nil {
		t.Fatal(err)
	}
	check("changed after the write")
	write("third")
	if f, err := os.OpenFile(path, os.O_APPEND|os.O_WRONLY, 0); err == nil {
		f.WriteString("!")
		f.Close()
	}
	check("appended to after the write")
	check("asked twice")
}

// TestWriteFileAtomicFlushBehind: a file of several flushBehind chunks is
// flushed behind its writes and comes out whole (its bytes and the kept
// SHA-256 those of crypto/sha256); an error of a flush behind fails the
// write and leaves no file, since the fsync after it would not report it
// again (Linux reports a writeback error to one fsync of a file).
func TestWriteFileAtomicFlushBehind(t *testing.T) {
	dir := t.TempDir()
	data := make([]byte, 3*flushBehind+12345)
	for i := range data {
		data[i] = byte(i * 7 / 3)
	}
	write := func(w *bufio.Writer) error { _, err := w.Write(data); return err }
	defer func(f func(*os.File) error) { flushData = f }(flushData)
	flushes := 0
	flushData = func(f *os.File) error { flushes++; return syncData(f) }
	path := filepath.Join(dir, "big.bin")
	if err := WriteFileAtomic(path, write); err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(path)
	if err != nil || string(got) != string(data) {
		t.Fatalf("file differs from what was written (%v)", err)
	}
	sum := sha256.Sum256(data)
	if s, ok := writtenSums.take(path); !ok || s.sum != hex.EncodeToString(sum[:]) {
		t.Errorf("kept sum %q (%v), want %x", s.sum, ok, sum)
	}
	if flushes == 0 {
		t.Error("no flush behind the writes")
	}
	boom := errors.New("disk gone")
	flushData = func(*os.File) error { return boom }
	bad := filepath.Join(dir, "bad.bin")
	if err := WriteFileAtomic(bad, write); !errors.Is(err, boom) {
		t.Errorf("flush error: got %v, want %v", err, boom)
	}
	if left, _ := os.ReadDir(dir); len(left) != 1 {
		t.Errorf("files left after the failed write: %v", left)
	}
}
