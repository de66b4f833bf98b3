package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"drygrid/pipeline"
	"drygrid/station"
)

// indexFlags are the flags of `drygrid index`.
type indexFlags struct {
	totals, stations string
	totalColumn      string
	year             int
	refStart, refEnd int
	minYears         int
	distribution     string
	poorFit          string
	out              string
	fromDaily        // --daily, --window and the daily records' flags (index_daily.go)
}

func newIndexCmd() *cobra.Command {
	var f indexFlags
	cmd := &cobra.Command{
		Use:   "index (--totals FILE | --daily FILE --window N) --stations FILE --out FILE.csv",
		Short: "Per-station percentile and SPI of a year's window total",
		Long: `index reads window totals per station and year (for example the precipitation of the
30 days ending on today's date, for every year of record) and a station table, and writes
per station the target year's mid-rank percentile and SPI, ready for 'drygrid grid'.

Reference sample: the station's non-missing totals in [--ref-start, --ref-end] (default:
every year it has, the target year included). A station needs --min-years of them and a
target-year total; otherwise its percentile and spi are empty and the note says why.

SPI (--distribution gamma): a gamma distribution is fitted by maximum likelihood to the
non-zero reference totals (Thom 1958 start, Newton's method); with q the share of zeros,
H = q + (1 - q) G(x) for x > 0 and q / 2 for x = 0 (Stagge et al. 2015); SPI = Phi^-1(H),
held within +/-5. Each fit is checked by the Anderson-Darling test at 5 % (critical values of
Stephens for the gamma with estimated parameters, D'Agostino and Stephens 1986); fit_ok is
false when it rejects. --distribution empirical gives SPI = Phi^-1 of the Gringorten
plotting position (i - 0.44) / (n + 0.12) with mid-ranks for ties, for comparison.

A station whose gamma fit the test rejects gets, by default, the empirical (Gringorten
plotting-position) SPI instead of its gamma SPI (--poor-fit empirical); --poor-fit keep keeps
the gamma SPI, --poor-fit drop leaves the SPI empty. The note says which, and the summary
how many stations the rule touched. Fits too short to test keep their gamma SPI.

Percentile: 100 x (count below + half the count equal) / n. pct_of_median: 100 x total /
median of the reference sample.

Totals table: station id (station|id|station_id|site), year, total (total|total_mm|precip|value
or --total-column); an empty or NA total is missing, never zero. Station table: id,
latitude, longitude (latitude|lat, longitude|lon|long|lng); other columns are ignored.
Tables are CSV or TSV, optionally gzip-compressed.

Daily records (--daily FILE --window N, instead of --totals): the totals of the window of N
days ending on --date's month and day are computed from the daily records in memory, as
'drygrid totals' does (see its help for the calendar and the missing-day rules), and indexed.

Output columns: station,latitude,longitude,year,total,years,zeros,percentile,spi,
pct_of_median,gamma_shape,gamma_scale,fit_ok,note.

These are statistics of station records, and maps made from them are interpolated
estimates, not official drought declarations: consult your national meteorological or
hydrological service and local rules.`,
		Example: `  # this year's SPI against every year of record, then the map layers
  drygrid index --totals totals.csv --stations stations.csv --out spi.csv
  drygrid grid --stations spi.csv --kind spi --out layers/

  # a fixed 1991-2020 reference period, year 2024, the empirical SPI for comparison
  drygrid index --totals totals.csv.gz --stations stations.tsv --year 2024 \
      --ref-start 1991 --ref-end 2020 --distribution empirical --out spi-empirical.csv

  # straight from daily records: the 90 days ending 30 November of every year
  drygrid index --daily daily.csv.gz --window 90 --date 2026-11-30 --stations stations.csv --out spi90.csv`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if f.daily.daily != "" {
				return f.runDaily(cmd.ErrOrStderr())
			}
			opt, err := f.options()
			if err != nil {
				return err
			}
			res, err := station.ComputeIndex(f.stations, f.totals, opt)
			if err != nil {
				return err
			}
			if err := pipeline.WriteIndexTable(f.out, res); err != nil {
				return err
			}
			indexSummary(cmd.ErrOrStderr(), res, f.out)
			return nil
		},
	}
	fl := cmd.Flags()
	fl.StringVar(&f.totals, "totals", "", "window totals per station and year (CSV or TSV, optionally .gz) (required)")
	fl.StringVar(&f.stations, "stations", "", "station table with id, latitude, longitude (required)")
	fl.StringVar(&f.totalColumn, "total-column", "", "name of the total column (default: total|total_mm|precip|value)")
	fl.IntVar(&f.year, "year", 0, "target year (default: the latest year with a total)")
	fl.IntVar(&f.refStart, "ref-start", 0, "first year of the reference period (default: the station's first)")
	fl.IntVar(&f.refEnd, "ref-end", 0, "last year of the reference period (default: the station's last)")
	fl.IntVar(&f.minYears, "min-years", station.DefaultMinYears, "least number of reference totals a station needs")
	fl.StringVar(&f.distribution, "distribution", station.DistGamma, "SPI from a fitted gamma, or from the empirical plotting position: gamma or empirical")
	fl.StringVar(&f.poorFit, "poor-fit", station.PoorFitEmpirical, "a gamma fit Anderson-Darling rejects: empirical (the Gringorten plotting-position SPI), keep (the gamma SPI) or drop (no SPI)")
	fl.StringVar(&f.out, "out", "", "output CSV file (required; written atomically)")
	f.fromDaily.register(fl)
	return cmd
}

