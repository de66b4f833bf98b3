package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"drygrid/interp"
	"drygrid/scenario"
	"drygrid/station"
)

func newDemoCmd() *cobra.Command {
	var out string
	cmd := &cobra.Command{
		Use:   "demo [--out DIR]",
		Short: "Run the whole job on the built-in invented scenario",
		Long: `demo generates an invented scenario of our own over open ocean in the South Pacific (the
fictitious Kelverin Islands: about 220 invented stations with 65 years of invented 30-day
window totals and six invented districts), then runs the whole job on it: per-station
percentile and SPI (the index step), the grid with every layer, and area in drought per
district. Inputs go to DIR/inputs, layers to DIR. The data are invented: nothing in the
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
	sc := scenario.DemoScenario()
	in := filepath.Join(out, "inputs")
	if err := os.MkdirAll(in, 0o755); err != nil {
		return fmt.Errorf("demo: %w", err)
	}
	stationsCSV := filepath.Join(in, "stations.csv")
	totalsCSV := filepath.Join(in, "totals.csv")
	districts := filepath.Join(in, "districts.geojson")
	if err := writeStream(stationsCSV, sc.WriteStationsCSV); err != nil {
		return err
	}
	if err := writeStream(totalsCSV, sc.WriteTotalsCSV); err != nil {
		return err
	}
	if err := writeStream(districts, func(w io.Writer) error { return writeDemoDistricts(w, sc.BBox) }); err != nil {
		return err
	}
	fmt.Fprintf(stderr, "demo: %s, %d invented stations, target year %d (%s)\n", sc.Name, len(sc.Sites), sc.TargetYear, sc.Window)
	values, err := demoIndex(sc, stationsCSV, totalsCSV, in, stderr)
	if err != nil {
		return err
	}
	layers, _ := parseLayers("all")
	job := gridJob{
		Command:  "demo",
		Stations: values,
		Values:   station.ValueOptions{Kind: station.KindSPI},
		Res:      0.05,
		BBox:     &sc.BBox,
		Params:   interp.DefaultParams(),
		Regions:  districts, RegionKey: "name",
		Layers: layers,
		Title:  fmt.Sprintf("%s: SPI, %s %d", capitalize(sc.Name), sc.Window, sc.TargetYear),
		Out:    out,
	}
	job.Params.RadiusKm = sc.RadiusKm
	history, chart, err := demoHistory(sc, stationsCSV, totalsCSV, job)
	if err != nil {
		return err
	}
	fmt.Fprintf(stderr, "history: %d years of area in drought per district (history.csv, chart.png)\n", demoHistoryYears)
	job.Extra = map[string][]byte{"history.csv": history, "chart.png": chart}
	_, err = runGrid(job, stderr)
	if err == nil {
		fmt.Fprintf(stderr, "demo: open %s in a browser; the data are invented\n", filepath.Join(out, "map.html"))
	}
	return err
}

// capitalize upper-cases the first letter of a title.
func capitalize(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}
