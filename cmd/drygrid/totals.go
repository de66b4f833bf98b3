package main

import (
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"drygrid/pipeline"
	"drygrid/station"
)

// dailyFlags name the daily records and how to read them (totals, index).
type dailyFlags struct {
	daily        string
	date         string
	minShare     float64
	units        string
	excludeFlags string
	idColumn     string
	dateColumn   string
	valueColumn  string
	flagColumn   string
}

func (f *dailyFlags) register(fl *pflag.FlagSet) {
	fl.StringVar(&f.date, "date", pipeline.DateYesterday, "target date YYYY-MM-DD (or today, yesterday: UTC); each year's windows end on its month and day")
	fl.Float64Var(&f.minShare, "min-share", station.DefaultMinShare, "least share of a window's days that must be reported for its total, in (0, 1]")
	fl.StringVar(&f.units, "units", station.UnitMM, "units of the daily values: mm, tenths-mm or inch (totals are always mm)")
	fl.StringVar(&f.excludeFlags, "exclude-flags", "", "quality flags whose values count as missing, comma-separated (needs a flag column)")
	fl.StringVar(&f.idColumn, "id-column", "", "name of the station id column (default: station|id|station_id|site)")
	fl.StringVar(&f.dateColumn, "date-column", "", "name of the date column (default: date|day|time)")
	fl.StringVar(&f.valueColumn, "value-column", "", "name of the precipitation column (default: precipitation|precip|prcp|value|rain|rainfall|total)")
	fl.StringVar(&f.flagColumn, "flag-column", "", "name of the quality flag column (default: flag|qflag|quality|qc, if present)")
}

// options checks the flags (usage errors) and builds the reader's options.
func (f dailyFlags) options(windows []int, now time.Time) (station.DailyOptions, error) {
	date, err := pipeline.ResolveDate(f.date, "", now)
	if err != nil {
		return station.DailyOptions{}, asUsage(err)
	}
	o := station.DailyOptions{Target: date, Windows: windows, MinShare: f.minShare, Units: strings.ToLower(f.units),
		IDColumn: f.idColumn, DateColumn: f.dateColumn, ValueColumn: f.valueColumn, FlagColumn: f.flagColumn}
	for _, fl := range strings.Split(f.excludeFlags, ",") {
		if fl = strings.TrimSpace(fl); fl != "" {
			o.ExcludeFlags = append(o.ExcludeFlags, fl)
		}
	}
	if err := pipeline.CheckDailyOptions(o); err != nil {
		return o, asUsage(err)
	}
	return o, nil
}

// read reads the daily records with a progress bar on a terminal.
func (f dailyFlags) read(opt station.DailyOptions, stderr io.Writer) (*station.WindowTotals, error) {
	report, done := dailyProgress(stderr)
	defer done()
	return pipeline.ReadDaily(f.daily, opt, report)
}

// dateHelp is the calendar of the window totals, for the help texts.
const dateHelp = `Calendar: a window of N days for year Y is the N calendar days ending on the target
date's month and day in Y; it belongs to Y even when it starts in Y-1 (a 90-day window
ending 15 February starts in November of the year before). A target of 29 February ends on
28 February in common years. Missing is not zero: a day without a row, with an empty or NA
value, or with an excluded flag is missing, and a total exists only when at least
--min-share of its days (default 0.9: 27 of 30) were reported; otherwise it is empty.
Rows dated after the target date are ignored (counted, one warning).`

func newTotalsCmd() *cobra.Command {
	var f dailyFlags
	var windows, out string
	cmd := &cobra.Command{
		Use:   "totals --daily FILE --out FILE.csv",
		Short: "Window totals per station and year from daily precipitation records",
		Long: `totals reads daily precipitation records (a long table: station id, date YYYY-MM-DD,
precipitation, optionally a quality flag; CSV or TSV, optionally gzip; or Parquet) and writes,
for every station and year from its first record to the target date's year, the total of
each trailing window (--windows, days) ending on the target date's month and day: one
total column per window (total_30d, ...) and one column of reported days per window
(days_30d, ...), in mm. Rows may come in any order; memory grows with stations x years x
windows, not with rows.

` + dateHelp + `

Errors name the file, line and column (an impossible date, a negative value, a station-day
given twice, ...), and nothing is written. The output is written atomically.`,
		Example: `  # four windows ending 30 November, for every year of record
  drygrid totals --daily daily.csv.gz --date 2026-11-30 --out totals.csv

  # one window ending yesterday (UTC), values in tenths of mm, flagged values missing
  drygrid totals --daily daily.tsv --windows 30 --units tenths-mm --exclude-flags X,S \
      --out totals30.csv`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if f.daily == "" {
				return usagef("--daily FILE is required")
			}
			if out == "" {
				return usagef("--out FILE.csv is required")
			}
			ws, err := pipeline.ParseWindows(windows)
			if err != nil {
				return asUsage(err)
			}
			opt, err := f.options(ws, time.Now())
			if err != nil {
				return err
			}
			stderr := cmd.ErrOrStderr()
			r, err := f.read(opt, stderr)
			if err != nil {
				return err
			}
			if err := pipeline.WriteTotals(out, r); err != nil {
				return err
			}
			totalsSummary(stderr, f.daily, r, out)
			return nil
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&f.daily, "daily", "", "daily precipitation records (CSV or TSV, optionally .gz, or Parquet) (required)")
	fl.StringVar(&windows, "windows", "30,90,180,365", "window lengths in days, comma-separated")
	f.register(fl)
	fl.StringVar(&out, "out", "", "output CSV file (required; written atomically)")
	return cmd
}

// totalsSummary writes the closing summary of `drygrid totals`.
func totalsSummary(w io.Writer, daily string, r *station.WindowTotals, out string) {
	for _, m := range r.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	fmt.Fprintf(w, "daily %s: %d rows, %d stations, target %s, units %s, at least %.0f%% of days reported\n",
		daily, r.Rows, len(r.Stations), r.Target, r.Units, 100*r.MinShare)
	for _, s := range pipeline.SummarizeTotals(r) {
		fmt.Fprintf(w, "  %3d days: %d totals, %d missing\n", s.Window, s.Present, s.Missing)
	}
	if r.AfterTarget > 0 {
		fmt.Fprintf(w, "  %d rows dated after %s ignored\n", r.AfterTarget, r.Target)
	}
	if out != "" {
		fmt.Fprintf(w, "wrote %s\n", out)
	}
}
