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
	once              sync.Once
	plain, gz, bydate []byte
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
