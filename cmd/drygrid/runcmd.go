package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"github.com/spf13/cobra"

	"drygrid/history"
	"drygrid/manifest"
	"drygrid/station"
)

func newRunCmd() *cobra.Command {
	var example bool
	cmd := &cobra.Command{
		Use:   "run JOB.toml",
		Short: "Run the daily job (index, grid, layers, history) from one job file",
		Long: `run reads a job file (TOML) naming the inputs, the window label and date, the grid, the
interpolation, the band scheme, the regions, the outputs and the history file, and runs the
whole job: the index step when the job names window totals, then the grid step with every
chosen layer, then one history row per region and date.

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
  drygrid demo --out demo && drygrid run --example > demo/job.toml && drygrid run demo/job.toml`,
		Args: func(cmd *cobra.Command, args []string) error {
			if example {
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
			if example {
				_, err := fmt.Fprint(cmd.OutOrStdout(), jobExample)
				return err
			}
			return runJobFile(args[0], cmd.ErrOrStderr())
		},
	}
	cmd.Flags().BoolVar(&example, "example", false, "print a commented example job file")
	return cmd
}

// readJob reads and parses the job file at path.
func readJob(path string) (*runJob, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("job %s: %w", path, err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, jobMaxBytes+1))
	if err != nil {
		return nil, fmt.Errorf("job %s: %w", path, err)
	}
	return parseJob(path, data)
}

// runJobFile runs the job in the file at path.
func runJobFile(path string, stderr io.Writer) error {
	start := manifestNow()
	j, err := readJob(path)
	if err != nil {
		return err
	}
	g := j.Grid
	jobIn, err := manifest.Input(path, "job")
	if err != nil {
		return err
	}
	g.ExtraInputs = []manifest.File{jobIn}
	g.ExtraParams = map[string]any{"window": j.Window, "date": j.Date, "year": j.Year}
	g.ExtraCounts = map[string]any{}
	g.ExtraTimings = map[string]float64{}
	if j.Totals != "" {
		res, err := station.ComputeIndex(j.StationList, j.Totals, j.Index)
		if err != nil {
			return err
		}
		var buf bytes.Buffer
		if err := station.WriteIndexCSV(&buf, res); err != nil {
			return fmt.Errorf("index table: %w", err)
		}
		for _, w := range res.Warnings {
			fmt.Fprintf(stderr, "warning: %s\n", w)
		}
		s := res.Summary()
		fmt.Fprintf(stderr, "index %d: %d stations, %d with percentile and SPI, %d without (%d too few years, %d no total)\n",
			s.Year, s.Stations, s.WithIndex, s.Stations-s.WithIndex, s.TooFewYears, s.NoTotal)
		g.StationsData = buf.Bytes()
		g.Extra = map[string][]byte{"index.csv": buf.Bytes()}
		for _, in := range [][2]string{{j.Totals, "totals"}, {j.StationList, "station-list"}} {
			f, err := manifest.Input(in[0], in[1])
			if err != nil {
				return err
			}
			g.ExtraInputs = append(g.ExtraInputs, f)
		}
		g.ExtraParams["index"] = map[string]any{
			"year": s.Year, "ref_start": s.RefStart, "ref_end": s.RefEnd, "min_years": s.MinYears,
			"distribution": s.Distribution, "total_column": j.Index.TotalColumn,
		}
		g.ExtraCounts["index"] = map[string]any{
			"stations": s.Stations, "with_index": s.WithIndex, "no_total": s.NoTotal,
			"too_few_years": s.TooFewYears, "not_fitted": s.NoIndexOther, "fit_failed": s.FitFailed,
			"fit_rejected": s.FitRejected, "fit_untested": s.FitUntested, "capped": s.Capped,
			"totals_rows": res.TotalsRows, "totals_rows_unknown_station": s.SkippedUnknown,
		}
		g.ExtraTimings["index_s"] = manifestSeconds(manifestNow().Sub(start))
	}
	res, err := runGrid(g, stderr)
	if err != nil {
		return err
	}
	if res.crossval != nil {
		printCrossval(stderr, res.Values.Path, *res.crossval)
	}
	if j.History != "" {
		if err := history.Append(j.History, j.Date, res.Regions, res.Scheme); err != nil {
			return fmt.Errorf("layers published in %s, but the history was not updated: %w", g.Out, err)
		}
		fmt.Fprintf(stderr, "history: %d regions for %s in %s\n", len(res.Regions), j.Date, filepath.Clean(j.History))
	}
	return nil
}
