package pipeline

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"drygrid/grid"
	"drygrid/scenario"
	"drygrid/station"
)

// dailyJobDir writes the invented scenario's daily records, station list
// and districts into a directory, with a job file of the given lines
// before its tables.
func dailyJobDir(t *testing.T, top, inputs string) string {
	t.Helper()
	dir := t.TempDir()
	sc := scenario.DemoScenario()
	in := filepath.Join(dir, "inputs")
	os.MkdirAll(in, 0o755)
	for name, enc := range map[string]func(io.Writer) error{
		"stations.csv": sc.WriteStationsCSV, "daily.csv.gz": sc.WriteDailyCSVGz,
		"districts.geojson": func(w io.Writer) error { return writeDemoDistricts(w, sc.BBox) },
	} {
		if err := writeStream(filepath.Join(in, name), enc); err != nil {
			t.Fatal(err)
		}
	}
	job := top + `
[inputs]
stations = "inputs/stations.csv"
daily = "inputs/daily.csv.gz"
exclude_flags = ["X"]
min_share = 0.8
` + inputs + `
[grid]
res = 0.1
bbox = [-128.0, -45.0, -116.0, -38.0]
[interpolation]
radius_km = 150.0
[regions]
file = "inputs/districts.geojson"
key = "name"
[output]
dir = "out"
layers = ["index", "geojson", "regions", "page"]
[history]
file = "history.csv"
`
	if err := os.WriteFile(filepath.Join(dir, "job.toml"), []byte(job), 0o644); err != nil {
		t.Fatal(err)
	}
	return dir
}

func readJSON(t *testing.T, path string) map[string]any {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return m
}

// A job with date = "yesterday" runs unchanged on two consecutive days
// (the clock injected): each run maps the day before the clock's day, in
// UTC, and the history file gets both dates; the outputs say the date,
// the window and the kind (manifest parameters, GeoJSON foreign members,
// regions.json, the page's title).
func TestDailyJobYesterday(t *testing.T) {
	dir := dailyJobDir(t, `date = "yesterday"`, "windows = [30]")
	job, err := ReadJobFile(filepath.Join(dir, "job.toml"))
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out")
	for _, c := range []struct{ clock, date, source, made string }{
		{"2025-12-01T08:00:00Z", "2025-11-30", "", "made 2025-12-01 08:00 UTC · SPI, 30 days ending 2025-11-30"},
		{"2025-12-02T23:59:59Z", "2025-12-01", "Invented Met Service", "made 2025-12-02 23:59 UTC · SPI, 30 days ending 2025-12-01 · data: Invented Met Service"},
	} {
		now, _ := time.Parse(time.RFC3339, c.clock)
		j := *job
		j.Clock = func() time.Time { return now }
		j.Source = c.source
		res, err := RunJob(context.Background(), j)
		if err != nil {
			t.Fatalf("%s: %v", c.clock, err)
		}
		if len(res) != 1 || res[0].History == nil || res[0].History.Date != c.date {
			t.Fatalf("%s: results %+v", c.clock, res)
		}
		m := readJSON(t, filepath.Join(out, "manifest.json"))
		p := m["parameters"].(map[string]any)
		if p["date"] != c.date || p["window_days"] != 30.0 || p["kind"] != "spi" || p["year"] != 2025.0 {
			t.Errorf("%s: manifest parameters date %v window_days %v kind %v year %v", c.clock, p["date"], p["window_days"], p["kind"], p["year"])
		}
		g := readJSON(t, filepath.Join(out, "bands.geojson"))
		if g["date"] != c.date || g["window_days"] != 30.0 || g["kind"] != "spi" {
			t.Errorf("%s: bands.geojson members date %v window_days %v kind %v", c.clock, g["date"], g["window_days"], g["kind"])
		}
		r := readJSON(t, filepath.Join(out, "regions.json"))
		if r["date"] != c.date || r["window_days"] != 30.0 || r["kind"] != "spi" {
			t.Errorf("%s: regions.json date %v window_days %v kind %v", c.clock, r["date"], r["window_days"], r["kind"])
		}
		page, _ := os.ReadFile(filepath.Join(out, "map.html"))
		if want := "drygrid: SPI, 30 days ending " + c.date; !strings.Contains(string(page), want) {
			t.Errorf("%s: the page does not say %q", c.clock, want)
		}
		// The production line: the job's clock (to the minute, UTC), what
		// the map shows, and the source only when the job names one.
		if !strings.Contains(string(page), c.made+"</p>") {
			t.Errorf("%s: the page's production line is not %q", c.clock, c.made)
		}
	}
	hist, err := os.ReadFile(filepath.Join(dir, "history.csv"))
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range []string{"2025-11-30", "2025-12-01"} {
		if n := strings.Count(string(hist), "\n"+d+","); n != 6 {
			t.Errorf("history has %d rows for %s, want 6 (one per district)", n, d)
		}
	}
}

