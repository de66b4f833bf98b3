package pipeline

import (
	"bytes"
	"fmt"
	"io"
	"time"

	"drygrid/manifest"
	"drygrid/station"
)

// runIndex runs the job's index step: the table it makes becomes the
// stations the grid reads (in memory) and index.csv among the outputs;
// its inputs, parameters, counts and time go into the manifest.
func runIndex(job *Job, start time.Time) (*station.IndexResult, error) {
	step := job.Index
	res, err := station.ComputeIndex(step.StationList, step.Totals, step.Options)
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
	for _, in := range [][2]string{{step.Totals, "totals"}, {step.StationList, "station-list"}} {
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
