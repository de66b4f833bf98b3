package main

import (
	"fmt"
	"io"
	"path/filepath"

	"github.com/spf13/cobra"

	"drygrid/pipeline"
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
				_, err := fmt.Fprint(cmd.OutOrStdout(), pipeline.JobExample)
				return err
			}
			return runJobFile(args[0], cmd.ErrOrStderr())
		},
	}
	cmd.Flags().BoolVar(&example, "example", false, "print a commented example job file")
	return cmd
}

// runJobFile runs the job in the file at path.
func runJobFile(path string, stderr io.Writer) error {
	j, err := pipeline.ReadJobFile(path)
	if err != nil {
		return err
	}
	res, err := runJob(*j, stderr)
	if err != nil {
		return err
	}
	if res.CrossVal != nil {
		printCrossval(stderr, res.Values.Path, *res.CrossVal)
	}
	if h := res.History; h != nil {
		fmt.Fprintf(stderr, "history: %d regions for %s in %s\n", h.Rows, h.Date, filepath.Clean(h.Path))
	}
	return nil
}
