package station

import (
	"bytes"
	"compress/gzip"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// dailyRows builds a daily table of one station with value v on every day
// from..to except the dates in skip.
func dailyRows(id, from, to, v string, skip ...string) string {
	var b strings.Builder
	a, _ := ParseDate(from)
	z, _ := ParseDate(to)
	sk := map[string]bool{}
	for _, s := range skip {
		sk[s] = true
	}
	for d := a; d <= z; d++ {
		if !sk[d.String()] {
			fmt.Fprintf(&b, "%s,%s,%s\n", id, d, v)
		}
	}
	return b.String()
}

func readDailyString(t *testing.T, data string, opt DailyOptions) *WindowTotals {
	t.Helper()
	r, err := ReadDailyReader("daily.csv", strings.NewReader(data), opt)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// The window rules on a case counted by hand on a calendar: a 29 February
// target, windows of 30 and 60 days, and the 90 % rule at its boundary
// (27 of 30 days is enough, 26 is not).
func TestDailyWindowsByHand(t *testing.T) {
	// Station A: 1 mm every day from 2022-12-01 to 2024-03-31 except three
	// days of the 2024 window (31 Jan..29 Feb) and four of the 2023 one
	// (30 Jan..28 Feb 2023).
	data := "station,date,prcp\n" +
		dailyRows("A", "2022-12-01", "2024-03-31", "1.0",
			"2024-01-31", "2024-02-10", "2024-02-29",
			"2023-01-30", "2023-02-01", "2023-02-14", "2023-02-28")
	r := readDailyString(t, data, DailyOptions{Target: "2024-02-29", Windows: []int{30, 60}})
	s := r.Station("A")
	if s == nil || s.FirstYear != 2022 || s.LastYear != 2024 || len(r.Stations) != 1 {
		t.Fatalf("stations %+v", r.Stations)
	}
	check := func(year, w int, total float64, reported int, reason string) {
		t.Helper()
		got := r.Total(s, year, w)
		if got.Reported != reported || got.Reason() != reason || (reason == "" && got.Total != total) {
			t.Errorf("%d %dd: total %v, %d days, reason %q; want %v, %d, %q", year, r.Windows[w], got.Total, got.Reported, got.Reason(), total, reported, reason)
		}
	}
	// 2024, 30 days: 31 Jan to 29 Feb, three days missing: 27 of 30.
	check(2024, 0, 27, 27, "")
	// 2024, 60 days: 1 Jan to 29 Feb, the same three missing.
	check(2024, 1, 57, 57, "")
	// 2023, 30 days: 30 Jan to 28 Feb 2023, four missing: 26 of 30.
	check(2023, 0, 0, 26, "26 of 30 days reported, 27 needed (90 %)")
	// 2023, 60 days: 30 Dec 2022 to 28 Feb 2023, four missing: 56 of 60 (54 needed).
	check(2023, 1, 56, 56, "")
	// 2022 (first record year), 30 days: 30 Jan to 28 Feb 2022, no rows.
	check(2022, 0, 0, 0, "0 of 30 days reported, 27 needed (90 %)")
	if r.Need[0] != 27 || r.Need[1] != 54 {
		t.Errorf("need %v, want [27 54]", r.Need)
	}
}

// Rows on the last day of a window and the day after it, a year-crossing
// window (target 10 January, 30 days: 12 December to 10 January), and
// units: tenths of mm and inches (1 in = 25.4 mm exactly, NIST SP 811).
func TestDailyWindowEdgesAndUnits(t *testing.T) {
	data := "id,day,value\n" +
		dailyRows("B", "2021-12-12", "2022-01-11", "254") // 2022-01-11 is after the target: warned
	r := readDailyString(t, data, DailyOptions{Target: "2022-01-10", Windows: []int{30, 31}, Units: UnitTenthMM})
	s := r.Station("B")
	if got := r.Total(s, 2022, 0); got.Total != 30*25.4 || got.Reported != 30 {
		t.Errorf("30 days crossing the year: %+v", got)
	}
	if got := r.Total(s, 2022, 1); got.Reported != 30 || got.Missing() {
		t.Errorf("31 days (11 Dec on): %+v", got)
	}
	if s.FirstYear != 2021 || r.AfterTarget != 1 || len(r.Warnings) != 1 ||
		r.Warnings[0] != "daily daily.csv: ignored 1 row dated after the target date 2022-01-10 (the first on line 32)" {
		t.Errorf("first year %d, after %d, warnings %q", s.FirstYear, r.AfterTarget, r.Warnings)
	}
	// 2021's window (12 Dec 2020 to 10 Jan 2021) has no rows at all.
	if got := r.Total(s, 2021, 0); !got.Missing() || got.Reported != 0 {
		t.Errorf("2021: %+v", got)
	}
	r = readDailyString(t, "station;date;rain\nC;2020-03-01;0,5\nC;2020-03-02;1\n",
		DailyOptions{Target: "2020-03-02", Windows: []int{2}, Units: UnitInch})
	if got := r.Total(r.Station("C"), 2020, 0); got.Total != 1.5*25.4 {
		t.Errorf("inches with a decimal comma: %+v", got)
	}
}

// Missing is not zero: empty, NA and excluded-flag rows count as missing
// days; a kept flag counts; a flagged negative sentinel is not an error.
func TestDailyMissingAndFlags(t *testing.T) {
	data := "station,date,precip,qflag\n" +
		"D,2024-05-01,1,\nD,2024-05-02,,\nD,2024-05-03,NA,\nD,2024-05-04,2,K\nD,2024-05-05,-9999,X\nD,2024-05-06,7,X\n"
	r := readDailyString(t, data, DailyOptions{Target: "2024-05-06", Windows: []int{6}, MinShare: 0.3, ExcludeFlags: []string{"X", " Z "}})
	got := r.Total(r.Station("D"), 2024, 0)
	if got.Total != 3 || got.Reported != 2 || got.Need != 2 {
		t.Errorf("%+v", got)
	}
	var b bytes.Buffer
	if err := WriteWindowTotalsCSV(&b, r); err != nil {
		t.Fatal(err)
	}
	if want := "station,year,total_6d,days_6d\nD,2024,3,2\n"; b.String() != want {
		t.Errorf("written %q, want %q", b.String(), want)
	}
}

// The same data grouped, shuffled, by date, in blocks, as TSV and
// gzip-compressed gives byte-identical totals tables (sums are exact
// integers of 1e-6 mm, so the order of the rows cannot change them).
func TestDailyOrderIndependent(t *testing.T) {
	base := dailyGen{seed: 9, stations: 15, from: mustDay(t, "2015-01-01"), to: mustDay(t, "2020-12-31"), delim: ',', order: "grouped"}
	opt := DailyOptions{Target: "2020-02-29", Windows: []int{30, 90, 366}, ExcludeFlags: []string{"X"}}
	var want []byte
	for _, order := range []string{"grouped", "shuffled", "bydate", "blocks", "tab", "gzip"} {
		g := base
		g.order = order
		if order == "tab" {
			g.delim = '\t'
		}
		data := dailyGenCSV(g)
		if order == "gzip" {
			var z bytes.Buffer
			zw := gzip.NewWriter(&z)
			zw.Write(data)
			zw.Close()
			data = z.Bytes()
		}
		r, err := ReadDailyReader(order, bytes.NewReader(data), opt)
		if err != nil {
			t.Fatalf("%s: %v", order, err)
		}
		var b bytes.Buffer
		if err := WriteWindowTotalsCSV(&b, r); err != nil {
			t.Fatal(err)
		}
		if want == nil {
			want = b.Bytes()
			if bytes.Count(want, []byte("\n")) < 50 {
				t.Fatalf("only %d lines", bytes.Count(want, []byte("\n")))
			}
		} else if !bytes.Equal(b.Bytes(), want) {
			t.Errorf("%s: the totals differ from the grouped input's", order)
		}
	}
}

// One window's totals in the station,year,total form are read unchanged by
// the index step (ComputeIndexReaders, the code of `drygrid index`): the
// same rows, the same totals, missing totals as missing.
func TestDailyIndexTotalsForm(t *testing.T) {
	g := dailyGen{seed: 21, stations: 6, from: mustDay(t, "1985-01-01"), to: mustDay(t, "2024-06-30"), delim: ',', order: "grouped"}
	r, err := ReadDailyReader("daily.csv", bytes.NewReader(dailyGenCSV(g)), DailyOptions{Target: "2024-06-30", Windows: []int{30, 90}})
	if err != nil {
		t.Fatal(err)
	}
	var tot bytes.Buffer
	if err := WriteIndexTotalsCSV(&tot, r, 90); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(tot.String(), "station,year,total\n") {
		t.Fatalf("header: %q", tot.String()[:40])
	}
	var st strings.Builder
	st.WriteString("station,latitude,longitude\n")
	for i, s := range r.Stations {
		fmt.Fprintf(&st, "%q,%d,%d\n", s.ID, 10+i, 20+i)
	}
	res, err := ComputeIndexReaders("stations.csv", strings.NewReader(st.String()), "totals.csv", &tot, IndexOptions{Year: 2024, MinYears: 5})
	if err != nil {
		t.Fatal(err)
	}
	rows := 0
	for _, s := range r.Stations {
		rows += s.Years()
	}
	if res.TotalsRows != rows || len(res.Rows) != len(r.Stations) {
		t.Fatalf("index read %d rows of %d stations; written %d of %d", res.TotalsRows, len(res.Rows), rows, len(r.Stations))
	}
	withIndex := 0
	for i, row := range res.Rows {
		s := &r.Stations[i]
		want := r.Total(s, 2024, 1)
		if row.Station != s.ID || row.HasTotal == want.Missing() || (row.HasTotal && row.Total != want.Total) {
			t.Errorf("%s: index total %v (has %v), ours %+v", row.Station, row.Total, row.HasTotal, want)
		}
		present := 0
		for y := s.FirstYear; y <= s.LastYear; y++ {
			if !r.Total(s, y, 1).Missing() {
				present++
			}
		}
		if row.Years != present {
			t.Errorf("%s: index counted %d reference years, we have %d totals", row.Station, row.Years, present)
		}
		if row.HasIndex {
			withIndex++
		} else {
			t.Logf("%s: %s", row.Station, row.Note)
		}
	}
	if withIndex == 0 {
		t.Error("no station got an index")
	}
	if err := WriteIndexTotalsCSV(&tot, r, 45); err == nil || err.Error() != "no window of 45 days (the windows are [30 90])" {
		t.Errorf("unknown window: %v", err)
	}
}

// Bad input: each case's exact message names the file, line and column
// (the project's rule for errors).
func TestDailyBadInput(t *testing.T) {
	opt := DailyOptions{Target: "2023-12-31", Windows: []int{30}}
	long := "station,date,prcp\nA,2023-01-01,1\n" + strings.Repeat("x", 100<<10) + "\nA,2023-01-02,1\n"
	cases := []struct {
		name, data string
		opt        DailyOptions
		want       string
	}{
		{"impossible date", "station,date,prcp\nA,2023-02-30,1\n", opt,
			"daily daily.csv line 2 column 2 (date): date 2023-02-30 does not exist (2023-02 has 28 days)"},
		{"29 February of a century", "station,date,prcp\nA,1900-02-29,1\n", opt,
			"daily daily.csv line 2 column 2 (date): date 1900-02-29 does not exist (1900-02 has 28 days)"},
		{"month 13", "station,date,prcp\nA,2023-13-01,1\n", opt,
			"daily daily.csv line 2 column 2 (date): date 2023-13-01 has no month 13"},
		{"not ISO", "station,date,prcp\nA,2023-01-01,1\nA,05/01/2023,1\n", opt,
			`daily daily.csv line 3 column 2 (date): date "05/01/2023" is not a date of the form YYYY-MM-DD`},
		{"missing date", "station,date,prcp\nA,,1\n", opt,
			"daily daily.csv line 2 column 2 (date): missing date"},
		{"year before 1000", "station,date,prcp\nA,0999-12-31,1\n", opt,
			"daily daily.csv line 2 column 2 (date): date 0999-12-31 is before the year 1000"},
		{"negative", "station,date,prcp\nA,2023-01-01,0\nA,2023-01-02,-1.5\n", opt,
			"daily daily.csv line 3 column 3 (prcp): precipitation -1.5 is negative"},
		{"NaN", "station,date,prcp\nA,2023-01-01,NaN\n", opt,
			"daily daily.csv line 2 column 3 (prcp): precipitation NaN is not a finite number"},
		{"Inf", "station\tdate\tprcp\nA\t2023-01-01\t+Inf\n", opt,
			"daily daily.csv line 2 column 3 (prcp): precipitation +Inf is not a finite number"},
		{"text value", "station,date,prcp\nA,2023-01-01,trace\n", opt,
			`daily daily.csv line 2 column 3 (prcp): precipitation "trace" is not a number`},
		{"implausible", "station,date,prcp\nA,2023-01-01,20000\n", opt,
			"daily daily.csv line 2 column 3 (prcp): precipitation 20000 (20000 mm) is more than 10000 mm in a day; check the units"},
		{"twice, different values", "station,date,prcp\nA,2023-01-01,1\nA,2023-01-02,0\nA,2023-01-01,2\n", opt,
			"daily daily.csv line 4 column 2 (date): station A has a second row for 2023-01-01 (a station-day may be given once)"},
		{"twice, same value", "station,date,prcp\nA,2023-01-01,1\nA,2023-01-01,1\n", opt,
			"daily daily.csv line 3 column 2 (date): station A has a second row for 2023-01-01 (a station-day may be given once)"},
		{"twice, in another run of rows", "station,date,prcp\nA,2023-01-01,1\nB,2023-01-01,1\nA,2023-01-01,\n", opt,
			"daily daily.csv line 4 column 2 (date): station A has a second row for 2023-01-01 (a station-day may be given once)"},
		{"too few fields", "station,date,prcp\nA,2023-01-01\n", opt,
			"daily daily.csv line 2: 2 fields, but the header (line 1) has 3"},
		{"too many fields", "station,date,prcp\nA,2023-01-01,1,2,3,4\n", opt,
			"daily daily.csv line 2: 6 fields, but the header (line 1) has 3"},
		{"missing id", "station,date,prcp\n,2023-01-01,1\n", opt,
			"daily daily.csv line 2 column 1 (station): missing station id"},
		{"id not UTF-8", "station,date,prcp\nA\xff,2023-01-01,1\n", opt,
			"daily daily.csv line 2 column 1 (station): station id is not valid UTF-8 text"},
		{"quote", "station,date,prcp\n\"A,2023-01-01,1\n", opt,
			"daily daily.csv line 2 (byte 16 of the line): extraneous or missing \" in quoted-field"},
		{"long line", long, opt,
			"daily daily.csv line 3: the line is longer than 65536 bytes, the limit (is this a daily table?)"},
		{"no date column", "station,when,prcp\nA,2023-01-01,1\n", opt,
			"daily daily.csv line 1: no date column (looked for date|day|time); the header has: station, when, prcp"},
		{"no flag column", "station,date,prcp\nA,2023-01-01,1\n", DailyOptions{Target: "2023-12-31", Windows: []int{30}, ExcludeFlags: []string{"X"}},
			"daily daily.csv line 1: flags to exclude are given, but there is no flag column (looked for flag|qflag|quality|qc); the header has: station, date, prcp"},
		{"one column for two", "station,date,prcp\nA,2023-01-01,1\n", DailyOptions{Target: "2023-12-31", Windows: []int{30}, ValueColumn: "date"},
			"daily daily.csv line 1: column 2 (date) is taken both for the date and the precipitation"},
		{"empty", "", opt, "daily daily.csv: empty table, no header row"},
		{"header only", "\n\nstation,date,prcp\n\n", opt, "daily daily.csv: no data rows"},
		{"all after the target", "station,date,prcp\nA,2024-01-01,1\n", opt,
			"daily daily.csv: no rows dated on or before the target date 2023-12-31"},
		{"UTF-16", "\xff\xfes\x00t\x00\n\x00", opt, "daily daily.csv line 1: the file is UTF-16; save it as UTF-8"},
		{"no target", "", DailyOptions{Windows: []int{30}}, "daily: no target date"},
		{"bad target", "", DailyOptions{Target: "2023-02-29", Windows: []int{30}},
			"daily: target date: 2023-02-29 does not exist (2023-02 has 28 days)"},
		{"target year", "", DailyOptions{Target: "3001-01-01", Windows: []int{30}},
			"daily: target date 3001-01-01 is not in the years 1000 to 3000"},
		{"window 0", "", DailyOptions{Target: "2023-12-31", Windows: []int{30, 0}}, "daily: window of 0 days is not from 1 to 366"},
		{"window 367", "", DailyOptions{Target: "2023-12-31", Windows: []int{367}}, "daily: window of 367 days is not from 1 to 366"},
		{"window twice", "", DailyOptions{Target: "2023-12-31", Windows: []int{30, 30}}, "daily: window of 30 days given twice"},
		{"no windows", "", DailyOptions{Target: "2023-12-31"}, "daily: no windows"},
		{"share", "", DailyOptions{Target: "2023-12-31", Windows: []int{30}, MinShare: 1.5},
			"daily: minimum share of reported days 1.5 is not in (0, 1]"},
		{"units", "", DailyOptions{Target: "2023-12-31", Windows: []int{30}, Units: "cm"},
			`daily: units "cm" are not mm, tenths-mm or inch`},
	}
	for _, c := range cases {
		_, err := ReadDailyReader("daily.csv", strings.NewReader(c.data), c.opt)
		if err == nil || err.Error() != c.want {
			t.Errorf("%s:\n got %v\nwant %s", c.name, err, c.want)
		}
	}
}

// A 10 MB line without a newline, a corrupt gzip stream and a file of
// binary junk end in an error naming the line, without echoing it.
func TestDailyJunk(t *testing.T) {
	opt := DailyOptions{Target: "2023-12-31", Windows: []int{30}}
	dir := t.TempDir()
	path := filepath.Join(dir, "big.csv")
	if err := os.WriteFile(path, append([]byte("station,date,prcp\n"), bytes.Repeat([]byte("7"), 10<<20)...), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := ReadDaily(path, opt)
	if err == nil || err.Error() != "daily "+path+" line 2: the line is longer than 65536 bytes, the limit (is this a daily table?)" {
		t.Errorf("10 MB line: %v", err)
	}
	var z bytes.Buffer
	zw := gzip.NewWriter(&z)
	zw.Write([]byte("station,date,prcp\n" + dailyRows("A", "2023-01-01", "2023-12-31", "1.5")))
	zw.Close()
	cut := z.Bytes()[:z.Len()/2]
	_, err = ReadDailyReader("daily.csv.gz", bytes.NewReader(cut), opt)
	if err == nil || !strings.HasPrefix(err.Error(), "daily daily.csv.gz line ") || !strings.Contains(err.Error(), "truncated or corrupt compressed data: unexpected EOF") {
		t.Errorf("truncated gzip: %v", err)
	}
	junk := make([]byte, 1<<20)
	x := uint32(1)
	for i := range junk {
		x = x*1664525 + 1013904223
		junk[i] = byte(x >> 24)
	}
	_, err = ReadDailyReader("junk.bin", bytes.NewReader(junk), opt)
	if err == nil || !strings.HasPrefix(err.Error(), "daily junk.bin line ") || len(err.Error()) > 300 {
		t.Errorf("junk: %v", err)
	}
}

// Window bounds by hand: 29 February targets end on 28 February in common
// years (1900 and 2100 are common, 2000 is leap: Gregorian rule), and a
// window of 366 days ending 1 January starts on 1 January of a common year.
func TestDailyCalendarByHand(t *testing.T) {
	cases := []struct {
		target     string
		year, n    int
		start, end string
	}{
		{"2024-02-29", 1900, 30, "1900-01-30", "1900-02-28"},
		{"2024-02-29", 2000, 30, "2000-01-31", "2000-02-29"},
		{"2024-02-29", 2100, 1, "2100-02-28", "2100-02-28"},
		{"2023-01-01", 2024, 366, "2023-01-01", "2024-01-01"},
		{"2023-01-01", 2025, 366, "2024-01-02", "2025-01-01"},
		{"2023-03-01", 2024, 2, "2024-02-29", "2024-03-01"},
		{"2023-03-01", 2023, 2, "2023-02-28", "2023-03-01"},
	}
	for _, c := range cases {
		tg := mustDay(t, c.target)
		if s, e := WindowStart(tg, c.year, c.n), WindowEnd(tg, c.year); s.String() != c.start || e.String() != c.end {
			t.Errorf("%s %d %dd: %s to %s, want %s to %s", c.target, c.year, c.n, s, e, c.start, c.end)
		}
	}
	if d := mustDay(t, "1970-01-01"); d != 0 {
		t.Errorf("epoch is day %d", d)
	}
	if d := mustDay(t, "2000-03-01"); d != 11017 { // date -d 2000-03-01 +%s / 86400
		t.Errorf("2000-03-01 is day %d, want 11017", d)
	}
	if NeededDays(30, 0.9) != 27 || NeededDays(365, 0.9) != 329 || NeededDays(1, 0.01) != 1 || NeededDays(366, 1) != 366 {
		t.Error("NeededDays")
	}
	if got := (WindowTotal{Length: 30, Reported: 26, Need: 27, Share: 0.9, Total: math.NaN()}).Reason(); got != "26 of 30 days reported, 27 needed (90 %)" {
		t.Errorf("reason %q", got)
	}
	if got := (WindowTotal{Length: 3, Reported: 0, Need: 1, Share: 0.333, Total: math.NaN()}).Reason(); got != "0 of 3 days reported, 1 needed (33.3 %)" {
		t.Errorf("reason %q", got)
	}
	if got := (WindowTotal{Length: 3, Reported: 1, Need: 1, Share: 0.333, Total: 0}).Reason(); got != "" {
		t.Errorf("reason of a total %q", got)
	}
}
