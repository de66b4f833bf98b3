package station

import (
	"bytes"
	"compress/gzip"
	"drygrid/spi"
	"fmt"
	"io"
	"math"
	"strings"
	"testing"
)

// Two columns for one role, by the same name (in any case) or by two of its
// aliases, are refused as ambiguous, naming both columns, for every role
// of every table: id, latitude, longitude, value, year and total.
func TestAmbiguousColumns(t *testing.T) {
	const shdr = "station,latitude,longitude\nST01,1,2\n"
	const thdr = "station,year,total_mm\nST01,1961,3\n"
	cases := []struct {
		name, kind, data string
		opt              ValueOptions
		want             string
	}{
		{"lat and latitude", "values", "station,lat,latitude,lon,spi\nA,1,1,2,0.5\n", ValueOptions{},
			"x.csv line 1: columns 2 (lat) and 3 (latitude) are both a latitude column, which is ambiguous; rename or remove one of them"},
		{"station and id", "values", "id,lat,lon,spi,station\nA,1,2,0.5,B\n", ValueOptions{},
			"x.csv line 1: columns 1 (id) and 5 (station) are both a station id column, which is ambiguous; rename or remove one of them"},
		{"lon and lng", "values", "id,lat,lng,spi,lon\nA,1,2,0.5,2\n", ValueOptions{},
			"x.csv line 1: columns 3 (lng) and 5 (lon) are both a longitude column, which is ambiguous; rename or remove one of them"},
		{"spi twice, other case", "values", "station,lat,lon,spi,SPI\nA,1,2,0.5,-1.5\n", ValueOptions{},
			"x.csv line 1: columns 4 (spi) and 5 (SPI) are both a spi value column, which is ambiguous; rename or remove one of them"},
		{"percentile and pct", "values", "station,lat,lon,pct,percentile\nA,1,2,5,50\n", ValueOptions{Kind: KindPercentile},
			"x.csv line 1: columns 4 (pct) and 5 (percentile) are both a percentile value column, which is ambiguous; rename or remove one of them"},
		{"named value column twice", "values", "station,lat,lon,spi3,spi3\nA,1,2,0.5,1\n", ValueOptions{ValueColumn: "spi3"},
			"x.csv line 1: columns 4 (spi3) and 5 (spi3) are both a spi value column, which is ambiguous; rename or remove one of them"},
		{"named id column twice", "values", "code,lat,lon,spi,Code\nA,1,2,0.5,B\n", ValueOptions{IDColumn: "code"},
			"x.csv line 1: columns 1 (code) and 5 (Code) are both a station id column, which is ambiguous; rename or remove one of them"},
		{"year twice", "totals", "station,year,total_mm,Year\nST01,1961,3,1962\n", ValueOptions{},
			"x.csv line 1: columns 2 (year) and 4 (Year) are both a year column, which is ambiguous; rename or remove one of them"},
		{"total and precip", "totals", "station,year,total,precip\nST01,1961,3,4\n", ValueOptions{},
			"x.csv line 1: columns 3 (total) and 4 (precip) are both a total column, which is ambiguous; rename or remove one of them"},
		{"totals station and site", "totals", "site,year,total_mm,station\nST01,1961,3,ST01\n", ValueOptions{},
			"x.csv line 1: columns 1 (site) and 4 (station) are both a station id column, which is ambiguous; rename or remove one of them"},
		{"station list lat and latitude", "stations", "station,lat,longitude,latitude\nST01,1,2,1\n", ValueOptions{},
			"x.csv line 1: columns 2 (lat) and 4 (latitude) are both a latitude column, which is ambiguous; rename or remove one of them"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var err error
			switch c.kind {
			case "values":
				_, err = ParseValues("x.csv", strings.NewReader(c.data), c.opt)
			case "totals":
				_, err = ComputeIndexReaders("s.csv", strings.NewReader(shdr), "x.csv", strings.NewReader(c.data), IndexOptions{MinYears: 1})
			case "stations":
				_, err = ComputeIndexReaders("x.csv", strings.NewReader(c.data), "t.csv", strings.NewReader(thdr), IndexOptions{MinYears: 1})
			}
			if err == nil || err.Error() != c.want {
				t.Fatalf("error\n got %v\nwant %s", err, c.want)
			}
		})
	}
	// A column named by the caller is not ambiguous with an alias of its
	// role, and other columns may repeat.
	v, err := ParseValues("x.csv", strings.NewReader("code,station,lat,lon,spi,note,note\nK1,zz,1,2,0.5,a,b\n"), ValueOptions{IDColumn: "code"})
	if err != nil || len(v.Stations) != 1 || v.Stations[0].ID != "K1" {
		t.Fatalf("named id column: %v", err)
	}
}

