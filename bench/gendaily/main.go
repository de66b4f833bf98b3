// Command gendaily writes an invented daily precipitation table for
// bench/run's daily item: STATIONS stations (ids D00001...) x DAYS days
// from 1999-01-01, grouped by station and in date order, gzip-compressed
// (level 6, as gzip's default), with the columns station,date,prcp,qflag.
// About 70 % of the values are 0; the rest are drawn from an exponential
// distribution (mean 6 mm, 0.1 mm steps); 1 % of the days have no row, 1 %
// an empty value and 1 % the flag X. Fixed seed: the same file every run.
// It prints the last date (the natural target) on standard output. It is a
// benchmark helper, not part of drygrid. With "bydate" the same kind of rows
// come ordered by date (every station's row of a day together), the common
// ungrouped order.
//
//	gendaily STATIONS DAYS OUT.csv.gz [bydate]
package main

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"time"

	"github.com/klauspost/compress/gzip"
)

func main() {
	if err := run(os.Args[1:]); err != nil {
		fmt.Fprintln(os.Stderr, "gendaily:", err)
		os.Exit(1)
	}
}

func run(a []string) error {
	if len(a) != 3 && (len(a) != 4 || a[3] != "bydate") {
		return fmt.Errorf("usage: gendaily STATIONS DAYS OUT.csv.gz [bydate]")
	}
	byDate := len(a) == 4
	stations, err1 := strconv.Atoi(a[0])
	days, err2 := strconv.Atoi(a[1])
	if err1 != nil || err2 != nil || stations < 1 || days < 1 {
		return fmt.Errorf("STATIONS and DAYS must be positive integers")
	}
	start := time.Date(1999, 1, 1, 0, 0, 0, 0, time.UTC)
	dates := make([]string, days)
	for i := range dates {
		dates[i] = start.AddDate(0, 0, i).Format("2006-01-02")
	}
	f, err := os.Create(a[2])
	if err != nil {
		return err
	}
	zw, err := gzip.NewWriterLevel(f, 6)
	if err != nil {
		return err
	}
	bw := bufio.NewWriterSize(zw, 1<<20)
	bw.WriteString("station,date,prcp,qflag\n")
	rng := rand.New(rand.NewPCG(2026, 16))
	var line []byte
	ids := make([]string, stations+1)
	for s := 1; s <= stations; s++ {
		ids[s] = fmt.Sprintf("D%05d", s)
	}
	row := func(id, d string) {
		r := rng.IntN(1000)
		if r < 10 {
			return // no row
		}
		line = append(line[:0], id...)
		line = append(line, ',')
		line = append(line, d...)
		line = append(line, ',')
		switch {
		case r < 20: // empty value
		case r < 720:
			line = append(line, '0')
		default:
			v := math.Round(rng.ExpFloat64()*60) / 10
			line = strconv.AppendFloat(line, v, 'f', 1, 64)
		}
		line = append(line, ',')
		if r >= 990 {
			line = append(line, 'X')
		}
		line = append(line, '\n')
		bw.Write(line)
	}
	if byDate {
		for _, d := range dates {
			for s := 1; s <= stations; s++ {
				row(ids[s], d)
			}
		}
	} else {
		for s := 1; s <= stations; s++ {
			for _, d := range dates {
				row(ids[s], d)
			}
		}
	}
	if err := bw.Flush(); err != nil {
		return err
	}
	if err := zw.Close(); err != nil {
		return err
	}
	if err := f.Close(); err != nil {
		return err
	}
	fmt.Println(dates[len(dates)-1])
	return nil
}
