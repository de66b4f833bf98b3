package station

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

const idxTestStations = "station,lat,lon,name,elevation\nA,10,20,Invented A,100\nB,-5,350,Invented B,\n"

// Bad input: each case's exact message names the file, line and column
// (errors name the file, line and column).
func TestIndexBadInput(t *testing.T) {
	cases := []struct {
		name, stations, totals string
		opt                    IndexOptions
		want                   string
	}{
		{"negative total", idxTestStations, "station,year,total\nA,2001,1\nA,2002,-1.5\n", IndexOptions{},
			"totals.csv line 3 column 3 (total): total -1.5 is negative"},
		{"non-numeric total", idxTestStations, "station,year,total\nA,2001,abc\n", IndexOptions{},
			`totals.csv line 2 column 3 (total): total "abc" is not a number`},
		{"infinite total", idxTestStations, "station,year,precip\nA,2001,Inf\n", IndexOptions{},
			"totals.csv line 2 column 3 (precip): total Inf is not a finite number"},
		{"fractional year", idxTestStations, "station,year,total\nA,2001.5,3\n", IndexOptions{},
			`totals.csv line 2 column 2 (year): year "2001.5" is not an integer from 1000 to 3000`},
		{"year too early", idxTestStations, "station,year,total\nA,999,3\n", IndexOptions{},
			`totals.csv line 2 column 2 (year): year "999" is not an integer from 1000 to 3000`},
		{"year too late", idxTestStations, "id,year,value\nB,3001,3\n", IndexOptions{},
			`totals.csv line 2 column 2 (year): year "3001" is not an integer from 1000 to 3000`},
		{"empty year", idxTestStations, "station,year,total\nA,,3\n", IndexOptions{},
			`totals.csv line 2 column 2 (year): year "" is not an integer from 1000 to 3000`},
		{"duplicate station-year", idxTestStations, "station,year,total\nA,2001,1\nB,2001,2\nA,2002,3\nA,2001,NA\n", IndexOptions{},
			"totals.csv line 5 column 2 (year): station A year 2001 appears twice, on lines 2 and 5"},
		{"first duplicate in file order", idxTestStations, "station,year,total\nB,2001,1\nA,2001,1\nA,2001,1\nB,2001,2\n", IndexOptions{},
			"totals.csv line 4 column 2 (year): station A year 2001 appears twice, on lines 3 and 4"},
		{"missing station id", idxTestStations, "station,year,total\n,2001,1\n", IndexOptions{},
			"totals.csv line 2 column 1 (station): missing station id"},
		{"no total column", idxTestStations, "station,year,rain\nA,2001,1\n", IndexOptions{},
			"totals.csv line 1: no total column (looked for total|total_mm|precip|value); the header has: station, year, rain"},
		{"named total column missing", idxTestStations, "station,year,total\nA,2001,1\n", IndexOptions{TotalColumn: "rain"},
			`totals.csv line 1: no total column named "rain"; the header has: station, year, total`},
		{"no totals at all", idxTestStations, "station,year,total\nA,2001,NA\nZ,2001,4\n", IndexOptions{},
			"totals.csv: no total for any station of stations.csv"},
		{"latitude out of range", "station,lat,lon\nA,95,20\n", "station,year,total\n", IndexOptions{},
			"stations.csv line 2 column 2 (lat): latitude 95 outside [-90, 90]"},
		{"longitude out of range", "station,lat,lon\nA,5,360\n", "station,year,total\n", IndexOptions{},
			"stations.csv line 2 column 3 (lon): longitude 360 outside [-180, 360)"},
		{"longitude missing", "station,lat,lon\nA,5,NA\n", "station,year,total\n", IndexOptions{},
			"stations.csv line 2 column 3 (lon): missing longitude"},
		{"latitude text", "station,lat,lon\nA,north,5\n", "station,year,total\n", IndexOptions{},
			`stations.csv line 2 column 2 (lat): latitude "north" is not a number`},
		{"duplicate station", "site,lat,lng\nA,5,5\nB,6,6\nA,5,5\n", "station,year,total\n", IndexOptions{},
			"stations.csv line 4 column 1 (site): station A is listed twice, on lines 2 and 4"},
		{"empty station table", "station,lat,lon\n", "station,year,total\n", IndexOptions{},
			"stations.csv: no stations"},
		{"reference period reversed", idxTestStations, "station,year,total\nA,2001,1\n", IndexOptions{RefStart: 2000, RefEnd: 1990},
			"reference period starts (2000) after it ends (1990)"},
		{"unknown distribution", idxTestStations, "station,year,total\nA,2001,1\n", IndexOptions{Distribution: "weibull"},
			`distribution "weibull" is not gamma or empirical`},
		{"year out of range", idxTestStations, "station,year,total\nA,2001,1\n", IndexOptions{Year: 20},
			"year 20 is not from 1000 to 3000"},
	}
	for _, c := range cases {
		_, err := ComputeIndexReaders("stations.csv", strings.NewReader(c.stations), "totals.csv", strings.NewReader(c.totals), c.opt)
		if err == nil || err.Error() != c.want {
			t.Errorf("%s:\n got %v\nwant %s", c.name, err, c.want)
		}
	}
}