// Several windows in one run: the daily file is read once, each window's
// layers go into out/DATE/<N>d (the archive), their history rows into
// history_<N>d.csv, and out/latest points at the newest day, not moved
// back by a back-filled earlier day.
func TestDailyJobWindowsArchive(t *testing.T) {
	dir := dailyJobDir(t, "date = \"2025-11-30\"\narchive = true", "windows = [30, 20]")
	job, err := ReadJobFile(filepath.Join(dir, "job.toml"))
	if err != nil {
		t.Fatal(err)
	}
	for _, date := range []string{"2025-11-30", "2025-11-29"} {
		j := *job
		j.Date = date
		reads := 0
		j.Note = func(msg string) {
			if strings.HasPrefix(msg, "daily ") {
				reads++
			}
		}
		res, err := RunJob(context.Background(), j)
		if err != nil {
			t.Fatalf("%s: %v", date, err)
		}
		if len(res) != 2 || reads != 1 {
			t.Errorf("%s: %d results, daily file read %d times", date, len(res), reads)
		}
		for _, n := range []int{30, 20} {
			m := readJSON(t, filepath.Join(dir, "out", date, fmt.Sprintf("%dd", n), "manifest.json"))
			if p := m["parameters"].(map[string]any); p["window_days"] != float64(n) || p["date"] != date {
				t.Errorf("%s %dd: parameters window_days %v date %v", date, n, p["window_days"], p["date"])
			}
			if _, err := os.Stat(filepath.Join(dir, fmt.Sprintf("history_%dd.csv", n))); err != nil {
				t.Error(err)
			}
		}
	}
	if l, err := os.Readlink(filepath.Join(dir, "out", "latest")); err != nil || l != "2025-11-30" {
		t.Errorf("out/latest -> %q (%v), want 2025-11-30", l, err)
	}
	if _, err := os.Stat(filepath.Join(dir, "out", "latest", "30d", "index.tif")); err != nil {
		t.Error(err)
	}
}

// A values table gridded without a date: the outputs say the kind and
// nothing they do not know (no date, no window members, no empty ones).
func TestNoDateNoMembers(t *testing.T) {
	out := filepath.Join(t.TempDir(), "layers")
	job := NewJob("../testdata/example/spi.csv", out)
	job.Layers = LayerSet{"index": true, "geojson": true, "stations": true}
	if _, err := Run(context.Background(), job); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"bands.geojson", "stations.geojson", "manifest.json"} {
		m := readJSON(t, filepath.Join(out, f))
		if f == "manifest.json" {
			m = m["parameters"].(map[string]any)
		}
		for _, k := range []string{"date", "window_days"} {
			if v, ok := m[k]; ok {
				t.Errorf("%s has %s = %v", f, k, v)
			}
		}
		if m["kind"] != "spi" {
			t.Errorf("%s: kind %v", f, m["kind"])
		}
	}
	b, _ := os.ReadFile(filepath.Join(out, "index.tif"))
	// TIFFTAG_DATETIME is "YYYY:MM:DD HH:MM:SS" (TIFF 6.0 section 8).
	if regexp.MustCompile(`\d{4}:\d\d:\d\d \d\d:\d\d:\d\d`).Match(b) || strings.Contains(string(b), "days ending") {
		t.Error("index.tif names a date")
	}
}

// The map's title and the line under it say what the map shows once: in
// the default title, or in the line under a title of the user's own.
func TestTitleSaysWhatItShows(t *testing.T) {
	res := &Result{Values: &station.Values{}, Spec: grid.Spec{Res: 0.1}}
	job := Job{Values: station.ValueOptions{Kind: station.KindPercentile}, Date: "2026-11-30", WindowDays: 90}
	w := &layerWriter{job: &job, res: res}
	if got := w.title(); got != "drygrid: percentile, 90 days ending 2026-11-30" {
		t.Errorf("title %q", got)
	}
	if strings.Contains(w.subtitle(), "ending") {
		t.Errorf("subtitle repeats the title: %q", w.subtitle())
	}
	job.Title = "Drought watch"
	if got := w.subtitle(); !strings.HasPrefix(got, "percentile, 90 days ending 2026-11-30; IDW") {
		t.Errorf("subtitle under a title of one's own: %q", got)
	}
	if job.units() != "percentile -> z" {
		t.Errorf("units %q", job.units())
	}
}
