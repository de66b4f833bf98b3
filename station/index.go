package station

import (
	"drygrid/internal/pool"
	"drygrid/spi"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
)

// Distributions of `drygrid index --distribution`.
const (
	DistGamma     = "gamma"
	DistEmpirical = "empirical"
)

// Rules for a station whose gamma fit the goodness-of-fit test rejects
// (IndexOptions.PoorFit, `drygrid index --poor-fit`).
const (
	PoorFitEmpirical = "empirical" // its SPI from the plotting position (the default)
	PoorFitKeep      = "keep"      // its gamma SPI all the same
	PoorFitDrop      = "drop"      // no SPI, with a note
)

// DefaultMinYears is the default least number of reference years.
const DefaultMinYears = 30

// IndexColumns is the header of the table WriteIndexCSV writes.
var IndexColumns = []string{"station", "latitude", "longitude", "year", "total", "years", "zeros",
	"percentile", "spi", "pct_of_median", "gamma_shape", "gamma_scale", "fit_ok", "note"}

// IndexOptions controls ComputeIndex.
type IndexOptions struct {
	Year             int    // target year; 0 = the latest year with a total
	RefStart, RefEnd int    // reference period, inclusive; 0 = open at that end
	MinYears         int    // least number of reference totals; 0 = DefaultMinYears
	Distribution     string // DistGamma (default when "") or DistEmpirical
	TotalColumn      string // exact total column name; "" = by TotalAliases
	Workers          int    // parallel workers; 0 = GOMAXPROCS (output never depends on it)
	// PoorFit is what the gamma distribution does for a station whose fit
	// Anderson-Darling rejects at 5 %: PoorFitEmpirical (default when "")
	// takes the Gringorten SPI of the empirical distribution instead,
	// PoorFitKeep the gamma SPI, PoorFitDrop no SPI. Untested fits (too
	// few non-zero totals) keep their gamma SPI.
	PoorFit string
}

// Validate checks the options on their own (before any file is read).
func (o IndexOptions) Validate() error {
	if o.Year != 0 && (o.Year < MinTotalYear || o.Year > MaxTotalYear) {
		return fmt.Errorf("year %d is not from %d to %d", o.Year, MinTotalYear, MaxTotalYear)
	}
	for _, y := range []int{o.RefStart, o.RefEnd} {
		if y != 0 && (y < MinTotalYear || y > MaxTotalYear) {
			return fmt.Errorf("reference year %d is not from %d to %d", y, MinTotalYear, MaxTotalYear)
		}
	}
	if o.RefStart != 0 && o.RefEnd != 0 && o.RefStart > o.RefEnd {
		return fmt.Errorf("reference period starts (%d) after it ends (%d)", o.RefStart, o.RefEnd)
	}
	if o.MinYears < 0 {
		return fmt.Errorf("min-years %d is negative", o.MinYears)
	}
	switch o.Distribution {
	case "", DistGamma, DistEmpirical:
	default:
		return fmt.Errorf("distribution %q is not %s or %s", o.Distribution, DistGamma, DistEmpirical)
	}
	switch o.PoorFit {
	case "", PoorFitEmpirical, PoorFitKeep, PoorFitDrop:
	default:
		return fmt.Errorf("poor-fit %q is not %s, %s or %s", o.PoorFit, PoorFitEmpirical, PoorFitKeep, PoorFitDrop)
	}
	return nil
}

func (o IndexOptions) poorFit() string {
	if o.PoorFit == "" {
		return PoorFitEmpirical
	}
	return o.PoorFit
}

func (o IndexOptions) minYears() int {
	if o.MinYears <= 0 {
		return DefaultMinYears
	}
	return o.MinYears
}

