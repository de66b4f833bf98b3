package station

import (
	"drygrid/spi"
	"fmt"
	"hash/maphash"
	"io"
	"math"
	"strings"
	"unsafe"
)

// Kind names what a station value table holds.
type Kind string

// Value kinds (the --kind flag).
//
// SPI and percentile are probabilities: a percentile becomes z
// (spi.PercentileToZ) and z is interpolated. Percent of normal (100 x the
// window's total / the median of the reference totals, the index step's
// pct_of_median) is not: a percent of normal has no z, so it is
// interpolated as it is (the weighted mean of the values) and classified
// by a scheme whose cuts are in percent of normal.
const (
	KindSPI         Kind = "spi"
	KindPercentile  Kind = "percentile"
	KindPctOfNormal Kind = "pct-of-normal"
)

// Kinds lists the kinds, as flags and messages name them.
const Kinds = "spi, percentile or pct-of-normal"

// ParseKind parses a --kind flag value: "spi", "percentile" or
// "pct-of-normal" ("percent-of-normal" is accepted), in any case.
func ParseKind(s string) (Kind, error) {
	switch k := Kind(strings.ToLower(strings.TrimSpace(s))); k {
	case KindSPI, KindPercentile, KindPctOfNormal:
		return k, nil
	case "percent-of-normal":
		return KindPctOfNormal, nil
	}
	return "", fmt.Errorf("unknown kind %q (want %s)", s, Kinds)
}

// MaxPctOfNormal is the largest percent of normal accepted: 100 times
// normal. In dry climates a window's median total can be a few mm, so a
// few thousand percent happen; beyond 10,000 % the value is taken for a
// mistake of units.
const MaxPctOfNormal = 10000

