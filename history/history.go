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
	// Bands are the band keys of the file's <key>_pct columns (every
	// column ending in _pct but covered_pct and in_drought_pct), in the
	// file's order: the scheme's, driest first. Empty for a history
	// without band columns.
	Bands []string
	// BandPct[r][d][b] is region r's share of band Bands[b] on Dates[d],
	// percent of the covered area, NaN when the history has no value
	// (no row that day, or nothing covered). Nil without band columns.
	BandPct [][][]float64
}

// FirstDate and LastDate are the history's first and last dates,
// YYYY-MM-DD ("" for an empty history).
func (h *History) FirstDate() string {
	if h == nil || len(h.Dates) == 0 {
		return ""
	}
	return h.Dates[0].Format("2006-01-02")
}

// LastDate: see FirstDate.
func (h *History) LastDate() string {
	if h == nil || len(h.Dates) == 0 {
		return ""
	}
	return h.Dates[len(h.Dates)-1].Format("2006-01-02")
}

// Between is the part of the history dated from from to to, both
// included (a zero time leaves that end open). The regions stay those of h,
// in the same order, even when one has no value in the range; the result
// has no dates when no row falls in the range. The slices are shared
// with h.
func (h *History) Between(from, to time.Time) *History {
	lo := sort.Search(len(h.Dates), func(i int) bool { return from.IsZero() || !h.Dates[i].Before(from) })
	hi := sort.Search(len(h.Dates), func(i int) bool { return !to.IsZero() && h.Dates[i].After(to) })
	if hi < lo {
		hi = lo
	}
	out := &History{Dates: h.Dates[lo:hi:hi], Regions: h.Regions, Bands: h.Bands}
	for _, v := range h.InDroughtPct {
		out.InDroughtPct = append(out.InDroughtPct, v[lo:hi:hi])
	}
	if h.BandPct != nil {
		out.BandPct = make([][][]float64, len(h.BandPct))
		for r, v := range h.BandPct {
			out.BandPct[r] = v[lo:hi:hi]
		}
	}
	return out
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
	h := &History{}
	for _, need := range []string{"date", "region", "in_drought_pct"} {
		if _, ok := col[need]; !ok {
			return nil, fmt.Errorf("history %s line 1: no %q column (header %s)", name, need, strings.Join(head, ","))
		}
	}
	ci, cr2, cd := col["date"], col["region"], col["in_drought_pct"]
	var bandCols []int // the <key>_pct columns, in the file's order
	for i, hd := range head {
		k := strings.ToLower(strings.TrimSpace(hd))
		if strings.HasSuffix(k, "_pct") && k != "covered_pct" && k != "in_drought_pct" && len(k) > len("_pct") {
			bandCols = append(bandCols, i)
			h.Bands = append(h.Bands, strings.TrimSuffix(k, "_pct"))
		}
	}
	type obs struct {
		date   time.Time
		region int
		pct    float64
		bands  []float64
	}
	var all []obs
	regIdx := map[string]int{}
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
		var bs []float64
		if len(bandCols) > 0 {
			bs = make([]float64, len(bandCols))
			for b, c := range bandCols {
				bs[b] = math.NaN()
				if s := strings.TrimSpace(rec[c]); s != "" {
					v, err := strconv.ParseFloat(s, 64)
					if err != nil || v < 0 || v > 100 || math.IsNaN(v) {
						return nil, fmt.Errorf("history %s line %d column %d: %s %q is not a percentage", name, line, c+1, head[c], rec[c])
					}
					bs[b] = v
				}
			}
		}
		ri, ok := regIdx[reg]
		if !ok {
			ri = len(h.Regions)
			regIdx[reg] = ri
			h.Regions = append(h.Regions, reg)
		}
		all = append(all, obs{d, ri, pct, bs})
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
	if len(bandCols) > 0 {
		h.BandPct = make([][][]float64, len(h.Regions))
		for r := range h.BandPct {
			h.BandPct[r] = make([][]float64, len(h.Dates))
		}
	}
	for _, o := range all {
		h.InDroughtPct[o.region][dateIdx[o.date]] = o.pct // a repeated (date, region): the last row wins
		if h.BandPct != nil {
			h.BandPct[o.region][dateIdx[o.date]] = o.bands
		}
	}
	for r := range h.BandPct { // days without a row: every band missing
		for d, v := range h.BandPct[r] {
			if v == nil {
				v = make([]float64, len(bandCols))
				for b := range v {
					v[b] = math.NaN()
				}
				h.BandPct[r][d] = v
			}
		}
	}
	return h, nil
}
