package main

import (
	"fmt"
	"io"
	"path/filepath"
	"time"

	"github.com/spf13/cobra"

	"drygrid/pipeline"
)

// runFlags are the flags of `drygrid run` beyond the job file.
type runFlags struct {
	example        bool
	date, from, to string
	archive        bool
}

func newRunCmd() *cobra.Command {
	var f runFlags
	cmd := &cobra.Command{
		Use:   "run JOB.toml",
		Short: "Run the daily job (index, grid, layers, history) from one job file",
		Long: `run reads a job file (TOML) naming the inputs, the window label and date, the grid, the
interpolation, the band scheme, the regions, the outputs and the history file, and runs the
whole job: the index step when the job names window totals or daily records, then the grid
step with every chosen layer, then one history row per region and date.

Daily records ([inputs] daily, windows = [30, 90]): the file is read once for all windows,
and each window gets its own set of layers: with one window in the output directory itself,
with several in DIR/30d/, DIR/90d/ ..., each published atomically (and history rows in
history_30d.csv, history_90d.csv ... beside the history file named). A window of N days
for year Y ends on the date's month and day in Y and belongs to Y even when it starts in Y-1
(29 February ends on 28 February in common years); missing days are not zero, and a total
needs min_share (default 0.9) of its days reported ('drygrid totals --help' says more).

A job that runs itself: date = "today" or "yesterday" is the day the job runs, or the day
before, in UTC or in timezone = "Pacific/Auckland" (any IANA zone name), so the same job file
runs unchanged from a scheduler every day. --date YYYY-MM-DD overrides the job's date;
--from D1 --to D2 back-fills one run per day in date order and stops at the first day that
fails, naming it. With archive = true (or --archive) each day is published into
DIR/YYYY-MM-DD/ and DIR/latest, a symbolic link replaced atomically, points at the newest
complete day.

Relative paths are relative to the job file's directory. An unknown key is an error naming
its line. The output directory is replaced atomically: everything is written into a
temporary directory beside it and swapped in only when complete, so a failed run leaves the
previous layers byte-identical; files in it that drygrid did not write are kept (hard-linked
into the new directory). manifest.json records the version, parameters, each input's and
output's size and SHA-256, the counts and the grid; only its "timings" member differs
between runs on the same inputs.

The layers are interpolated estimates, not official drought declarations: consult your
national meteorological or hydrological service and local rules.`,
		Example: `  drygrid run --example > job.toml     # a commented job file to start from
  drygrid demo --out demo && drygrid run --example > demo/job.toml && drygrid run demo/job.toml

  # every morning from cron, with date = "yesterday" in the job file
  drygrid run /srv/drought/job.toml

  # back-fill November into a dated archive
  drygrid run job.toml --from 2026-11-01 --to 2026-11-30 --archive`,
		Args: func(cmd *cobra.Command, args []string) error {
			if f.example {
				if len(args) != 0 {
					return usagef("run --example takes no job file")
				}
				return nil
			}
			if len(args) != 1 {
				return usagef("run needs one job file: drygrid run JOB.toml (see 'drygrid run --example')")
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			if f.example {
				_, err := fmt.Fprint(cmd.OutOrStdout(), pipeline.JobExample)
				return err
			}
			return runJobFile(args[0], f, cmd.ErrOrStderr())
		},
	}
	fl := cmd.Flags()
	fl.BoolVar(&f.example, "example", false, "print a commented example job file")
	fl.StringVar(&f.date, "date", "", "run for this date YYYY-MM-DD (or today, yesterday) instead of the job's")
	fl.StringVar(&f.from, "from", "", "back-fill: first date YYYY-MM-DD of one run per day (with --to)")
	fl.StringVar(&f.to, "to", "", "back-fill: last date YYYY-MM-DD (with --from)")
	fl.BoolVar(&f.archive, "archive", false, "publish into DIR/YYYY-MM-DD/ and point DIR/latest at the newest day")
	return cmd
}

// dates are the days to run: the job's own (""), --date, or --from to --to.
func (f runFlags) dates() ([]string, error) {
	if f.date != "" && (f.from != "" || f.to != "") {
		return nil, usagef("--date and --from/--to: give one or the other")
	}
	if f.date != "" {
		if !pipeline.IsRelativeDate(f.date) {
			if err := pipeline.CheckDate(f.date); err != nil {
				return nil, asUsage(err)
			}
		}
		return []string{f.date}, nil
	}
	if (f.from == "") != (f.to == "") {
		return nil, usagef("--from and --to go together")
	}
	if f.from == "" {
		return []string{""}, nil
	}
	d0, err := parseDateFlag("--from", f.from)
	if err != nil {
		return nil, err
	}
	d1, err := parseDateFlag("--to", f.to)
	if err != nil {
		return nil, err
	}
	if d1.Before(d0) {
		return nil, usagef("--to %s is before --from %s", f.to, f.from)
	}
	if d1.Sub(d0) > 3660*24*time.Hour {
		return nil, usagef("--from %s --to %s: more than ten years of daily runs", f.from, f.to)
	}
	var out []string
	for d := d0; !d.After(d1); d = d.AddDate(0, 0, 1) {
		out = append(out, d.Format("2006-01-02"))
	}
	return out, nil
}

// runJobFile runs the job in the file at path, once per date asked for.
func runJobFile(path string, f runFlags, stderr io.Writer) error {
	dates, err := f.dates()
	if err != nil {
		return err
	}
	j, err := pipeline.ReadJobFile(path)
	if err != nil {
		return err
	}
	if f.archive {
		j.Archive = true
	}
	for _, d := range dates {
		job := *j
		if d != "" {
			job.Date = d
		}
		if err := runDay(job, stderr); err != nil {
			if len(dates) > 1 {
				return fmt.Errorf("run for %s failed (earlier days are done, later ones not run): %w", d, err)
			}
			return err
		}
	}
	return nil
}

// runDay runs a job for one day: each window's layers, then the archive's
// latest link.
func runDay(job pipeline.Job, stderr io.Writer) error {
	done := report(&job, stderr)
	plan, err := pipeline.PlanDay(job)
	done()
	if err != nil {
		return err
	}
	for _, j := range plan.Jobs {
		if len(plan.Jobs) > 1 {
			fmt.Fprintf(stderr, "window %d days: %s\n", j.WindowDays, j.Out)
		}
		res, err := runJob(j, stderr)
		if err != nil {
			plan.Abandon()
			return err
		}
		if res.CrossVal != nil {
			printCrossval(stderr, res.Values.Path, *res.CrossVal)
		}
		if h := res.History; h != nil {
			fmt.Fprintf(stderr, "history: %d regions for %s in %s\n", h.Rows, h.Date, filepath.Clean(h.Path))
		}
	}
	return plan.Finish()
}