// Column aliases: columns are found by name, case-insensitively.
var (
	IDAliases          = []string{"station", "id", "station_id", "site"}
	LatAliases         = []string{"latitude", "lat"}
	LonAliases         = []string{"longitude", "lon", "long", "lng"}
	SPIAliases         = []string{"spi"}
	PercentileAliases  = []string{"percentile", "pct", "percent"}
	PctOfNormalAliases = []string{"pct_of_normal", "pct_of_median", "percent_of_normal", "percent_of_median"}
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
	Lon, Lat float64 // Lon normalised to [-180, 180)
	Value    float64 // the input value (SPI, percentile or percent of normal)
	// Z is the value interpolated: z (SPI units) for SPI (as is) and
	// percentile (via spi.PercentileToZ); for percent of normal, which has
	// no z, the percent of normal itself.
	Z      float64
	Line   int      // line of first appearance
	Merged []string // other ids averaged into this site (same point), if any
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

// MaxStations is the most stations (distinct ids) a value table may hold:
// one million, twice the largest networks drygrid is measured on (500,000
// stations) and about twenty times the largest station networks in use.
// At about 170 bytes a station while reading (the station itself, its id
// and two hash-table entries) and the collector's slack, the process stays
// under 300 MB however large the file (BENCHMARKS.md, "Memory"). A larger
// table is refused rather than left to exhaust memory.
const MaxStations = 1_000_000

// valuesMaxStations is MaxStations (lowered by tests).
var valuesMaxStations = MaxStations

// valuesMerged accumulates the rows averaged into one site of several ids.
type valuesMerged struct {
	sumZ, sumV float64
	n          int
}

// valuesCell is the first and last site of a point cell (valuesKey); the
// sites between follow the next links, in file order.
type valuesCell struct{ first, last int32 }

// valuesRow is the first appearance of an id that is not a site's own: a
// row without value, or a row averaged into another site.
type valuesRow struct {
	id       string
	line     int
	lat, lon float64
	missing  bool
	value    float64
}

// valuesIDTable maps a station id to its site (>= 0) or to another row
// (-1 - its index in others). It is keyed by a 64-bit hash of the id, 16
// bytes an entry rather than the 24 of a string key; the id found is
// compared, and the ids whose hash another id took first (in practice
// none) are kept by string in overflow.
type valuesIDTable struct {
	seed     maphash.Seed
	byHash   map[uint64]int32
	overflow map[string]int32
	n        int
}

func (m *valuesIDTable) get(id []byte, idOf func(int32) string) (int32, bool) {
	at, ok := m.byHash[maphash.Bytes(m.seed, id)]
	if !ok {
		return 0, false
	}
	if idOf(at) == string(id) {
		return at, true
	}
	at, ok = m.overflow[string(id)]
	return at, ok
}

// put adds an id that get did not find.
func (m *valuesIDTable) put(id string, at int32) {
	m.n++
	h := maphash.String(m.seed, id)
	if _, taken := m.byHash[h]; taken {
		m.overflow[id] = at
		return
	}
	m.byHash[h] = at
}

// valuesIDs holds the station ids in chunks of one allocation each: an id
// costs its bytes, not an object of its own.
type valuesIDs struct{ buf []byte }

// add returns b as a string in the arena. The arena's bytes are never
// written again once handed out.
func (a *valuesIDs) add(b []byte) string {
	if len(b) == 0 {
		return ""
	}
	if cap(a.buf)-len(a.buf) < len(b) {
		a.buf = make([]byte, 0, max(64<<10, len(b)))
	}
	start := len(a.buf)
	a.buf = append(a.buf, b...)
	return unsafe.String(&a.buf[start], len(b))
}

// valuesPointKey is a cell of 1e-6 degree used to find sites at the same
// point; the site lists of the (at most four) cells within 1e-9 degree of a
// point are checked exactly with valuesSamePoint.
// The cell's two coordinates (at most 540e6 in magnitude, longitudes
// shifted by 360 included) are packed exactly into one word, which keeps
// the table of cells at 16 bytes an entry.
type valuesPointKey uint64

func valuesKey(lat, lon float64) valuesPointKey {
	if math.Abs(lat) == 90 {
		lon = 0 // every longitude is the same point at a pole
	}
	la, lo := int64(math.Floor(lat*1e6)), int64(math.Floor(lon*1e6))
	return valuesPointKey(uint64(uint32(la+1<<31))<<32 | uint64(uint32(lo+1<<31)))
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
	case KindPctOfNormal:
		valAliases = PctOfNormalAliases
	case "":
		// No kind given: an spi column if there is one, else a percentile column.
		kind = KindSPI
		valAliases = SPIAliases
		if opt.ValueColumn == "" && t.Column(SPIAliases...) < 0 && t.Column(PercentileAliases...) >= 0 {
			kind, valAliases = KindPercentile, PercentileAliases
		}
	default:
		return nil, fmt.Errorf("%s: unknown value kind %q (want %s)", t.Path, kind, Kinds)
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
	// Memory goes with the stations: an id maps to its site (>= 0) or to
	// another row (-1 - its index in others: no value, or averaged into a
	// site); the sites are the result's stations themselves, linked per
	// point cell by next; the sums of a site of several ids are kept aside.
	byID := &valuesIDTable{seed: maphash.MakeSeed(), byHash: make(map[uint64]int32, hint), overflow: map[string]int32{}}
	byPoint := make(map[valuesPointKey]valuesCell, hint)
	stations := make([]Station, 0, hint)
	next := make([]int32, 0, hint)
	var others []valuesRow
	idOf := func(at int32) string {
		if at >= 0 {
			return stations[at].ID
		}
		return others[-1-at].id
	}
	merged := map[int32]*valuesMerged{}
	var ids valuesIDs
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
		if at, dup := byID.get(idb, idOf); dup {
			var first valuesRow
			if at >= 0 {
				s := &stations[at]
				// A site's Value is its own row's until the end (averages
				// are taken after the last row).
				first = valuesRow{line: s.Line, lat: s.Lat, lon: s.Lon, value: s.Value}
			} else {
				first = others[-1-at]
			}
			id := string(idb)
			if !valuesSamePoint(first.lat, first.lon, lat, lon) {
				col := latC
				if math.Abs(first.lat-lat) <= 1e-9 {
					col = lonC
				}
				return nil, t.FieldError(line, col, "station %s is at %g, %g here but at %g, %g on line %d", id, lat, lon, first.lat, first.lon, first.line)
			}
			if first.missing != r.missing || first.value != r.value {
				return nil, t.FieldError(line, valC, "station %s has %s %q here but another value on line %d", id, kind, r.raw, first.line)
			}
			warn("%s line %d: repeats station %s of line %d exactly; kept once", t.Path, line, id, first.line)
			continue
		}
		if byID.n >= valuesMaxStations {
			return nil, t.FieldError(line, idC, "more than %d stations; the limit keeps memory bounded: split the table, or grid fewer stations", valuesMaxStations)
		}
		id := ids.add(idb)
		row := valuesRow{id: id, line: line, lat: lat, lon: lon, missing: r.missing, value: r.value}
		if row.missing {
			byID.put(id, int32(-1-len(others)))
			others = append(others, row)
			v.Rejected = append(v.Rejected, Rejection{Line: line, ID: id, Reason: ReasonNoValue})
			continue
		}
		z := row.value
		if kind == KindPercentile {
			z = spi.PercentileToZ(row.value)
		}
		if si, ok := valuesFindPoint(byPoint, stations, next, lat, lon); ok {
			byID.put(id, int32(-1-len(others)))
			others = append(others, row)
			s := &stations[si]
			m := merged[int32(si)]
			if m == nil {
				m = &valuesMerged{sumZ: s.Z, sumV: s.Value, n: 1}
				merged[int32(si)] = m
			}
			m.sumZ += z
			m.sumV += row.value
			m.n++
			s.Merged = append(s.Merged, id)
			warn("%s line %d: station %s is at the same point as %s (line %d); their values are averaged into one site", t.Path, line, id, s.ID, s.Line)
			continue
		}
		k, at := valuesKey(lat, lon), int32(len(stations))
		if c, ok := byPoint[k]; ok {
			next[c.last] = at
			byPoint[k] = valuesCell{c.first, at}
		} else {
			byPoint[k] = valuesCell{at, at}
		}
		byID.put(id, at)
		stations = append(stations, Station{ID: id, Lon: lon, Lat: lat, Value: row.value, Z: z, Line: line})
		next = append(next, -1)
	}
	v.Read = rd.read
	if kind == KindPercentile && maxLine > 0 && maxValue > 0 && maxValue <= 1 {
		// Every percentile in [0, 1], not all 0: fractions (0.0231 for
		// 2.31 %), which read as percents would map everything driest.
		return nil, t.FieldError(maxLine, valC, "every percentile lies in [0, 1] (the largest, %s, is on this line): these look like fractions; percentiles are 0-100; multiply by 100", maxRaw)
	}
	if kind == KindPctOfNormal && maxLine > 0 && maxValue > 0 && maxValue <= 3 {
		// Every value in [0, 3], not all 0: ratios (1.0 for normal), which
		// read as percents would map everything at 1-3 % of normal.
		return nil, t.FieldError(maxLine, valC, "every percent of normal lies in [0, 3] (the largest, %s, is on this line): these look like ratios to normal; normal is 100; multiply by 100", maxRaw)
	}
	for si, m := range merged {
		s := &stations[si]
		s.Z = m.sumZ / float64(m.n)
		s.Value = m.sumV / float64(m.n)
	}
	v.Stations = stations
	if dropped > 0 {
		v.Warnings = append(v.Warnings, fmt.Sprintf("%s: %d more warnings not shown", t.Path, dropped))
	}
	return v, nil
}

// valuesFindPoint looks up a site at the same point (1e-9 degree): the cells
// of the points 1e-9 degree around, and across the antimeridian seam.
func valuesFindPoint(m map[valuesPointKey]valuesCell, sites []Station, next []int32, lat, lon float64) (int, bool) {
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
			for i := c.first; ok && i >= 0; i = next[i] {
				if valuesSamePoint(sites[i].Lat, sites[i].Lon, lat, lon) {
					return int(i), true
				}
			}
		}
	}
	return 0, false
}
