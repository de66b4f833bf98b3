package station

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
)

// Column aliases of the window-totals table.
var (
	TotalAliases = []string{"total", "total_mm", "precip", "value"}
	YearAliases  = []string{"year"}
)

// MaxTotal is the largest window total accepted, in mm: a plausibility
// bound (common practice in data quality control), above any recorded
// window total (the wettest year on record, Cherrapunji 1860-61, is about
// 26,500 mm). A larger total is a unit, column or data error; taken as it
// is it would make the fit and the share of the median overflow (1e308
// gave an infinite gamma scale).
const MaxTotal = 100000

// Years a totals table may hold; anything else is an impossible year.
const (
	MinTotalYear = 1000
	MaxTotalYear = 3000
)

// idxSite is one row of the station table of `drygrid index`.
type idxSite struct {
	ID       string
	Lat, Lon float64 // Lon normalised to [-180, 180)
	Line     int
}

// idxEntry is one station-year of the totals table; total is NaN when missing.
// It is 16 bytes: the table is held as one entry per row (the index needs
// each station's whole record), so a 10-million-row file takes 160 MB here.
type idxEntry struct {
	total float64
	line  uint32 // line in the file (files beyond 4,294,967,295 lines are refused)
	year  int32
}

// idxTotals is the totals table gathered per station (index into the sites).
type idxTotals struct {
	path           string
	series         [][]idxEntry // per site, sorted by year after idxReadTotals
	latest         int          // latest year with a non-missing total, 0 if none
	rows           int          // data rows read
	skippedUnknown int          // rows of stations missing from the station table
	unknownIDs     int          // distinct such stations
	firstUnknown   string       // "ID (line L)" of the first such row
}

// idxReadSites reads the station table: id, latitude, longitude (other
// columns, such as name and elevation, are allowed and ignored). Latitude
// must lie in [-90, 90] and longitude in [-180, 360); longitudes of 180 and
// more are normalised to [-180, 180). Ids must be unique.
func idxReadSites(t *Table) ([]idxSite, map[string]int, error) {
	idC, err := t.FindColumn("station id", "", IDAliases)
	if err != nil {
		return nil, nil, err
	}
	latC, err := t.FindColumn("latitude", "", LatAliases)
	if err != nil {
		return nil, nil, err
	}
	lonC, err := t.FindColumn("longitude", "", LonAliases)
	if err != nil {
		return nil, nil, err
	}
	var sites []idxSite
	byID := make(map[string]int)
	for {
		rec, line, err := t.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, nil, err
		}
		id := rec[idC]
		if id == "" {
			return nil, nil, t.FieldError(line, idC, "missing station id")
		}
		if first, dup := byID[id]; dup {
			return nil, nil, t.FieldError(line, idC, "station %s is listed twice, on lines %d and %d", id, sites[first].Line, line)
		}
		lat, err := t.Float(rec, line, latC, "latitude")
		if err != nil {
			return nil, nil, err
		}
		if lat < -90 || lat > 90 {
			return nil, nil, t.FieldError(line, latC, "latitude %s outside [-90, 90]", rec[latC])
		}
		lon, err := t.Float(rec, line, lonC, "longitude")
		if err != nil {
			return nil, nil, err
		}
		if lon < -180 || lon >= 360 {
			return nil, nil, t.FieldError(line, lonC, "longitude %s outside [-180, 360)", rec[lonC])
		}
		if lon >= 180 {
			lon -= 360
		}
		byID[id] = len(sites)
		sites = append(sites, idxSite{ID: id, Lat: lat, Lon: lon, Line: line})
	}
	if len(sites) == 0 {
		return nil, nil, fmt.Errorf("%s: no stations", t.Path)
	}
	return sites, byID, nil
}

