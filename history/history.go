package history

import (
	"bufio"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"drygrid/bands"
	"drygrid/layer/regions"
	"drygrid/publish"
	"drygrid/region"
)

// Header is the history CSV header: date, then the regions.csv
// columns (regions.Header).
func Header(s *bands.Scheme) []string {
	return append([]string{"date"}, regions.Header(s)...)
}

// histCheckDate accepts an ISO calendar date, YYYY-MM-DD.
func histCheckDate(date string) error {
	if _, err := time.Parse("2006-01-02", date); err != nil || len(date) != 10 {
		return fmt.Errorf("date %q is not a calendar date YYYY-MM-DD", date)
	}
	return nil
}

// Append adds one day's region rows to the history CSV at path,
// creating it if missing. Rows are keyed by (date, region): re-running a date
// replaces that date's rows instead of duplicating them. Rows are kept in
// date order (regions in the order given within a date). A history whose
// header differs from this scheme's (another scheme, another format) is an
// error and the file is left untouched; the file is rewritten atomically,
// under an exclusive lock on .NAME.drygrid-lock beside it (waited for,
// removed when done), so concurrent appends to one file lose no date.
func Append(path, date string, stats []region.ZonalStats, s *bands.Scheme) error {
	if err := histCheckDate(date); err != nil {
		return fmt.Errorf("history %s: %w", path, err)
	}
	seen := map[string]bool{}
	for _, z := range stats {
		if seen[z.Key] {
			return fmt.Errorf("history %s: region %q appears twice for %s", path, z.Key, date)
		}
		seen[z.Key] = true
	}
	// The read, the change and the rewrite are one step under a lock
	// beside the file, so that two runs appending to the same history
	// (another output directory, drygrid stats) both keep their rows.
	dir, base := filepath.Split(path)
	release, err := publish.Lock(filepath.Join(dir, "."+base+publish.LockTag), true)
	if err != nil {
		return fmt.Errorf("history %s: lock: %w", path, err)
	}
	defer release()
	header := Header(s)
	var rows [][]string
	f, err := os.Open(path)
	switch {
	case errors.Is(err, fs.ErrNotExist):
	case err != nil:
		return fmt.Errorf("history %s: %w", path, err)
	default:
		old, err := histRead(path, f, header)
		f.Close()
		if err != nil {
			return err
		}
		for _, r := range old {
			if r[0] != date {
				rows = append(rows, r)
			}
		}
	}
	for _, z := range stats {
		rows = append(rows, append([]string{date}, regions.Record(z, s)...))
	}
	sort.SliceStable(rows, func(i, j int) bool { return rows[i][0] < rows[j][0] })
	return publish.WriteFile(path, func(w *bufio.Writer) error { return writeRows(w, header, rows) })
}

// Day is one date's region rows of a history.
type Day struct {
	Date  string // YYYY-MM-DD
	Stats []region.ZonalStats
}

// Encode writes a history CSV of the days, the same bytes as Append
// called on a new file with each day in turn: rows in date order (regions
// in the order given within a date); a date given twice keeps its last rows.
func Encode(w io.Writer, days []Day, s *bands.Scheme) error {
	byDate := map[string]int{}
	for i, d := range days {
		if err := histCheckDate(d.Date); err != nil {
			return fmt.Errorf("history: %w", err)
		}
		byDate[d.Date] = i
	}
	var rows [][]string
	for i, d := range days {
		if byDate[d.Date] != i {
			continue
		}
		seen := map[string]bool{}
		for _, z := range d.Stats {
			if seen[z.Key] {
				return fmt.Errorf("history: region %q appears twice for %s", z.Key, d.Date)
			}
			seen[z.Key] = true
			rows = append(rows, append([]string{d.Date}, regions.Record(z, s)...))
		}
	}
	sort.SliceStable(rows, func(i, j int) bool { return rows[i][0] < rows[j][0] })
	return writeRows(w, Header(s), rows)
}

// writeRows writes the header and the rows as CSV.
func writeRows(w io.Writer, header []string, rows [][]string) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	if err := cw.WriteAll(rows); err != nil {
		return err
	}
	return cw.Error()
}

