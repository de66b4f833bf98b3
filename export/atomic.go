// Package export writes drygrid's layers: GeoTIFF (COG), GeoJSON, CSV/JSON
// statistics, the map picture, the web page and the manifest.
package export

import (
	"bufio"
	"fmt"
	"os"
	"path/filepath"
)

// WriteFileAtomic writes path through write into a temporary file in the same
// directory and renames it over path only when write and the flush succeed,
// so a failed write leaves any earlier file at path untouched.
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
	w := bufio.NewWriterSize(f, 1<<20)
	if err = write(w); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err = w.Flush(); err != nil {
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