// idxReadTotals streams the totals table (station, year, total) into one
// series per known station; memory grows with stations x years, not with
// the file. ids are the station ids by site index. totalColumn, when not empty, names the total column exactly
// (case-insensitive). An empty or NA total is missing (kept as NaN), never
// zero. Rows of stations missing from the station table are counted and
// skipped before their cells are checked. Errors (file, line, column): a year
// that is not an integer in [1000, 3000], a total that is not a finite
// number, a negative total, a total above MaxTotal, and the same
// station-year on two lines.
func idxReadTotals(t *Table, byID map[string]int, ids []string, totalColumn string) (*idxTotals, error) {
	return idxReadTotalsRuns(t, byID, ids, totalColumn, nil)
}

// idxReadTotalsRuns is idxReadTotals that also calls onRun, when not nil,
// each time a station's first run of rows ends in year order: si is the
// station, s its series so far and latest the latest year with a total so
// far. s is never written to afterwards (a later run of the same station is
// appended to a copy, and a series in order is not sorted again), so onRun
// may hand it to another goroutine. When a later run of a station ends,
// onRun gets again = true and a nil s.
func idxReadTotalsRuns(t *Table, byID map[string]int, ids []string, totalColumn string, onRun func(si int, s []idxEntry, latest int, again bool)) (*idxTotals, error) {
	idC, err := t.FindColumn("station id", "", IDAliases)
	if err != nil {
		return nil, err
	}
	yearC, err := t.FindColumn("year", "", YearAliases)
	if err != nil {
		return nil, err
	}
	totC, err := t.FindColumn("total", totalColumn, TotalAliases)
	if err != nil {
		return nil, err
	}
	tt := &idxTotals{path: t.Path, series: make([][]idxEntry, len(ids))}
	unknown := make(map[string]bool)
	// Rows of one station usually come together (a run); a run is gathered
	// in run and then copied into an exact-sized slice of a shared arena, so
	// the series take 16 bytes a row and no slice grows by doubling. A
	// station whose rows come in several runs has its series appended to.
	var run, arena []idxEntry
	runSite := -1
	flush := func() {
		if runSite < 0 || len(run) == 0 {
			return
		}
		again := tt.series[runSite] != nil
		if again {
			tt.series[runSite] = append(tt.series[runSite], run...)
		} else {
			if len(run) > len(arena) {
				arena = make([]idxEntry, max(len(run), idxArenaChunk))
			}
			n := copy(arena, run)
			tt.series[runSite] = arena[:n:n]
			arena = arena[n:]
		}
		run = run[:0]
		if onRun != nil {
			switch {
			case again:
				onRun(runSite, nil, tt.latest, true)
			case idxSorted(tt.series[runSite]):
				onRun(runSite, tt.series[runSite], tt.latest, false)
			}
		}
	}
	var lastID []byte
	lastSite := -1
	for {
		rec, idb, line, err := t.nextRecord(idC)
		if err == io.EOF {
			break
		}
		tt.rows++
		if err != nil {
			return nil, err
		}
		si := lastSite
		if si < 0 || !bytes.Equal(idb, lastID) {
			var ok bool
			si, ok = byID[string(idb)]
			if !ok {
				if tt.skippedUnknown == 0 {
					tt.firstUnknown = fmt.Sprintf("%s (line %d)", idb, line)
				}
				tt.skippedUnknown++
				if !unknown[string(idb)] {
					unknown[string(idb)] = true
					tt.unknownIDs++
				}
				continue
			}
			lastID = append(lastID[:0], idb...)
			lastSite = si
		}
		year, ok := idxYear4(rec[yearC])
		if !ok {
			ys := string(rec[yearC])
			year, err = strconv.Atoi(ys)
			if err != nil || year < MinTotalYear || year > MaxTotalYear {
				return nil, t.FieldError(line, yearC, "year %q is not an integer from %d to %d", ys, MinTotalYear, MaxTotalYear)
			}
		}
		total := math.NaN()
		if v, ok := idxDecimal(rec[totC]); ok {
			if v > MaxTotal {
				return nil, idxTooLarge(t, line, totC, rec[totC])
			}
			total = v
			if year > tt.latest {
				tt.latest = year
			}
		} else if s := string(rec[totC]); !IsMissing(s) {
			v, err := t.ParseFloat(s)
			if err != nil {
				return nil, t.FieldError(line, totC, "total %v", err)
			}
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, t.FieldError(line, totC, "total %s is not a finite number", s)
			}
			if v < 0 {
				return nil, t.FieldError(line, totC, "total %s is negative", s)
			}
			if v > MaxTotal {
				return nil, idxTooLarge(t, line, totC, rec[totC])
			}
			total = v + 0 // -0 becomes 0
			if year > tt.latest {
				tt.latest = year
			}
		}
		if line > math.MaxUint32 {
			return nil, t.FieldError(line, totC, "totals table longer than %d lines", uint32(math.MaxUint32))
		}
		if si != runSite {
			flush()
			runSite = si
		}
		run = append(run, idxEntry{total: total, line: uint32(line), year: int32(year)})
	}
	flush()
	// Sort each series by year (input is usually sorted already) and find the
	// duplicate station-year whose second line comes first in the file.
	dupA, dupB, dupID, dupYear := 0, 0, "", 0
	for si, s := range tt.series {
		if !idxSorted(s) {
			sort.Slice(s, func(i, j int) bool { return idxEntryLess(s[i], s[j]) })
		}
		for i := 1; i < len(s); i++ {
			if s[i].year == s[i-1].year && (dupB == 0 || int(s[i].line) < dupB) {
				dupA, dupB, dupID, dupYear = int(s[i-1].line), int(s[i].line), ids[si], int(s[i].year)
			}
		}
	}
	if dupB > 0 {
		return nil, t.FieldError(dupB, yearC, "station %s year %d appears twice, on lines %d and %d", dupID, dupYear, dupA, dupB)
	}
	return tt, nil
}

