package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"

	"drygrid/internal/reftest"
)

const exampleSPI = "../../testdata/example/spi.csv"

// TestExitCodes checks the command-line contract: 0 ok, 1 data or run error,
// 2 usage (docs/design.md, "Command line").
func TestExitCodes(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	if err := os.WriteFile(bad, []byte("station,lat,lon,spi\nA,95,10,0.5\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		args []string
		want int
	}{
		{"ok", []string{"grid", "--stations", exampleSPI, "--layers", "index", "--out", filepath.Join(dir, "ok")}, exitOK},
		{"no stations flag", []string{"grid", "--out", dir}, exitUsage},
		{"unknown flag", []string{"grid", "--stations", exampleSPI, "--bogus", "--out", dir}, exitUsage},
		{"unknown command", []string{"mapit"}, exitUsage},
		{"bad kind", []string{"grid", "--stations", exampleSPI, "--kind", "rain", "--out", dir}, exitUsage},
		{"bad layer", []string{"grid", "--stations", exampleSPI, "--layers", "index,maps", "--out", dir}, exitUsage},
		{"bad bbox", []string{"grid", "--stations", exampleSPI, "--bbox", "1,2,3", "--out", dir}, exitUsage},
		{"bad power", []string{"grid", "--stations", exampleSPI, "--power", "0", "--out", dir}, exitUsage},
		{"bad stations on map", []string{"grid", "--stations", exampleSPI, "--stations-on-map", "some", "--out", dir}, exitUsage},
		{"bad date", []string{"grid", "--stations", exampleSPI, "--regions", "r.geojson", "--history", "h.csv", "--date", "2025-02-30", "--out", dir}, exitUsage},
		{"regions layer without regions", []string{"grid", "--stations", exampleSPI, "--layers", "regions", "--out", dir}, exitUsage},
		{"missing file", []string{"grid", "--stations", filepath.Join(dir, "nope.csv"), "--out", dir}, exitData},
		{"bad latitude", []string{"grid", "--stations", bad, "--out", dir}, exitData},
		{"missing column", []string{"grid", "--stations", exampleSPI, "--kind", "percentile", "--out", dir}, exitData},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := run(c.args); got != c.want {
				t.Errorf("drygrid %s: exit %d, want %d", strings.Join(c.args, " "), got, c.want)
			}
		})
	}
}

