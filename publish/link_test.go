package publish

import (
	"os"
	"path/filepath"
	"testing"
)

// TestLinkReplaces: Link makes the link, then points it elsewhere, leaving
// no temporary link behind (os.Readlink, the kernel's own answer).
func TestLinkReplaces(t *testing.T) {
	dir := t.TempDir()
	for _, d := range []string{"2026-12-02", "2026-12-03"} {
		if err := os.Mkdir(filepath.Join(dir, d), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	latest := filepath.Join(dir, "latest")
	for _, target := range []string{"2026-12-02", "2026-12-03"} {
		if err := Link(latest, target); err != nil {
			t.Fatal(err)
		}
		if got, err := os.Readlink(latest); err != nil || got != target {
			t.Fatalf("latest -> %q (%v), want %q", got, err, target)
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 3 {
		t.Errorf("left in the directory: %v", entries)
	}
}
