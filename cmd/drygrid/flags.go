package main

import (
	"time"

	"github.com/spf13/pflag"

	"drygrid/interp"
	"drygrid/station"
)

// inputFlags name the station value table and its columns (grid, crossval).
type inputFlags struct {
	stations    string
	kind        string
	valueColumn string
	idColumn    string
	latColumn   string
	lonColumn   string
}

func (f *inputFlags) register(fl *pflag.FlagSet) {
	fl.StringVar(&f.stations, "stations", "", "station value table (CSV or TSV, optionally .gz) with id, latitude, longitude and the value (required)")
	fl.StringVar(&f.kind, "kind", "spi", "what the values are: spi, percentile or pct-of-normal (percent of normal, as index.csv's pct_of_median; interpolated as it is, not as z)")
	fl.StringVar(&f.valueColumn, "value-column", "", "name of the value column (default: the column named like --kind)")
	fl.StringVar(&f.idColumn, "id-column", "", "name of the station id column (default: station|id|station_id|site)")
	fl.StringVar(&f.latColumn, "lat-column", "", "name of the latitude column (default: latitude|lat)")
	fl.StringVar(&f.lonColumn, "lon-column", "", "name of the longitude column (default: longitude|lon|long|lng)")
}

// options checks the flags and gives the table reader's options.
func (f inputFlags) options() (station.ValueOptions, error) {
	if f.stations == "" {
		return station.ValueOptions{}, usagef("--stations FILE is required")
	}
	kind, err := station.ParseKind(f.kind)
	if err != nil {
		return station.ValueOptions{}, usagef("--kind must be %s, not %q", station.Kinds, f.kind)
	}
	return station.ValueOptions{Kind: kind, ValueColumn: f.valueColumn,
		IDColumn: f.idColumn, LatColumn: f.latColumn, LonColumn: f.lonColumn}, nil
}

// interpFlags are the interpolation parameters (grid, crossval).
type interpFlags struct {
	power       float64
	neighbors   int
	radiusKm    float64
	minStations int
	sectors     int
}

// register adds the flags; where says what an estimate is for ("cell" or
// "prediction") and masked what happens below --min-stations.
func (f *interpFlags) register(fl *pflag.FlagSet, where, masked string) {
	fl.Float64Var(&f.power, "power", 2, "IDW power: weights are distance^-power")
	fl.IntVar(&f.neighbors, "neighbors", 12, "use at most this many nearest stations per "+where)
	fl.Float64Var(&f.radiusKm, "radius-km", 300, "search radius in km (great-circle)")
	fl.IntVar(&f.minStations, "min-stations", 3, masked)
	fl.IntVar(&f.sectors, "sectors", 0, "0 (off), 4 or 8: at most neighbors/sectors stations per direction sector around a "+where)
}

// params gives the parameters unchecked (a search varies them first).
func (f interpFlags) params() interp.Params {
	return interp.Params{Power: f.power, Neighbors: f.neighbors, RadiusKm: f.radiusKm,
		MinStations: f.minStations, Sectors: f.sectors}
}

// parseDateFlag reads the value of a date flag: a calendar date YYYY-MM-DD.
func parseDateFlag(flag, v string) (time.Time, error) {
	t, err := time.Parse("2006-01-02", v)
	if err != nil || len(v) != 10 {
		return t, usagef("%s %q is not a calendar date YYYY-MM-DD", flag, v)
	}
	return t, nil
}