// hashDir maps each regular file in dir to its SHA-256.
func hashDir(t *testing.T, dir string) map[string]string {
	t.Helper()
	out := map[string]string{}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if e.IsDir() {
			continue
		}
		b, err := os.ReadFile(filepath.Join(dir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		h := sha256.Sum256(b)
		out[e.Name()] = hex.EncodeToString(h[:])
	}
	return out
}

// TestFailedRunLeavesOutputs: a run that fails on bad input leaves the
// earlier layers byte-identical and no staging directory behind
// (docs/design.md: "A failed run leaves earlier outputs in the output directory untouched").
func TestFailedRunLeavesOutputs(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	if code := run([]string{"grid", "--stations", exampleSPI, "--out", out}); code != exitOK {
		t.Fatalf("first run: exit %d", code)
	}
	before := hashDir(t, out)
	if len(before) < 6 {
		t.Fatalf("first run wrote only %v", before)
	}
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("station,lat,lon,spi\nA,10,10,0.5\nB,10,11,NaN\n"), 0o644)
	if code := run([]string{"grid", "--stations", bad, "--out", out}); code != exitData {
		t.Fatalf("bad run: exit %d, want %d", code, exitData)
	}
	badRegions := filepath.Join(dir, "regions.geojson")
	os.WriteFile(badRegions, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"id":"x"},"geometry":{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1]]]}}]}`), 0o644)
	if code := run([]string{"grid", "--stations", exampleSPI, "--regions", badRegions, "--out", out}); code != exitData {
		t.Fatalf("bad regions run: exit %d, want %d", code, exitData)
	}
	after := hashDir(t, out)
	if len(after) != len(before) {
		t.Fatalf("files changed: before %v after %v", before, after)
	}
	for name, h := range before {
		if after[name] != h {
			t.Errorf("%s changed after a failed run", name)
		}
	}
	entries, _ := os.ReadDir(out)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("left behind %s", e.Name())
		}
	}
}

// TestOutputsIndependentOfCores: the same inputs give byte-identical files
// for any core count (docs/design.md: "Output never depends on the number of cores").
func TestOutputsIndependentOfCores(t *testing.T) {
	dir := t.TempDir()
	prev := runtime.GOMAXPROCS(0)
	defer runtime.GOMAXPROCS(prev)
	var hashes []map[string]string
	for i, procs := range []int{1, 3} {
		runtime.GOMAXPROCS(procs)
		out := filepath.Join(dir, string(rune('a'+i)))
		if code := run([]string{"grid", "--stations", exampleSPI, "--res", "0.05", "--out", out}); code != exitOK {
			t.Fatalf("GOMAXPROCS=%d: exit %d", procs, code)
		}
		hashes = append(hashes, hashDir(t, out))
	}
	for name, h := range hashes[0] {
		if hashes[1][name] != h {
			t.Errorf("%s differs between GOMAXPROCS 1 and 3", name)
		}
	}
}

// TestDemo runs the whole job on the invented scenario and has GDAL open the
// rasters: GDAL must open index.tif and bands.tif.
func TestDemo(t *testing.T) {
	if testing.Short() {
		t.Skip("demo in -short mode")
	}
	out := filepath.Join(t.TempDir(), "demo")
	var stderr bytes.Buffer
	if err := runDemo(out, &stderr); err != nil {
		t.Fatalf("demo: %v\n%s", err, stderr.String())
	}
	for _, f := range []string{"index.tif", "bands.tif", "bands.geojson", "stations.geojson",
		"regions.csv", "regions.json", "map.png", "map.html", "history.csv", "chart.png", "chart-district.png",
		"inputs/stations.csv", "inputs/totals.csv", "inputs/index.csv"} {
		if st, err := os.Stat(filepath.Join(out, f)); err != nil || st.Size() == 0 {
			t.Errorf("demo did not write %s: %v", f, err)
		}
	}
	for _, want := range []string{"in drought:", "Parched", "sites used"} {
		if !strings.Contains(stderr.String(), want) {
			t.Errorf("demo summary lacks %q:\n%s", want, stderr.String())
		}
	}
	gdalinfo := reftest.Tool(t, "gdalinfo")
	for _, f := range []string{"index.tif", "bands.tif"} {
		b, err := exec.Command(gdalinfo, filepath.Join(out, f)).CombinedOutput()
		if err != nil {
			t.Fatalf("gdalinfo %s: %v\n%s", f, err, b)
		}
		// GDAL 3.6 prints the CRS with its EPSG identifier.
		if !strings.Contains(string(b), `ID["EPSG",4326]`) {
			t.Errorf("gdalinfo %s: no EPSG:4326\n%s", f, b)
		}
	}
}

// TestSourceDateEpoch: with SOURCE_DATE_EPOCH set (the reproducible-builds
// convention), two runs an hour apart write the same picture and page, the
// production line saying the given time; without it the line says the
// run's own time.
func TestSourceDateEpoch(t *testing.T) {
	prev := manifestNow
	defer func() { manifestNow = prev }()
	dir := t.TempDir()
	t.Setenv("SOURCE_DATE_EPOCH", "1764806400") // 2025-12-04 00:00 UTC
	var hashes []map[string]string
	for i, h := range []int{3, 4} {
		manifestNow = func() time.Time { return time.Date(2026, 12, 4, h, 0, 0, 0, time.UTC) }
		out := filepath.Join(dir, string(rune('a'+i)))
		if code := run([]string{"grid", "--stations", exampleSPI, "--layers", "map,page", "--out", out}); code != exitOK {
			t.Fatalf("exit %d", code)
		}
		hashes = append(hashes, hashDir(t, out))
	}
	for _, name := range []string{"map.png", "map.html"} {
		if hashes[0][name] == "" || hashes[0][name] != hashes[1][name] {
			t.Errorf("%s differs between two runs with SOURCE_DATE_EPOCH", name)
		}
	}
	page, err := os.ReadFile(filepath.Join(dir, "a", "map.html"))
	if err != nil || !strings.Contains(string(page), "2025-12-04 00:00 UTC") {
		t.Errorf("the page does not say the SOURCE_DATE_EPOCH time (%v)", err)
	}
}
