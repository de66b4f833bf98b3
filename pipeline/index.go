package pipeline

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"time"

	"drygrid/manifest"
	"drygrid/station"
)

// runIndex runs the job's index step: the table it makes becomes the
// stations the grid reads (in memory) and index.csv among the outputs;
// its inputs, parameters, counts and time go into the manifest.
func runIndex(job *Job, start time.Time) (*station.IndexResult, error) {
	step := job.Index
	var res *station.IndexResult
	var err error
	totalsInput := [2]string{step.Totals, "totals"}
	if step.Daily != "" {
		totalsInput = [2]string{step.Daily, "daily"}
		res, err = indexFromDaily(job)
	} else {
		res, err = station.ComputeIndex(step.StationList, step.Totals, step.Options)
	}
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	if err := station.WriteIndexCSV(&buf, res); err != nil {
		return nil, fmt.Errorf("index table: %w", err)
	}
	if job.Warn != nil {
		for _, w := range res.Warnings {
			job.Warn(w)
		}
	}
	s := res.Summary()
	if job.Note != nil {
		job.Note(fmt.Sprintf("index %d: %d stations, %d with percentile and SPI, %d without (%d too few years, %d no total); poor fit (%s): %d stations touched",
			s.Year, s.Stations, s.WithIndex, s.Stations-s.WithIndex, s.TooFewYears, s.NoTotal, s.PoorFitRule, s.PoorFit))
	}
	job.StationsData = buf.Bytes()
	job.Extra = cloneMap(job.Extra)
	job.Extra["index.csv"] = buf.Bytes()
	for _, in := range [][2]string{totalsInput, {step.StationList, "station-list"}} {
		f, err := manifest.Input(in[0], in[1])
		if err != nil {
			return nil, err
		}
		job.extraInputs = append(job.extraInputs, f)
	}
	job.ExtraParams = cloneMap(job.ExtraParams)
	job.ExtraParams["index"] = map[string]any{
		"year": s.Year, "ref_start": s.RefStart, "ref_end": s.RefEnd, "min_years": s.MinYears,
		"distribution": s.Distribution, "total_column": step.Options.TotalColumn, "poor_fit": s.PoorFitRule,
	}
	if step.Daily != "" {
		o := step.daily
		job.ExtraParams["daily"] = map[string]any{
			"window_days": step.Window, "windows": o.Windows, "target": o.Target.String(),
			"min_share": o.MinShare, "units": o.Units, "exclude_flags": step.DailyOptions.ExcludeFlags,
		}
	}
	job.ExtraCounts = cloneMap(job.ExtraCounts)
	job.ExtraCounts["index"] = map[string]any{
		"stations": s.Stations, "with_index": s.WithIndex, "no_total": s.NoTotal,
		"too_few_years": s.TooFewYears, "not_fitted": s.NoIndexOther, "fit_failed": s.FitFailed,
		"fit_rejected": s.FitRejected, "fit_untested": s.FitUntested, "capped": s.Capped, "poor_fit": s.PoorFit,
		"totals_rows": res.TotalsRows, "totals_rows_unknown_station": s.SkippedUnknown,
	}
	job.extraTimings = map[string]float64{"index_s": seconds(job.now().Sub(start))}
	return res, nil
}

// indexFromDaily runs the index step on the totals of the job's window,
// computed from the daily records (read here unless RunJob read them
// once for every window).
func indexFromDaily(job *Job) (*station.IndexResult, error) {
	step := job.Index
	if step.daily == nil {
		r, err := readJobDaily(job)
		if err != nil {
			return nil, err
		}
		step.daily = r
	}
	return indexOfWindow(step.daily, step.Daily, step.Window, step.StationList, step.Options)
}

// indexOfWindow runs the index step on window n's totals of r (read from
// the daily file named daily), written in memory in the form the step
// reads (station,year,total).
func indexOfWindow(r *station.WindowTotals, daily string, n int, stationList string, opt station.IndexOptions) (*station.IndexResult, error) {
	if r.WindowIndex(n) < 0 {
		return nil, Usagef("window of %d days: not among the windows read (%v)", n, r.Windows)
	}
	totals, err := indexTotals(r, n)
	if err != nil {
		return nil, err
	}
	f, err := os.Open(stationList)
	if err != nil {
		return nil, fmt.Errorf("stations %s: %w", stationList, err)
	}
	defer f.Close()
	name := fmt.Sprintf("%s (%d-day totals)", daily, n)
	return station.ComputeIndexReaders(stationList, f, name, bytes.NewReader(totals), opt)
}

// ComputeIndexDaily is the index step on daily records: the totals of the
// window of n days ending on opt.Target are computed from the daily file
// (station.ReadDaily, with progress as ReadDaily's) and go, in memory,
// into the index step with the station list; the index options' year
// defaults to the target's. It returns the index table and the totals.
func ComputeIndexDaily(stationList, daily string, opt station.DailyOptions, n int, iopt station.IndexOptions, progress func(done, total int64)) (*station.IndexResult, *station.WindowTotals, error) {
	if len(opt.Windows) == 0 {
		opt.Windows = []int{n}
	}
	if err := CheckWindows(opt.Windows); err != nil {
		return nil, nil, err
	}
	if err := CheckDailyOptions(opt); err != nil {
		return nil, nil, err
	}
	r, err := ReadDaily(daily, opt, progress)
	if err != nil {
		return nil, nil, err
	}
	if iopt.Year == 0 {
		iopt.Year = r.Target.Year()
	}
	res, err := indexOfWindow(r, daily, n, stationList, iopt)
	if err != nil {
		return nil, r, err
	}
	return res, r, nil
}

// readJobDaily reads the daily records of the job's index step, with the
// job's progress (stage "daily", bytes read) and warnings.
func readJobDaily(job *Job) (*station.WindowTotals, error) {
	step := job.Index
	opt := step.DailyOptions
	opt.Target = job.Date
	var progress func(done, total int64)
	if job.Progress != nil {
		progress = func(done, total int64) { job.Progress("daily", int(done), int(total)) }
	}
	r, err := ReadDaily(step.Daily, opt, progress)
	if err != nil {
		return nil, err
	}
	if job.Warn != nil {
		for _, w := range r.Warnings {
			job.Warn(w)
		}
	}
	if job.Note != nil {
		job.Note(fmt.Sprintf("daily %s: %d rows, %d stations, windows %v days ending %s", step.Daily, r.Rows, len(r.Stations), r.Windows, r.Target))
	}
	return r, nil
}

// cloneMap copies a map (nil gives an empty one), so that a job's maps are
// not changed under its caller.
func cloneMap[V any](m map[string]V) map[string]V {
	c := make(map[string]V, len(m)+1)
	for k, v := range m {
		c[k] = v
	}
	return c
}

// WriteIndexTable writes the index step's table to path atomically.
func WriteIndexTable(path string, res *station.IndexResult) error {
	return writeStream(path, func(w io.Writer) error { return station.WriteIndexCSV(w, res) })
}