// idxTooLarge is the error of a total above MaxTotal.
func idxTooLarge(t *Table, line, col int, cell []byte) error {
	return t.FieldError(line, col, "total %s is above %d mm, more than any window total on record; check the unit and the column", cell, MaxTotal)
}

// idxEntryLess orders entries by year, then by line.
func idxEntryLess(a, b idxEntry) bool {
	if a.year != b.year {
		return a.year < b.year
	}
	return a.line < b.line
}

// idxSorted reports whether s is in idxEntryLess order.
func idxSorted(s []idxEntry) bool {
	for i := 1; i < len(s); i++ {
		if idxEntryLess(s[i], s[i-1]) {
			return false
		}
	}
	return true
}

// idxArenaChunk is the number of entries the series arena allocates at a
// time (1 MiB).
const idxArenaChunk = 1 << 16

// idxYear4 parses a year of exactly four ASCII digits in [MinTotalYear,
// MaxTotalYear], the common case; anything else reports false and is left
// to strconv.Atoi (which gives the same value wherever this one succeeds).
func idxYear4(b []byte) (int, bool) {
	if len(b) != 4 {
		return 0, false
	}
	y := 0
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, false
		}
		y = y*10 + int(c-'0')
	}
	return y, y >= MinTotalYear && y <= MaxTotalYear
}

// idxPow10 holds the powers of ten that float64 represents exactly.
var idxPow10 = [...]float64{1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15}

// idxDecimal parses the common form of a total, ASCII digits with at most
// one decimal point (at least one digit, at most 15), and reports false for
// anything else, which is left to Table.ParseFloat. With at most 15 digits
// the digits form an integer below 2^53 and the divisor 10^k is exact, so the
// one IEEE division rounds correctly and the result is exactly that of
// strconv.ParseFloat (Clinger 1990, the exact fast path strconv also takes).
func idxDecimal(b []byte) (float64, bool) {
	if len(b) == 0 || len(b) > 16 {
		return 0, false
	}
	var m uint64
	digits, frac, dot := 0, 0, false
	for _, c := range b {
		switch {
		case c >= '0' && c <= '9':
			m = m*10 + uint64(c-'0')
			digits++
			if dot {
				frac++
			}
		case c == '.' && !dot:
			dot = true
		default:
			return 0, false
		}
	}
	if digits == 0 || digits > 15 {
		return 0, false
	}
	return float64(m) / idxPow10[frac], true
}
