package station

import (
	"bufio"
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
)

// IndexTotalsColumns is the header WriteIndexTotalsCSV writes: the totals
// table that `drygrid index` reads (its columns are found by IDAliases,
// YearAliases and TotalAliases).
var IndexTotalsColumns = []string{"station", "year", "total"}

// WindowTotalsColumns returns the header WriteWindowTotalsCSV writes for
// the windows: station, year, total_<N>d per window, days_<N>d per window.
func WindowTotalsColumns(windows []int) []string {
	cols := []string{"station", "year"}
	for _, n := range windows {
		cols = append(cols, fmt.Sprintf("total_%dd", n))
	}
	for _, n := range windows {
		cols = append(cols, fmt.Sprintf("days_%dd", n))
	}
	return cols
}

// FormatTotal formats a total in mm as WriteWindowTotalsCSV does: the
// shortest decimal that reads back as the same number ("12.3", "0"); a
// missing total (NaN) is "".
func FormatTotal(t WindowTotal) string {
	if t.Missing() {
		return ""
	}
	return strconv.FormatFloat(t.Total, 'f', -1, 64)
}

// WriteWindowTotalsCSV writes every station's totals, one row per station
// and year (stations by id, years ascending), one total column per window
// (empty when missing) and then one column per window with the number of
// days reported.
func WriteWindowTotalsCSV(w io.Writer, r *WindowTotals) error {
	nw := len(r.Windows)
	return writeStationYearsCSV(w, r, WindowTotalsColumns(r.Windows), func(rest []string, s *StationTotals, y int) {
		for k := range nw {
			t := r.Total(s, y, k)
			rest[k] = FormatTotal(t)
			rest[nw+k] = strconv.Itoa(t.Reported)
		}
	})
}

// WriteIndexTotalsCSV writes the totals of the window of n days (one of
// r.Windows) in the form `drygrid index --totals` reads unchanged: the
// columns station,year,total, one row per station and year, the total in
// mm, an empty cell when it is missing (the index step takes an empty
// total as missing, never as zero).
func WriteIndexTotalsCSV(w io.Writer, r *WindowTotals, n int) error {
	k := r.WindowIndex(n)
	if k < 0 {
		return fmt.Errorf("no window of %d days (the windows are %v)", n, r.Windows)
	}
	return writeStationYearsCSV(w, r, IndexTotalsColumns, func(rest []string, s *StationTotals, y int) {
		rest[0] = FormatTotal(r.Total(s, y, k))
	})
}

// writeStationYearsCSV writes header and then one row per station and
// year of r (stations in order, years ascending): the station's id, the
// year and the columns after them, which fill sets.
func writeStationYearsCSV(w io.Writer, r *WindowTotals, header []string, fill func(rest []string, s *StationTotals, y int)) error {
	bw := bufio.NewWriterSize(w, 64<<10)
	cw := csv.NewWriter(bw)
	if err := cw.Write(header); err != nil {
		return err
	}
	rec := make([]string, len(header))
	for i := range r.Stations {
		s := &r.Stations[i]
		rec[0] = s.ID
		for y := s.FirstYear; y <= s.LastYear; y++ {
			rec[1] = strconv.Itoa(y)
			fill(rec[2:], s, y)
			if err := cw.Write(rec); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	return bw.Flush()
}
