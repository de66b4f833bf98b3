package station

import (
	"drygrid/spi"
	"fmt"
	"io"
	"math"
	"strings"
)

// Kind names what a station value table holds.
type Kind string

// Value kinds (the --kind flag).
const (
	KindSPI        Kind = "spi"
	KindPercentile Kind = "percentile"
)

// ParseKind parses a --kind flag value: "spi" or "percentile" (any case).
func ParseKind(s string) (Kind, error) {
	switch k := Kind(strings.ToLower(strings.TrimSpace(s))); k {
	case KindSPI, KindPercentile:
		return k, nil
	}
	return "", fmt.Errorf("unknown kind %q (want spi or percentile)", s)
}

// Column aliases: columns are found by name, case-insensitively.
var (
	IDAliases         = []string{"station", "id", "station_id", "site"}
	LatAliases        = []string{"latitude", "lat"}
	LonAliases        = []string{"longitude", "lon", "long", "lng"}
	SPIAliases        = []string{"spi"}
	PercentileAliases = []string{"percentile", "pct", "percent"}
)

// SPILimit is the largest |SPI| accepted: a value table's SPI beyond +/-5 is
// rejected as implausible, and the index step holds its SPI at +/-5.
const SPILimit = 5

// ReasonNoValue is the rejection reason of a row whose value cell is empty or NA.
const ReasonNoValue = "no value"

// valuesMaxWarnings caps the warnings kept; the rest are counted.
const valuesMaxWarnings = 100

// ValueOptions picks the value kind and, optionally, the columns by exact
// name (case-insensitive); "" finds a column by its aliases. An empty Kind
// takes an spi column if the table has one, else a percentile column; with
// ValueColumn set, an empty Kind means spi.
type ValueOptions struct {
	Kind                                        Kind
	ValueColumn, IDColumn, LatColumn, LonColumn string
}

// Station is one usable site of a value table.
type Station struct {
	ID       string
	Lon, Lat float64  // Lon normalised to [-180, 180)
	Value    float64  // the input value (SPI or percentile)
	Z        float64  // z (SPI units): SPI as is, percentile via spi.PercentileToZ
	Line     int      // line of first appearance
	Merged   []string // other ids averaged into this site (same point), if any
}

// Rejection is a row that carries no usable value; it is kept for the summary.
type Rejection struct {
	Line   int
	ID     string
	Reason string
}

// Values is a validated station value table.
type Values struct {
	Path     string
	Kind     Kind
	Column   string      // the value column used
	Read     int         // data rows read
	Stations []Station   // usable sites, in file order
	Rejected []Rejection // rows without a value (reason ReasonNoValue)
	Warnings []string    // exact duplicates collapsed, co-located ids averaged
}

// RejectedByReason counts the rejected rows by reason.
func (v *Values) RejectedByReason() map[string]int {
	m := make(map[string]int)
	for _, r := range v.Rejected {
		m[r.Reason]++
	}
	return m
}

// ReadValues reads and validates the station value table at path.
func ReadValues(path string, opt ValueOptions) (*Values, error) {
	t, err := OpenTable(path)
	if err != nil {
		return nil, err
	}
	defer t.Close()
	return readValues(t, opt)
}

// ParseValues reads and validates a station value table from r; name is used
// in error messages.
func ParseValues(name string, r io.Reader, opt ValueOptions) (*Values, error) {
	t, err := NewTable(name, r)
	if err != nil {
		return nil, err
	}
	defer t.Close()
	return readValues(t, opt)
}

// FindColumn returns the column named exactly name (case-insensitive) when
// name is given, else the one matching an alias. The error names the file,
// the header line and lists the header. Two columns that both match (the
// same name twice, or two aliases of one role such as lat and latitude) are
// refused as ambiguous, naming both: taking either would be a guess.
func (t *Table) FindColumn(what, name string, aliases []string) (int, error) {
	names := aliases
	if name != "" {
		names = []string{name}
	}
	found := -1
	for i, h := range t.Header {
		for _, a := range names {
			if !strings.EqualFold(h, strings.TrimSpace(a)) {
				continue
			}
			if found >= 0 {
				return -1, fmt.Errorf("%s line %d: columns %d (%s) and %d (%s) are both a %s column, which is ambiguous; rename or remove one of them",
					t.Path, t.HeaderLine, found+1, t.Header[found], i+1, h, what)
			}
			found = i
			break
		}
	}
	switch {
	case found >= 0:
		return found, nil
	case name != "":
		return -1, fmt.Errorf("%s line %d: no %s column named %q; the header has: %s", t.Path, t.HeaderLine, what, name, strings.Join(t.Header, ", "))
	}
	return -1, fmt.Errorf("%s line %d: no %s column (looked for %s); the header has: %s", t.Path, t.HeaderLine, what, strings.Join(aliases, "|"), strings.Join(t.Header, ", "))
}

