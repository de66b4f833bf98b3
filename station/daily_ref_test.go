package station

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/reftest"
)

// dailyRefScript is the pure-Python reference of the daily totals.
const dailyRefScript = "../testdata/daily_ref.py"

// dailyGen describes invented daily data: stations with made-up ids, each
// with a span of days, gaps, zeros, empty and NA values and flags.
type dailyGen struct {
	seed     uint64
	stations int
	from, to Day    // each station's span lies within, at least 2 years long
	delim    byte   // ',' or '\t'
	order    string // "grouped" (by station, by date), "shuffled", "blocks" (stations split in two runs), "bydate"
	units    string
	after    int // rows dated after `to` (ignored when `to` is the target)
}

// dailyGenCSV writes the data as a daily table (station,date,prcp,qflag).
func dailyGenCSV(g dailyGen) []byte {
	rng := rand.New(rand.NewPCG(g.seed, 7))
	type row struct {
		id, date, v, flag string
		st, day           int
	}
	var rows []row
	span := int(g.to - g.from)
	for s := range g.stations {
		id := fmt.Sprintf("Q%03d", s)
		if s%7 == 3 {
			id = fmt.Sprintf("inv-%d x", s) // a space inside an id
		}
		a := g.from + Day(rng.IntN(span/2))
		b := g.to - Day(rng.IntN(span/3))
		if s%2 == 0 {
			b = g.to // half the stations report to the end
		}
		gapFrom, gapTo := Day(-1), Day(-1)
		if rng.IntN(2) == 0 { // a long gap (a month to a season)
			gapFrom = a + Day(rng.IntN(int(b-a)))
			gapTo = gapFrom + Day(20+rng.IntN(80))
		}
		for d := a; d <= b; d++ {
			if (d >= gapFrom && d <= gapTo) || rng.IntN(100) < 3 {
				continue
			}
			var v string
			switch r := rng.IntN(100); {
			case r < 70:
				v = "0"
			case r < 71:
				v = ""
			case r < 72:
				v = "NA"
			default:
				x := rng.ExpFloat64() * 6
				switch g.units {
				case UnitInch:
					v = strconv.FormatFloat(math.Round(x/25.4*100)/100, 'f', 2, 64)
				case UnitTenthMM:
					v = strconv.Itoa(int(x * 10))
				default:
					v = strconv.FormatFloat(math.Round(x*10)/10, 'f', 1, 64)
				}
			}
			flag := ""
			switch r := rng.IntN(100); {
			case r < 2:
				flag = "X" // excluded
			case r < 3:
				flag = "Y" // excluded
			case r < 6:
				flag = "K" // kept
			}
			rows = append(rows, row{id: id, date: d.String(), v: v, flag: flag, st: s, day: int(d)})
		}
	}
	for i := range g.after {
		d := g.to + 1 + Day(rng.IntN(400))
		rows = append(rows, row{id: fmt.Sprintf("Q%03d", i%g.stations), date: d.String(), v: "1.5", st: i % g.stations, day: int(d)})
	}
	// Rows after the target are unique per station-day only by chance:
	// drop repeats (they are ignored anyway, but keep the table clean).
	seen := map[string]bool{}
	kept := rows[:0]
	for _, r := range rows {
		if k := r.id + r.date; !seen[k] {
			seen[k] = true
			kept = append(kept, r)
		}
	}
	rows = kept
	switch g.order {
	case "shuffled":
		rng.Shuffle(len(rows), func(i, j int) { rows[i], rows[j] = rows[j], rows[i] })
	case "bydate":
		sort.SliceStable(rows, func(i, j int) bool {
			if rows[i].day != rows[j].day {
				return rows[i].day < rows[j].day
			}
			return rows[i].st < rows[j].st
		})
	case "blocks":
		// Each station's rows in two runs: its second half after everybody's first half.
		var first, second []row
		start := 0
		for i := 1; i <= len(rows); i++ {
			if i == len(rows) || rows[i].st != rows[start].st {
				mid := start + (i-start)/2
				second = append(second, rows[start:mid]...) // the earlier half comes last
				first = append(first, rows[mid:i]...)
				start = i
			}
		}
		rows = append(first, second...)
	}
	var b bytes.Buffer
	d := string(g.delim)
	b.WriteString("station" + d + "date" + d + "prcp" + d + "qflag\n")
	for _, r := range rows {
		b.WriteString(r.id + d + r.date + d + r.v + d + r.flag + "\n")
	}
	return b.Bytes()
}