// A percentile column whose values all lie in [0, 1] (not all 0) holds
// fractions: refused with the line of the largest and the hint, for a
// percentile kind given or inferred; one value above 1 (or all zero, which
// is the same as a fraction or a percent) is read as percents.
func TestFractionPercentiles(t *testing.T) {
	const h = "station,lat,lon,percentile\n"
	const want = "x.csv line 3 column 4 (percentile): every percentile lies in [0, 1] (the largest, 0.92, is on this line): these look like fractions; percentiles are 0-100; multiply by 100"
	for _, opt := range []ValueOptions{{Kind: KindPercentile}, {}} {
		_, err := ParseValues("x.csv", strings.NewReader(h+"A,1,2,0.0231\nB,3,4,0.92\nC,5,6,NA\nD,7,8,0\n"), opt)
		if err == nil || err.Error() != want {
			t.Errorf("kind %q: error\n got %v\nwant %s", opt.Kind, err, want)
		}
	}
	_, err := ParseValues("x.csv", strings.NewReader(h+"A,1,2,1\n"), ValueOptions{Kind: KindPercentile})
	if err == nil || !strings.Contains(err.Error(), "x.csv line 2 column 4 (percentile): every percentile lies in [0, 1] (the largest, 1, is on this line)") {
		t.Errorf("a lone 1: %v", err)
	}
	v, err := ParseValues("x.csv", strings.NewReader(h+"A,1,2,0.0231\nB,3,4,0.92\nC,5,6,2.5\n"), ValueOptions{Kind: KindPercentile})
	if err != nil || len(v.Stations) != 3 || v.Stations[0].Value != 0.0231 || v.Stations[2].Value != 2.5 {
		t.Fatalf("with a value above 1: %v", err)
	}
	v, err = ParseValues("x.csv", strings.NewReader(h+"A,1,2,0\nB,3,4,0\n"), ValueOptions{Kind: KindPercentile})
	// Percentile 0 is clamped to 0.1 %: Phi^-1(0.001) = -3.090232 (A&S
	// 1964 table 26.5).
	if err != nil || len(v.Stations) != 2 || v.Stations[0].Z > -3.09023 || v.Stations[0].Z < -3.09024 {
		t.Fatalf("all zero: %v %+v", err, v)
	}
	// An spi column of small values is not a percentile column.
	if _, err := ParseValues("x.csv", strings.NewReader("station,lat,lon,spi\nA,1,2,0.5\n"), ValueOptions{}); err != nil {
		t.Fatal(err)
	}
}

// Totals beyond the plausibility bound MaxTotal (100,000 mm) are refused
// with their file, line and column, in either number path; the bound itself
// is accepted, and totals near it give finite statistics.
func TestAbsurdTotals(t *testing.T) {
	const st = "station,latitude,longitude\nA,1,2\n"
	for _, c := range []struct{ cell, want string }{
		{"1e308", "t.csv line 3 column 3 (total): total 1e308 is above 100000 mm, more than any window total on record; check the unit and the column"},
		{"100000.01", "t.csv line 3 column 3 (total): total 100000.01 is above 100000 mm"},
		{"999999999999999", "t.csv line 3 column 3 (total): total 999999999999999 is above 100000 mm"},
		{"1.5E+5", "t.csv line 3 column 3 (total): total 1.5E+5 is above 100000 mm"},
	} {
		_, err := ComputeIndexReaders("s.csv", strings.NewReader(st), "t.csv", strings.NewReader("station,year,total\nA,2001,5\nA,2002,"+c.cell+"\n"), IndexOptions{MinYears: 1})
		if err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s: error\n got %v\nwant %s", c.cell, err, c.want)
		}
	}
	var b strings.Builder
	b.WriteString("station,year,total\n")
	for y := 1971; y <= 2020; y++ {
		fmt.Fprintf(&b, "A,%d,%d\n", y, 1+(y%7)*(y%7)*(y%7))
	}
	b.WriteString("A,2021,100000\n")
	res, err := ComputeIndexReaders("s.csv", strings.NewReader(st), "t.csv", strings.NewReader(b.String()), IndexOptions{})
	if err != nil {
		t.Fatal(err)
	}
	r := res.Rows[0]
	// The median of the 51 totals is 28 (1 + 3^3, the 26th smallest).
	if !r.Fitted || math.IsInf(r.Scale, 0) || math.IsNaN(r.Scale) || r.PctOfMedian != 100*100000.0/28 || r.Total != 100000 {
		t.Errorf("at the bound: %+v", r)
	}
}

