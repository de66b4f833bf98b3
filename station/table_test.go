package station

import (
	"bytes"
	"compress/gzip"
	"encoding/json"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"drygrid/internal/reftest"
)

// tableReadAll reads every record of a table, returning records, their lines
// and the first error.
func tableReadAll(t *testing.T, name string, data []byte) (*Table, [][]string, []int, error) {
	t.Helper()
	tb, err := NewTable(name, bytes.NewReader(data))
	if err != nil {
		return nil, nil, nil, err
	}
	defer tb.Close()
	var recs [][]string
	var lines []int
	for {
		rec, line, err := tb.Next()
		if err == io.EOF {
			return tb, recs, lines, nil
		}
		if err != nil {
			return tb, recs, lines, err
		}
		recs = append(recs, rec)
		lines = append(lines, line)
	}
}

func gz(t *testing.T, b []byte) []byte {
	t.Helper()
	var buf bytes.Buffer
	w := gzip.NewWriter(&buf)
	w.Write(b)
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// Formats follow RFC 4180 (CSV: comma, CRLF, double-quote quoting) and the
// IANA text/tab-separated-values registration (TSV); the semicolon variant
// and the UTF-8 BOM are common practice in spreadsheet exports.
func TestTableFormats(t *testing.T) {
	want := [][]string{{"A1", "10.5", "-3"}, {"B 2", "11", "4"}}
	cases := []struct {
		name  string
		data  string
		delim rune
		want  [][]string
		lines []int
	}{
		{"csv", "station,lat,lon\nA1,10.5,-3\nB 2,11,4\n", ',', want, []int{2, 3}},
		{"tsv", "station\tlat\tlon\nA1\t10.5\t-3\nB 2\t11\t4\n", '\t', want, []int{2, 3}},
		{"semicolon", "station;lat;lon\nA1;10.5;-3\nB 2;11;4\n", ';', want, []int{2, 3}},
		{"crlf", "station,lat,lon\r\nA1,10.5,-3\r\nB 2,11,4\r\n", ',', want, []int{2, 3}},
		{"bom", "\ufeffstation,lat,lon\nA1,10.5,-3\nB 2,11,4", ',', want, []int{2, 3}},
		{"blank lines keep file line numbers", "\n\nstation,lat,lon\n\nA1,10.5,-3\n   \n,,\nB 2,11,4\n\n", ',', want, []int{5, 8}},
		{"spaces trimmed", "station , lat,lon\n  A1 ,10.5 , -3\nB 2,11,4\n", ',', want, []int{2, 3}},
		{"quoted comma (RFC 4180)", "station,name,lon\n\"A1\",\"Hill, North\",\"-3\"\n", ',', [][]string{{"A1", "Hill, North", "-3"}}, []int{2}},
		{"quoted newline: next record's line is its own", "station,name,lon\nA1,\"two\nlines\",1\nB,x,2\n", ',', [][]string{{"A1", "two\nlines", "1"}, {"B", "x", "2"}}, []int{2, 4}},
		{"doubled quote (RFC 4180)", "station,name,lon\nA1,\"say \"\"hi\"\"\",1\n", ',', [][]string{{"A1", `say "hi"`, "1"}}, []int{2}},
		{"commas in quoted header do not fool the sniffer", "\"a,b\";\"c,d\";e\n1;2;3\n", ';', [][]string{{"1", "2", "3"}}, []int{2}},
		{"header only", "station,lat,lon\n", ',', nil, nil},
	}
	for _, c := range cases {
		for _, compress := range []bool{false, true} {
			name := c.name
			data := []byte(c.data)
			if compress {
				name += "/gzip"
				data = gz(t, data)
			}
			t.Run(name, func(t *testing.T) {
				tb, recs, lines, err := tableReadAll(t, "x.csv", data)
				if err != nil {
					t.Fatal(err)
				}
				if tb.Delim != c.delim {
					t.Errorf("delim %q, want %q", tb.Delim, c.delim)
				}
				if !reflect.DeepEqual(recs, c.want) {
					t.Errorf("records %q, want %q", recs, c.want)
				}
				if !reflect.DeepEqual(lines, c.lines) {
					t.Errorf("lines %v, want %v", lines, c.lines)
				}
			})
		}
	}
}

func TestTableHeaderAndColumns(t *testing.T) {
	tb, err := NewTable("h.csv", strings.NewReader("\ufeff Station_ID ,LAT,Lng,SPI\n"))
	if err != nil {
		t.Fatal(err)
	}
	if want := []string{"Station_ID", "LAT", "Lng", "SPI"}; !reflect.DeepEqual(tb.Header, want) {
		t.Fatalf("header %q, want %q", tb.Header, want)
	}
	cases := []struct {
		aliases []string
		want    int
	}{
		{[]string{"station", "id", "station_id", "site"}, 0},
		{[]string{"latitude", "lat"}, 1},
		{[]string{"longitude", "lon", "long", "lng"}, 2},
		{[]string{"spi"}, 3},
		{[]string{"percentile"}, -1},
		{nil, -1},
	}
	for _, c := range cases {
		if got := tb.Column(c.aliases...); got != c.want {
			t.Errorf("Column(%q) = %d, want %d", c.aliases, got, c.want)
		}
	}
	if tb.HeaderLine != 1 {
		t.Errorf("header line %d", tb.HeaderLine)
	}
}

func TestTableErrors(t *testing.T) {
	good := gz(t, []byte("station,lat,lon\n"+strings.Repeat("A,1,2\n", 5000)))
	cases := []struct {
		name string
		data []byte
		want string // substring of the error
	}{
		{"empty", nil, "x.csv: empty table"},
		{"blank only", []byte("\n \n\r\n"), "x.csv: empty table"},
		{"too many fields", []byte("a,b,c\n1,2,3\n1,2,3,4\n"), "x.csv line 3: 4 fields, but the header (line 1) has 3"},
		{"too few fields", []byte("a,b,c\n1,2\n"), "x.csv line 2: 2 fields, but the header (line 1) has 3"},
		{"broken quote", []byte("a,b,c\n1,\"2,3\n"), "x.csv line 2"},
		{"bare quote", []byte("a,b,c\n1,2\"x,3\n"), "x.csv line 2 (byte 4 of the line): bare \" in non-quoted-field"},
		{"non-UTF-8 field", []byte("a,b,c\n1,2,3\n1,caf\xe9,3\n"), "x.csv line 3 column 2 (b): not valid UTF-8 text"},
		{"non-UTF-8 header", []byte("a,\xff\xfeb,c\n"), "x.csv line 1 column 2: header is not valid UTF-8"},
		{"CR-only line ends", []byte("a,b\r1,2\r"), "x.csv line 1: lines end in a bare carriage return"},
		{"UTF-16", []byte("\xff\xfea\x00,\x00"), "UTF-16"},
		{"truncated gzip", good[:len(good)/2], "truncated or corrupt compressed data"},
		{"gzip bad checksum", append(append([]byte{}, good[:len(good)-8]...), 1, 2, 3, 4, 5, 6, 7, 8), "x.csv: gzip data corrupt: the checksum at the end of the stream (byte 107) does not match the data"},
		{"gzip magic then junk", []byte{0x1f, 0x8b, 0, 0}, "x.csv: reading gzip header"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, _, _, err := tableReadAll(t, "x.csv", c.data)
			if err == nil {
				t.Fatalf("no error, want %q", c.want)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %q, want it to contain %q", err, c.want)
			}
		})
	}
}

