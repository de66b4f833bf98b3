package main

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/scenario"
	"drygrid/station"
)

// writeDaily writes a small invented daily table: stations A and B, every
// day of 2019-01-01 to 2021-03-05 but A's 2020-12-25 (a gap), B's rainfall
// 1 mm a day and A's 2 mm, A's 2021-01-10 flagged X.
func writeDaily(t *testing.T, dir string) string {
	t.Helper()
	var b strings.Builder
	b.WriteString("station,date,precip,flag\n")
	for _, s := range []string{"A", "B"} {
		first, _ := station.DayOf(2019, 1, 1)
		last, _ := station.DayOf(2021, 3, 5)
		for d := first; d <= last; d++ {
			date := d.String()
			if s == "A" && date == "2020-12-25" {
				continue
			}
			v, flag := "1", ""
			if s == "A" {
				v = "2"
				if date == "2021-01-10" {
					flag = "X"
				}
			}
			fmt.Fprintf(&b, "%s,%s,%s,%s\n", s, date, v, flag)
		}
	}
	path := filepath.Join(dir, "daily.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// `drygrid totals` end to end: windows that cross New Year belong to the
// year they end in, a gap and a flagged day are missing (not zero), rows
// after the date are ignored and counted, and usage errors exit 2 without
// writing. Expected sums by hand: B reports every day at 1 mm, so its
// N-day total is N; A at 2 mm a day misses 2020-12-25 and (flagged)
// 2021-01-10, both inside its 2021 windows ending 2021-02-28 of 90 days
// and more (from 2020-12-01) but not its 30-day one (from 2021-01-30).
func TestTotalsCommand(t *testing.T) {
	dir := t.TempDir()
	daily := writeDaily(t, dir)
	out := filepath.Join(dir, "totals.csv")
	var stderr bytes.Buffer
	root := newRootCmd()
	root.SetErr(&stderr)
	root.SetArgs([]string{"totals", "--daily", daily, "--date", "2021-02-28", "--windows", "30,90",
		"--exclude-flags", "X", "--out", out})
	if _, err := root.ExecuteC(); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	want := "station,year,total_30d,total_90d,days_30d,days_90d\n" +
		"A,2019,60,,30,59\n" + // 2019's 90 days start in 2018: 59 days reported, too few
		"A,2020,60,180,30,90\n" +
		"A,2021,60,176,30,88\n" +
		"B,2019,30,,30,59\n" +
		"B,2020,30,90,30,90\n" +
		"B,2021,30,90,30,90\n"
	if string(b) != want {
		t.Errorf("totals:\n%s\nwant:\n%s", b, want)
	}
	for _, w := range []string{"2 stations", "30 days: 6 totals, 0 missing", "90 days: 4 totals, 2 missing",
		"10 rows dated after 2021-02-28 ignored", "wrote " + out} {
		if !strings.Contains(stderr.String(), w) {
			t.Errorf("summary lacks %q:\n%s", w, stderr.String())
		}
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 2 {
		t.Errorf("files left: %v", ents)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"totals", "--out", out}, "--daily FILE is required"},
		{[]string{"totals", "--daily", daily, "--out", out, "--windows", "30,30"}, "named twice"},
		{[]string{"totals", "--daily", daily, "--out", out, "--date", "tomorrow"}, `--date "tomorrow" is not a calendar date`},
		{[]string{"totals", "--daily", daily, "--out", out, "--units", "cm"}, `--units "cm"`},
		{[]string{"totals", "--daily", daily, "--out", out, "--min-share", "1.5"}, "--min-share 1.5"},
	} {
		root := newRootCmd()
		root.SetErr(&bytes.Buffer{})
		root.SetArgs(c.args)
		_, err := root.ExecuteC()
		var ue usageError
		if err == nil || !errors.As(asUsage(err), &ue) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v: %v, want usage error %q", c.args, err, c.want)
		}
	}
	after, _ := os.ReadFile(out)
	if !bytes.Equal(after, b) {
		t.Error("a failed run changed the output")
	}
}

// `drygrid index --daily` gives the same index table as `drygrid totals`
// followed by `drygrid index --totals` on the totals it wrote (the two
// paths share no code past the daily reader's totals).
func TestIndexDaily(t *testing.T) {
	dir := t.TempDir()
	sc := scenario.DemoScenario()
	daily := filepath.Join(dir, "daily.csv.gz")
	stations := filepath.Join(dir, "stations.csv")
	var d, s bytes.Buffer
	sc.WriteDailyCSVGz(&d)
	sc.WriteStationsCSV(&s)
	os.WriteFile(daily, d.Bytes(), 0o644)
	os.WriteFile(stations, s.Bytes(), 0o644)
	common := []string{"--date", scenario.DailyTarget, "--exclude-flags", scenario.DailyBadFlag}
	totals := filepath.Join(dir, "totals.csv")
	viaTotals := filepath.Join(dir, "via-totals.csv")
	viaDaily := filepath.Join(dir, "via-daily.csv")
	for _, args := range [][]string{
		append([]string{"totals", "--daily", daily, "--windows", "30", "--out", totals}, common...),
		{"index", "--totals", totals, "--total-column", "total_30d", "--stations", stations, "--year", "2025", "--out", viaTotals},
		append([]string{"index", "--daily", daily, "--window", "30", "--stations", stations, "--out", viaDaily}, common...),
	} {
		root := newRootCmd()
		root.SetErr(&bytes.Buffer{})
		root.SetArgs(args)
		if _, err := root.ExecuteC(); err != nil {
			t.Fatalf("%v: %v", args, err)
		}
	}
	a, _ := os.ReadFile(viaTotals)
	b, _ := os.ReadFile(viaDaily)
	if len(a) == 0 || !bytes.Equal(a, b) {
		t.Errorf("index tables differ (%d and %d bytes)", len(a), len(b))
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"index", "--daily", daily, "--stations", stations, "--out", viaDaily}, "--daily needs --window N"},
		{[]string{"index", "--daily", daily, "--totals", totals, "--window", "30", "--stations", stations, "--out", viaDaily}, "one or the other"},
		{[]string{"index", "--daily", daily, "--window", "400", "--stations", stations, "--out", viaDaily}, "--window 400"},
	} {
		root := newRootCmd()
		root.SetErr(&bytes.Buffer{})
		root.SetArgs(c.args)
		_, err := root.ExecuteC()
		var ue usageError
		if err == nil || !errors.As(err, &ue) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v: %v, want usage error %q", c.args, err, c.want)
		}
	}
}
