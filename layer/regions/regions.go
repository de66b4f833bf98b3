package regions

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"

	"drygrid/bands"
	"drygrid/region"
)

// Caution is the caution carried by regions.json and the chart.
const Caution = "Shares of area are computed from interpolated estimates on a station network, " +
	"not official drought declarations. Consult your national meteorological or hydrological " +
	"service and local rules before acting on them."

// Header is the regions.csv header for a scheme (docs/design.md, "Formats
// written"): region, area_km2, covered_km2, covered_pct, one <key>_pct per
// band in scheme order, in_drought_pct, mean_z.
func Header(s *bands.Scheme) []string {
	h := []string{"region", "area_km2", "covered_km2", "covered_pct"}
	for _, b := range s.Bands {
		h = append(h, b.Key+"_pct")
	}
	return append(h, "in_drought_pct", "mean_z")
}

// regRow is one region's values, NaN where undefined.
type regRow struct {
	area, covered, coveredPct float64
	bandKm2, bandPct          []float64
	droughtKm2, droughtPct    float64
	meanZ                     float64
}

func regValues(z region.ZonalStats, s *bands.Scheme) regRow {
	r := regRow{area: z.AreaKm2, covered: z.CoveredKm2, coveredPct: math.NaN(), droughtPct: math.NaN(), meanZ: math.NaN()}
	if z.AreaKm2 > 0 {
		r.coveredPct = z.CoveredPct()
	}
	for _, b := range s.Bands {
		pct, ok := z.BandPct(b.Code)
		if !ok {
			pct = math.NaN()
		}
		r.bandKm2 = append(r.bandKm2, z.CodeKm2[b.Code])
		r.bandPct = append(r.bandPct, pct)
	}
	r.droughtKm2 = z.InDroughtKm2(s)
	if pct, ok := z.InDroughtPct(s); ok {
		r.droughtPct = pct
	}
	if z.HasMeanZ {
		r.meanZ = z.MeanZ
	}
	return r
}

// regFmt writes areas and percentages with 3 decimals (a square metre,
// a thousandth of a percent); undefined values are empty.
func regFmt(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	if v == 0 {
		v = 0 // no "-0.000"
	}
	s := strconv.FormatFloat(v, 'f', 3, 64)
	if s == "-0.000" {
		s = "0.000"
	}
	return s
}

// Record is one region's regions.csv row, in the columns of Header: areas
// and percentages with 3 decimals, empty where undefined.
func Record(z region.ZonalStats, s *bands.Scheme) []string {
	r := regValues(z, s)
	rec := []string{z.Key, regFmt(r.area), regFmt(r.covered), regFmt(r.coveredPct)}
	for _, p := range r.bandPct {
		rec = append(rec, regFmt(p))
	}
	return append(rec, regFmt(r.droughtPct), regFmt(r.meanZ))
}