func TestOpenTable(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "plain.txt") // compression found by magic bytes, not the name
	if err := os.WriteFile(p, gz(t, []byte("id\tlat\nK1\t3\n")), 0o644); err != nil {
		t.Fatal(err)
	}
	tb, err := OpenTable(p)
	if err != nil {
		t.Fatal(err)
	}
	rec, line, err := tb.Next()
	if err != nil || line != 2 || !reflect.DeepEqual(rec, []string{"K1", "3"}) {
		t.Fatalf("got %q line %d err %v", rec, line, err)
	}
	if _, _, err := tb.Next(); err != io.EOF {
		t.Fatalf("want EOF, got %v", err)
	}
	if err := tb.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := OpenTable(filepath.Join(dir, "nope.csv")); err == nil || !strings.Contains(err.Error(), "nope.csv") {
		t.Fatalf("missing file error %v should name the file", err)
	}
}

func TestTableParseFloat(t *testing.T) {
	comma := &Table{Delim: ','}
	semi := &Table{Delim: ';'}
	cases := []struct {
		tb   *Table
		in   string
		want float64
		ok   bool
	}{
		{comma, "12.5", 12.5, true},
		{comma, " -0.25 ", -0.25, true},
		{comma, "1e2", 100, true},
		{semi, "12,5", 12.5, true}, // decimal comma: common practice in semicolon exports
		{comma, "12,5", 0, false},
		{semi, "1,234.5", 0, false},
		{comma, "0x10", 0, false},
		{comma, "1_000", 0, false},
		{comma, "abc", 0, false},
		{comma, "1e999", 0, false},
	}
	for _, c := range cases {
		got, err := c.tb.ParseFloat(c.in)
		if (err == nil) != c.ok || (c.ok && got != c.want) {
			t.Errorf("ParseFloat(%q, delim %q) = %v, %v; want %v ok=%v", c.in, c.tb.Delim, got, err, c.want, c.ok)
		}
	}
	for _, s := range []string{"", " ", "NA", "na", "N/A", "null"} {
		if !IsMissing(s) {
			t.Errorf("IsMissing(%q) = false", s)
		}
	}
	for _, s := range []string{"0", "NaN", "-"} {
		if IsMissing(s) {
			t.Errorf("IsMissing(%q) = true", s)
		}
	}
}

