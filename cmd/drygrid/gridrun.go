package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strconv"
	"syscall"
	"time"

	"drygrid/pipeline"
)

// manifestNow is the clock of the manifest's timings and of a job's
// "today" and "yesterday" (a variable so that tests can stop it; timings
// are the one member allowed to differ between runs).
var manifestNow = time.Now

// report sets the job's version, clock, warnings, notes and progress bars
// (one per stage: reading the daily records, gridding) on stderr; the
// function returned closes the bars.
func report(job *pipeline.Job, stderr io.Writer) func() {
	job.Version = version
	job.Clock = func() time.Time { return manifestNow() }
	if t, ok := sourceDateEpoch(); ok {
		job.Made = t
	}
	job.Warn = func(msg string) { fmt.Fprintf(stderr, "warning: %s\n", msg) }
	job.Note = func(msg string) { fmt.Fprintln(stderr, msg) }
	bars := map[string]*progress{}
	job.Progress = func(stage string, done, total int) {
		bar := bars[stage]
		if bar == nil {
			what := "gridding"
			if stage == "daily" {
				what = "reading daily records"
			}
			bar = newProgress(stderr, total, what)
			bars[stage] = bar
		}
		bar.set(done, total)
	}
	return func() {
		for _, b := range bars {
			b.done()
		}
		clear(bars)
	}
}

// sourceDateEpoch is the time in SOURCE_DATE_EPOCH (seconds since 1970,
// the reproducible-builds convention), when set and valid: the time made
// written on the picture and the page, so that two runs on the same inputs
// give the same bytes.
func sourceDateEpoch() (time.Time, bool) {
	s := os.Getenv("SOURCE_DATE_EPOCH")
	if s == "" {
		return time.Time{}, false
	}
	n, err := strconv.ParseInt(s, 10, 64)
	if err != nil || n < 0 {
		return time.Time{}, false
	}
	return time.Unix(n, 0).UTC(), true
}

// runJob runs a job with the command line's progress bar, warnings and
// notes on stderr, and prints the closing summary.
func runJob(job pipeline.Job, stderr io.Writer) (*pipeline.Result, error) {
	done := report(&job, stderr)
	// An interrupt stops the run between row blocks; the staging
	// directory is removed and the output directory left as it was.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	res, err := pipeline.Run(ctx, job)
	done()
	if err != nil {
		if res != nil { // published, but a later step failed
			printSummary(stderr, job, res)
		}
		return nil, err
	}
	printSummary(stderr, job, res)
	return res, nil
}
