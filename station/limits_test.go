package station

import (
	"bytes"
	"compress/gzip"
	"fmt"
	"io"
	"runtime"
	"strings"
	"testing"
)

// zeroReader is an endless stream of zero bytes, as /dev/zero is.
type zeroReader struct{}

func (zeroReader) Read(p []byte) (int, error) {
	clear(p)
	return len(p), nil
}

// gzipZeros is a gzip stream of prefix then n zero bytes and no newline:
// about 50 kB on the wire for 50 MB of zeros.
func gzipZeros(t *testing.T, prefix string, n int) []byte {
	t.Helper()
	var buf bytes.Buffer
	w, _ := gzip.NewWriterLevel(&buf, gzip.BestCompression)
	io.WriteString(w, prefix)
	chunk := make([]byte, 1<<20)
	for n > 0 {
		k := min(n, len(chunk))
		w.Write(chunk[:k])
		n -= k
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// heapGrowth runs f and returns the bytes allocated meanwhile (TotalAlloc).
func heapGrowth(f func()) uint64 {
	var a, b runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&a)
	f()
	runtime.ReadMemStats(&b)
	return b.TotalAlloc - a.TotalAlloc
}

// Every line, the header included, is held to MaxLineBytes: a 10 MB line,
// a gzip stream of 50 MB of zeros without a newline and an endless stream
// of zeros each fail within the first MiB with the line and the limit,
// never echoing the line, and without allocating more than a few MiB.
// Each reader of tables (the table itself, value tables, totals and
// station lists of the index step) gets the same error.
func TestTableLineLimit(t *testing.T) {
	big := strings.Repeat("A", 10<<20)
	const hdr = "station,latitude,longitude,spi\n"
	const thdr = "station,year,total_mm\n"
	const shdr = "station,latitude,longitude\nST01,1,2\n"
	cases := []struct {
		name string
		kind string // table, values, totals, stations
		in   func() io.Reader
		want string
	}{
		{"10 MB header line", "table", func() io.Reader { return strings.NewReader(big + "\n") }, "x.csv: line 1 is longer than the limit of 1 MiB"},
		{"10 MB data line", "table", func() io.Reader { return strings.NewReader(hdr + "A,1,2,0.5\n" + big + "\nB,1,2,3\n") }, "x.csv: line 3 is longer than the limit of 1 MiB"},
		{"10 MB line after blank lines", "table", func() io.Reader { return strings.NewReader("\n\n" + big) }, "x.csv: line 3 is longer than the limit of 1 MiB"},
		{"10 MB quoted line", "table", func() io.Reader { return strings.NewReader(hdr + "\"" + big + "\"\n") }, "x.csv: line 2 is longer than the limit of 1 MiB"},
		{"open quote over many lines", "table", func() io.Reader {
			return strings.NewReader(hdr + "\"A" + strings.Repeat("0123456789\n", 200000))
		}, "x.csv: the record running to line 95327 is longer than the limit of 1 MiB; is a double quote left open?"},
		{"gzip of 50 MB of zeros, no newline", "table", func() io.Reader { return bytes.NewReader(gzipZeros(t, "", 50<<20)) }, "x.csv: line 1 is longer than the limit of 1 MiB"},
		{"gzip of 50 MB of zeros after a header", "values", func() io.Reader { return bytes.NewReader(gzipZeros(t, hdr, 50<<20)) }, "x.csv: line 2 is longer than the limit of 1 MiB"},
		{"endless zeros", "table", func() io.Reader { return zeroReader{} }, "x.csv: line 1 is longer than the limit of 1 MiB"},
		{"endless zeros after a header", "values", func() io.Reader { return io.MultiReader(strings.NewReader(hdr+"A,1,2,0.5\n"), zeroReader{}) }, "x.csv: line 3 is longer than the limit of 1 MiB"},
		{"endless zeros as totals", "totals", func() io.Reader { return io.MultiReader(strings.NewReader(thdr+"ST01,1961,3\n"), zeroReader{}) }, "x.csv: line 3 is longer than the limit of 1 MiB"},
		{"endless zeros as station list", "stations", func() io.Reader { return io.MultiReader(strings.NewReader(shdr), zeroReader{}) }, "x.csv: line 3 is longer than the limit of 1 MiB"},
		{"10 MB line as totals", "totals", func() io.Reader { return strings.NewReader(thdr + big) }, "x.csv: line 2 is longer than the limit of 1 MiB"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			in := c.in()
			var err error
			grew := heapGrowth(func() {
				switch c.kind {
				case "table":
					var tb *Table
					tb, err = NewTable("x.csv", in)
					for err == nil {
						_, _, err = tb.Next()
					}
				case "values":
					_, err = ParseValues("x.csv", in, ValueOptions{Kind: KindSPI})
				case "totals":
					_, err = ComputeIndexReaders("s.csv", strings.NewReader(shdr), "x.csv", in, IndexOptions{})
				case "stations":
					_, err = ComputeIndexReaders("x.csv", in, "t.csv", strings.NewReader(thdr+"ST01,1961,3\n"), IndexOptions{})
				}
			})
			if err == nil || err == io.EOF {
				t.Fatalf("error %v, want %q", err, c.want)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %q, want it to contain %q", err, c.want)
			}
			if len(err.Error()) > 300 {
				t.Errorf("error of %d bytes: it echoes the line", len(err.Error()))
			}
			if grew > 64<<20 {
				t.Errorf("allocated %d MiB, want under 64 MiB", grew>>20)
			}
			t.Logf("allocated %.1f MiB", float64(grew)/(1<<20))
		})
	}
}

