package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"drygrid/history"
	"drygrid/layer/chart"
	"drygrid/scenario"
	"drygrid/station"
)

// demoHistoryYears is how many target years, ending with the scenario's,
// the demo puts in its history of area in drought.
const demoHistoryYears = 10

// demoHistory runs the index and the regions layer for each of the last
// demoHistoryYears years of the scenario (dated on the window's last day)
// and returns the history table and its chart, to be published with the
// demo's layers. The template job gives the grid, parameters and regions.
func demoHistory(sc *scenario.Scenario, stationsCSV, totalsCSV string, tmpl gridJob) (historyCSV, chartPNG []byte, err error) {
	tmp, err := os.MkdirTemp("", "drygrid-demo-history-")
	if err != nil {
		return nil, nil, fmt.Errorf("demo history: %w", err)
	}
	defer os.RemoveAll(tmp)
	histPath := filepath.Join(tmp, "history.csv")
	for y := sc.TargetYear - demoHistoryYears + 1; y <= sc.TargetYear; y++ {
		res, err := station.ComputeIndex(stationsCSV, totalsCSV, station.IndexOptions{Year: y})
		if err != nil {
			return nil, nil, fmt.Errorf("demo history %d: %w", y, err)
		}
		values := filepath.Join(tmp, fmt.Sprintf("index-%d.csv", y))
		if err := writeIndexTable(values, res); err != nil {
			return nil, nil, err
		}
		job := tmpl
		job.Stations, job.Layers = values, layerSet{"regions": true}
		job.Out = filepath.Join(tmp, fmt.Sprintf("layers-%d", y))
		job.Extra = nil
		r, err := runGrid(job, io.Discard)
		if err != nil {
			return nil, nil, fmt.Errorf("demo history %d: %w", y, err)
		}
		if err := history.Append(histPath, fmt.Sprintf("%d-11-30", y), r.Regions, r.Scheme); err != nil {
			return nil, nil, err
		}
	}
	if historyCSV, err = os.ReadFile(histPath); err != nil {
		return nil, nil, err
	}
	h, err := history.Read(histPath)
	if err != nil {
		return nil, nil, err
	}
	var buf bytes.Buffer
	opt := chart.Options{Title: fmt.Sprintf("%s: share of each district in drought, %s", capitalize(sc.Name), sc.Window)}
	if err := chart.Encode(&buf, h, opt); err != nil {
		return nil, nil, err
	}
	return historyCSV, buf.Bytes(), nil
}
