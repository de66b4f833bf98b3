package history

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

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
		{"date,region,dry_pct,in_drought_pct\n2026-01-01,a,-1,1\n", `history h.csv line 2 column 3: dry_pct "-1" is not a percentage`},
		{"date,region,dry_pct,in_drought_pct\n2026-01-01,a,x,1\n", `history h.csv line 2 column 3: dry_pct "x" is not a percentage`},
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
	f.Add([]byte("date,region,covered_pct,dry_pct,wet_pct,in_drought_pct\n2026-01-01,a,90,40,60,40\n2026-01-03,a,0,,,\n"))
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
		if len(h.Bands) > 0 && len(h.BandPct) != len(h.Regions) {
			t.Fatal("band shares and regions disagree")
		}
		for _, s := range h.BandPct {
			if len(s) != len(h.Dates) {
				t.Fatal("band shares and dates disagree")
			}
			for _, v := range s {
				if len(v) != len(h.Bands) {
					t.Fatal("band shares and bands disagree")
				}
			}
		}
		if len(h.Dates) > 0 {
			if b := h.Between(h.Dates[0], h.Dates[len(h.Dates)-1]); len(b.Dates) != len(h.Dates) {
				t.Fatal("the whole range lost dates")
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

// TestReadBandShares: the <key>_pct columns are read back as the band
// shares Append wrote (each band's area over the covered area, the
// definition of regions.csv in docs/design.md), in the scheme's order;
// a day without a region's row is missing, not zero.
func TestReadBandShares(t *testing.T) {
	path := filepath.Join(t.TempDir(), "history.csv")
	s := bands.Default()
	// north covers 80 km2: 20 in band 1 (parched), 60 in band 5 (normal).
	if err := Append(path, "2026-05-01", []region.ZonalStats{histStats("north", 20, 80), histStats("south", 5, 50)}, s); err != nil {
		t.Fatal(err)
	}
	if err := Append(path, "2026-05-03", []region.ZonalStats{histStats("north", 40, 80)}, s); err != nil {
		t.Fatal(err)
	}
	h, err := Read(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(h.Bands) != len(s.Bands) {
		t.Fatalf("bands %v", h.Bands)
	}
	for i, b := range s.Bands {
		if h.Bands[i] != b.Key {
			t.Errorf("band %d %q, want %q", i, h.Bands[i], b.Key)
		}
	}
	want := func(r, d int, parched, normal float64) {
		t.Helper()
		for b, v := range h.BandPct[r][d] {
			w := 0.0
			switch b {
			case 0:
				w = parched
			case 4:
				w = normal
			}
			if math.Abs(v-w) > 0.0005 { // 3 decimals in the file
				t.Errorf("region %d date %d band %s: %v, want %v", r, d, h.Bands[b], v, w)
			}
		}
	}
	want(0, 0, 25, 75)                  // 20/80, 60/80
	want(1, 0, 10, 90)                  // 5/50, 45/50
	want(0, 1, 50, 50)                  // 40/80
	for _, v := range h.BandPct[1][1] { // south has no row on 2026-05-03
		if !math.IsNaN(v) {
			t.Errorf("south on 2026-05-03: %v, want missing", h.BandPct[1][1])
			break
		}
	}
}

// TestBetween: a range keeps the dates inside it, both ends included; an
// open end is a zero time; a range with no date gives no dates.
func TestBetween(t *testing.T) {
	h, err := Parse("h.csv", strings.NewReader("date,region,dry_pct,wet_pct,in_drought_pct\n"+
		"2026-01-01,a,10,90,10\n2026-01-02,a,20,80,20\n2026-01-04,a,40,60,40\n2026-01-04,b,1,99,1\n"))
	if err != nil {
		t.Fatal(err)
	}
	day := func(s string) time.Time {
		d, _ := time.Parse("2006-01-02", s)
		return d
	}
	for _, c := range []struct {
		from, to string
		want     []float64 // region a's in_drought_pct
	}{
		{"2026-01-02", "2026-01-04", []float64{20, 40}},
		{"2026-01-02", "2026-01-02", []float64{20}},
		{"", "2026-01-01", []float64{10}},
		{"2026-01-03", "", []float64{40}},
		{"2026-01-03", "2026-01-03", nil},
		{"2025-01-01", "2025-12-31", nil},
	} {
		var from, to time.Time
		if c.from != "" {
			from = day(c.from)
		}
		if c.to != "" {
			to = day(c.to)
		}
		b := h.Between(from, to)
		if len(b.Dates) != len(c.want) || len(b.Regions) != 2 || len(b.BandPct) != 2 {
			t.Errorf("%s..%s: %d dates %v", c.from, c.to, len(b.Dates), b.Regions)
			continue
		}
		for d, w := range c.want {
			if b.InDroughtPct[0][d] != w || b.BandPct[0][d][0] != w || b.BandPct[0][d][1] != 100-w {
				t.Errorf("%s..%s date %d: %v %v, want %v", c.from, c.to, d, b.InDroughtPct[0][d], b.BandPct[0][d], w)
			}
		}
	}
	if h.FirstDate() != "2026-01-01" || h.LastDate() != "2026-01-04" {
		t.Errorf("first %s last %s", h.FirstDate(), h.LastDate())
	}
}
