package main

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"drygrid/bands"
	"drygrid/interp"
	"drygrid/publish"
	"drygrid/station"
)

// crossvalFlags are the flags of `drygrid crossval`.
type crossvalFlags struct {
	inputFlags
	interpFlags
	scheme    string
	residuals string
	json      bool
	search    []string
}

// cvMaxCombos bounds the parameter sets one --search may try.
const cvMaxCombos = 1000

func newCrossvalCmd() *cobra.Command {
	var f crossvalFlags
	cmd := &cobra.Command{
		Use:   "crossval --stations FILE [interpolation flags] [--json]",
		Short: "Leave-one-out cross-validation of the interpolation: how good is the map?",
		Long: `crossval leaves each station out in turn, predicts its value from the other stations exactly
as 'drygrid grid' would at that point (same --power, --neighbors, --radius-km, --min-stations,
--sectors), and reports over the stations:

  n               stations counted
  rmse, mae       root-mean-square and mean absolute error, in z (SPI units)
  bias            mean of predicted - observed: positive = the map is too wet there,
                  negative = too dry
  band_agreement  share of counted stations whose predicted band equals their own band

A station with fewer than --min-stations OTHER stations within --radius-km would be no data
on the map and is not counted. Percentiles are compared as z = Phi^-1(p/100), like the map.

--residuals FILE.csv writes one row per station. --search tries every combination of the
values given and ranks them by RMSE (ties by MAE, then the order given); keys are power,
radius-km, neighbors, min-stations and sectors. Note that a larger radius counts more
stations, so compare n too.

The figures measure interpolated estimates, not official drought declarations: consult your
national meteorological or hydrological service and local rules.`,
		Example: `  drygrid crossval --stations spi.csv
  drygrid crossval --stations spi.csv --sectors 4 --residuals loo.csv --json
  drygrid crossval --stations spi.csv --search power=1,2,3 radius-km=200,300,500`,
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) > 0 && len(f.search) == 0 {
				return usagef("crossval takes no arguments (%q); search terms go after --search", args[0])
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			return runCrossval(f, append(append([]string(nil), f.search...), args...), cmd.OutOrStdout(), cmd.ErrOrStderr())
		},
	}
	fl := cmd.Flags()
	f.inputFlags.register(fl)
	f.interpFlags.register(fl, "prediction", "a station with fewer other stations within the radius is not counted")
	fl.StringVar(&f.scheme, "scheme", "", "band scheme file for band_agreement (TOML; default: the nine built-in bands)")
	fl.StringVar(&f.residuals, "residuals", "", "write one row per station to this CSV")
	fl.BoolVar(&f.json, "json", false, "print JSON instead of text")
	fl.StringArrayVar(&f.search, "search", nil, "KEY=V1,V2,... (repeatable, or several terms after it): rank every combination by RMSE")
	return cmd
}

// runCrossval is the crossval command; terms are the --search terms.
func runCrossval(f crossvalFlags, terms []string, stdout, stderr io.Writer) error {
	values, err := f.options()
	if err != nil {
		return err
	}
	base := f.params()
	var combos []interp.Params
	if len(terms) > 0 {
		if f.residuals != "" {
			return usagef("--residuals goes with one parameter set, not with --search")
		}
		c, err := cvSearchCombos(base, terms)
		if err != nil {
			return err
		}
		combos = c
	} else {
		if err := base.Validate(); err != nil {
			return usageError{err}
		}
	}
	scheme, err := loadScheme(f.scheme)
	if err != nil {
		return err
	}
	vals, err := station.ReadValues(f.stations, values)
	if err != nil {
		return err
	}
	for _, w := range vals.Warnings {
		fmt.Fprintf(stderr, "warning: %s\n", w)
	}
	if len(vals.Stations) == 0 {
		return fmt.Errorf("stations %s: no station with a usable %s value (%d rows read)", f.stations, vals.Column, vals.Read)
	}
	pts := points(vals)
	if combos != nil {
		return cvRunSearch(pts, combos, scheme, f.json, stdout)
	}
	r, err := interp.CrossValidate(pts, base, scheme.Classify)
	if err != nil {
		return err
	}
	if f.residuals != "" {
		if err := writeResiduals(f.residuals, vals, r, scheme); err != nil {
			return err
		}
	}
	if f.json {
		return cvWriteJSON(stdout, crossvalFigures(r))
	}
	printCrossval(stdout, f.stations, r)
	if f.residuals != "" {
		fmt.Fprintf(stdout, "wrote %s\n", f.residuals)
	}
	return nil
}

// crossvalGrid is the cross-validation of a grid run (--crossval): the
// run's stations with the run's parameters and bands.
func crossvalGrid(res *gridResult, p interp.Params) (interp.CrossValResult, error) {
	return interp.CrossValidate(points(res.Values), p, res.Scheme.Classify)
}

// cvNum is a figure for JSON: NaN (nothing counted) becomes null.
func cvNum(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return v
}