// FuzzTable: NewTable and Next over arbitrary bytes never panic, and every
// error names the table.
func FuzzTable(f *testing.F) {
	f.Add([]byte("station,lat,lon\nA,1,2\n"))
	f.Add([]byte("a\tb\n1\t\"2\n"))
	f.Add([]byte("\ufeffa;b\r\n1;2\r\n"))
	f.Add([]byte{0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 0, 0xff})
	f.Fuzz(func(t *testing.T, data []byte) {
		tb, err := NewTable("fz.csv", bytes.NewReader(data))
		if err != nil {
			if !strings.Contains(err.Error(), "fz.csv") {
				t.Fatalf("error without file name: %v", err)
			}
			return
		}
		defer tb.Close()
		for i := 0; i < 1_000_000; i++ {
			rec, _, err := tb.Next()
			if err == io.EOF {
				return
			}
			if err != nil {
				if !strings.Contains(err.Error(), "fz.csv") {
					t.Fatalf("error without file name: %v", err)
				}
				return
			}
			if len(rec) != len(tb.Header) {
				t.Fatalf("record of %d fields with header of %d", len(rec), len(tb.Header))
			}
		}
	})
}

// The reader agrees with Python's csv module (the standard library's RFC 4180
// parser, run by testdata/table_ref.py) on the fixtures and on generated
// tricky tables: quoting, doubled quotes, embedded delimiters and newlines,
// BOM, CRLF, gzip.
func TestTableAgainstPythonCSV(t *testing.T) {
	py := reftest.Python(t, "csv", "gzip", "json")
	dir := t.TempDir()
	gen := []struct {
		name, data string
		delim      rune
	}{
		{"quotes.csv", "id,name,note\nK1,\"a, b\",\"say \"\"x\"\"\"\nK2,,\" padded \"\n\nK3,\"multi\r\nline\",end\n", ','},
		{"bom_crlf.tsv", "\ufeffid\tlat\tlon\r\nK1\t-40\t-120\r\n \t \t \r\nK2\t\"-41\"\t240\r\n", '\t'},
		{"semi.csv", "id;v\n\"K;1\";1,5\nK2;\"2\"\n", ';'},
		{"unicode.csv", "id,name\nK1,Ærøvik Fjeld\nK2,\"Ñandú, Sur\"\n", ','},
	}
	files := []struct {
		path  string
		delim rune
	}{
		{"../testdata/stations/good.csv", ','},
		{"../testdata/stations/percentiles.tsv", '\t'},
		{"../testdata/stations/percentiles.tsv.gz", '\t'},
		{"../testdata/stations/semicolon.csv", ';'},
		{"../testdata/stations/bad_lon.csv", ','},
		{"../testdata/stations/dup_id.csv", ','},
	}
	for i, g := range gen {
		for _, z := range []bool{false, true} {
			data := []byte(g.data)
			p := filepath.Join(dir, g.name)
			if z {
				data, p = gz(t, data), p+".gz"
			}
			if err := os.WriteFile(p, data, 0o644); err != nil {
				t.Fatal(err)
			}
			files = append(files, struct {
				path  string
				delim rune
			}{p, gen[i].delim})
		}
	}
	for _, f := range files {
		t.Run(filepath.Base(f.path), func(t *testing.T) {
			tb, err := OpenTable(f.path)
			if err != nil {
				t.Fatal(err)
			}
			defer tb.Close()
			if tb.Delim != f.delim {
				t.Fatalf("sniffed %q, want %q", tb.Delim, f.delim)
			}
			got := [][]string{tb.Header}
			for {
				rec, _, err := tb.Next()
				if err == io.EOF {
					break
				}
				if err != nil {
					t.Fatal(err)
				}
				got = append(got, rec)
			}
			d := string(f.delim)
			if f.delim == '\t' {
				d = "tab"
			}
			var want [][]string
			if err := json.Unmarshal(reftest.RunPython(t, py, "../testdata/table_ref.py", nil, f.path, d), &want); err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got, want) {
				t.Fatalf("records differ from Python csv:\n got %q\nwant %q", got, want)
			}
		})
	}
}
