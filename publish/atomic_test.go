package publish

import (
	"bufio"
	"errors"
	"os"
	"path/filepath"
	"testing"
)

// TestWriteFileFlushBehind: a file of several flushBehind chunks is
// flushed behind its writes and comes out whole (its bytes ); an error of a flush behind fails the
// write and leaves no file, since the fsync after it would not report it
// again (Linux reports a writeback error to one fsync of a file).
func TestWriteFileFlushBehind(t *testing.T) {
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
	if err := WriteFile(path, write); err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile(path)
	if err != nil || string(got) != string(data) {
		t.Fatalf("file differs from what was written (%v)", err)
	}
	if flushes == 0 {
		t.Error("no flush behind the writes")
	}
	boom := errors.New("disk gone")
	flushData = func(*os.File) error { return boom }
	bad := filepath.Join(dir, "bad.bin")
	if err := WriteFile(bad, write); !errors.Is(err, boom) {
		t.Errorf("flush error: got %v, want %v", err, boom)
	}
	if left, _ := os.ReadDir(dir); len(left) != 1 {
		t.Errorf("files left after the failed write: %v", left)
	}
}
