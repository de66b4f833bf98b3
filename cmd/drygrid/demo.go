package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"

	"github.com/spf13/cobra"

	"drygrid/pipeline"
)

func newDemoCmd() *cobra.Command {
	var out string
	cmd := &cobra.Command{
		Use:   "demo [--out DIR]",
		Short: "Run the whole job on the built-in invented scenario",
		Long: `demo generates an invented scenario of our own over open ocean in the South Pacific (the
fictitious Kelverin Islands: about 220 invented stations with 65 years of invented daily
records, with gaps and flagged days, and six invented districts), then runs the whole job on
it: the 30-day totals ending 30 November of every year from the daily records
(inputs/daily.csv.gz -> inputs/totals.csv), per-station percentile and SPI (the index step,
inputs/index.csv), the grid with every layer, and area in drought per district. Inputs go to
DIR/inputs, layers to DIR. The data are invented: nothing in the
demo describes a real place.`,
		Example: `  drygrid demo
  drygrid demo --out /tmp/demo && open /tmp/demo/map.html`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			return runDemo(out, cmd.ErrOrStderr())
		},
	}
	cmd.Flags().StringVar(&out, "out", "drygrid-demo", "output directory")
	return cmd
}

// runDemo writes the scenario's inputs and runs index and grid on them.
func runDemo(out string, stderr io.Writer) error {
	job, err := pipeline.DemoJob(context.Background(), out, func(msg string) { fmt.Fprintln(stderr, msg) })
	if err != nil {
		return err
	}
	if _, err := runJob(job, stderr); err != nil {
		return err
	}
	fmt.Fprintf(stderr, "demo: open %s in a browser; the data are invented\n", filepath.Join(out, "map.html"))
	return nil
}
