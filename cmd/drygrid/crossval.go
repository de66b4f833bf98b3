package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/spf13/cobra"

	"drygrid/bands"
	"drygrid/interp"
	"drygrid/pipeline"
)

// crossvalFlags are the flags of `drygrid crossval`.
type crossvalFlags struct {
	inputFlags
	interpFlags
	scheme    string
	residuals string
	json      bool
	search    []string
	blocks    float64
}

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

--blocks KM is spatial block cross-validation (Roberts et al. 2017, Ecography 40) in place of
leave-one-out: the stations are grouped into blocks of about KM x KM km (latitude bands of
KM/111.2 degrees from 90S, each cut from 180W into equal longitude blocks about KM km wide at
the band's centre), every station is predicted from the stations of the OTHER blocks, and the
same figures are reported. Leave-one-out tests the map inside clusters of stations, where
every radius looks alike; blocks test it across gaps of about KM km, so choose KM near the
gaps the map must bridge. --search ranks by the block figures.

The figures measure interpolated estimates, not official drought declarations: consult your
national meteorological or hydrological service and local rules.`,
		Example: `  drygrid crossval --stations spi.csv
  drygrid crossval --stations spi.csv --sectors 4 --residuals loo.csv --json
  drygrid crossval --stations spi.csv --search power=1,2,3 radius-km=200,300,500
  drygrid crossval --stations spi.csv --blocks 200 --search radius-km=150,300,500`,
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
	fl.Float64Var(&f.blocks, "blocks", 0, "spatial block cross-validation: leave out blocks of about KM x KM km whole (0 = leave one out)")
	return cmd
}

// runCrossval is the crossval command; terms are the --search terms.
func runCrossval(f crossvalFlags, terms []string, stdout, stderr io.Writer) error {
	values, err := f.options()
	if err != nil {
		return err
	}
	base := f.params()
	if math.IsNaN(f.blocks) || math.IsInf(f.blocks, 0) || f.blocks < 0 {
		return usagef("--blocks %g: give a block size in km above 0 (or 0 to leave one station out)", f.blocks)
	}
	var combos []interp.Params
	if len(terms) > 0 {
		if f.residuals != "" {
			return usagef("--residuals goes with one parameter set, not with --search")
		}
		c, err := interp.SearchCombos(base, terms)
		if err != nil {
			return usagef("--%v", err)
		}
		combos = c
	} else {
		if err := base.Validate(); err != nil {
			return usageError{err}
		}
	}
	scheme, err := pipeline.SchemeFor(f.scheme, values.Kind)
	if err != nil {
		return err
	}
	vals, err := pipeline.ReadValues(f.stations, nil, values, func(w string) { fmt.Fprintf(stderr, "warning: %s\n", w) })
	if err != nil {
		return err
	}
	pts := pipeline.Points(vals)
	if combos != nil {
		return cvRunSearch(pts, combos, f.blocks, scheme, f.json, stdout)
	}
	var r interp.CrossValResult
	if f.blocks > 0 {
		r, err = interp.CrossValidateBlocks(pts, base, f.blocks, scheme.Classify)
	} else {
		r, err = interp.CrossValidate(pts, base, scheme.Classify)
	}
	if err != nil {
		return err
	}
	if f.residuals != "" {
		if err := pipeline.WriteResiduals(f.residuals, vals, r, scheme); err != nil {
			return err
		}
	}
	if f.json {
		return cvWriteJSON(stdout, pipeline.CrossValFigures(r))
	}
	printCrossval(stdout, f.stations, r)
	if f.residuals != "" {
		fmt.Fprintf(stdout, "wrote %s\n", f.residuals)
	}
	return nil
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
	if r.BlockKm > 0 {
		fmt.Fprintf(w, "cross-validation (spatial blocks of about %g km, %d blocks, each left out whole) of %d stations from %s\n",
			r.BlockKm, r.Blocks, len(r.Stations), source)
	} else {
		fmt.Fprintf(w, "cross-validation (leave one out) of %d stations from %s\n", len(r.Stations), source)
	}
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

// cvRunSearch cross-validates every combination and prints the ranking.
func cvRunSearch(pts []interp.Point, combos []interp.Params, blockKm float64, scheme *bands.Scheme, asJSON bool, w io.Writer) error {
	rs, err := interp.SearchBlocks(pts, combos, blockKm, scheme.Classify)
	if err != nil {
		return err
	}
	order := interp.Rank(rs)
	if asJSON {
		out := make([]map[string]any, 0, len(rs))
		for rank, i := range order {
			m := pipeline.CrossValFigures(rs[i])
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
	if blockKm > 0 {
		fmt.Fprintf(w, "spatial block cross-validation: blocks of about %g km (%d), each left out whole\n", blockKm, rs[0].Blocks)
	}
	fmt.Fprintf(w, "ranked by RMSE (ties by MAE, then the order given) over %d stations; n = stations counted; bias = mean of predicted - observed\n", len(pts))
	return nil
}