// dailyRefEntry is one line of daily_ref.py's answer.
type dailyRefEntry struct {
	ID           string
	Year, N, Rep int
	Sum          int64
	Need         int
	Total        *float64
}

func (e *dailyRefEntry) UnmarshalJSON(b []byte) error {
	var raw []json.RawMessage
	if err := json.Unmarshal(b, &raw); err != nil {
		return err
	}
	if len(raw) != 7 {
		return fmt.Errorf("entry %s: %d fields", b, len(raw))
	}
	for i, p := range []any{&e.ID, &e.Year, &e.N, &e.Rep, &e.Sum, &e.Need, &e.Total} {
		if err := json.Unmarshal(raw[i], p); err != nil {
			return err
		}
	}
	return nil
}

func mustDay(t testing.TB, s string) Day {
	t.Helper()
	d, err := ParseDate(s)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// Every total, day count and missing decision against the independent
// pure-Python reference (testdata/daily_ref.py: datetime.date calendar
// walk, csv module), on invented data with gaps, empty/NA values, excluded
// and kept flags, rows after the target, leap years (29 February targets,
// 2000 leap, 1900 and 2100 not), windows crossing into the year before,
// windows of 1 and 366 days, three units, comma and tab, and rows grouped,
// shuffled, by date, or in two runs per station.
func TestDailyTotalsPython(t *testing.T) {
	py := reftest.Python(t)
	dir := t.TempDir()
	for ci, c := range dailyRefCases(t) {
		name := fmt.Sprintf("case%d-%s-%s", ci+1, c.target, c.gen.order)
		path := filepath.Join(dir, name+".csv")
		if err := os.WriteFile(path, dailyGenCSV(c.gen), 0o644); err != nil {
			t.Fatal(err)
		}
		res, err := ReadDaily(path, c.options())
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		n, missing := dailyCheckRef(t, name, res, dailyRunRef(t, py, path, c))
		if c.gen.after > 0 && (res.AfterTarget == 0 || len(res.Warnings) != 1) {
			t.Errorf("%s: %d rows after the target, warnings %q", name, res.AfterTarget, res.Warnings)
		}
		t.Logf("%s: %d rows, %d stations, %d totals (%d missing) equal to Python's", name, res.Rows, len(res.Stations), n, missing)
	}
}

// dailyRefCase is one run of the reference comparison.
type dailyRefCase struct {
	gen     dailyGen
	target  string
	windows []int
	share   float64
	flags   []string
}

func (c dailyRefCase) options() DailyOptions {
	return DailyOptions{Target: c.target, Windows: c.windows, MinShare: c.share, Units: c.gen.units, ExcludeFlags: c.flags}
}

// dailyRefCases: gaps, empty/NA values, excluded and kept flags, rows
// after the target, leap years (29 February targets, 2000 leap, 1900 and
// 2100 not), windows crossing into the year before, windows of 1 and 366
// days, three units, comma and tab, and rows grouped, shuffled, by date,
// or in two runs per station.
func dailyRefCases(t *testing.T) []dailyRefCase {
	return []dailyRefCase{
		{dailyGen{seed: 1, stations: 12, from: mustDay(t, "2017-06-01"), to: mustDay(t, "2024-02-29"), delim: ',', order: "grouped", after: 40},
			"2024-02-29", []int{30, 90, 180, 365, 366}, 0, []string{"X", "Y"}},
		{dailyGen{seed: 2, stations: 10, from: mustDay(t, "1897-01-01"), to: mustDay(t, "1903-12-31"), delim: ',', order: "shuffled", units: UnitTenthMM},
			"1904-02-29", []int{1, 59, 60, 366}, 0.75, []string{"X"}},
		{dailyGen{seed: 3, stations: 10, from: mustDay(t, "1996-01-01"), to: mustDay(t, "2000-12-31"), delim: '\t', order: "blocks"},
			"2000-02-29", []int{29, 60, 365}, 0.8, nil},
		{dailyGen{seed: 4, stations: 10, from: mustDay(t, "2096-03-01"), to: mustDay(t, "2102-06-30"), delim: ',', order: "bydate", units: UnitInch},
			"2101-03-01", []int{31, 365, 366}, 1, []string{"Y", "K"}},
		{dailyGen{seed: 5, stations: 14, from: mustDay(t, "2016-01-01"), to: mustDay(t, "2023-03-31"), delim: ',', order: "shuffled", after: 0},
			"2023-01-15", []int{7, 30, 90, 366}, 0.5, []string{"X", "Y"}},
		{dailyGen{seed: 6, stations: 8, from: mustDay(t, "2019-11-01"), to: mustDay(t, "2023-12-31"), delim: ',', order: "grouped"},
			"2023-12-31", []int{1, 2, 365}, 0.9, nil},
	}
}

// dailyRunRef runs testdata/daily_ref.py on the daily table at path.
func dailyRunRef(t *testing.T, py, path string, c dailyRefCase) []dailyRefEntry {
	t.Helper()
	share := c.share
	if share == 0 {
		share = DefaultMinShare
	}
	units := c.gen.units
	if units == "" {
		units = UnitMM
	}
	delim := ","
	if c.gen.delim == '\t' {
		delim = "tab"
	}
	wins := make([]string, len(c.windows))
	for i, n := range c.windows {
		wins[i] = strconv.Itoa(n)
	}
	out := reftest.RunPython(t, py, dailyRefScript, nil, "totals", path, delim, c.target, strings.Join(wins, ","),
		strconv.FormatFloat(share, 'g', -1, 64), units, strings.Join(c.flags, "|"))
	var ref []dailyRefEntry
	if err := json.Unmarshal(out, &ref); err != nil {
		t.Fatalf("%s: decoding the reference: %v", path, err)
	}
	return ref
}

// dailyCheckRef compares every entry of res with the reference's: the same
// stations, years and windows in the same order, the same day counts,
// exact sums and totals, the same missing decisions. It returns the number
// of entries and of missing totals, and fails when the data did not give
// both outcomes.
func dailyCheckRef(t *testing.T, name string, res *WindowTotals, ref []dailyRefEntry) (n, missing int) {
	t.Helper()
	present := 0
	for si := range res.Stations {
		s := &res.Stations[si]
		for y := s.FirstYear; y <= s.LastYear; y++ {
			for w := range res.Windows {
				if n >= len(ref) {
					t.Fatalf("%s: more entries than the reference (%d)", name, len(ref))
				}
				e := ref[n]
				n++
				got := res.Total(s, y, w)
				i := (y-s.FirstYear)*len(res.Windows) + w
				if s.ID != e.ID || y != e.Year || res.Windows[w] != e.N {
					t.Fatalf("%s: entry %d is %s %d %dd, the reference's %s %d %dd", name, n, s.ID, y, res.Windows[w], e.ID, e.Year, e.N)
				}
				if got.Reported != e.Rep || got.Need != e.Need || s.Sum[i] != e.Sum {
					t.Errorf("%s: %s %d %dd: %d days (need %d), sum %d; Python %d days (need %d), sum %d",
						name, s.ID, y, e.N, got.Reported, got.Need, s.Sum[i], e.Rep, e.Need, e.Sum)
				}
				switch {
				case e.Total == nil && !got.Missing():
					t.Errorf("%s: %s %d %dd: total %v, Python missing", name, s.ID, y, e.N, got.Total)
				case e.Total != nil && (got.Missing() || got.Total != *e.Total):
					t.Errorf("%s: %s %d %dd: total %v (%s), Python %v", name, s.ID, y, e.N, got.Total, got.Reason(), *e.Total)
				}
				if got.Missing() {
					missing++
				} else {
					present++
				}
			}
		}
	}
	if n != len(ref) {
		t.Fatalf("%s: %d entries, the reference %d", name, n, len(ref))
	}
	if missing == 0 || present == 0 {
		t.Errorf("%s: %d present and %d missing totals; the test data should give both", name, present, missing)
	}
	return n, missing
}

// Window bounds and date parsing against Python's datetime (the calendar
// walk of testdata/daily_ref.py): window start and end for many targets
// (every 29 February of 1896-2104 among them), lengths 1 to 366 and years
// across the 1900, 2000 and 2100 century rules; day numbers of valid
// dates and the rejection of impossible ones.
func TestDailyCalendarPython(t *testing.T) {
	py := reftest.Python(t)
	rng := rand.New(rand.NewPCG(11, 12))
	type req struct {
		Windows [][3]any `json:"windows"`
		Dates   []string `json:"dates"`
	}
	var r req
	type win struct {
		target Day
		n, y   int
	}
	var wins []win
	targets := []string{"2000-02-29", "2024-02-29", "1900-03-01", "2100-02-28", "2023-01-01", "2023-12-31", "1904-02-29", "2096-02-29"}
	for _, ts := range targets {
		for _, n := range []int{1, 2, 28, 29, 59, 60, 61, 365, 366} {
			for _, y := range []int{1899, 1900, 1901, 1904, 1999, 2000, 2001, 2023, 2024, 2099, 2100, 2101} {
				wins = append(wins, win{mustDay(t, ts), n, y})
			}
		}
	}
	for range 3000 {
		d := civilDay(1000, 1, 1) + Day(rng.IntN(2000*366))
		wins = append(wins, win{d, 1 + rng.IntN(366), 1000 + rng.IntN(2000)})
	}
	for _, w := range wins {
		r.Windows = append(r.Windows, [3]any{w.target.String(), w.n, w.y})
	}
	for range 3000 {
		y, m, d := 1+rng.IntN(9999), 1+rng.IntN(12), 1+rng.IntN(31)
		r.Dates = append(r.Dates, fmt.Sprintf("%04d-%02d-%02d", y, m, d))
	}
	for _, y := range []int{1600, 1700, 1800, 1900, 2000, 2100, 2400, 2023, 2024, 1} {
		for _, md := range []string{"02-28", "02-29", "02-30", "04-31", "12-31", "13-01", "00-10", "01-00"} {
			r.Dates = append(r.Dates, fmt.Sprintf("%04d-%s", y, md))
		}
	}
	r.Dates = append(r.Dates, "2023-1-01", "20230101", "2023-01-01T00", "+023-01-01", "2023/01/01", "", "abcd-ef-gh", "0000-01-01", "9999-12-31")
	in, err := json.Marshal(r)
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Windows [][2]string `json:"windows"`
		Dates   []*int      `json:"dates"`
	}
	if err := json.Unmarshal(reftest.RunPython(t, py, dailyRefScript, in, "calendar"), &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Windows) != len(wins) || len(ref.Dates) != len(r.Dates) {
		t.Fatalf("reference answered %d windows and %d dates for %d and %d", len(ref.Windows), len(ref.Dates), len(wins), len(r.Dates))
	}
	for i, w := range wins {
		s, e := WindowStart(w.target, w.y, w.n), WindowEnd(w.target, w.y)
		if s.String() != ref.Windows[i][0] || e.String() != ref.Windows[i][1] {
			t.Errorf("target %s, %d days, year %d: %s to %s; Python %s to %s", w.target, w.n, w.y, s, e, ref.Windows[i][0], ref.Windows[i][1])
		}
		if int(e-s)+1 != w.n {
			t.Errorf("target %s, %d days, year %d: %d days long", w.target, w.n, w.y, int(e-s)+1)
		}
	}
	valid := 0
	for i, s := range r.Dates {
		d, err := ParseDate(s)
		want := ref.Dates[i]
		switch {
		case want == nil && err == nil:
			t.Errorf("%q: parsed as %s, Python rejects it", s, d)
		case want != nil && err != nil:
			t.Errorf("%q: %v; Python day %d", s, err, *want)
		case want != nil && int(d) != *want:
			t.Errorf("%q: day %d, Python %d", s, d, *want)
		case want != nil:
			valid++
			if d.String() != s {
				t.Errorf("%q: formats back as %s", s, d)
			}
		}
	}
	if valid < 1000 {
		t.Errorf("only %d valid dates checked", valid)
	}
}