// histRead reads a history file's rows and checks its header.
func histRead(path string, r io.Reader, header []string) ([][]string, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = len(header)
	got, err := cr.Read()
	if err == io.EOF {
		return nil, fmt.Errorf("history %s: empty file (no header)", path)
	}
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) && pe.Err == csv.ErrFieldCount {
			return nil, fmt.Errorf("history %s line 1: the header has %d columns, this scheme's has %d (%s): use another history file for another scheme", path, len(got), len(header), strings.Join(header, ","))
		}
		return nil, fmt.Errorf("history %s: %w", path, err)
	}
	if !slices.Equal(got, header) {
		for i := range got {
			if got[i] != header[i] {
				return nil, fmt.Errorf("history %s line 1 column %d: header %q, want %q (the header must be %s)", path, i+1, got[i], header[i], strings.Join(header, ","))
			}
		}
	}
	var rows [][]string
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if err == io.EOF {
			return rows, nil
		}
		if err != nil {
			return nil, fmt.Errorf("history %s: %w", path, err)
		}
		if err := histCheckDate(rec[0]); err != nil {
			return nil, fmt.Errorf("history %s line %d column 1: %w", path, line, err)
		}
		rows = append(rows, rec)
	}
}

// History is the share in drought per region over time, read from a
// history CSV for charting.
type History struct {
	Dates   []time.Time // distinct dates, ascending
	Regions []string    // regions in order of first appearance
	// InDroughtPct[r][d] is region r's in_drought_pct on Dates[d], NaN when
	// the history has no value for that day.
	InDroughtPct [][]float64
}

// Read reads a history CSV written by Append (any scheme: the
// columns date, region and in_drought_pct are found by name).
func Read(path string) (*History, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("history %s: %w", path, err)
	}
	defer f.Close()
	return Parse(path, f)
}

// histMaxRows bounds what Parse keeps (ten regions for a century of
// days is 365,250).
const histMaxRows = 5_000_000

// Parse reads a history CSV from r; name is used in errors.
func Parse(name string, r io.Reader) (*History, error) {
	cr := csv.NewReader(r)
	head, err := cr.Read()
	if err == io.EOF {
		return nil, fmt.Errorf("history %s: empty file (no header)", name)
	}
	if err != nil {
		return nil, fmt.Errorf("history %s: %w", name, err)
	}
	col := map[string]int{}
	for i, h := range head {
		col[strings.ToLower(strings.TrimSpace(h))] = i
	}
	for _, need := range []string{"date", "region", "in_drought_pct"} {
		if _, ok := col[need]; !ok {
			return nil, fmt.Errorf("history %s line 1: no %q column (header %s)", name, need, strings.Join(head, ","))
		}
	}
	ci, cr2, cd := col["date"], col["region"], col["in_drought_pct"]
	type obs struct {
		date   time.Time
		region int
		pct    float64
	}
	var all []obs
	regIdx := map[string]int{}
	h := &History{}
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("history %s: %w", name, err)
		}
		if line > histMaxRows {
			return nil, fmt.Errorf("history %s: more than %d rows", name, histMaxRows)
		}
		d, err := time.Parse("2006-01-02", rec[ci])
		if err != nil {
			return nil, fmt.Errorf("history %s line %d column %d: date %q is not YYYY-MM-DD", name, line, ci+1, rec[ci])
		}
		reg := rec[cr2]
		if reg == "" {
			return nil, fmt.Errorf("history %s line %d column %d: empty region", name, line, cr2+1)
		}
		pct := math.NaN()
		if s := strings.TrimSpace(rec[cd]); s != "" {
			v, err := strconv.ParseFloat(s, 64)
			if err != nil || v < 0 || v > 100 || math.IsNaN(v) {
				return nil, fmt.Errorf("history %s line %d column %d: in_drought_pct %q is not a percentage", name, line, cd+1, rec[cd])
			}
			pct = v
		}
		ri, ok := regIdx[reg]
		if !ok {
			ri = len(h.Regions)
			regIdx[reg] = ri
			h.Regions = append(h.Regions, reg)
		}
		all = append(all, obs{d, ri, pct})
	}
	if len(all) == 0 {
		return nil, fmt.Errorf("history %s: no rows", name)
	}
	dateIdx := map[time.Time]int{}
	for _, o := range all {
		if _, ok := dateIdx[o.date]; !ok {
			dateIdx[o.date] = 0
			h.Dates = append(h.Dates, o.date)
		}
	}
	sort.Slice(h.Dates, func(i, j int) bool { return h.Dates[i].Before(h.Dates[j]) })
	for i, d := range h.Dates {
		dateIdx[d] = i
	}
	h.InDroughtPct = make([][]float64, len(h.Regions))
	for r := range h.InDroughtPct {
		row := make([]float64, len(h.Dates))
		for i := range row {
			row[i] = math.NaN()
		}
		h.InDroughtPct[r] = row
	}
	for _, o := range all {
		h.InDroughtPct[o.region][dateIdx[o.date]] = o.pct // a repeated (date, region): the last row wins
	}
	return h, nil
}