// IndexRow is one station's line of the index table. Float fields that do
// not apply are NaN (written as empty cells).
type IndexRow struct {
	Station  string
	Lat, Lon float64
	Year     int
	Total    float64 // the target-year total; NaN when missing
	HasTotal bool
	Years    int // non-missing totals in the reference period
	Zeros    int // of which zero

	Percentile  float64 // mid-rank percentile (0-100) of Total in the reference sample
	SPI         float64 // by the chosen distribution, within [-SPILimit, SPILimit]
	PctOfMedian float64 // 100 x Total / median of the reference sample
	HasIndex    bool    // Percentile and SPI are both present

	Shape, Scale float64 // gamma fitted to the non-zero reference totals
	Fitted       bool
	AD           float64 // Anderson-Darling A^2 of the fit; NaN when untested
	FitTested    bool    // enough non-zero totals to test the fit (ADMinCount)
	FitOK        bool    // fitted, and tested without rejection at 5 %
	Capped       bool    // SPI was beyond +/-SPILimit and was held there
	PoorFit      bool    // the poor-fit rule changed the SPI (empirical instead, or dropped)

	Note string // why values are missing, and fit problems; "; "-separated
}

// IndexResult is the index table of a run.
type IndexResult struct {
	Year             int
	RefStart, RefEnd int // as given (0 = open)
	MinYears         int
	Distribution     string
	PoorFit          string     // the poor-fit rule applied (IndexOptions.PoorFit)
	Rows             []IndexRow // in station-table order
	TotalsRows       int        // data rows read from the totals table
	SkippedUnknown   int        // totals rows of stations missing from the station table
	Warnings         []string
}

// ComputeIndex reads the station table and the window-totals table and
// computes each station's percentile and SPI for the target year (the
// index step of the package doc).
func ComputeIndex(stationsPath, totalsPath string, opt IndexOptions) (*IndexResult, error) {
	st, err := OpenTable(stationsPath)
	if err != nil {
		return nil, err
	}
	defer st.Close()
	tt, err := OpenTable(totalsPath)
	if err != nil {
		return nil, err
	}
	defer tt.Close()
	return idxCompute(st, tt, opt)
}

// ComputeIndexReaders is ComputeIndex on readers (tests, the demo); the
// names are used in error messages.
func ComputeIndexReaders(stationsName string, stations io.Reader, totalsName string, totals io.Reader, opt IndexOptions) (*IndexResult, error) {
	st, err := NewTable(stationsName, stations)
	if err != nil {
		return nil, err
	}
	defer st.Close()
	tt, err := NewTable(totalsName, totals)
	if err != nil {
		return nil, err
	}
	defer tt.Close()
	return idxCompute(st, tt, opt)
}

func idxCompute(st, tt *Table, opt IndexOptions) (*IndexResult, error) {
	if err := opt.Validate(); err != nil {
		return nil, err
	}
	sites, byID, err := idxReadSites(st)
	if err != nil {
		return nil, err
	}
	ids := make([]string, len(sites))
	for i, s := range sites {
		ids[i] = s.ID
	}
	spec := idxStartSpec(sites, opt)
	tot, err := idxReadTotalsRuns(tt, byID, ids, opt.TotalColumn, spec.run)
	spec.stop(err != nil)
	if err != nil {
		return nil, err
	}
	year := opt.Year
	if tot.latest == 0 {
		return nil, fmt.Errorf("%s: no total for any station of %s", tt.Path, st.Path)
	}
	if year == 0 {
		year = tot.latest
	} else if !idxHasYear(tot.series, year) {
		// A table of empty rows would be no answer at all.
		return nil, fmt.Errorf("%s: no station of %s has a total for %d; the latest year with a total is %d", tt.Path, st.Path, year, tot.latest)
	}
	res := &IndexResult{
		Year: year, RefStart: opt.RefStart, RefEnd: opt.RefEnd, MinYears: opt.minYears(),
		Distribution: opt.Distribution, TotalsRows: tot.rows, SkippedUnknown: tot.skippedUnknown,
	}
	if res.Distribution == "" {
		res.Distribution = DistGamma
	}
	res.PoorFit = opt.poorFit()
	if tot.skippedUnknown > 0 {
		plural := "s"
		if tot.unknownIDs == 1 {
			plural = ""
		}
		res.Warnings = append(res.Warnings, fmt.Sprintf("%s: skipped %d rows of %d station%s missing from %s (first: %s)",
			tt.Path, tot.skippedUnknown, tot.unknownIDs, plural, st.Path, tot.firstUnknown))
	}
	res.Rows = spec.finish(sites, tot.series, year, opt)
	return res, nil
}

