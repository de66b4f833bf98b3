package pipeline

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"drygrid/history"
	"drygrid/interp"
	"drygrid/layer/chart"
	"drygrid/scenario"
	"drygrid/station"
)

// demoHistoryYears is how many target years, ending with the scenario's,
// the demo puts in its history of area in drought.
const demoHistoryYears = 10

// DemoJob prepares the demo: it writes the invented scenario's inputs into
// out/inputs (stations, daily records, districts, the islands' invented
// coastlines in coast.geojson, the job's mask: the map shows land only),
// computes the window
// totals from the daily records into out/inputs/totals.csv, runs the index
// step on them into out/inputs/index.csv, and computes, in memory, the history of
// area in drought per district over the last ten target years and its
// charts (chart.png: every district's share in drought; chart-district.png:
// the district most in drought in the target year, its bands stacked over
// the years). It returns the job that maps the target year with every layer,
// the history and the chart among its files. note, when not nil, receives
// one line on each step.
func DemoJob(ctx context.Context, out string, note func(string)) (Job, error) {
	if note == nil {
		note = func(string) {}
	}
	sc := scenario.DemoScenario()
	in := filepath.Join(out, "inputs")
	if err := os.MkdirAll(in, 0o755); err != nil {
		return Job{}, fmt.Errorf("demo: %w", err)
	}
	stationsCSV := filepath.Join(in, "stations.csv")
	dailyCSV := filepath.Join(in, "daily.csv.gz")
	totalsCSV := filepath.Join(in, "totals.csv")
	districts := filepath.Join(in, "districts.geojson")
	coast := filepath.Join(in, "coast.geojson")
	if err := writeStream(stationsCSV, sc.WriteStationsCSV); err != nil {
		return Job{}, err
	}
	if err := writeStream(dailyCSV, sc.WriteDailyCSVGz); err != nil {
		return Job{}, err
	}
	daily, err := ReadDaily(dailyCSV, station.DailyOptions{Target: scenario.DailyTarget,
		Windows: []int{scenario.DailyWindow}, ExcludeFlags: []string{scenario.DailyBadFlag}}, nil)
	if err != nil {
		return Job{}, fmt.Errorf("demo daily records: %w", err)
	}
	sum := SummarizeTotals(daily)[0]
	note(fmt.Sprintf("daily: %d invented rows of %d stations (%s), %d-day totals ending %s: %d, %d missing (flag %s excluded)",
		daily.Rows, len(daily.Stations), dailyCSV, scenario.DailyWindow, scenario.DailyTarget, sum.Present, sum.Missing, scenario.DailyBadFlag))
	if err := writeStream(totalsCSV, func(w io.Writer) error {
		return station.WriteIndexTotalsCSV(w, daily, scenario.DailyWindow)
	}); err != nil {
		return Job{}, err
	}
	if err := writeStream(districts, func(w io.Writer) error { return writeDemoDistricts(w, sc.BBox) }); err != nil {
		return Job{}, err
	}
	if err := writeStream(coast, sc.WriteCoastGeoJSON); err != nil {
		return Job{}, err
	}
	note(fmt.Sprintf("demo: %s, %d invented stations, target year %d (%s)", sc.Name, len(sc.Sites), sc.TargetYear, sc.Window))

	res, err := station.ComputeIndex(stationsCSV, totalsCSV, station.IndexOptions{Year: sc.TargetYear})
	if err != nil {
		return Job{}, fmt.Errorf("demo index: %w", err)
	}
	values := filepath.Join(in, "index.csv")
	if err := WriteIndexTable(values, res); err != nil {
		return Job{}, err
	}
	s := res.Summary()
	note(fmt.Sprintf("index: %d stations, %d with percentile and SPI for %d, %d without (%d with too few years, %d without a %d total)",
		s.Stations, s.WithIndex, s.Year, s.Stations-s.WithIndex, s.TooFewYears, s.NoTotal, s.Year))

	layers, _ := ParseLayers("all")
	job := Job{
		Command:  "demo",
		Stations: values,
		Values:   station.ValueOptions{Kind: station.KindSPI},
		Res:      0.05,
		BBox:     &sc.BBox,
		Params:   interp.DefaultParams(),
		Regions:  districts, RegionKey: "name",
		Mask:   coast,
		Layers: layers,
		Title:  fmt.Sprintf("%s: SPI, %d days ending %s", capitalize(sc.Name), scenario.DailyWindow, scenario.DailyTarget),
		Out:    out,
		Date:   scenario.DailyTarget, WindowDays: scenario.DailyWindow,
	}
	job.Params.RadiusKm = sc.RadiusKm
	hist, chartPNG, districtPNG, err := demoHistory(ctx, sc, stationsCSV, totalsCSV, job)
	if err != nil {
		return Job{}, err
	}
	note(fmt.Sprintf("history: %d years of area in drought per district (history.csv, chart.png, chart-district.png)", demoHistoryYears))
	job.Extra = map[string][]byte{"history.csv": hist, "chart.png": chartPNG, "chart-district.png": districtPNG}
	return job, nil
}

