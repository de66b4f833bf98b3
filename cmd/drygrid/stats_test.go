package main

import (
	"bytes"
	"encoding/csv"
	"errors"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/geotiff"
	"drygrid/grid"
)

func statsRun(t *testing.T, args ...string) error {
	t.Helper()
	root := newStatsCmd()
	if args[0] == "chart" {
		root = newChartCmd()
	}
	root.SetArgs(args[1:])
	root.SetOut(&bytes.Buffer{})
	root.SetErr(&bytes.Buffer{})
	root.SilenceUsage, root.SilenceErrors = true, true
	return root.Execute()
}

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs
}

// TestStatsAndChartCommands: stats from a band raster written by the team's
// GeoTIFF writer over the invented districts of testdata/regions; the
// raster is parched west of 13 E and soaked east of it, so the district
// lying wholly west (upland) is 100 % in drought and the one wholly east
// (river-basin, its west edge on 13 E) 0 % (hand-derived). A re-run of a
// date replaces its history rows; the chart is a PNG.
func TestStatsAndChartCommands(t *testing.T) {
	dir := t.TempDir()
	s, _ := grid.NewSpec(9, 41, 18, 48, 0.1)
	b := grid.NewUint8(s, 0)
	z := grid.NewFloat32(s, grid.NoDataIndex)
	for row := 0; row < s.Rows; row++ {
		for col := 0; col < s.Cols; col++ {
			lon, _ := s.Center(col, row)
			i := s.Index(col, row)
			if lon < 13 {
				b.Data[i], z.Data[i] = 1, -2.5
			} else {
				b.Data[i], z.Data[i] = 9, 2.5
			}
		}
	}
	bandsPath, index := filepath.Join(dir, "bands.tif"), filepath.Join(dir, "index.tif")
	if err := geotiff.WriteBands(bandsPath, b, bands.Default(), geotiff.DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	if err := geotiff.WriteIndex(index, z, geotiff.DefaultOptions()); err != nil {
		t.Fatal(err)
	}
	regions := "../../testdata/regions/districts.geojson"
	hist := filepath.Join(dir, "history.csv")
	out := filepath.Join(dir, "out")
	for _, date := range []string{"2026-05-01", "2026-05-02", "2026-05-01"} {
		if err := statsRun(t, "stats", "--bands", bandsPath, "--index", index, "--regions", regions, "--out", out, "--history", hist, "--date", date); err != nil {
			t.Fatal(err)
		}
	}
	recs := readCSV(t, filepath.Join(out, "regions.csv"))
	if len(recs) != 5 || recs[0][0] != "region" {
		t.Fatalf("regions.csv: %v", recs)
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	got := map[string][]string{}
	for _, r := range recs[1:] {
		got[r[0]] = r
	}
	if r := got["upland"]; r[col["in_drought_pct"]] != "100.000" || r[col["parched_pct"]] != "100.000" || r[col["covered_pct"]] != "100.000" || r[col["mean_z"]] != "-2.500" {
		t.Errorf("upland %v", r)
	}
	if r := got["river-basin"]; r[col["in_drought_pct"]] != "0.000" || r[col["soaked_pct"]] != "100.000" || r[col["mean_z"]] != "2.500" {
		t.Errorf("river-basin %v", r)
	}
	if h := readCSV(t, hist); len(h) != 1+2*4 {
		t.Errorf("history has %d rows, want header + 2 days x 4 regions", len(h))
	}
	if _, err := os.Stat(filepath.Join(out, "regions.json")); err != nil {
		t.Error(err)
	}
	png1 := filepath.Join(dir, "chart.png")
	if err := statsRun(t, "chart", "--history", hist, "--out", png1, "--regions-limit", "3"); err != nil {
		t.Fatal(err)
	}
	data, _ := os.ReadFile(png1)
	if _, err := png.Decode(bytes.NewReader(data)); err != nil {
		t.Errorf("chart.png: %v", err)
	}

	// Usage and data errors.
	var ue usageError
	if err := statsRun(t, "stats", "--bands", bandsPath, "--regions", regions, "--history", hist); !errors.As(err, &ue) {
		t.Errorf("--history without --date: %v, want a usage error", err)
	}
	other, _ := grid.NewSpec(9, 41, 18, 48, 0.5)
	wrong := filepath.Join(dir, "wrong.tif")
	geotiff.WriteIndex(wrong, grid.NewFloat32(other, grid.NoDataIndex), geotiff.DefaultOptions())
	if err := statsRun(t, "stats", "--bands", bandsPath, "--index", wrong, "--regions", regions, "--out", out); err == nil || !strings.Contains(err.Error(), "differs from the band raster's") {
		t.Errorf("index on another grid: %v", err)
	}
	b.Data[0] = 77
	odd := filepath.Join(dir, "odd.tif")
	geotiff.WriteBands(odd, b, bands.Default(), geotiff.DefaultOptions())
	if err := statsRun(t, "stats", "--bands", odd, "--regions", regions, "--out", out); err == nil || !strings.Contains(err.Error(), "holds code 77") {
		t.Errorf("unknown code: %v", err)
	}
}

// TestStatsOutRefused: stats needs --out, and refuses the output directory
// of a run (it holds a manifest.json listing regions.csv with its SHA-256),
// with exit code 2 and the file left as it was: stats never writes into
// "." by default nor over a published regions.csv.
func TestStatsOutRefused(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "layers")
	regionsForExample := filepath.Join(dir, "district.geojson")
	os.WriteFile(regionsForExample, []byte(`{"type":"FeatureCollection","features":[{"type":"Feature","properties":{"name":"coast"},
"geometry":{"type":"Polygon","coordinates":[[[-126,-42],[-123,-42],[-123,-39],[-126,-39],[-126,-42]]]}}]}`), 0o644)
	if code := run([]string{"grid", "--stations", exampleSPI, "--regions", regionsForExample, "--layers", "bands,regions", "--out", out}); code != exitOK {
		t.Fatalf("grid: exit %d", code)
	}
	before, err := os.ReadFile(filepath.Join(out, "regions.csv"))
	if err != nil {
		t.Fatal(err)
	}
	bandsTif := filepath.Join(out, "bands.tif")
	var code int
	msg := captureStderr(t, func() {
		code = run([]string{"stats", "--bands", bandsTif, "--regions", regionsForExample, "--out", out})
	})
	if code != exitUsage || !strings.Contains(msg, "holds "+filepath.Join(out, "manifest.json")) || !strings.Contains(msg, "write the statistics into another directory") {
		t.Errorf("stats into a run's output: exit %d, %s", code, msg)
	}
	if after, _ := os.ReadFile(filepath.Join(out, "regions.csv")); !bytes.Equal(after, before) {
		t.Error("regions.csv of the run changed")
	}
	msg = captureStderr(t, func() {
		code = run([]string{"stats", "--bands", bandsTif, "--regions", regionsForExample})
	})
	if code != exitUsage || !strings.Contains(msg, "stats needs --out DIR") {
		t.Errorf("stats without --out: exit %d, %s", code, msg)
	}
	if code := run([]string{"stats", "--bands", bandsTif, "--regions", regionsForExample, "--out", filepath.Join(dir, "stats")}); code != exitOK {
		t.Errorf("stats into another directory: exit %d", code)
	}
}