// idxHasYear reports whether any series has a total for year.
func idxHasYear(series [][]idxEntry, year int) bool {
	for _, s := range series {
		for _, e := range s {
			if int(e.year) == year && !math.IsNaN(e.total) {
				return true
			}
		}
	}
	return false
}

// idxSpec computes station rows while the totals are still being read: a
// station's row is computed as soon as its first run of rows ends, for the
// target year (or, by default, the latest year seen so far). At the end a
// row is kept only if the station's series did not grow afterwards and the
// year was the right one; every other row is computed then. A row depends
// only on its station's totals and the year, so the result is the same as
// computing every row at the end, for any number of workers. Reading stays
// on its own goroutine with GOMAXPROCS-1 workers beside it; with one core,
// or once a station comes back in a later run (a file not grouped by
// station), nothing more is handed over.
type idxSpec struct {
	rows    []IndexRow
	year    []int32 // year a row was computed for; 0 = not computed
	n       []int32 // series length it was computed on
	fixed   int     // the target year when given
	work    chan int
	series  [][]idxEntry // series handed over, by station
	wg      sync.WaitGroup
	abort   atomic.Bool
	stopped bool
}

// idxSpecQueue is the hand-over queue length; when it is full the station
// is left for the end rather than holding up reading.
const idxSpecQueue = 4096

func idxStartSpec(sites []idxSite, opt IndexOptions) *idxSpec {
	sp := &idxSpec{rows: make([]IndexRow, len(sites)), fixed: opt.Year}
	workers := pool.Workers(opt.Workers)
	if workers < 2 {
		sp.stopped = true
		return sp
	}
	sp.year = make([]int32, len(sites))
	sp.n = make([]int32, len(sites))
	sp.series = make([][]idxEntry, len(sites))
	sp.work = make(chan int, idxSpecQueue)
	for w := 0; w < workers-1; w++ {
		sp.wg.Add(1)
		go func() {
			defer sp.wg.Done()
			var scratch []float64
			for si := range sp.work {
				if sp.abort.Load() {
					continue
				}
				sp.rows[si], scratch = idxStationRow(sites[si], sp.series[si], int(sp.year[si]), opt, scratch)
			}
		}()
	}
	return sp
}

// run is the onRun hook of idxReadTotalsRuns.
func (sp *idxSpec) run(si int, s []idxEntry, latest int, again bool) {
	if sp.stopped {
		return
	}
	if again {
		sp.stopped = true // not grouped by station: stop handing over
		return
	}
	year := sp.fixed
	if year == 0 {
		year = latest
	}
	if year == 0 {
		return
	}
	sp.year[si], sp.n[si], sp.series[si] = int32(year), int32(len(s)), s
	select {
	case sp.work <- si:
	default:
		sp.year[si] = 0 // queue full: left for the end
	}
}

// stop ends the hand-over and waits for the workers (abandoning the queue
// when abort is set).
func (sp *idxSpec) stop(abort bool) {
	sp.stopped = true
	if sp.work == nil {
		return
	}
	sp.abort.Store(abort)
	close(sp.work)
	sp.wg.Wait()
	sp.work = nil
}

// finish computes every row not computed ahead for the right year and
// series, and returns the rows.
func (sp *idxSpec) finish(sites []idxSite, series [][]idxEntry, year int, opt IndexOptions) []IndexRow {
	keep := func(i int) bool {
		return sp.year != nil && int(sp.year[i]) == year && int(sp.n[i]) == len(series[i])
	}
	idxComputeRows(sp.rows, sites, series, year, opt, keep)
	return sp.rows
}

// idxComputeAll computes every station's row with a pool of workers; each
// row depends only on its own station, so the result is the same for any
// number of workers.
func idxComputeAll(sites []idxSite, series [][]idxEntry, year int, opt IndexOptions) []IndexRow {
	rows := make([]IndexRow, len(sites))
	idxComputeRows(rows, sites, series, year, opt, nil)
	return rows
}