// cvParams are the interpolation parameters as JSON keys (command-line names
// with underscores).
func cvParams(p interp.Params) map[string]any {
	return map[string]any{"power": p.Power, "neighbors": p.Neighbors, "radius_km": p.RadiusKm,
		"min_stations": p.MinStations, "sectors": p.Sectors}
}

// crossvalFigures are the leave-one-out figures as a JSON object, for
// `crossval --json` and the manifest of `grid --crossval`: n, rmse, mae,
// bias (mean of predicted - observed), band_agreement (0..1), stations,
// not_counted and params. Figures over no station are null.
func crossvalFigures(r interp.CrossValResult) map[string]any {
	return map[string]any{
		"n": r.N, "rmse": cvNum(r.RMSE), "mae": cvNum(r.MAE), "bias": cvNum(r.Bias),
		"band_agreement": cvNum(r.BandAgreement),
		"stations":       len(r.Stations), "not_counted": len(r.Stations) - r.N,
		"residual": "predicted - observed", "params": cvParams(r.Params),
	}
}

// cvWriteJSON prints v as indented JSON.
func cvWriteJSON(w io.Writer, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	_, err = fmt.Fprintf(w, "%s\n", b)
	return err
}

// cvSectorsText names the sector setting.
func cvSectorsText(s int) string {
	if s == 0 {
		return "off"
	}
	return strconv.Itoa(s)
}

// printCrossval writes the text summary of one cross-validation.
func printCrossval(w io.Writer, source string, r interp.CrossValResult) {
	p := r.Params
	fmt.Fprintf(w, "cross-validation (leave one out) of %d stations from %s\n", len(r.Stations), source)
	fmt.Fprintf(w, "  parameters: power %g, neighbors %d, radius %g km, min-stations %d, sectors %s\n",
		p.Power, p.Neighbors, p.RadiusKm, p.MinStations, cvSectorsText(p.Sectors))
	fmt.Fprintf(w, "  counted: %d stations; %d not counted (fewer than %d other stations within %g km)\n",
		r.N, len(r.Stations)-r.N, p.MinStations, p.RadiusKm)
	if r.N == 0 {
		fmt.Fprintf(w, "  no station could be predicted: widen --radius-km or lower --min-stations\n")
	} else {
		fmt.Fprintf(w, "  RMSE %.4f  MAE %.4f  bias %+.4f  (z units; bias = mean of predicted - observed, + = map too wet)\n",
			r.RMSE, r.MAE, r.Bias)
		fmt.Fprintf(w, "  band agreement: %.1f%% of counted stations predicted in their own band\n", 100*r.BandAgreement)
	}
	fmt.Fprintf(w, "These are errors of interpolated estimates, not official declarations; consult the national meteorological or hydrological service.\n")
}