// valuesSite accumulates the rows averaged into one site.
type valuesSite struct {
	st         Station
	sumZ, sumV float64
	n          int
	next       int32 // the next site of the same point cell, -1 for none
}

// valuesCell is the first and last site of a point cell (valuesKey); the
// sites between follow valuesSite.next, in file order.
type valuesCell struct{ first, last int32 }

// valuesRow is the first appearance of an id.
type valuesRow struct {
	line     int
	lat, lon float64
	missing  bool
	value    float64
}

// valuesPointKey is a cell of 1e-6 degree used to find sites at the same
// point; the site lists of the (at most four) cells within 1e-9 degree of a
// point are checked exactly with valuesSamePoint.
type valuesPointKey struct{ lat, lon int64 }

func valuesKey(lat, lon float64) valuesPointKey {
	if math.Abs(lat) == 90 {
		lon = 0 // every longitude is the same point at a pole
	}
	return valuesPointKey{int64(math.Floor(lat * 1e6)), int64(math.Floor(lon * 1e6))}
}

// valuesSamePoint: coordinates equal to 1e-9 degree after normalisation.
func valuesSamePoint(lat1, lon1, lat2, lon2 float64) bool {
	if math.Abs(lat1-lat2) > 1e-9 {
		return false
	}
	if math.Abs(lat1) == 90 && math.Abs(lat2) == 90 {
		return true
	}
	d := math.Abs(lon1 - lon2)
	return d <= 1e-9 || math.Abs(d-360) <= 1e-9
}