// WriteCSV writes regions.csv: one row per region in the order
// given. Areas are km^2 on the WGS84 ellipsoid; band and in-drought shares
// are percent of the covered (not masked) area, empty when nothing is
// covered; mean_z is the area-weighted mean index, empty without one.
func WriteCSV(w io.Writer, stats []region.ZonalStats, s *bands.Scheme) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(Header(s)); err != nil {
		return fmt.Errorf("regions.csv: %w", err)
	}
	for _, z := range stats {
		if err := cw.Write(Record(z, s)); err != nil {
			return fmt.Errorf("regions.csv region %s: %w", z.Key, err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("regions.csv: %w", err)
	}
	return nil
}

// Meta describes the run behind regions.json.
type Meta struct {
	Date    string // the day the statistics describe, YYYY-MM-DD, may be empty
	Source  string // what the band raster came from (a file or "drygrid grid")
	Regions string // the regions file
	Grid    string // grid.Spec.String() of the band raster
	// WindowDays is the window of the totals behind the index in days
	// (0 = unknown) and Kind the index kind (spi, percentile; may be empty).
	WindowDays int
	Kind       string
}

// regNum is a number written with 3 decimals, or null when undefined.
type regNum float64

func (n regNum) MarshalJSON() ([]byte, error) {
	s := regFmt(float64(n))
	if s == "" {
		return []byte("null"), nil
	}
	return []byte(s), nil
}

type regJSONBand struct {
	Code    uint8  `json:"code"`
	Key     string `json:"key"`
	Label   string `json:"label"`
	Color   string `json:"color"`
	Drought bool   `json:"drought"`
	Range   string `json:"range"`
}

type regJSONShare struct {
	Key string `json:"key"`
	Km2 regNum `json:"km2"`
	Pct regNum `json:"pct"`
}

type regJSONRegion struct {
	Region       string         `json:"region"`
	AreaKm2      regNum         `json:"area_km2"`
	CoveredKm2   regNum         `json:"covered_km2"`
	CoveredPct   regNum         `json:"covered_pct"`
	Bands        []regJSONShare `json:"bands"`
	InDroughtKm2 regNum         `json:"in_drought_km2"`
	InDroughtPct regNum         `json:"in_drought_pct"`
	MeanZ        regNum         `json:"mean_z"`
}

type regJSONDoc struct {
	Caution string          `json:"caution"`
	Date    string          `json:"date,omitempty"`
	Window  int             `json:"window_days,omitempty"`
	Kind    string          `json:"kind,omitempty"`
	Source  string          `json:"source,omitempty"`
	Regions string          `json:"regions_file,omitempty"`
	Grid    string          `json:"grid,omitempty"`
	Method  string          `json:"method"`
	Scheme  regJSONScheme   `json:"scheme"`
	Stats   []regJSONRegion `json:"regions"`
}

type regJSONScheme struct {
	Name  string        `json:"name"`
	Bands []regJSONBand `json:"bands"`
}

const regMethod = "Each grid cell counts with the share of its area inside the region (the region clipped to the cell; " +
	"planar in degrees within a cell) times its area on the WGS84 ellipsoid. Shares are percent of the covered area " +
	"(cells holding a band); masked cells have too few stations. area_km2 is the part of the region inside the grid. mean_z is the area-weighted mean index (SPI units)."

// WriteJSON writes regions.json: the same figures as regions.csv
// (plus each band's and the in-drought area in km^2), the scheme's bands
// with code, key, label, colour, drought flag and z range, the method and a
// caution that these are estimates, not official declarations.
func WriteJSON(w io.Writer, stats []region.ZonalStats, s *bands.Scheme, meta Meta) error {
	doc := regJSONDoc{Caution: Caution, Date: meta.Date, Window: meta.WindowDays, Kind: meta.Kind, Source: meta.Source, Regions: meta.Regions,
		Grid: meta.Grid, Method: regMethod, Scheme: regJSONScheme{Name: s.Name}, Stats: []regJSONRegion{}}
	for _, b := range s.Bands {
		doc.Scheme.Bands = append(doc.Scheme.Bands, regJSONBand{b.Code, b.Key, b.Label, b.Color, b.Drought, s.RangeOf(b)})
	}
	for _, z := range stats {
		r := regValues(z, s)
		jr := regJSONRegion{Region: z.Key, AreaKm2: regNum(r.area), CoveredKm2: regNum(r.covered),
			CoveredPct: regNum(r.coveredPct), InDroughtKm2: regNum(r.droughtKm2), InDroughtPct: regNum(r.droughtPct),
			MeanZ: regNum(r.meanZ)}
		for i, b := range s.Bands {
			jr.Bands = append(jr.Bands, regJSONShare{b.Key, regNum(r.bandKm2[i]), regNum(r.bandPct[i])})
		}
		doc.Stats = append(doc.Stats, jr)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	if err := enc.Encode(doc); err != nil {
		return fmt.Errorf("regions.json: %w", err)
	}
	return nil
}
