package main

import (
	"io"
	"time"

	"github.com/spf13/pflag"

	"drygrid/pipeline"
)

// fromDaily are the flags of `drygrid index --daily FILE --window N`: the
// window's totals are computed from daily records in memory and go into
// the index step.
type fromDaily struct {
	daily  dailyFlags
	window int
}

func (f *fromDaily) register(fl *pflag.FlagSet) {
	fl.StringVar(&f.daily.daily, "daily", "", "daily precipitation records instead of --totals (CSV or TSV, optionally .gz, or Parquet); needs --window")
	fl.IntVar(&f.window, "window", 0, "with --daily: the window in days whose totals, ending on --date, are indexed")
	f.daily.register(fl)
}

// runDaily is `drygrid index --daily`.
func (f indexFlags) runDaily(stderr io.Writer) error {
	if f.totals != "" {
		return usagef("--totals and --daily: give one or the other")
	}
	if f.window == 0 {
		return usagef("--daily needs --window N (the window in days, e.g. 30)")
	}
	opt, err := f.options()
	if err != nil {
		return err
	}
	if err := pipeline.CheckWindows([]int{f.window}); err != nil {
		return usagef("--window %d: must be from 1 to 366 days", f.window)
	}
	dopt, err := f.daily.options([]int{f.window}, time.Now())
	if err != nil {
		return err
	}
	report, done := dailyProgress(stderr)
	res, r, err := pipeline.ComputeIndexDaily(f.stations, f.daily.daily, dopt, f.window, opt, report)
	done()
	if err != nil {
		return asUsage(err)
	}
	if err := pipeline.WriteIndexTable(f.out, res); err != nil {
		return err
	}
	totalsSummary(stderr, f.daily.daily, r, "")
	indexSummary(stderr, res, f.out)
	return nil
}
