package station

import (
	"bytes"
	"compress/gzip"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// WriteIndexFile replaces the file only when complete and leaves no
// temporary file; a failed write (missing directory) is an error naming
// the path.
func TestWriteIndexFileAtomic(t *testing.T) {
	res, err := ComputeIndex(idxFixStations, idxFixTotals, IndexOptions{})
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	out := filepath.Join(dir, "spi.csv")
	if err := os.WriteFile(out, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := WriteIndexFile(out, res); err != nil {
		t.Fatal(err)
	}
	var want bytes.Buffer
	if err := WriteIndexCSV(&want, res); err != nil {
		t.Fatal(err)
	}
	got, _ := os.ReadFile(out)
	if !bytes.Equal(got, want.Bytes()) {
		t.Error("file differs from WriteIndexCSV")
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Errorf("directory holds %d entries, want 1", len(ents))
	}
	bad := filepath.Join(dir, "missing", "spi.csv")
	if err := WriteIndexFile(bad, res); err == nil || !strings.Contains(err.Error(), "writing "+bad) {
		t.Errorf("missing directory: %v", err)
	}
}

// The same totals as TSV, gzip-compressed, with CRLF line ends, give the
// same table (the tables are CSV or TSV, optionally gzip-compressed:
// DESIGN.md).
func TestIndexTSVGzipSameResult(t *testing.T) {
	st, _ := os.ReadFile(idxFixStations)
	tot, _ := os.ReadFile(idxFixTotals)
	tsv := strings.ReplaceAll(strings.ReplaceAll(string(tot), ",", "\t"), "\n", "\r\n")
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write([]byte(tsv))
	zw.Close()
	a, err := ComputeIndexReaders("stations.csv", bytes.NewReader(st), "totals.csv", bytes.NewReader(tot), IndexOptions{})
	if err != nil {
		t.Fatal(err)
	}
	b, err := ComputeIndexReaders("stations.csv", bytes.NewReader(st), "totals.tsv.gz", &gz, IndexOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var wa, wb bytes.Buffer
	WriteIndexCSV(&wa, a)
	WriteIndexCSV(&wb, b)
	if !bytes.Equal(wa.Bytes(), wb.Bytes()) {
		t.Errorf("TSV+gzip differs:\n%s\n%s", wa.String(), wb.String())
	}
}
