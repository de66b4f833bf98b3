package station

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"sync"
	"testing"

	"github.com/klauspost/compress/gzip"
	"github.com/parquet-go/parquet-go"
)

// dailyBenchData is an invented daily table as bench/gendaily writes it
// (station,date,prcp,qflag; about 70 % zeros, 1 % of days without a row,
// 1 % empty, 1 % flagged X): stations x days from 1999-01-01, grouped by
// station in date order, or by date (every station's row of a day
// together, the common ungrouped order) when byDate is set.
func dailyBenchData(stations, days int, byDate bool) []byte {
	rng := rand.New(rand.NewPCG(2026, 16))
	d0 := civilDay(1999, 1, 1)
	dates := make([]string, days)
	for i := range dates {
		dates[i] = (d0 + Day(i)).String()
	}
	var b bytes.Buffer
	b.WriteString("station,date,prcp,qflag\n")
	var line []byte
	row := func(s, i int) {
		r := rng.IntN(1000)
		if r < 10 {
			return
		}
		line = fmt.Appendf(line[:0], "D%05d,%s,", s, dates[i])
		switch {
		case r < 20:
		case r < 720:
			line = append(line, '0')
		default:
			line = strconv.AppendFloat(line, math.Round(rng.ExpFloat64()*60)/10, 'f', 1, 64)
		}
		line = append(line, ',')
		if r >= 990 {
			line = append(line, 'X')
		}
		b.Write(append(line, '\n'))
	}
	if byDate {
		for i := range days {
			for s := 1; s <= stations; s++ {
				row(s, i)
			}
		}
	} else {
		for s := 1; s <= stations; s++ {
			for i := range days {
				row(s, i)
			}
		}
	}
	return b.Bytes()
}

var dailyBench struct {
	once, pqOnce          sync.Once
	plain, gz, bydate, pq []byte
}

func dailyBenchInputs() {
	dailyBench.once.Do(func() {
		dailyBench.plain = dailyBenchData(300, 9000, false)
		var z bytes.Buffer
		zw, _ := gzip.NewWriterLevel(&z, 6)
		zw.Write(dailyBench.plain)
		zw.Close()
		dailyBench.gz = z.Bytes()
		dailyBench.bydate = dailyBenchData(300, 9000, true)
	})
}

func benchDaily(b *testing.B, data []byte, raw int) {
	opt := DailyOptions{Target: "2023-08-22", Windows: []int{30, 90, 180, 365}, ExcludeFlags: []string{"X"}}
	b.SetBytes(int64(raw))
	b.ReportAllocs()
	rows := 0
	for b.Loop() {
		r, err := ReadDailyReader("bench.csv", bytes.NewReader(data), opt)
		if err != nil {
			b.Fatal(err)
		}
		rows = r.Rows
	}
	b.ReportMetric(float64(rows)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mrows/s")
}

// 300 stations x 9,000 days (2.7 M rows, 57 MB), four windows: grouped by
// station, gzip-compressed (decompression on its own goroutine).
func BenchmarkDailyTotalsGzip(b *testing.B) {
	dailyBenchInputs()
	benchDaily(b, dailyBench.gz, len(dailyBench.plain))
}

// The same rows uncompressed.
func BenchmarkDailyTotalsPlain(b *testing.B) {
	dailyBenchInputs()
	benchDaily(b, dailyBench.plain, len(dailyBench.plain))
}

// The same rows by date: every row changes station (a map look-up each).
func BenchmarkDailyTotalsByDate(b *testing.B) {
	dailyBenchInputs()
	benchDaily(b, dailyBench.bydate, len(dailyBench.bydate))
}

// The grouped rows as Parquet (DATE column, double values, parquet-go's
// default page size, row groups of 100,000 rows), read from memory.
func BenchmarkDailyTotalsParquet(b *testing.B) {
	dailyBenchInputs()
	dailyBench.pqOnce.Do(func() {
		var buf bytes.Buffer
		w := parquet.NewGenericWriter[pqRowDate](&buf)
		lines := bytes.Split(bytes.TrimSuffix(dailyBench.plain, []byte("\n")), []byte("\n"))[1:]
		rows := make([]pqRowDate, 0, 1024)
		for i, l := range lines {
			f := bytes.Split(l, []byte(","))
			d, _, err := parseDateBytes(f[1])
			if err != nil {
				b.Fatal(err)
			}
			r := pqRowDate{Station: string(f[0]), Date: int32(d), QFlag: string(f[3])}
			if len(f[2]) > 0 {
				x, err := strconv.ParseFloat(string(f[2]), 64)
				if err != nil {
					b.Fatal(err)
				}
				r.Prcp = &x
			}
			rows = append(rows, r)
			if len(rows) == cap(rows) || i == len(lines)-1 {
				w.Write(rows)
				rows = rows[:0]
			}
			if i%100000 == 99999 {
				w.Flush()
			}
		}
		if err := w.Close(); err != nil {
			b.Fatal(err)
		}
		dailyBench.pq = buf.Bytes()
	})
	benchDaily(b, dailyBench.pq, len(dailyBench.plain))
}
