package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestRunUsage: calling run wrongly is a usage error (exit 2); a missing job file is a data error naming it.
func TestRunUsage(t *testing.T) {
	for _, args := range [][]string{{"run"}, {"run", "a.toml", "b.toml"}, {"run", "--example", "a.toml"}, {"run", "--bogus", "a.toml"}} {
		if code := run(args); code != exitUsage {
			t.Errorf("drygrid %s: exit %d, want %d", strings.Join(args, " "), code, exitUsage)
		}
	}
	msg := captureStderr(t, func() {
		if code := run([]string{"run", filepath.Join(t.TempDir(), "none.toml")}); code != exitData {
			t.Errorf("missing job: exit %d", code)
		}
	})
	if !strings.Contains(msg, "none.toml") {
		t.Errorf("message %q does not name the job file", msg)
	}
}
