package history

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/layer/regions"
	"drygrid/region"
)

func histStats(key string, drought, covered float64) region.ZonalStats {
	z := region.ZonalStats{Key: key}
	z.AreaKm2, z.CoveredKm2 = 100, covered
	z.CodeKm2[1] = drought
	z.CodeKm2[5] = covered - drought
	return z
}

// TestAppendHistory: rows keyed by (date, region); re-running a date replaces
// its rows, dates stay in order, a header from another scheme is refused and
// leaves the file as it was.
func TestAppendHistory(t *testing.T) {
	path := filepath.Join(t.TempDir(), "history.csv")
	s := bands.Default()
	day := func(date string, a, b float64) {
		t.Helper()
		if err := Append(path, date, []region.ZonalStats{histStats("north", a, 80), histStats("south", b, 50)}, s); err != nil {
			t.Fatal(err)
		}
	}
	day("2026-05-02", 40, 10)
	day("2026-05-01", 20, 5)
	day("2026-05-02", 60, 25) // a re-run replaces the day's rows
	data, _ := os.ReadFile(path)
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	if len(lines) != 5 || lines[0] != "date,"+strings.Join(regions.Header(s), ",") {
		t.Fatalf("history:\n%s", data)
	}
	// in_drought_pct: 20/80 = 25 %, 5/50 = 10 %, 60/80 = 75 %, 25/50 = 50 %.
	for i, w := range []string{"2026-05-01,north,", "2026-05-01,south,", "2026-05-02,north,", "2026-05-02,south,"} {
		if !strings.HasPrefix(lines[i+1], w) {
			t.Errorf("line %d %q, want prefix %q", i+2, lines[i+1], w)
		}
	}
	h, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(h.Dates) != 2 || h.Regions[0] != "north" || h.InDroughtPct[0][0] != 25 || h.InDroughtPct[0][1] != 75 || h.InDroughtPct[1][1] != 50 {
		t.Errorf("read back %+v", h)
	}

	other := &bands.Scheme{Name: "two", Bands: []bands.Band{
		{Code: 1, Key: "dry", Min: math.Inf(-1), Max: 0, MaxInclusive: true, Color: "#000000", Drought: true},
		{Code: 2, Key: "wet", Min: 0, Max: math.Inf(1), Color: "#ffffff"},
	}}
	err = Append(path, "2026-05-03", []region.ZonalStats{histStats("north", 1, 2)}, other)
	if err == nil || !strings.Contains(err.Error(), "line 1: the header has 16 columns, this scheme's has 9") {
		t.Errorf("other scheme: %v", err)
	}
	again, _ := os.ReadFile(path)
	if string(again) != string(data) {
		t.Error("a refused append changed the file")
	}
	if err := Append(path, "2026-5-3", nil, s); err == nil || err.Error() != `history `+path+`: date "2026-5-3" is not a calendar date YYYY-MM-DD` {
		t.Errorf("bad date: %v", err)
	}
	bad := strings.Replace(string(data), "date,region", "day,region", 1)
	os.WriteFile(path, []byte(bad), 0o644)
	if err := Append(path, "2026-05-03", nil, s); err == nil || !strings.Contains(err.Error(), `line 1 column 1: header "day", want "date"`) {
		t.Errorf("renamed column: %v", err)
	}
}

func TestParseHistoryErrors(t *testing.T) {
	cases := []struct{ in, want string }{
		{"", "history h.csv: empty file (no header)"},
		{"date,region\n", `history h.csv line 1: no "in_drought_pct" column (header date,region)`},
		{"date,region,in_drought_pct\n", "history h.csv: no rows"},
		{"date,region,in_drought_pct\n2026-13-01,a,1\n", `history h.csv line 2 column 1: date "2026-13-01" is not YYYY-MM-DD`},
		{"date,region,in_drought_pct\n2026-01-01,a,101\n", `history h.csv line 2 column 3: in_drought_pct "101" is not a percentage`},
		{"date,region,in_drought_pct\n2026-01-01,,1\n", `history h.csv line 2 column 2: empty region`},
		{"date,region,in_drought_pct\n2026-01-01,a\n", `history h.csv: record on line 2: wrong number of fields`},
	}
	for _, c := range cases {
		_, err := Parse("h.csv", strings.NewReader(c.in))
		if err == nil || err.Error() != c.want {
			t.Errorf("%q: got %v, want %s", c.in, err, c.want)
		}
	}
}

func FuzzParseHistory(f *testing.F) {
	f.Add([]byte("date,region,in_drought_pct\n2026-01-01,a,1\n2026-01-02,a,\n2026-01-01,b,99.5\n"))
	f.Add([]byte("region,in_drought_pct,date\nx,5,2026-02-28\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		h, err := Parse("fuzz", strings.NewReader(string(data)))
		if err != nil {
			return
		}
		if len(h.InDroughtPct) != len(h.Regions) {
			t.Fatal("series and regions disagree")
		}
		for _, s := range h.InDroughtPct {
			if len(s) != len(h.Dates) {
				t.Fatal("series and dates disagree")
			}
		}
	})
}

// TestAppendConcurrent: appends of different dates to one history at the
// same time all end up in the file, and no lock file stays beside it
// (issue 17: two jobs with the same history file lost one date's rows).
func TestAppendConcurrent(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "history.csv")
	s := bands.Default()
	const days = 16
	errs := make(chan error, days)
	for d := range days {
		go func() {
			date := fmt.Sprintf("2026-05-%02d", d+1)
			errs <- Append(path, date, []region.ZonalStats{histStats("north", 20, 80), histStats("south", 5, 50)}, s)
		}()
	}
	for range days {
		if err := <-errs; err != nil {
			t.Fatal(err)
		}
	}
	h, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(h.Dates) != days {
		t.Errorf("%d dates in the history, want %d", len(h.Dates), days)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("files beside the history: %v", entries)
	}
}