// A line of exactly MaxLineBytes is read; one byte more is refused.
func TestTableLineLimitEdge(t *testing.T) {
	for _, extra := range []int{0, 1} {
		id := strings.Repeat("S", MaxLineBytes-len(",1,2,0.5")+extra)
		data := "station,latitude,longitude,spi\n" + id + ",1,2,0.5\nB,3,4,1\n"
		v, err := ParseValues("x.csv", strings.NewReader(data), ValueOptions{Kind: KindSPI})
		switch {
		case extra == 0 && (err != nil || len(v.Stations) != 2 || v.Stations[0].ID != id):
			t.Errorf("line of %d bytes: %v", MaxLineBytes, err)
		case extra == 1 && (err == nil || !strings.Contains(err.Error(), "line 2 is longer than the limit of 1 MiB")):
			t.Errorf("line of %d bytes: error %v", MaxLineBytes+1, err)
		}
	}
}

// A gzip file inside a gzip file, and corrupt gzip data, get messages that
// say so (not a bare carriage return, not a field count).
func TestTableGzipMessages(t *testing.T) {
	var b strings.Builder
	b.WriteString("station,latitude,longitude,spi\n")
	for i := range 20000 {
		fmt.Fprintf(&b, "S%d,%d.5,%d.25,%d.5\n", i, i%170-85, i%350-175, i%9-4)
	}
	plain := []byte(b.String())
	once := gz(t, plain)
	twice := gz(t, once)
	if _, err := ParseValues("x.csv.gz", bytes.NewReader(twice), ValueOptions{}); err == nil ||
		err.Error() != "x.csv.gz: the file is gzip inside gzip: decompress it once (gunzip it, and give drygrid the .gz it holds)" {
		t.Errorf("gzip inside gzip: %v", err)
	}
	// A byte flipped in the middle of the deflate data: flate either fails
	// at a byte of the stream, or decodes garbage that the checksum at the
	// end refutes; both are reported as corrupt gzip data.
	for _, at := range []int{len(once) / 3, len(once) / 2, 2 * len(once) / 3, len(once) - 12} {
		bad := append([]byte{}, once...)
		bad[at] ^= 0x55
		_, err := ParseValues("x.csv.gz", bytes.NewReader(bad), ValueOptions{})
		if err == nil || !strings.HasPrefix(err.Error(), "x.csv.gz: gzip data corrupt") {
			t.Errorf("byte %d of %d flipped: %v", at, len(once), err)
		} else {
			t.Logf("byte %d of %d flipped: %v", at, len(once), err)
		}
	}
}
