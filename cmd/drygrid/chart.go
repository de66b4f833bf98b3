package main

import (
	"fmt"
	"time"

	"drygrid/history"
	"drygrid/layer/chart"
	"drygrid/pipeline"

	"github.com/spf13/cobra"
)

// newChartCmd is `drygrid chart`: the share in drought over time per
// region, or one region's shares by band.
func newChartCmd() *cobra.Command {
	var historyPath, out, title, regionName, from, to, scheme string
	var limit int
	c := &cobra.Command{
		Use:   "chart --history FILE.csv --out chart.png [--region NAME] [--from D1] [--to D2] [--regions-limit N]",
		Short: "Chart the share of each region in drought over time, or one region's bands",
		Long: `chart reads a history table written by 'drygrid stats --history' or a run with a history
file and draws a PNG chart for reports, in the same font as map.png.

Without --region: the share of each region's covered area in drought, one line per region
(the columns date, region and in_drought_pct are used). With more regions than
--regions-limit, those with the highest latest share are drawn and the caption says how
many were left out; a daily history is drawn without markers on its points.

With --region NAME: that region alone, its covered area's share in each band stacked over
time (an area chart, driest at the bottom, in the scheme's colours and order) with the
share in drought as a black line over it, and a legend of the bands with their latest
shares (the <key>_pct columns are used; --scheme names the scheme the history was written
with, default the nine built-in bands).

--from and --to (YYYY-MM-DD, both included, either may be left out) limit the chart to a
date range; a range holding no row of the history is refused with the history's first
and last dates.

The chart carries the caution that the figures are interpolated estimates, not official
drought declarations.`,
		Example: `  drygrid chart --history drought-history.csv --out drought-chart.png --regions-limit 4
  drygrid chart --history history_30d.csv --region upland --from 2026-06-01 --out upland.png`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if historyPath == "" || out == "" {
				return usagef("chart needs --history FILE.csv and --out FILE.png")
			}
			if limit < 1 || limit > 40 {
				return usagef("--regions-limit %d must be between 1 and 40", limit)
			}
			var t0, t1 time.Time
			for _, d := range []struct {
				flag, v string
				t       *time.Time
			}{{"--from", from, &t0}, {"--to", to, &t1}} {
				if d.v == "" {
					continue
				}
				t, err := parseDateFlag(d.flag, d.v)
				if err != nil {
					return err
				}
				*d.t = t
			}
			if !t0.IsZero() && !t1.IsZero() && t1.Before(t0) {
				return usagef("--from %s is after --to %s", from, to)
			}
			s, err := pipeline.LoadScheme(scheme)
			if err != nil {
				return err
			}
			h, err := history.Read(historyPath)
			if err != nil {
				return err
			}
			part := h.Between(t0, t1)
			if len(part.Dates) == 0 {
				return fmt.Errorf("chart: %s has no row dated %s: its dates run from %s to %s", historyPath, chartRange(from, to), h.FirstDate(), h.LastDate())
			}
			if regionName != "" { // the region and the history's bands, checked before the file is touched
				if _, err := chart.StackRegion(part, regionName, s); err != nil {
					return fmt.Errorf("%s: %w", historyPath, err)
				}
			}
			if err := chart.WriteFile(out, part, chart.Options{Region: regionName, Scheme: s, RegionsLimit: limit, Title: title}); err != nil {
				return err
			}
			what := fmt.Sprintf("%d regions", min(limit, len(h.Regions)))
			if regionName != "" {
				what = fmt.Sprintf("region %s, %d bands", regionName, len(s.Bands))
			}
			fmt.Fprintf(cmd.ErrOrStderr(), "chart: %s, %d dates (%s to %s) -> %s\n", what, len(part.Dates), part.FirstDate(), part.LastDate(), out)
			return nil
		},
	}
	fl := c.Flags()
	fl.StringVar(&historyPath, "history", "", "history CSV from 'drygrid stats --history' or a run (required)")
	fl.StringVar(&out, "out", "", "PNG file to write (required)")
	fl.StringVar(&regionName, "region", "", "draw this region alone: its shares by band stacked over time")
	fl.StringVar(&from, "from", "", "first date YYYY-MM-DD drawn (default the history's first)")
	fl.StringVar(&to, "to", "", "last date YYYY-MM-DD drawn (default the history's last)")
	fl.IntVar(&limit, "regions-limit", 5, "most regions drawn without --region (the highest latest shares)")
	fl.StringVar(&scheme, "scheme", "", "band scheme TOML file the history was written with, for --region (default: the built-in nine bands)")
	fl.StringVar(&title, "title", "", "chart title (default \"Share of each region in drought\", or \"NAME: share of the covered area in each band\")")
	return c
}

// chartRange says a date range as the user gave it.
func chartRange(from, to string) string {
	switch {
	case from != "" && to != "":
		return "from " + from + " to " + to
	case from != "":
		return "on or after " + from
	default:
		return "on or before " + to
	}
}
