package main

import (
	"bytes"
	"errors"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"drygrid/bands"
	"drygrid/history"
	"drygrid/internal/reftest"
	"drygrid/region"
)

// chartHistoryFile writes an invented daily history (regions north, south,
// east; 40 days from 2026-03-01; each region's covered area split between
// the parched, normal and soaked bands on invented ramps) with
// history.Encode, the bytes of a run's appends.
func chartHistoryFile(t *testing.T, dir string) string {
	t.Helper()
	t0 := time.Date(2026, 3, 1, 0, 0, 0, 0, time.UTC)
	var days []history.Day
	for d := 0; d < 40; d++ {
		day := history.Day{Date: t0.AddDate(0, 0, d).Format("2006-01-02")}
		for r, name := range []string{"north", "south", "east"} {
			z := region.ZonalStats{Key: name}
			z.AreaKm2, z.CoveredKm2 = 500, 400
			dry := 400 * float64((d+10*r)%40) / 40
			z.CodeKm2[1], z.CodeKm2[5], z.CodeKm2[9] = dry, (400-dry)/2, (400-dry)/2
			day.Stats = append(day.Stats, z)
		}
		days = append(days, day)
	}
	var buf bytes.Buffer
	if err := history.Encode(&buf, days, bands.Default()); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "history.csv")
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestChartCommand: drygrid chart draws the single-region view and the
// all-regions view, within a date range, as PNGs of 1200 x 720 pixels read
// back by Go's image/png and by GDAL's PNG driver (gdalinfo); the same
// command gives the same bytes twice. A range with no row is a data error
// (exit 1) naming the history's first and last dates; a malformed date or a
// reversed range is a usage error (exit 2); an unknown region is a data
// error naming the regions.
func TestChartCommand(t *testing.T) {
	dir := t.TempDir()
	hist := chartHistoryFile(t, dir)
	for _, c := range []struct {
		name string
		args []string
	}{
		{"region.png", []string{"--region", "south"}},
		{"region-range.png", []string{"--region", "south", "--from", "2026-03-10", "--to", "2026-03-20"}},
		{"all-from.png", []string{"--from", "2026-03-30", "--regions-limit", "2"}},
		{"all-to.png", []string{"--to", "2026-03-01"}},
	} {
		var prev []byte
		for i := 0; i < 2; i++ {
			out := filepath.Join(dir, strconv.Itoa(i)+c.name)
			if err := statsRun(t, append([]string{"chart", "--history", hist, "--out", out}, c.args...)...); err != nil {
				t.Fatalf("%s: %v", c.name, err)
			}
			data, err := os.ReadFile(out)
			if err != nil {
				t.Fatal(err)
			}
			img, err := png.Decode(bytes.NewReader(data))
			if err != nil {
				t.Fatalf("%s: %v", c.name, err)
			}
			if b := img.Bounds(); b.Dx() != 1200 || b.Dy() != 720 {
				t.Errorf("%s: %v, want 1200x720", c.name, b)
			}
			if i == 1 && !bytes.Equal(prev, data) {
				t.Errorf("%s: two runs differ", c.name)
			}
			prev = data
			if i == 0 {
				t.Run("gdalinfo "+c.name, func(t *testing.T) {
					gdalinfo := reftest.Tool(t, "gdalinfo")
					b, err := exec.Command(gdalinfo, out).CombinedOutput()
					if err != nil {
						t.Fatalf("gdalinfo: %v\n%s", err, b)
					}
					if info := string(b); !strings.Contains(info, "Driver: PNG/") || !strings.Contains(info, "Size is 1200, 720") {
						t.Errorf("gdalinfo says\n%s", info)
					}
				})
			}
		}
	}

	var ue usageError
	for _, c := range []struct {
		args  []string
		usage bool
		want  string
	}{
		{[]string{"--from", "2026-04-10", "--to", "2026-04-30"}, false, "chart: " + hist + " has no row dated from 2026-04-10 to 2026-04-30: its dates run from 2026-03-01 to 2026-04-09"},
		{[]string{"--region", "south", "--to", "2026-02-28"}, false, "chart: " + hist + " has no row dated on or before 2026-02-28: its dates run from 2026-03-01 to 2026-04-09"},
		{[]string{"--from", "2026-4-10"}, true, `--from "2026-4-10" is not a calendar date YYYY-MM-DD`},
		{[]string{"--from", "2026-03-20", "--to", "2026-03-10"}, true, "--from 2026-03-20 is after --to 2026-03-10"},
		{[]string{"--region", "west"}, false, hist + `: chart: no region "west" in the history (regions: north, south, east)`},
	} {
		out := filepath.Join(dir, "refused.png")
		err := statsRun(t, append([]string{"chart", "--history", hist, "--out", out}, c.args...)...)
		if err == nil || err.Error() != c.want || errors.As(err, &ue) != c.usage {
			t.Errorf("%v: %v (usage error %v), want %s (usage error %v)", c.args, err, errors.As(err, &ue), c.want, c.usage)
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%v: a refused chart was written", c.args)
			os.Remove(out)
		}
	}
	if code := run([]string{"chart", "--history", hist, "--out", filepath.Join(dir, "x.png"), "--from", "2027-01-01"}); code != exitData {
		t.Errorf("an empty range: exit %d, want %d", code, exitData)
	}
	if code := run([]string{"chart", "--history", hist, "--out", filepath.Join(dir, "x.png"), "--to", "tomorrow"}); code != exitUsage {
		t.Errorf("a malformed date: exit %d, want %d", code, exitUsage)
	}
}
