package main

import (
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/internal/reftest"
	"drygrid/scenario"
)

// dailyJob writes the invented daily records, station list and a job file
// reading them (date = "yesterday") into a directory.
func dailyJob(t *testing.T) (dir, job string) {
	t.Helper()
	dir = t.TempDir()
	sc := scenario.DemoScenario()
	for name, enc := range map[string]func(io.Writer) error{
		"stations.csv": sc.WriteStationsCSV, "daily.csv.gz": sc.WriteDailyCSVGz,
	} {
		f, err := os.Create(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		if err := enc(f); err != nil {
			t.Fatal(err)
		}
		f.Close()
	}
	job = filepath.Join(dir, "job.toml")
	os.WriteFile(job, []byte(`date = "yesterday"
[inputs]
stations = "stations.csv"
daily = "daily.csv.gz"
exclude_flags = ["X"]
min_share = 0.8
[grid]
res = 0.2
bbox = [-128.0, -45.0, -116.0, -38.0]
[output]
dir = "out"
layers = ["index", "bands"]
`), 0o644)
	return dir, job
}

// run --from/--to back-fills one run per day in date order into the dated
// archive and points out/latest at the last; --date overrides the job's
// date; a failing day stops the back-fill and is named; mistakes in the
// flags are usage errors (exit 2).
func TestRunBackfill(t *testing.T) {
	dir, job := dailyJob(t)
	if code := run([]string{"run", job, "--from", "2025-11-29", "--to", "2025-11-30", "--archive"}); code != exitOK {
		t.Fatalf("back-fill: exit %d", code)
	}
	for _, d := range []string{"2025-11-29", "2025-11-30"} {
		m := readManifest(t, filepath.Join(dir, "out", d))
		if p := m["parameters"].(map[string]any); p["date"] != d || p["window_days"] != 30.0 {
			t.Errorf("%s: parameters date %v window_days %v", d, p["date"], p["window_days"])
		}
	}
	if l, _ := os.Readlink(filepath.Join(dir, "out", "latest")); l != "2025-11-30" {
		t.Errorf("out/latest -> %q", l)
	}
	if code := run([]string{"run", job, "--date", "2025-11-28"}); code != exitOK {
		t.Fatalf("--date: exit %d", code)
	}
	if p := readManifest(t, filepath.Join(dir, "out"))["parameters"].(map[string]any); p["date"] != "2025-11-28" {
		t.Errorf("--date: manifest date %v", p["date"])
	}
	// GDAL reads what the raster shows: the date (TIFFTAG_DATETIME), the
	// band's description and unit (an outside reader: gdalinfo).
	gdalinfo := reftest.Tool(t, "gdalinfo")
	b, err := exec.Command(gdalinfo, filepath.Join(dir, "out", "index.tif")).CombinedOutput()
	if err != nil {
		t.Fatalf("gdalinfo: %v\n%s", err, b)
	}
	for _, want := range []string{"TIFFTAG_DATETIME=2025:11:28 00:00:00", "Description = SPI, 30 days ending 2025-11-28", "Unit Type: SPI (z)"} {
		if !strings.Contains(string(b), want) {
			t.Errorf("gdalinfo index.tif lacks %q:\n%s", want, b)
		}
	}
	b, err = exec.Command(gdalinfo, filepath.Join(dir, "out", "bands.tif")).CombinedOutput()
	if err != nil {
		t.Fatalf("gdalinfo: %v\n%s", err, b)
	}
	if !strings.Contains(string(b), "Description = drought bands of SPI, 30 days ending 2025-11-28") || strings.Contains(string(b), "Unit Type") {
		t.Errorf("gdalinfo bands.tif: description or unit wrong:\n%s", b)
	}
	// 1960 has no record: the first day fails, the second is not run.
	var code int
	msg := captureStderr(t, func() { code = run([]string{"run", job, "--from", "1960-12-31", "--to", "1961-01-01", "--archive"}) })
	if code != exitData || !strings.Contains(msg, "run for 1960-12-31 failed") {
		t.Errorf("failing back-fill: exit %d, stderr %s", code, msg)
	}
	for _, d := range []string{"1960-12-31", "1961-01-01"} {
		if _, err := os.Stat(filepath.Join(dir, "out", d)); err == nil {
			t.Errorf("out/%s exists after the failed back-fill", d)
		}
	}
	for _, args := range [][]string{
		{"run", job, "--date", "2025-11-28", "--from", "2025-11-01", "--to", "2025-11-02"},
		{"run", job, "--from", "2025-11-02", "--to", "2025-11-01"},
		{"run", job, "--from", "2025-11-02"},
		{"run", job, "--date", "someday"},
	} {
		if code := run(args); code != exitUsage {
			t.Errorf("%v: exit %d, want %d", args, code, exitUsage)
		}
	}
}