// idxComputeRows fills rows[i] for every station i for which keep (when not
// nil) is false.
func idxComputeRows(rows []IndexRow, sites []idxSite, series [][]idxEntry, year int, opt IndexOptions, keep func(i int) bool) {
	const chunk = 256
	scratch := make([][]float64, pool.Count(len(sites), opt.Workers, chunk))
	pool.Run(len(sites), opt.Workers, chunk, func(w, lo, hi int) {
		for i := lo; i < hi; i++ {
			if keep == nil || !keep(i) {
				rows[i], scratch[w] = idxStationRow(sites[i], series[i], year, opt, scratch[w])
			}
		}
	})
}

// idxStationRow computes one station's row; scratch is reused between calls.
func idxStationRow(site idxSite, s []idxEntry, year int, opt IndexOptions, scratch []float64) (IndexRow, []float64) {
	nan := math.NaN()
	r := IndexRow{Station: site.ID, Lat: site.Lat, Lon: site.Lon, Year: year, Total: nan,
		Percentile: nan, SPI: nan, PctOfMedian: nan, Shape: nan, Scale: nan, AD: nan}
	ref := scratch[:0]
	targetInRef := (opt.RefStart == 0 || year >= opt.RefStart) && (opt.RefEnd == 0 || year <= opt.RefEnd)
	for _, e := range s {
		y := int(e.year)
		if y == year && !math.IsNaN(e.total) {
			r.Total, r.HasTotal = e.total, true
		}
		if math.IsNaN(e.total) || (opt.RefStart != 0 && y < opt.RefStart) || (opt.RefEnd != 0 && y > opt.RefEnd) {
			continue
		}
		ref = append(ref, e.total)
	}
	sort.Float64s(ref)
	r.Years = len(ref)
	for r.Zeros < len(ref) && ref[r.Zeros] == 0 {
		r.Zeros++
	}
	var notes []string
	minYears := opt.minYears()
	if !r.HasTotal {
		notes = append(notes, fmt.Sprintf("no total for %d", year))
	}
	if r.Years < minYears {
		notes = append(notes, fmt.Sprintf("only %d reference years (needs %d)", r.Years, minYears))
	}
	if len(notes) > 0 {
		r.Note = strings.Join(notes, "; ")
		return r, ref
	}
	x := r.Total
	below, equal := spi.SortedCount(ref, x)
	n := float64(len(ref))
	r.Percentile = 100 * (float64(below) + float64(equal)/2) / n
	if med := spi.SortedMedian(ref); med > 0 {
		r.PctOfMedian = 100 * x / med
	} else {
		notes = append(notes, "reference median is 0")
	}

	shape, scale, err := spi.GammaFit(ref[r.Zeros:])
	if err != nil {
		notes = append(notes, "gamma not fitted: "+err.Error())
	} else {
		r.Shape, r.Scale, r.Fitted = shape, scale, true
		a2, ok, tested := spi.GammaFitOKSorted(ref[r.Zeros:], shape, scale)
		r.AD, r.FitTested, r.FitOK = a2, tested, ok && tested
		switch {
		case !tested:
			notes = append(notes, fmt.Sprintf("%d non-zero totals are too few to test the gamma fit", len(ref)-r.Zeros))
		case !ok:
			notes = append(notes, fmt.Sprintf("gamma rejected by Anderson-Darling at 5 %% (A2 %.3f > %.3f)", a2, spi.ADCritical5(shape)))
		}
	}
	// Gringorten position of x among the reference totals, x counted once
	// more when its year lies outside the reference period.
	empirical := func() float64 {
		if targetInRef {
			return spi.GringortenCounts(below, equal, len(ref))
		}
		return spi.GringortenCounts(below, equal+1, len(ref)+1)
	}
	switch {
	case opt.Distribution == DistEmpirical:
		r.SPI = empirical()
	case r.Fitted && r.FitTested && !r.FitOK && opt.poorFit() == PoorFitEmpirical:
		r.SPI, r.PoorFit = empirical(), true
		notes = append(notes, "spi from the empirical plotting position instead (poor fit: empirical)")
	case r.Fitted && r.FitTested && !r.FitOK && opt.poorFit() == PoorFitDrop:
		r.PoorFit = true
		notes = append(notes, "no spi (poor fit: drop)")
	case r.Fitted:
		r.SPI = spi.SPI(x, shape, scale, float64(r.Zeros)/n)
	}
	if !math.IsNaN(r.SPI) {
		if math.Abs(r.SPI) > SPILimit {
			notes = append(notes, fmt.Sprintf("spi %.3f held at %+d", r.SPI, int(math.Copysign(SPILimit, r.SPI))))
			r.SPI = math.Copysign(SPILimit, r.SPI)
			r.Capped = true
		}
		r.HasIndex = true
	}
	r.Note = strings.Join(notes, "; ")
	return r, ref
}