// demoHistory computes, for each of the last demoHistoryYears years of the
// scenario (dated on the window's last day), the index step and the area
// in each band per district, in memory, and returns the history table and
// its two charts. The template job gives the grid, parameters and regions.
func demoHistory(ctx context.Context, sc *scenario.Scenario, stationsCSV, totalsCSV string, tmpl Job) (historyCSV, chartPNG, districtPNG []byte, err error) {
	var days []history.Day
	var res *Result
	for y := sc.TargetYear - demoHistoryYears + 1; y <= sc.TargetYear; y++ {
		idx, err := station.ComputeIndex(stationsCSV, totalsCSV, station.IndexOptions{Year: y})
		if err != nil {
			return nil, nil, nil, fmt.Errorf("demo history %d: %w", y, err)
		}
		var buf bytes.Buffer
		if err := station.WriteIndexCSV(&buf, idx); err != nil {
			return nil, nil, nil, fmt.Errorf("demo history %d: %w", y, err)
		}
		job := tmpl
		job.Stations, job.StationsData = fmt.Sprintf("index-%d.csv", y), buf.Bytes()
		if res, err = Compute(ctx, job); err != nil {
			return nil, nil, nil, fmt.Errorf("demo history %d: %w", y, err)
		}
		days = append(days, history.Day{Date: fmt.Sprintf("%d-11-30", y), Stats: res.Regions})
	}
	var csv bytes.Buffer
	if err := history.Encode(&csv, days, res.Scheme); err != nil {
		return nil, nil, nil, err
	}
	h, err := history.Parse("history.csv", bytes.NewReader(csv.Bytes()))
	if err != nil {
		return nil, nil, nil, err
	}
	// chart.png: every district (the demo has few), one line each.
	var png bytes.Buffer
	opt := chart.Options{Title: fmt.Sprintf("%s: share of each district in drought, %s", capitalize(sc.Name), sc.Window), RegionsLimit: len(h.Regions), Scheme: res.Scheme}
	if err := chart.Encode(&png, h, opt); err != nil {
		return nil, nil, nil, err
	}
	// chart-district.png: the district with the highest share in drought
	// in the target year alone, its bands stacked over the years.
	worst := demoWorstRegion(h)
	var one bytes.Buffer
	opt = chart.Options{Title: fmt.Sprintf("%s: share of the covered area in each band, %s", worst, sc.Window), Region: worst, Scheme: res.Scheme}
	if err := chart.Encode(&one, h, opt); err != nil {
		return nil, nil, nil, err
	}
	return csv.Bytes(), png.Bytes(), one.Bytes(), nil
}

// demoWorstRegion is the region with the highest share in drought on the
// history's last date (the first in the file's order on a tie).
func demoWorstRegion(h *history.History) string {
	best, bestPct := h.Regions[0], -1.0
	last := len(h.Dates) - 1
	for r, name := range h.Regions {
		if v := h.InDroughtPct[r][last]; v > bestPct { // NaN never wins
			best, bestPct = name, v
		}
	}
	return best
}

// capitalize upper-cases the first letter of a title.
func capitalize(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}