// A target year that no station has a total for is refused, naming the
// year and the latest year with a total, instead of a table of empty rows.
func TestIndexYearWithoutTotals(t *testing.T) {
	const st = "station,latitude,longitude\nA,1,2\nB,3,4\n"
	const tt = "station,year,total\nA,2001,5\nA,2002,6\nB,2003,\nB,2002,4\n"
	for _, y := range []int{2030, 2000, 2003} {
		_, err := ComputeIndexReaders("s.csv", strings.NewReader(st), "t.csv", strings.NewReader(tt), IndexOptions{Year: y, MinYears: 1})
		want := fmt.Sprintf("t.csv: no station of s.csv has a total for %d; the latest year with a total is 2002", y)
		if err == nil || err.Error() != want {
			t.Errorf("year %d: error\n got %v\nwant %s", y, err, want)
		}
	}
	res, err := ComputeIndexReaders("s.csv", strings.NewReader(st), "t.csv", strings.NewReader(tt), IndexOptions{Year: 2001, MinYears: 1})
	if err != nil || res.Year != 2001 || !res.Rows[0].HasTotal || res.Rows[1].HasTotal {
		t.Fatalf("year 2001: %v", err)
	}
}

// The poor-fit rules on the fixture's bimodal station ST07, whose gamma
// fit Anderson-Darling rejects (TestIndexSciPy checks that against
// SciPy): empirical (the default) gives it the SPI of the empirical
// distribution, keep the gamma SPI, drop none (its percentile stays);
// each other station is untouched, and the summary counts the stations
// the rule changed.
func TestPoorFitRules(t *testing.T) {
	run := func(opt IndexOptions) *IndexResult {
		t.Helper()
		res, err := ComputeIndex(idxFixStations, idxFixTotals, opt)
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	keep, emp, drop, def := run(IndexOptions{PoorFit: PoorFitKeep}), run(IndexOptions{Distribution: DistEmpirical}),
		run(IndexOptions{PoorFit: PoorFitDrop}), run(IndexOptions{})
	const st07 = 6
	if keep.Rows[st07].Station != "ST07" || keep.Rows[st07].FitOK || !keep.Rows[st07].FitTested {
		t.Fatalf("ST07: %+v", keep.Rows[st07])
	}
	for i := range keep.Rows {
		k, e, d, f := keep.Rows[i], emp.Rows[i], drop.Rows[i], def.Rows[i]
		if i != st07 {
			if !sameFloat(f.SPI, k.SPI) || !sameFloat(d.SPI, k.SPI) || f.PoorFit || d.PoorFit || k.Note != f.Note {
				t.Errorf("%s changed: keep %v, default %v, drop %v", k.Station, k.SPI, f.SPI, d.SPI)
			}
			continue
		}
		if k.PoorFit || !k.HasIndex || k.SPI != spi.SPI(k.Total, k.Shape, k.Scale, float64(k.Zeros)/float64(k.Years)) {
			t.Errorf("keep: %+v", k)
		}
		if !f.PoorFit || !f.HasIndex || f.SPI != e.SPI || f.SPI == k.SPI {
			t.Errorf("empirical: SPI %v, empirical run %v, gamma %v", f.SPI, e.SPI, k.SPI)
		}
		if !d.PoorFit || d.HasIndex || !math.IsNaN(d.SPI) || d.Percentile != k.Percentile ||
			!strings.HasSuffix(d.Note, "; no spi (poor fit: drop)") {
			t.Errorf("drop: %+v", d)
		}
	}
	for _, c := range []struct {
		res             *IndexResult
		rule            string
		poor, withIndex int
	}{{keep, PoorFitKeep, 0, 5}, {def, PoorFitEmpirical, 1, 5}, {drop, PoorFitDrop, 1, 4}} {
		s := c.res.Summary()
		if s.PoorFitRule != c.rule || s.PoorFit != c.poor || s.WithIndex != c.withIndex || s.NoIndexOther != 1 || s.FitRejected != 1 {
			t.Errorf("%s: summary %+v", c.rule, s)
		}
	}
	if err := (IndexOptions{PoorFit: "maybe"}).Validate(); err == nil || err.Error() != `poor-fit "maybe" is not empirical, keep or drop` {
		t.Errorf("Validate: %v", err)
	}
}

func sameFloat(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) }

