package publish

import (
	"fmt"
	"os"
	"path/filepath"
)

// Link points the symbolic link at path to target (a name relative to the
// link's directory), replacing an earlier link atomically: a new link is
// made beside it and renamed over it, then the directory is synced, so a
// reader always finds either the old target or the new one.
func Link(path, target string) error {
	dir := filepath.Dir(path)
	tmp := filepath.Join(dir, fmt.Sprintf(".%s.drygrid-link-%d", filepath.Base(path), os.Getpid()))
	_ = os.Remove(tmp)
	if err := os.Symlink(target, tmp); err != nil {
		return fmt.Errorf("link %s: %w", path, err)
	}
	if err := os.Rename(tmp, path); err != nil {
		_ = os.Remove(tmp)
		return fmt.Errorf("link %s: %w", path, err)
	}
	if d, err := os.Open(dir); err == nil {
		err = d.Sync()
		d.Close()
		if err != nil {
			return fmt.Errorf("link %s: sync %s: %w", path, dir, err)
		}
	}
	return nil
}
