package station

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/reftest"

	"github.com/parquet-go/parquet-go"
)

// Parquet rows in three layouts: a DATE column and double values; text
// dates and text values; a TIMESTAMP (ms) column with integer values (for
// tenths of mm) and an integer-free string id.
type pqRowDate struct {
	Station string   `parquet:"station"`
	Date    int32    `parquet:"date,date"`
	Prcp    *float64 `parquet:"prcp,optional"`
	QFlag   string   `parquet:"qflag"`
}

type pqRowText struct {
	Site  string  `parquet:"site"`
	Day   string  `parquet:"day"`
	Value *string `parquet:"value,optional"`
	Flag  string  `parquet:"flag"`
}

type pqRowStamp struct {
	ID    string `parquet:"id"`
	Time  int64  `parquet:"time,timestamp(millisecond)"`
	Rain  *int32 `parquet:"rain,optional"`
	QC    string `parquet:"qc"`
	Extra int64  `parquet:"extra"`
}

// dailyCSVToParquet converts a daily table of dailyGenCSV to Parquet in
// the layout, with row groups of 1,000 rows (so that batches, pages and
// row groups all end at different rows).
func dailyCSVToParquet(t *testing.T, data []byte, delim, layout string) []byte {
	t.Helper()
	var b bytes.Buffer
	lines := strings.Split(strings.TrimSuffix(string(data), "\n"), "\n")[1:]
	write := func(each func(i int, f []string)) {
		for i, l := range lines {
			each(i, strings.Split(l, delim))
		}
	}
	value := func(s string) *string {
		if s == "" || s == "NA" {
			return nil
		}
		return &s
	}
	day := func(s string) Day { return mustDay(t, s) }
	switch layout {
	case "date":
		w := parquet.NewGenericWriter[pqRowDate](&b, parquet.PageBufferSize(2048))
		write(func(i int, f []string) {
			r := pqRowDate{Station: f[0], Date: int32(day(f[1])), QFlag: f[3]}
			if v := value(f[2]); v != nil {
				x, err := strconv.ParseFloat(*v, 64)
				if err != nil {
					t.Fatal(err)
				}
				r.Prcp = &x
			}
			w.Write([]pqRowDate{r})
			if i%1000 == 999 {
				w.Flush()
			}
		})
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
	case "text":
		w := parquet.NewGenericWriter[pqRowText](&b)
		write(func(i int, f []string) {
			w.Write([]pqRowText{{Site: f[0], Day: f[1], Value: value(f[2]), Flag: f[3]}})
			if i%1000 == 999 {
				w.Flush()
			}
		})
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
	case "stamp":
		w := parquet.NewGenericWriter[pqRowStamp](&b, parquet.PageBufferSize(1024))
		write(func(i int, f []string) {
			r := pqRowStamp{ID: f[0], Time: int64(day(f[1]))*86400e3 + 43200e3, QC: f[3], Extra: int64(i)}
			if v := value(f[2]); v != nil {
				x, err := strconv.Atoi(*v)
				if err != nil {
					t.Fatal(err)
				}
				x32 := int32(x)
				r.Rain = &x32
			}
			w.Write([]pqRowStamp{r})
			if i%1000 == 999 {
				w.Flush()
			}
		})
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
	}
	return b.Bytes()
}

// Parquet input against the pure-Python reference (testdata/daily_ref.py)
// run on the CSV the Parquet file was converted from (by parquet-go's
// writer): every total, day count and missing decision, for the reference
// cases in three column layouts.
func TestDailyParquetPython(t *testing.T) {
	py := reftest.Python(t)
	dir := t.TempDir()
	layouts := []string{"date", "text", "date", "text", "date", "text"}
	for ci, c := range dailyRefCases(t) {
		layout := layouts[ci]
		if c.gen.units == UnitTenthMM {
			layout = "stamp" // integer values
		}
		name := fmt.Sprintf("case%d-%s", ci+1, layout)
		data := dailyGenCSV(c.gen)
		csvPath := filepath.Join(dir, name+".csv")
		pqPath := filepath.Join(dir, name+".parquet")
		delim := string(c.gen.delim)
		if err := os.WriteFile(csvPath, data, 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(pqPath, dailyCSVToParquet(t, data, delim, layout), 0o644); err != nil {
			t.Fatal(err)
		}
		res, err := ReadDaily(pqPath, c.options())
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		n, missing := dailyCheckRef(t, name, res, dailyRunRef(t, py, csvPath, c))
		if c.gen.after > 0 && (res.AfterTarget == 0 || len(res.Warnings) != 1 || !strings.Contains(res.Warnings[0], "(the first on row ")) {
			t.Errorf("%s: %d rows after the target, warnings %q", name, res.AfterTarget, res.Warnings)
		}
		t.Logf("%s: %d rows, %d totals (%d missing) equal to Python's", name, res.Rows, n, missing)
	}
}

// Bad Parquet input: messages name the file, row and column.
func TestDailyParquetBadInput(t *testing.T) {
	opt := DailyOptions{Target: "2023-12-31", Windows: []int{30}, ExcludeFlags: []string{"X"}}
	one := func(rows ...pqRowText) []byte {
		var b bytes.Buffer
		w := parquet.NewGenericWriter[pqRowText](&b)
		w.Write(rows)
		w.Close()
		return b.Bytes()
	}
	s := func(x string) *string { return &x }
	cases := []struct {
		name string
		data []byte
		want string
	}{
		{"impossible date", one(pqRowText{"A", "2023-01-01", s("1"), ""}, pqRowText{"A", "2023-02-30", s("1"), ""}),
			"daily d.parquet row 2 column 2 (day): date 2023-02-30 does not exist (2023-02 has 28 days)"},
		{"negative", one(pqRowText{"A", "2023-01-01", s("-2"), ""}),
			"daily d.parquet row 1 column 3 (value): precipitation -2 is negative"},
		{"twice", one(pqRowText{"A", "2023-01-01", s("1"), ""}, pqRowText{"A", "2023-01-01", s("2"), ""}),
			"daily d.parquet row 2 column 2 (day): station A has a second row for 2023-01-01 (a station-day may be given once)"},
		{"missing id", one(pqRowText{"", "2023-01-01", s("1"), ""}),
			"daily d.parquet row 1 column 1 (site): missing station id"},
		{"NaN", one(pqRowText{"A", "2023-01-01", s("NaN"), ""}),
			"daily d.parquet row 1 column 3 (value): precipitation NaN is not a finite number"},
		{"truncated", one(pqRowText{"A", "2023-01-01", s("1"), ""})[:40], ""},
	}
	for _, c := range cases {
		path := filepath.Join(t.TempDir(), "d.parquet")
		if err := os.WriteFile(path, c.data, 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := ReadDaily(path, opt)
		if c.want == "" {
			if err == nil || !strings.HasPrefix(err.Error(), "daily "+path+": ") {
				t.Errorf("%s: %v", c.name, err)
			}
			continue
		}
		if want := strings.Replace(c.want, "d.parquet", path, 1); err == nil || err.Error() != want {
			t.Errorf("%s:\n got %v\nwant %s", c.name, err, want)
		}
	}
	_, err := ReadDailyReader("stdin", io.MultiReader(strings.NewReader("PAR1....")), opt)
	if err == nil || err.Error() != "daily stdin: a Parquet table must be read from a file (it is read from its end), not from a stream" {
		t.Errorf("stream: %v", err)
	}
}