// FuzzTableGzip: arbitrary bytes, gzip-compressed once or twice, or with a
// damaged byte, never panic; an accepted table's rows have the header's
// width, and every error names the file.
func FuzzTableGzip(f *testing.F) {
	f.Add([]byte("station,lat,lon\nA,1,2\n"), uint8(1), uint16(0))
	f.Add([]byte("a\tb\n1\t\"2\n"), uint8(2), uint16(0))
	f.Add([]byte("x,y\n"+strings.Repeat("1,2\n", 300)), uint8(1), uint16(40))
	f.Fuzz(func(t *testing.T, data []byte, times uint8, flip uint16) {
		for range times % 3 {
			var b bytes.Buffer
			w := gzip.NewWriter(&b)
			w.Write(data)
			w.Close()
			data = b.Bytes()
		}
		if flip > 0 && len(data) > 0 {
			data = append([]byte{}, data...)
			data[int(flip)%len(data)] ^= 0x5a
		}
		tb, err := NewTable("fz.csv", bytes.NewReader(data))
		for err == nil {
			var rec []string
			rec, _, err = tb.Next()
			if err == nil && len(rec) != len(tb.Header) {
				t.Fatalf("record of %d fields, header of %d", len(rec), len(tb.Header))
			}
		}
		if err != io.EOF && !strings.Contains(err.Error(), "fz.csv") {
			t.Fatalf("error without the file: %v", err)
		}
	})
}

// FuzzValuesColumns: any header and rows read as a percentile table never
// panic; what is accepted has one column per role (no two columns of the
// header match the value column's aliases) and is not a column of
// fractions.
func FuzzValuesColumns(f *testing.F) {
	f.Add("station,lat,lon,percentile", "A,1,2,0.5\nB,3,4,50\n")
	f.Add("id,latitude,lat,lon,pct", "A,1,1,2,0.02\n")
	f.Add("site,lat,lng,PCT,percent", "A,1,2,3,4\n")
	f.Fuzz(func(t *testing.T, header, rows string) {
		v, err := ParseValues("fz.csv", strings.NewReader(header+"\n"+rows), ValueOptions{Kind: KindPercentile})
		if err != nil {
			if !strings.Contains(err.Error(), "fz.csv") {
				t.Fatalf("error without the file: %v", err)
			}
			return
		}
		tb, _ := NewTable("fz.csv", strings.NewReader(header+"\n"))
		n := 0
		for _, h := range tb.Header {
			for _, a := range PercentileAliases {
				if strings.EqualFold(h, a) {
					n++
				}
			}
		}
		if n != 1 {
			t.Fatalf("accepted with %d percentile columns: %q", n, tb.Header)
		}
		// (Sites of several ids hold means, which may be fractions of
		// percents that were not.)
		most, merged := 0.0, false
		for _, s := range v.Stations {
			most, merged = max(most, s.Value), merged || len(s.Merged) > 0
		}
		if !merged && most > 0 && most <= 1 {
			t.Fatalf("fractions accepted: largest %v", most)
		}
	})
}