// IndexSummary counts the stations of an index table by outcome.
type IndexSummary struct {
	Stations, WithIndex        int
	NoTotal, TooFewYears       int // without index, by reason (a station may have both)
	FitFailed, FitRejected     int // gamma not fitted; rejected by Anderson-Darling
	FitUntested, Capped        int
	NoIndexOther               int // without index for another reason (gamma not fitted)
	PoorFit                    int // stations whose SPI the poor-fit rule changed (PoorFitRule)
	SkippedUnknown             int
	Year                       int
	Distribution, PoorFitRule  string
	RefStart, RefEnd, MinYears int
}

// Summary counts the rows by outcome for a closing report.
func (r *IndexResult) Summary() IndexSummary {
	s := IndexSummary{Stations: len(r.Rows), SkippedUnknown: r.SkippedUnknown, Year: r.Year,
		Distribution: r.Distribution, PoorFitRule: r.PoorFit, RefStart: r.RefStart, RefEnd: r.RefEnd, MinYears: r.MinYears}
	for _, row := range r.Rows {
		tooFew := row.Years < r.MinYears
		switch {
		case row.HasIndex:
			s.WithIndex++
		case !row.HasTotal || tooFew || row.PoorFit:
		default:
			s.NoIndexOther++
		}
		if row.PoorFit {
			s.PoorFit++
		}
		if !row.HasTotal {
			s.NoTotal++
		}
		if tooFew {
			s.TooFewYears++
		}
		if row.HasTotal && !tooFew {
			switch {
			case !row.Fitted:
				s.FitFailed++
			case !row.FitTested:
				s.FitUntested++
			case !row.FitOK:
				s.FitRejected++
			}
		}
		if row.Capped {
			s.Capped++
		}
	}
	return s
}

// WriteIndexCSV writes the index table (IndexColumns) with fixed decimals:
// coordinates 6, total 2, percentile 2, spi 3, pct_of_median 1, gamma shape
// and scale 4. Missing values are empty cells; fit_ok is true, false, or
// empty when the gamma was not fitted or could not be tested.
func WriteIndexCSV(w io.Writer, res *IndexResult) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(IndexColumns); err != nil {
		return err
	}
	f := func(v float64, dec int) string {
		if math.IsNaN(v) {
			return ""
		}
		s := strconv.FormatFloat(v, 'f', dec, 64)
		if strings.TrimLeft(s, "-0.") == "" {
			s = strings.TrimPrefix(s, "-") // no "-0.000"
		}
		return s
	}
	rec := make([]string, len(IndexColumns))
	for _, r := range res.Rows {
		fit := ""
		if r.Fitted && r.FitTested {
			fit = strconv.FormatBool(r.FitOK)
		}
		rec[0] = r.Station
		rec[1] = f(r.Lat, 6)
		rec[2] = f(r.Lon, 6)
		rec[3] = strconv.Itoa(r.Year)
		rec[4] = f(r.Total, 2)
		rec[5] = strconv.Itoa(r.Years)
		rec[6] = strconv.Itoa(r.Zeros)
		rec[7] = f(r.Percentile, 2)
		rec[8] = f(r.SPI, 3)
		rec[9] = f(r.PctOfMedian, 1)
		rec[10] = f(r.Shape, 4)
		rec[11] = f(r.Scale, 4)
		rec[12] = fit
		rec[13] = r.Note
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