func readValues(t *Table, opt ValueOptions) (*Values, error) {
	kind := opt.Kind
	var valAliases []string
	switch kind {
	case KindSPI:
		valAliases = SPIAliases
	case KindPercentile:
		valAliases = PercentileAliases
	case "":
		// No kind given: an spi column if there is one, else a percentile column.
		kind = KindSPI
		valAliases = SPIAliases
		if opt.ValueColumn == "" && t.Column(SPIAliases...) < 0 && t.Column(PercentileAliases...) >= 0 {
			kind, valAliases = KindPercentile, PercentileAliases
		}
	default:
		return nil, fmt.Errorf("%s: unknown value kind %q (want spi or percentile)", t.Path, kind)
	}
	idC, err := t.FindColumn("station id", opt.IDColumn, IDAliases)
	if err != nil {
		return nil, err
	}
	latC, err := t.FindColumn("latitude", opt.LatColumn, LatAliases)
	if err != nil {
		return nil, err
	}
	lonC, err := t.FindColumn("longitude", opt.LonColumn, LonAliases)
	if err != nil {
		return nil, err
	}
	valC, err := t.FindColumn(string(kind)+" value", opt.ValueColumn, valAliases)
	if err != nil {
		return nil, err
	}
	v := &Values{Path: t.Path, Kind: kind, Column: t.ColumnName(valC)}
	hint := t.rowsHint()
	byID := make(map[string]valuesRow, hint)
	byPoint := make(map[valuesPointKey]valuesCell, hint)
	sites := make([]valuesSite, 0, hint)
	dropped := 0
	warn := func(format string, args ...any) {
		if len(v.Warnings) < valuesMaxWarnings {
			v.Warnings = append(v.Warnings, fmt.Sprintf(format, args...))
		} else {
			dropped++
		}
	}
	// The rows are read and their numbers parsed in a goroutine of their
	// own (valuesReader), a batch ahead of the checks against the rows
	// before them here; the errors come in file order either way.
	rd := newValuesReader(t, kind, idC, latC, lonC, valC)
	defer rd.stop()
	var maxValue float64 // the largest value, on line maxLine (0 = no value yet)
	var maxLine int
	var maxRaw string
	for {
		r, ok, err := rd.next()
		if err != nil {
			return nil, err
		}
		if !ok {
			break
		}
		idb, line, lat, lon := r.id, r.line, r.lat, r.lon
		if !r.missing && (maxLine == 0 || r.value > maxValue) {
			maxValue, maxLine, maxRaw = r.value, line, string(r.raw)
		}
		row := valuesRow{line: line, lat: lat, lon: lon, missing: r.missing, value: r.value}
		if first, dup := byID[string(idb)]; dup {
			id := string(idb)
			if !valuesSamePoint(first.lat, first.lon, lat, lon) {
				col := latC
				if math.Abs(first.lat-lat) <= 1e-9 {
					col = lonC
				}
				return nil, t.FieldError(line, col, "station %s is at %g, %g here but at %g, %g on line %d", id, lat, lon, first.lat, first.lon, first.line)
			}
			if first.missing != row.missing || first.value != row.value {
				return nil, t.FieldError(line, valC, "station %s has %s %q here but another value on line %d", id, kind, r.raw, first.line)
			}
			warn("%s line %d: repeats station %s of line %d exactly; kept once", t.Path, line, id, first.line)
			continue
		}
		id := string(idb)
		byID[id] = row
		if row.missing {
			v.Rejected = append(v.Rejected, Rejection{Line: line, ID: id, Reason: ReasonNoValue})
			continue
		}
		z := row.value
		if kind == KindPercentile {
			z = spi.PercentileToZ(row.value)
		}
		if si, ok := valuesFindPoint(byPoint, sites, lat, lon); ok {
			s := &sites[si]
			s.sumZ += z
			s.sumV += row.value
			s.n++
			s.st.Merged = append(s.st.Merged, id)
			warn("%s line %d: station %s is at the same point as %s (line %d); their values are averaged into one site", t.Path, line, id, s.st.ID, s.st.Line)
			continue
		}
		k, at := valuesKey(lat, lon), int32(len(sites))
		if c, ok := byPoint[k]; ok {
			sites[c.last].next = at
			byPoint[k] = valuesCell{c.first, at}
		} else {
			byPoint[k] = valuesCell{at, at}
		}
		sites = append(sites, valuesSite{
			st:   Station{ID: id, Lon: lon, Lat: lat, Value: row.value, Z: z, Line: line},
			sumZ: z, sumV: row.value, n: 1, next: -1,
		})
	}
	v.Read = rd.read
	if kind == KindPercentile && maxLine > 0 && maxValue > 0 && maxValue <= 1 {
		// Every percentile in [0, 1], not all 0: fractions (0.0231 for
		// 2.31 %), which read as percents would map everything driest.
		return nil, t.FieldError(maxLine, valC, "every percentile lies in [0, 1] (the largest, %s, is on this line): these look like fractions; percentiles are 0-100; multiply by 100", maxRaw)
	}
	v.Stations = make([]Station, len(sites))
	for i, s := range sites {
		st := s.st
		if s.n > 1 {
			st.Z = s.sumZ / float64(s.n)
			st.Value = s.sumV / float64(s.n)
		}
		v.Stations[i] = st
	}
	if dropped > 0 {
		v.Warnings = append(v.Warnings, fmt.Sprintf("%s: %d more warnings not shown", t.Path, dropped))
	}
	return v, nil
}

// valuesFindPoint looks up a site at the same point (1e-9 degree): the cells
// of the points 1e-9 degree around, and across the antimeridian seam.
func valuesFindPoint(m map[valuesPointKey]valuesCell, sites []valuesSite, lat, lon float64) (int, bool) {
	const eps = 1e-9
	lons := [...]float64{lon - eps, lon + eps, lon - eps + 360, lon + eps - 360}
	nl := 2
	if lon < -180+eps || lon > 180-eps {
		nl = 4
	}
	var seen [16]valuesPointKey
	ns := 0
	for _, la := range [...]float64{lat - eps, lat + eps} {
		for _, lo := range lons[:nl] {
			k := valuesKey(math.Max(-90, math.Min(90, la)), lo)
			dup := false
			for _, o := range seen[:ns] {
				dup = dup || o == k
			}
			if dup {
				continue
			}
			seen[ns] = k
			ns++
			c, ok := m[k]
			for i := c.first; ok && i >= 0; i = sites[i].next {
				if valuesSamePoint(sites[i].st.Lat, sites[i].st.Lon, lat, lon) {
					return int(i), true
				}
			}
		}
	}
	return 0, false
}
