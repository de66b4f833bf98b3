package pipeline

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
	"time"
	_ "time/tzdata" // the zone database, for a static binary

	"drygrid/station"
)

// DefaultWindows are the windows of `drygrid totals` when none are named.
var DefaultWindows = []int{30, 90, 180, 365}

// ReadDaily reads a daily precipitation table into window totals
// (station.ReadDaily); progress, when not nil, is called now and then with
// the bytes of the file read so far and its size (a Parquet file reports
// only at the end).
func ReadDaily(path string, opt station.DailyOptions, progress func(done, total int64)) (*station.WindowTotals, error) {
	if progress == nil {
		return station.ReadDaily(path, opt)
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("daily %s: %w", path, err)
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil || !st.Mode().IsRegular() {
		f.Close()
		return station.ReadDaily(path, opt)
	}
	var magic [4]byte
	if n, _ := f.ReadAt(magic[:], 0); n == 4 && string(magic[:]) == "PAR1" {
		r, err := station.ReadDaily(path, opt)
		if err == nil {
			progress(st.Size(), st.Size())
		}
		return r, err
	}
	cr := &countingReader{r: f, total: st.Size(), report: progress}
	r, err := station.ReadDailyReader(path, cr, opt)
	if err == nil {
		progress(st.Size(), st.Size())
	}
	return r, err
}

// countingReader reports the bytes read through it every 4 MiB.
type countingReader struct {
	r           io.Reader
	done, total int64
	last        int64
	report      func(done, total int64)
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.done += int64(n)
	if c.done-c.last >= 4<<20 {
		c.last = c.done
		c.report(c.done, c.total)
	}
	return n, err
}

// WriteTotals writes every window's totals (station.WriteWindowTotalsCSV)
// to path atomically.
func WriteTotals(path string, r *station.WindowTotals) error {
	return writeStream(path, func(w io.Writer) error { return station.WriteWindowTotalsCSV(w, r) })
}

// TotalsSummary counts a window's totals present and missing.
type TotalsSummary struct {
	Window           int
	Present, Missing int
}

// SummarizeTotals counts, per window, the station-year totals present and
// missing (a year from the station's first record year to the target's).
func SummarizeTotals(r *station.WindowTotals) []TotalsSummary {
	out := make([]TotalsSummary, len(r.Windows))
	for w, n := range r.Windows {
		out[w].Window = n
	}
	for i := range r.Stations {
		s := &r.Stations[i]
		for y := s.FirstYear; y <= s.LastYear; y++ {
			for w := range r.Windows {
				if !r.Total(s, y, w).Missing() {
					out[w].Present++
				} else {
					out[w].Missing++
				}
			}
		}
	}
	return out
}

// ParseWindows reads a comma-separated list of window lengths in days
// ("30,90,180,365"): each 1 to station.MaxWindowDays, none twice.
func ParseWindows(s string) ([]int, error) {
	var out []int
	for _, p := range strings.Split(s, ",") {
		p = strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(p), "d"))
		n, err := strconv.Atoi(p)
		if err != nil {
			return nil, usageAt("--windows ", "windows", fmt.Sprintf("%q: %q is not a number of days", s, p))
		}
		out = append(out, n)
	}
	return out, CheckWindows(out)
}

// CheckWindows checks window lengths: at least one, each 1 to
// station.MaxWindowDays days, none twice.
func CheckWindows(ws []int) error {
	if len(ws) == 0 {
		return usageAt("--windows: ", "windows", "no window named (e.g. 30 or 30,90)")
	}
	seen := map[int]bool{}
	for _, n := range ws {
		if n < 1 || n > station.MaxWindowDays {
			return usageAt("--windows: ", "windows", fmt.Sprintf("a window of %d days is not from 1 to %d days", n, station.MaxWindowDays))
		}
		if seen[n] {
			return usageAt("--windows: ", "windows", fmt.Sprintf("the window of %d days is named twice", n))
		}
		seen[n] = true
	}
	return nil
}

// CheckDailyOptions checks the options of the daily records that do not
// need the file: units, the least share of reported days.
func CheckDailyOptions(o station.DailyOptions) error {
	switch o.Units {
	case "", station.UnitMM, station.UnitTenthMM, station.UnitInch:
	default:
		return usageAt("--units ", "inputs.units", fmt.Sprintf("%q: must be %s, %s or %s", o.Units, station.UnitMM, station.UnitTenthMM, station.UnitInch))
	}
	if o.MinShare != 0 && !(o.MinShare > 0 && o.MinShare <= 1) {
		return usageAt("--min-share ", "inputs.min_share", fmt.Sprintf("%g: must be in (0, 1]", o.MinShare))
	}
	return nil
}

// indexTotals writes window n's totals in the index step's form
// (station,year,total) into memory.
func indexTotals(r *station.WindowTotals, n int) ([]byte, error) {
	var buf bytes.Buffer
	bw := bufio.NewWriter(&buf)
	if err := station.WriteIndexTotalsCSV(bw, r, n); err != nil {
		return nil, err
	}
	if err := bw.Flush(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// Relative dates of a job: the day the job runs, or the day before.
const (
	DateToday     = "today"
	DateYesterday = "yesterday"
)

// ResolveDate turns a job's date into YYYY-MM-DD: "today" and "yesterday"
// are read off now in the time zone tz (an IANA name such as
// "Pacific/Auckland"; "" = UTC); a calendar date is checked and returned
// as it is.
func ResolveDate(date, tz string, now time.Time) (string, error) {
	switch strings.ToLower(date) {
	case DateToday, DateYesterday:
		loc, err := LoadZone(tz)
		if err != nil {
			return "", err
		}
		t := now.In(loc)
		if strings.EqualFold(date, DateYesterday) {
			y, m, d := t.Date()
			t = time.Date(y, m, d-1, 12, 0, 0, 0, loc)
		}
		return t.Format("2006-01-02"), nil
	}
	if err := CheckDate(date); err != nil {
		return "", err
	}
	return date, nil
}

// IsRelativeDate reports whether date is "today" or "yesterday".
func IsRelativeDate(date string) bool {
	d := strings.ToLower(date)
	return d == DateToday || d == DateYesterday
}

// LoadZone loads an IANA time zone ("" = UTC); the zone database is built
// into the program (time/tzdata), so a static binary knows the zones.
func LoadZone(tz string) (*time.Location, error) {
	if tz == "" {
		return time.UTC, nil
	}
	loc, err := time.LoadLocation(tz)
	if err != nil || strings.EqualFold(tz, "local") {
		return nil, usageAt("--timezone ", "timezone", fmt.Sprintf("%q is not a time zone of the IANA database (e.g. UTC, Pacific/Auckland)", tz))
	}
	return loc, nil
}
