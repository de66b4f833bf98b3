package main

import (
	"drygrid/history"
	"drygrid/layer/chart"
	"fmt"

	"github.com/spf13/cobra"
)

// newChartCmd is `drygrid chart`: the share in drought over time per region.
func newChartCmd() *cobra.Command {
	var historyPath, out, title string
	var limit int
	c := &cobra.Command{
		Use:   "chart --history FILE.csv --out chart.png [--regions-limit N]",
		Short: "Chart the share of each region in drought over time",
		Long: `chart reads a history table written by 'drygrid stats --history' (columns date,
region and in_drought_pct are used) and draws a PNG line chart of the share of each
region's covered area in drought, one line per region, for reports. With more regions
than --regions-limit, those with the highest latest share are drawn and the caption says
how many were left out.

The chart carries the caution that the figures are interpolated estimates, not official
drought declarations.`,
		Example: `  drygrid chart --history drought-history.csv --out drought-chart.png --regions-limit 6`,
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if historyPath == "" || out == "" {
				return usagef("chart needs --history FILE.csv and --out FILE.png")
			}
			if limit < 1 || limit > 40 {
				return usagef("--regions-limit %d must be between 1 and 40", limit)
			}
			h, err := history.Read(historyPath)
			if err != nil {
				return err
			}
			if err := chart.WriteFile(out, h, chart.Options{RegionsLimit: limit, Title: title}); err != nil {
				return err
			}
			fmt.Fprintf(cmd.ErrOrStderr(), "chart: %d regions, %d dates -> %s\n", min(limit, len(h.Regions)), len(h.Dates), out)
			return nil
		},
	}
	fl := c.Flags()
	fl.StringVar(&historyPath, "history", "", "history CSV from 'drygrid stats --history' (required)")
	fl.StringVar(&out, "out", "", "PNG file to write (required)")
	fl.IntVar(&limit, "regions-limit", 8, "most regions drawn (the highest latest shares)")
	fl.StringVar(&title, "title", "", "chart title (default \"Share of each region in drought\")")
	return c
}