// writeResiduals writes one row per station: id, position, observed and
// predicted z, residual, stations used, counted, and both bands' keys.
func writeResiduals(path string, v *station.Values, r interp.CrossValResult, scheme *bands.Scheme) error {
	key := func(code uint8) string {
		if b, ok := scheme.Band(code); ok {
			return b.Key
		}
		return ""
	}
	num := func(x float64) string { return strconv.FormatFloat(x, 'f', 6, 64) }
	return publish.WriteFile(path, func(bw *bufio.Writer) error {
		cw := csv.NewWriter(bw)
		if err := cw.Write([]string{"station", "latitude", "longitude", "observed", "predicted", "residual",
			"n_used", "counted", "observed_band", "predicted_band"}); err != nil {
			return err
		}
		for i, s := range v.Stations {
			x := r.Stations[i]
			row := []string{s.ID, num(s.Lat), num(s.Lon), num(x.Observed), "", "", strconv.Itoa(x.N), strconv.FormatBool(x.Counted), "", ""}
			if x.Counted {
				row[4], row[5] = num(x.Predicted), num(x.Predicted-x.Observed)
				row[8], row[9] = key(x.ObservedBand), key(x.PredictedBand)
			}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
		cw.Flush()
		return cw.Error()
	})
}

// cvSearchKeys are the keys --search accepts, each setting one parameter.
var cvSearchKeys = map[string]func(p *interp.Params, v float64){
	"power":        func(p *interp.Params, v float64) { p.Power = v },
	"radius-km":    func(p *interp.Params, v float64) { p.RadiusKm = v },
	"neighbors":    func(p *interp.Params, v float64) { p.Neighbors = int(v) },
	"min-stations": func(p *interp.Params, v float64) { p.MinStations = int(v) },
	"sectors":      func(p *interp.Params, v float64) { p.Sectors = int(v) },
}

// cvSearchCombos reads terms KEY=V1,V2,... and lists every combination,
// the first key varying slowest, each value in the order given; the flags'
// values fill the keys not searched.
func cvSearchCombos(base interp.Params, terms []string) ([]interp.Params, error) {
	type axis struct {
		key  string
		vals []float64
	}
	var axes []axis
	seen := map[string]bool{}
	for _, t := range terms {
		for _, term := range strings.Fields(t) {
			k, list, ok := strings.Cut(term, "=")
			k = strings.ToLower(strings.TrimSpace(k))
			if !ok || list == "" {
				return nil, usagef("--search %q: want KEY=V1,V2,... with KEY one of power, radius-km, neighbors, min-stations, sectors", term)
			}
			if _, known := cvSearchKeys[k]; !known {
				return nil, usagef("--search %q: unknown key %q (power, radius-km, neighbors, min-stations, sectors)", term, k)
			}
			if seen[k] {
				return nil, usagef("--search: key %q given twice", k)
			}
			seen[k] = true
			a := axis{key: k}
			for _, s := range strings.Split(list, ",") {
				v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
				if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
					return nil, usagef("--search %q: %q is not a number", term, s)
				}
				if k != "power" && k != "radius-km" && (v != math.Trunc(v) || math.Abs(v) > 1e9) {
					return nil, usagef("--search %q: %s takes whole numbers, not %q", term, k, s)
				}
				a.vals = append(a.vals, v)
			}
			axes = append(axes, a)
		}
	}
	if len(axes) == 0 {
		return nil, usagef("--search: give at least one KEY=V1,V2,...")
	}
	total := 1
	for _, a := range axes {
		total *= len(a.vals)
		if total > cvMaxCombos {
			return nil, usagef("--search: more than %d combinations", cvMaxCombos)
		}
	}
	combos := make([]interp.Params, 0, total)
	idx := make([]int, len(axes))
	for range total {
		p := base
		var desc []string
		for j, a := range axes {
			cvSearchKeys[a.key](&p, a.vals[idx[j]])
			desc = append(desc, fmt.Sprintf("%s=%g", a.key, a.vals[idx[j]]))
		}
		if err := p.Validate(); err != nil {
			return nil, usagef("--search combination %s: %v", strings.Join(desc, " "), err)
		}
		combos = append(combos, p)
		for j := len(axes) - 1; j >= 0; j-- { // odometer: the last key turns fastest
			idx[j]++
			if idx[j] < len(axes[j].vals) {
				break
			}
			idx[j] = 0
		}
	}
	return combos, nil
}

// cvRank orders results by RMSE, then MAE, then their given order; sets
// with nothing counted come last.
func cvRank(rs []interp.CrossValResult) []int {
	order := make([]int, len(rs))
	for i := range order {
		order[i] = i
	}
	key := func(v float64) float64 {
		if math.IsNaN(v) {
			return math.Inf(1)
		}
		return v
	}
	sort.SliceStable(order, func(a, b int) bool {
		ra, rb := rs[order[a]], rs[order[b]]
		if x, y := key(ra.RMSE), key(rb.RMSE); x != y {
			return x < y
		}
		return key(ra.MAE) < key(rb.MAE)
	})
	return order
}

// cvRunSearch cross-validates every combination and prints the ranking.
func cvRunSearch(pts []interp.Point, combos []interp.Params, scheme *bands.Scheme, asJSON bool, w io.Writer) error {
	rs := make([]interp.CrossValResult, len(combos))
	for i, p := range combos {
		r, err := interp.CrossValidate(pts, p, scheme.Classify)
		if err != nil {
			return err
		}
		r.Stations = nil // only the figures are kept
		rs[i] = r
	}
	order := cvRank(rs)
	if asJSON {
		out := make([]map[string]any, 0, len(rs))
		for rank, i := range order {
			m := crossvalFigures(rs[i])
			m["stations"], m["not_counted"] = len(pts), len(pts)-rs[i].N
			m["rank"] = rank + 1
			out = append(out, m)
		}
		return cvWriteJSON(w, out)
	}
	fmt.Fprintf(w, "%4s %6s %9s %9s %12s %7s %6s %8s %8s %8s %6s\n",
		"rank", "power", "neighbors", "radius_km", "min_stations", "sectors", "n", "rmse", "mae", "bias", "bands")
	f := func(v float64, format string) string {
		if math.IsNaN(v) {
			return "-"
		}
		return fmt.Sprintf(format, v)
	}
	for rank, i := range order {
		r := rs[i]
		p := r.Params
		fmt.Fprintf(w, "%4d %6g %9d %9g %12d %7s %6d %8s %8s %8s %6s\n", rank+1, p.Power, p.Neighbors, p.RadiusKm,
			p.MinStations, cvSectorsText(p.Sectors), r.N, f(r.RMSE, "%.4f"), f(r.MAE, "%.4f"), f(r.Bias, "%+.4f"),
			f(100*r.BandAgreement, "%.1f%%"))
	}
	fmt.Fprintf(w, "ranked by RMSE (ties by MAE, then the order given) over %d stations; n = stations counted; bias = mean of predicted - observed\n", len(pts))
	return nil
}
