package pipeline

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/publish"
)

// lostJob is a small run of the example stations into out: the rasters
// (streamed) or, with all, every layer but regions (in memory).
func lostJob(out string, all bool) Job {
	j := NewJob(exampleSPI, out)
	j.Res = 0.25
	if !all {
		j.Layers = LayerSet{"index": true, "bands": true}
	}
	return j
}

// beside lists the entries of out's parent other than out.
func beside(t *testing.T, out string) []string {
	t.Helper()
	entries, err := os.ReadDir(filepath.Dir(out))
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		if e.Name() != filepath.Base(out) {
			names = append(names, e.Name())
		}
	}
	return names
}

// TestRunEmptyMapRefused: a swapped bbox holding none of the stations, and
// a grid whose cells all lack a value (every cell has fewer than
// min-stations stations within the radius), are refused with a hint and
// publish nothing, rather than all-empty maps reading "0.0 % in drought";
// AllowEmpty publishes them. Both the streamed and the
// in-memory runs are checked.
func TestRunEmptyMapRefused(t *testing.T) {
	for _, all := range []bool{false, true} {
		dir := t.TempDir()
		out := filepath.Join(dir, "layers")
		j := lostJob(out, all)
		j.BBox = &[4]float64{-116, -45, -128, -38} // -128,-45,-116,-38 swapped
		_, err := Run(context.Background(), j)
		want := "west > east means a grid across the antimeridian, 348 degrees wide here; did you swap west and east?"
		if err == nil || !strings.Contains(err.Error(), want) || !strings.Contains(err.Error(), "--allow-empty") {
			t.Errorf("swapped bbox: %v", err)
		}
		j.BBox = &[4]float64{-128, -45, -116, -38}
		j.Params.RadiusKm, j.Params.MinStations = 1, 2 // no two stations within 1 km of a cell
		_, err = Run(context.Background(), j)
		if err == nil || !strings.Contains(err.Error(), "has a value: every cell has fewer than 2 stations (min stations) within 1 km") {
			t.Errorf("no covered cell (all layers %v): %v", all, err)
		}
		if _, err := os.Stat(out); !errors.Is(err, os.ErrNotExist) {
			t.Errorf("an empty map was published: %v", err)
		}
		if left := beside(t, out); len(left) > 0 {
			t.Errorf("left beside the output: %v", left)
		}
		j.AllowEmpty = true
		res, err := Run(context.Background(), j)
		if err != nil || res.CoveredCells != 0 {
			t.Errorf("AllowEmpty: %v", err)
		}
	}
}

// TestRunLocksFirst: a run on an output directory another run holds stops
// at once, before it reads its inputs (the stations here do not exist),
// naming the holder's pid: the lock is taken before the work.
func TestRunLocksFirst(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	release, err := publish.Lock(filepath.Join(dir, ".layers"+publish.LockTag), false)
	if err != nil {
		t.Fatal(err)
	}
	j := lostJob(out, false)
	j.Stations = filepath.Join(dir, "no-such-stations.csv")
	_, err = Run(context.Background(), j)
	release()
	if err == nil || !strings.Contains(err.Error(), "another drygrid run is writing "+out) || !strings.Contains(err.Error(), "pid ") {
		t.Errorf("locked output: %v", err)
	}
	if left := beside(t, out); len(left) > 0 {
		t.Errorf("left beside the output: %v", left)
	}
}

// TestRunRecoversBeforeBadInput: a crash between the two renames of a
// swap (fault injection) leaves no output directory; the next run, though
// it fails on bad input, puts the previous one back first, and nothing is
// left beside it.
func TestRunRecoversBeforeBadInput(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	if _, err := Run(context.Background(), lostJob(out, false)); err != nil {
		t.Fatal(err)
	}
	os.WriteFile(filepath.Join(out, "notes.txt"), []byte("mine"), 0o644)
	crash := errors.New("crash between the renames")
	publish.Fault = func(string) error { return crash }
	_, err := Run(context.Background(), lostJob(out, false))
	publish.Fault = nil
	if !errors.Is(err, crash) {
		t.Fatalf("fault: %v", err)
	}
	if _, err := os.Stat(out); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("output directory after the crash: %v", err)
	}
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("station,latitude,longitude,spi\nA,-40,-125,dry\n"), 0o644)
	j := lostJob(out, false)
	j.Stations = bad
	if _, err := Run(context.Background(), j); err == nil || !strings.Contains(err.Error(), "dry") {
		t.Fatalf("bad input: %v", err)
	}
	if b, err := os.ReadFile(filepath.Join(out, "notes.txt")); err != nil || string(b) != "mine" {
		t.Errorf("output directory not restored: %q, %v", b, err)
	}
	if _, err := os.Stat(filepath.Join(out, "manifest.json")); err != nil {
		t.Errorf("output directory not restored: %v", err)
	}
	if left := beside(t, out); len(left) != 1 || left[0] != "bad.csv" {
		t.Errorf("beside the output: %v, want only bad.csv", left)
	}
}

// TestRunNoStrayFiles: a run leaves nothing beside its output directory
// (not even its lock file), and refuses a read-only output directory
// before the work.
func TestRunNoStrayFiles(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	for range 2 {
		if _, err := Run(context.Background(), lostJob(out, true)); err != nil {
			t.Fatal(err)
		}
	}
	if left := beside(t, out); len(left) > 0 {
		t.Errorf("left beside the output: %v", left)
	}
	os.Chmod(out, 0o555)
	defer os.Chmod(out, 0o755)
	j := lostJob(out, false)
	j.Stations = filepath.Join(dir, "no-such-stations.csv") // not read: refused first
	if _, err := Run(context.Background(), j); err == nil || !strings.Contains(err.Error(), "is read-only") {
		t.Errorf("read-only output: %v", err)
	}
}

// TestParseJobLost: layers = [] is an error at its key, not every layer;
// allow_empty and poor_fit reach the job.
func TestParseJobLost(t *testing.T) {
	base := "[inputs]\nstations = \"s.csv\"\n[output]\ndir = \"o\"\n"
	for _, src := range []string{base + "layers = []\n", base + "layers = [ \"\" ]\n"} {
		_, err := ParseJobFile("j.toml", []byte(src))
		if err == nil || !strings.Contains(err.Error(), "job j.toml line 5 column 10: output.layers: the list names no layer") {
			t.Errorf("%q: %v", src, err)
		}
	}
	j, err := ParseJobFile("j.toml", []byte(base+"[grid]\nallow_empty = true\n"))
	if err != nil || !j.AllowEmpty {
		t.Errorf("allow_empty: %v", err)
	}
	idx := "[inputs]\nstations = \"s.csv\"\ntotals = \"t.csv\"\n[output]\ndir = \"o\"\n[index]\npoor_fit = "
	j, err = ParseJobFile("j.toml", []byte(idx+"\"Drop\"\n"))
	if err != nil || j.Index.Options.PoorFit != "drop" {
		t.Errorf("poor_fit: %v", err)
	}
	_, err = ParseJobFile("j.toml", []byte(idx+"\"toss\"\n"))
	if err == nil || !strings.Contains(err.Error(), "line 7 column 12: index.poor_fit: poor-fit \"toss\" is not empirical, keep or drop") {
		t.Errorf("bad poor_fit: %v", err)
	}
}
