package main

import (
	"fmt"
	"io"
	"path/filepath"

	"drygrid/scenario"
	"drygrid/station"
)

// demoIndex runs the index step on the scenario's totals and returns the
// path of the index table the grid step reads.
func demoIndex(sc *scenario.Scenario, stationsCSV, totalsCSV, dir string, stderr io.Writer) (string, error) {
	res, err := station.ComputeIndex(stationsCSV, totalsCSV, station.IndexOptions{Year: sc.TargetYear})
	if err != nil {
		return "", fmt.Errorf("demo index: %w", err)
	}
	out := filepath.Join(dir, "index.csv")
	if err := writeIndexTable(out, res); err != nil {
		return "", err
	}
	s := res.Summary()
	fmt.Fprintf(stderr, "index: %d stations, %d with percentile and SPI for %d, %d without (%d with too few years, %d without a %d total)\n",
		s.Stations, s.WithIndex, s.Year, s.Stations-s.WithIndex, s.TooFewYears, s.NoTotal, s.Year)
	return out, nil
}