// options checks the flags (usage errors, exit code 2) and builds the options.
func (f indexFlags) options() (station.IndexOptions, error) {
	var o station.IndexOptions
	if f.totals == "" && f.daily.daily == "" {
		return o, usagef("--totals FILE is required (or --daily FILE --window N)")
	}
	if f.stations == "" {
		return o, usagef("--stations FILE is required")
	}
	if f.out == "" {
		return o, usagef("--out FILE.csv is required")
	}
	if f.minYears < 1 {
		return o, usagef("--min-years %d: must be 1 or more", f.minYears)
	}
	o = station.IndexOptions{Year: f.year, RefStart: f.refStart, RefEnd: f.refEnd, MinYears: f.minYears,
		Distribution: strings.ToLower(f.distribution), TotalColumn: f.totalColumn, PoorFit: strings.ToLower(f.poorFit)}
	if err := o.Validate(); err != nil {
		if strings.HasPrefix(err.Error(), "poor-fit") {
			return o, usageError{fmt.Errorf("--%w", err)}
		}
		return o, usageError{fmt.Errorf("--year/--ref-start/--ref-end/--distribution: %w", err)}
	}
	return o, nil
}

// indexSummary writes the closing summary of a run.
func indexSummary(w io.Writer, res *station.IndexResult, out string) {
	for _, m := range res.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	s := res.Summary()
	ref := "all years"
	if s.RefStart != 0 || s.RefEnd != 0 {
		ref = fmt.Sprintf("%s-%s", indexYear(s.RefStart, "first"), indexYear(s.RefEnd, "last"))
	}
	fmt.Fprintf(w, "index %d (%s SPI, reference %s, at least %d years): %d stations, %d with index, %d without\n",
		s.Year, s.Distribution, ref, s.MinYears, s.Stations, s.WithIndex, s.Stations-s.WithIndex)
	fmt.Fprintf(w, "  without: %d no total for %d, %d too few reference years, %d gamma not fitted\n",
		s.NoTotal, s.Year, s.TooFewYears, s.NoIndexOther)
	fmt.Fprintf(w, "  gamma fits: %d failed, %d rejected by Anderson-Darling at 5 %%, %d too short to test; %d SPI held at +/-5\n",
		s.FitFailed, s.FitRejected, s.FitUntested, s.Capped)
	fmt.Fprintf(w, "  poor fits (--poor-fit %s): %s\n", s.PoorFitRule, poorFitLine(s))
	if s.SkippedUnknown > 0 {
		fmt.Fprintf(w, "  skipped %d totals rows of stations missing from the station table\n", s.SkippedUnknown)
	}
	fmt.Fprintf(w, "wrote %s\n", out)
}

// poorFitLine says what the poor-fit rule did.
func poorFitLine(s station.IndexSummary) string {
	switch {
	case s.Distribution == station.DistEmpirical:
		return "not applied (empirical SPI for every station)"
	case s.PoorFitRule == station.PoorFitKeep:
		return fmt.Sprintf("%d stations keep their gamma SPI", s.FitRejected)
	case s.PoorFitRule == station.PoorFitDrop:
		return fmt.Sprintf("%d stations without SPI", s.PoorFit)
	}
	return fmt.Sprintf("%d stations given the empirical (Gringorten) SPI instead of the gamma SPI", s.PoorFit)
}

func indexYear(y int, open string) string {
	if y == 0 {
		return open
	}
	return fmt.Sprint(y)
}
