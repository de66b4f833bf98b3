package station

import (
	"bytes"
	"compress/gzip"
	"os"
	"strings"
	"testing"
)

// The same totals as TSV, gzip-compressed, with CRLF line ends, give the
// same table (the tables are CSV or TSV, optionally gzip-compressed).
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
