// Command dailytotals is bench/run's driver of the daily-to-window-totals
// library step (station.ReadDaily), until the drygrid command that wires it
// exists: it reads a daily table and writes the totals table of all the
// windows and, optionally, one window's station,year,total table for
// `drygrid index`. A summary goes to standard error. It is a benchmark
// helper, not part of drygrid.
//
//	dailytotals -in DAILY -target YYYY-MM-DD -windows 30,90,180,365 -out TOTALS.csv
//	            [-min-share 0.9] [-units mm] [-exclude-flags X,Y]
//	            [-index-window 90 -index-out TOTALS90.csv]
package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"runtime/pprof"
	"strconv"
	"strings"

	"drygrid/station"
)

func main() {
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "dailytotals:", err)
		os.Exit(1)
	}
}

func run() error {
	in := flag.String("in", "", "daily table (CSV/TSV, optionally gzip)")
	target := flag.String("target", "", "target date YYYY-MM-DD")
	windows := flag.String("windows", "30,90,180,365", "window lengths in days")
	share := flag.Float64("min-share", 0, "least share of reported days (0 = 0.9)")
	units := flag.String("units", "", "mm, tenths-mm or inch")
	flags := flag.String("exclude-flags", "X", "flags whose values are missing, comma-separated")
	out := flag.String("out", "", "totals table to write")
	iw := flag.Int("index-window", 0, "window of the station,year,total table")
	iout := flag.String("index-out", "", "station,year,total table to write")
	prof := flag.String("cpuprofile", "", "write a CPU profile")
	flag.Parse()
	if *prof != "" {
		f, err := os.Create(*prof)
		if err != nil {
			return err
		}
		defer f.Close()
		if err := pprof.StartCPUProfile(f); err != nil {
			return err
		}
		defer pprof.StopCPUProfile()
	}
	opt := station.DailyOptions{Target: *target, MinShare: *share, Units: *units}
	for _, w := range strings.Split(*windows, ",") {
		n, err := strconv.Atoi(w)
		if err != nil {
			return fmt.Errorf("window %q: %v", w, err)
		}
		opt.Windows = append(opt.Windows, n)
	}
	if *flags != "" {
		opt.ExcludeFlags = strings.Split(*flags, ",")
	}
	r, err := station.ReadDaily(*in, opt)
	if err != nil {
		return err
	}
	for _, w := range r.Warnings {
		fmt.Fprintln(os.Stderr, "warning:", w)
	}
	write := func(path string, f func(io.Writer) error) error {
		if path == "" {
			return nil
		}
		o, err := os.Create(path)
		if err != nil {
			return err
		}
		if err := f(o); err != nil {
			o.Close()
			return err
		}
		return o.Close()
	}
	if err := write(*out, func(w io.Writer) error { return station.WriteWindowTotalsCSV(w, r) }); err != nil {
		return err
	}
	if err := write(*iout, func(w io.Writer) error { return station.WriteIndexTotalsCSV(w, r, *iw) }); err != nil {
		return err
	}
	years := 0
	for i := range r.Stations {
		years += r.Stations[i].Years()
	}
	fmt.Fprintf(os.Stderr, "%d rows, %d stations, %d station-years, windows %v\n", r.Rows, len(r.Stations), years, r.Windows)
	return nil
}