// Missing totals (empty, NA) are missing, never zero; unknown stations are
// skipped (even with bad cells) with a count and a warning; -0 is 0; a
// 0-360 longitude is normalised; --total-column picks the column (two
// total columns, total and precip, are ambiguous unless one is named).
func TestIndexTotalsParsing(t *testing.T) {
	totals := "station,year,total,precip\nA,2001,,5\nA,2002,NA,5\nA,2003,-0,5\nA,2004,2.5,5\nZ,2004,-7,x\nZ,1,1,1\nB,2004,1,\n"
	res, err := ComputeIndexReaders("stations.csv", strings.NewReader(idxTestStations), "totals.csv", strings.NewReader(totals), IndexOptions{MinYears: 1, TotalColumn: "total"})
	if err != nil {
		t.Fatal(err)
	}
	a, b := res.Rows[0], res.Rows[1]
	if res.Year != 2004 || a.Years != 2 || a.Zeros != 1 || a.Total != 2.5 || b.Lon != -10 {
		t.Errorf("rows %+v %+v", a, b)
	}
	if res.SkippedUnknown != 2 || len(res.Warnings) != 1 ||
		res.Warnings[0] != "totals.csv: skipped 2 rows of 1 station missing from stations.csv (first: Z (line 6))" {
		t.Errorf("skipped %d, warnings %q", res.SkippedUnknown, res.Warnings)
	}
	// --total-column precip: B's empty precip is missing, so the latest year
	// with a total is still 2004 (A), and B has no total.
	res, err = ComputeIndexReaders("stations.csv", strings.NewReader(idxTestStations), "totals.csv", strings.NewReader(totals), IndexOptions{MinYears: 1, TotalColumn: "PRECIP"})
	if err != nil {
		t.Fatal(err)
	}
	if a, b := res.Rows[0], res.Rows[1]; a.Years != 4 || a.Total != 5 || b.HasTotal || b.Note != "no total for 2004; only 0 reference years (needs 1)" {
		t.Errorf("total column precip: %+v %+v", a, b)
	}
}

// FuzzTotals: the totals parser never panics, and what it accepts keeps its
// invariants (years in range, totals non-negative or missing, one row per
// station-year, sorted); the computation on it never panics either.
func FuzzTotals(f *testing.F) {
	f.Add([]byte("station,year,total\nA,2001,1.5\nA,2002,0\nB,2001,NA\n"))
	f.Add([]byte("id\tyear\tvalue\nA\t1999\t3\nA\t1999\t4\n"))
	f.Add([]byte("station;year;precip\nA;2001;1,5\nB;2001;\n"))
	f.Add([]byte("station,year,total\nA,2001,-1\nZ,3001,x\n\"A\",\"2002\",\"7\"\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		tab, err := NewTable("totals.csv", bytes.NewReader(data))
		if err != nil {
			return
		}
		defer tab.Close()
		byID := map[string]int{"A": 0, "B": 1}
		tt, err := idxReadTotals(tab, byID, []string{"A", "B"}, "")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "totals.csv") {
				t.Fatalf("error without the file name: %v", err)
			}
			return
		}
		for _, s := range tt.series {
			for i, e := range s {
				if e.year < MinTotalYear || e.year > MaxTotalYear || e.total < 0 || math.IsInf(e.total, 0) {
					t.Fatalf("accepted %+v", e)
				}
				if i > 0 && e.year <= s[i-1].year {
					t.Fatalf("unsorted or duplicate %+v after %+v", e, s[i-1])
				}
			}
		}
		sites := []idxSite{{ID: "A"}, {ID: "B"}}
		for _, dist := range []string{DistGamma, DistEmpirical} {
			rows := idxComputeAll(sites, tt.series, max(tt.latest, MinTotalYear), IndexOptions{MinYears: 1, Distribution: dist})
			for _, r := range rows {
				if r.HasIndex && (math.IsNaN(r.SPI) || math.Abs(r.SPI) > SPILimit || r.Percentile < 0 || r.Percentile > 100) {
					t.Fatalf("bad row %+v", r)
				}
			}
		}
	})
}
