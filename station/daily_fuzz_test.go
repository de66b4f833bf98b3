package station

import (
	"bytes"
	"reflect"
	"runtime"
	"strings"
	"testing"

	"github.com/parquet-go/parquet-go"
)

// readDailyChunked reads data with read buffers of chunk bytes.
func readDailyChunked(data []byte, opt DailyOptions, chunk int) (*WindowTotals, error) {
	old := dailyChunk
	dailyChunk = chunk
	defer func() { dailyChunk = old }()
	return ReadDailyReader("fuzz.csv", bytes.NewReader(data), opt)
}

// Lines cut across read buffers anywhere (buffers of 1 to 4096 bytes) read
// exactly as with the default buffers, results and errors alike.
func TestDailyChunkBoundaries(t *testing.T) {
	g := dailyGen{seed: 31, stations: 4, from: mustDay(t, "2021-01-01"), to: mustDay(t, "2023-06-30"), delim: ',', order: "shuffled"}
	good := dailyGenCSV(g)
	bad := append(append([]byte{}, good[:len(good)/2]...), []byte("\nQ001,2023-02-29,1\n")...)
	long := append(append([]byte{}, good[:200]...), bytes.Repeat([]byte("y"), DailyLineLimit+1)...)
	crlf := bytes.ReplaceAll(good, []byte("\n"), []byte("\r\n"))
	opt := DailyOptions{Target: "2023-06-30", Windows: []int{30, 90}, ExcludeFlags: []string{"X"}}
	for _, data := range [][]byte{good, bad, long, crlf, good[:len(good)-1]} {
		want, werr := ReadDailyReader("fuzz.csv", bytes.NewReader(data), opt)
		for _, chunk := range []int{1, 2, 3, 7, 64, 4096} {
			got, err := readDailyChunked(data, opt, chunk)
			if (err == nil) != (werr == nil) || (err != nil && err.Error() != werr.Error()) {
				t.Fatalf("chunk %d: error %v, with 1 MiB buffers %v", chunk, err, werr)
			}
			if !reflect.DeepEqual(got, want) {
				t.Fatalf("chunk %d: totals differ", chunk)
			}
		}
	}
}

// FuzzReadDaily: no input panics or grows memory beyond a bound per line;
// whatever is accepted obeys the invariants (days reported within the
// window, totals non-negative, a total exactly when enough days were
// reported, stations sorted and distinct, years within the first record
// year and the target's) and reads the same with tiny read buffers.
func FuzzReadDaily(f *testing.F) {
	f.Add([]byte("station,date,prcp,qflag\nA,2024-02-28,1.5,\nA,2024-02-29,0,X\nB,2023-03-01,2,K\n"))
	f.Add([]byte("id\tday\tvalue\nA\t2000-02-29\t3\nA\t1999-12-31\tNA\n"))
	f.Add([]byte("site;time;rain;qc\n\"A;x\";2024-01-01;0,5;\n"))
	f.Add([]byte("station,date,prcp\nA,2023-02-30,1\n"))
	f.Add([]byte("\xef\xbb\xbfstation,date,prcp\r\nA,1000-01-01,1e3\r\nA,2025-01-01,1\r\n"))
	g := dailyGen{seed: 41, stations: 3, from: civilDay(2022, 12, 1), to: civilDay(2024, 3, 1), delim: ',', order: "blocks"}
	f.Add(dailyGenCSV(g)[:4000])
	var pq bytes.Buffer
	w := parquet.NewGenericWriter[pqRowText](&pq)
	w.Write([]pqRowText{{"A", "2024-02-28", nil, "X"}, {"A", "2024-02-29", nil, ""}, {"B", "2023-02-28", nil, ""}})
	w.Close()
	f.Add(pq.Bytes())
	opt := DailyOptions{Target: "2024-02-29", Windows: []int{1, 30, 366}, MinShare: 0.5, ExcludeFlags: []string{"X"}}
	f.Fuzz(func(t *testing.T, data []byte) {
		var m0, m1 runtime.MemStats
		runtime.ReadMemStats(&m0)
		r, err := ReadDailyReader("fuzz.csv", bytes.NewReader(data), opt)
		runtime.ReadMemStats(&m1)
		// Fixed buffers (4 x 1 MiB, 64 KiB) plus, per line, at most one
		// station's arrays from the year 1000 (~80 KB).
		lines := uint64(bytes.Count(data, []byte("\n")) + 1)
		limit := 8<<20 + lines*128<<10
		if bytes.HasPrefix(data, parquetMagic) {
			// Parquet: the decoder's buffers, for pages of up to 1 MiB
			// (pqMaxRatio) and the footer's structures.
			limit = 64<<20 + uint64(len(data))*1024
		}
		if alloc := m1.TotalAlloc - m0.TotalAlloc; alloc > limit {
			t.Fatalf("%d bytes allocated (the bound is %d)", alloc, limit)
		}
		r2, err2 := readDailyChunked(data, opt, 5)
		if (err == nil) != (err2 == nil) || (err != nil && err.Error() != err2.Error()) || !reflect.DeepEqual(r, r2) {
			t.Fatalf("5-byte buffers: %v; 1 MiB: %v", err2, err)
		}
		if err != nil {
			if !strings.HasPrefix(err.Error(), "daily fuzz.csv") || len(err.Error()) > 1000 {
				t.Fatalf("error without the file, or too long: %.200s", err)
			}
			return
		}
		for i := range r.Stations {
			s := &r.Stations[i]
			if i > 0 && r.Stations[i-1].ID >= s.ID {
				t.Fatalf("stations out of order: %q then %q", r.Stations[i-1].ID, s.ID)
			}
			if s.ID == "" || s.FirstYear < MinTotalYear || s.FirstYear > 2024 || s.LastYear != 2024 {
				t.Fatalf("station %q years %d-%d", s.ID, s.FirstYear, s.LastYear)
			}
			for y := s.FirstYear; y <= s.LastYear; y++ {
				for w, n := range r.Windows {
					tt := r.Total(s, y, w)
					if tt.Reported < 0 || tt.Reported > n {
						t.Fatalf("%s %d %dd: %d days reported", s.ID, y, n, tt.Reported)
					}
					if tt.Missing() != (tt.Reported < tt.Need) || (!tt.Missing() && (tt.Total < 0 || tt.Total > float64(n)*MaxDailyMM)) {
						t.Fatalf("%s %d %dd: %+v", s.ID, y, n, tt)
					}
				}
			}
		}
	})
}
