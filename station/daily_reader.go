package station

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"math/bits"
	"os"
	"sort"
	"strings"
	"unicode/utf8"

	kgzip "github.com/klauspost/compress/gzip"
)

// DailyLineLimit is the longest line of a daily table, in bytes (without
// its newline); a longer line is an error, so that a file of junk without
// newlines never has to be held in memory.
const DailyLineLimit = 64 << 10

// The input is read in dailyChunks rotating buffers of dailyChunk bytes by
// a goroutine of its own (which also decompresses), while the rows are
// parsed on the caller's.
const dailyChunks = 4

// dailyChunk is the size of a read buffer (a variable so that tests can
// cut the input at every byte).
var dailyChunk = 1 << 20

// ReadDaily reads a long table of daily precipitation (station id, date,
// precipitation, optional quality flag; CSV or TSV, delimiter sniffed,
// optionally gzip-compressed; or a Parquet file, see readDailyParquet) and computes the trailing-window totals of
// every station for every year from its first record year to the target's.
//
// Missing is not zero: a day without a row, with an empty or NA value, or
// with an excluded flag is missing, and a total exists only when at least
// opt.MinShare of its window's days were reported. Rows may come in any
// order; rows of one station together are the fast case. Rows dated after
// the target are counted and ignored (one warning). Memory grows with
// stations x years x windows, not with rows.
//
// Errors name the file, line and column: a date that is not YYYY-MM-DD or
// does not exist, a year before MinTotalYear, a negative, non-finite or
// non-numeric value, more than MaxDailyMM in a day, a station-day given
// twice (even with the same value), a wrong number of fields, a line longer
// than DailyLineLimit.
func ReadDaily(path string, opt DailyOptions) (*WindowTotals, error) {
	p, err := opt.plan()
	if err != nil {
		return nil, err
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("daily %s: %w", path, err)
	}
	defer f.Close()
	size := int64(-1)
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
		size = st.Size()
		if isParquet(f) {
			return readDailyParquet(path, f, size, p, opt)
		}
	}
	return readDaily(path, f, size, p, opt)
}

// ReadDailyReader is ReadDaily on a reader (standard input, tests); name
// is used in messages. A reader that is also an io.ReaderAt with a Size
// (bytes.Reader) may hold a Parquet file; a stream may not. The reader is
// read on a goroutine of its own, which ends before ReadDailyReader
// returns (after an error, once its pending Read returns).
func ReadDailyReader(name string, r io.Reader, opt DailyOptions) (*WindowTotals, error) {
	p, err := opt.plan()
	if err != nil {
		return nil, err
	}
	if ra, ok := r.(interface {
		io.ReaderAt
		Size() int64
	}); ok && isParquet(ra) {
		return readDailyParquet(name, ra, ra.Size(), p, opt)
	}
	size := int64(-1)
	if l, ok := r.(interface{ Len() int }); ok {
		size = int64(l.Len()) // a bytes or strings reader
	}
	return readDaily(name, r, size, p, opt)
}

// readDaily reads the table; size is the input's size in bytes when known
// (-1 otherwise), to size the read buffers of a small uncompressed input.
func readDaily(name string, r io.Reader, size int64, p *dailyPlan, opt DailyOptions) (*WindowTotals, error) {
	br := bufio.NewReaderSize(r, 64<<10)
	var src io.Reader = br
	chunk := dailyChunk
	if size >= 0 && size < int64(chunk) {
		chunk = max(int(size)+1, 16)
	}
	if magic, _ := br.Peek(4); bytes.Equal(magic, parquetMagic) {
		return nil, fmt.Errorf("daily %s: %w", name, errParquetStream)
	}
	if magic, _ := br.Peek(2); len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		chunk = dailyChunk
		zr, err := kgzip.NewReader(br)
		if err != nil {
			return nil, fmt.Errorf("daily %s: reading gzip header: %w", name, err)
		}
		defer zr.Close()
		src = zr
	}
	d := &dailyReader{name: name, p: p, opt: opt, accs: make(map[string]*dailyAcc)}
	cs := startChunks(src, chunk)
	err := d.run(cs)
	cs.stop()
	if err != nil {
		return nil, err
	}
	return d.result()
}

// chunkSource reads its input into rotating buffers on its own goroutine.
type chunkSource struct {
	ch     chan []byte // filled buffers, closed at the end
	free   chan []byte // buffers handed back
	done   chan struct{}
	exited chan struct{}
	err    error // the read error that ended the input (not io.EOF); set before ch is closed
}

func startChunks(r io.Reader, chunk int) *chunkSource {
	cs := &chunkSource{ch: make(chan []byte, dailyChunks), free: make(chan []byte, dailyChunks),
		done: make(chan struct{}), exited: make(chan struct{})}
	for range dailyChunks {
		cs.free <- make([]byte, chunk)
	}
	go func() {
		defer close(cs.exited)
		defer close(cs.ch)
		for {
			var buf []byte
			select {
			case buf = <-cs.free:
			case <-cs.done:
				return
			}
			n, err := readFull(r, buf)
			if n > 0 {
				select {
				case cs.ch <- buf[:n]:
				case <-cs.done:
					return
				}
			}
			if err != nil {
				if err != io.EOF {
					cs.err = err
				}
				return
			}
		}
	}()
	return cs
}

// readFull is io.ReadFull except that the reader's own errors come back
// unchanged (io.ErrUnexpectedEOF from a truncated gzip stream is an error
// here, while the end of the input is io.EOF).
func readFull(r io.Reader, buf []byte) (int, error) {
	n := 0
	for n < len(buf) {
		k, err := r.Read(buf[n:])
		n += k
		if err != nil {
			return n, err
		}
	}
	return n, nil
}

// stop ends the reading goroutine and waits for it.
func (cs *chunkSource) stop() {
	close(cs.done)
	<-cs.exited
}

// dailyReader parses the rows and accumulates the totals.
type dailyReader struct {
	name string
	p    *dailyPlan
	opt  DailyOptions

	t                       *Table // the header (nil until read), for columns and number parsing
	prefix                  []byte // lines up to the header
	delim                   byte
	nf                      int
	idC, dateC, valC, flagC int
	fields                  [][]byte

	lineNo  int  // physical line last read (1-based); the row of a Parquet file
	parquet bool // reading a Parquet file
	rows    int

	accs     map[string]*dailyAcc
	cur      *dailyAcc
	curID    []byte
	lastDate []byte
	lastDay  Day
	lastYear int
	// Day of month of lastDate, and the number of days of its month.
	lastDD, lastMonthDays int

	after, afterLine int
}

// dailyAcc is one station's accumulator: per year from base (its first
// record year) to the target's and per window, the exact sum and the count
// of reported days, and one bit per day seen since 1 January of base.
type dailyAcc struct {
	id       string
	base     int
	sum      []int64
	days     []uint16
	seen     []uint64
	seenBase Day
}

func (d *dailyReader) run(cs *chunkSource) error {
	var carry []byte
	for chunk := range cs.ch {
		buf := chunk
		if len(carry) > 0 {
			i := bytes.IndexByte(buf, '\n')
			if i < 0 {
				if len(carry)+len(buf) > DailyLineLimit {
					return d.tooLong()
				}
				carry = append(carry, buf...)
				cs.free <- chunk[:cap(chunk)]
				continue
			}
			if len(carry)+i > DailyLineLimit {
				return d.tooLong()
			}
			carry = append(carry, buf[:i]...)
			if err := d.line(carry); err != nil {
				return err
			}
			carry = carry[:0]
			buf = buf[i+1:]
		}
		for {
			i := bytes.IndexByte(buf, '\n')
			if i < 0 {
				break
			}
			if i > DailyLineLimit {
				return d.tooLong()
			}
			if err := d.line(buf[:i]); err != nil {
				return err
			}
			buf = buf[i+1:]
		}
		if len(buf) > DailyLineLimit {
			return d.tooLong()
		}
		carry = append(carry, buf...)
		cs.free <- chunk[:cap(chunk)]
	}
	if cs.err != nil {
		line := d.lineNo + 1
		if errors.Is(cs.err, io.ErrUnexpectedEOF) || errors.Is(cs.err, kgzip.ErrChecksum) || errors.Is(cs.err, kgzip.ErrHeader) {
			return fmt.Errorf("daily %s line %d: truncated or corrupt compressed data: %w", d.name, line, cs.err)
		}
		return fmt.Errorf("daily %s line %d: %w", d.name, line, cs.err)
	}
	if len(carry) > 0 {
		if err := d.line(carry); err != nil {
			return err
		}
	}
	if d.t == nil {
		return fmt.Errorf("daily %s: empty table, no header row", d.name)
	}
	return nil
}

func (d *dailyReader) tooLong() error {
	return fmt.Errorf("daily %s line %d: the line is longer than %d bytes, the limit (is this a daily table?)", d.name, d.lineNo+1, DailyLineLimit)
}

// line handles one physical line (without its LF).
func (d *dailyReader) line(raw []byte) error {
	d.lineNo++
	if d.t == nil {
		return d.header(raw)
	}
	if n := len(raw); n > 0 && raw[n-1] == '\r' {
		raw = raw[:n-1]
	}
	if len(raw) == 0 {
		return nil
	}
	// Split at the delimiter by hand (fields are short); a line with a
	// double quote goes to encoding/csv instead. After nf fields the rest
	// is one more field (a wrong count, counted again for the message).
	f := d.fields[:0]
	quote := false
	start := 0
	for i, c := range raw {
		if c == d.delim {
			f = append(f, raw[start:i])
			start = i + 1
			if len(f) == d.nf {
				break
			}
		} else if c == '"' {
			quote = true
			break
		}
	}
	if quote {
		var err error
		if f, err = d.quoted(raw, f[:0]); err != nil {
			return err
		}
	} else {
		f = append(f, raw[start:])
	}
	d.fields = f
	if len(f) != d.nf {
		if dailyBlank(f) {
			return nil
		}
		n := len(f)
		if n > d.nf && bytes.IndexByte(raw, '"') < 0 {
			n = bytes.Count(raw, []byte{d.delim}) + 1
		}
		return fmt.Errorf("daily %s line %d: %d fields, but the header (line %d) has %d", d.name, d.lineNo, n, d.t.HeaderLine, d.nf)
	}
	id := dailyTrim(f[d.idC])
	if len(id) == 0 {
		if dailyBlank(f) {
			return nil
		}
		return d.fieldErr(d.idC, "missing station id")
	}
	d.rows++

	ds := dailyTrim(f[d.dateC])
	day, year := d.lastDay, d.lastYear
	if len(ds) == 10 && len(d.lastDate) == 10 && string(ds[:8]) == string(d.lastDate[:8]) {
		// The month of the row before (the common case): only the day
		// changes, if at all.
		if ds[8] != d.lastDate[8] || ds[9] != d.lastDate[9] {
			dd := int(ds[8]-'0')*10 + int(ds[9]-'0')
			if ds[8] < '0' || ds[8] > '9' || ds[9] < '0' || ds[9] > '9' || dd < 1 || dd > d.lastMonthDays {
				_, _, err := parseDateBytes(ds)
				return d.fieldErr(d.dateC, "date %v", err)
			}
			day += Day(dd - d.lastDD)
			d.lastDate[8], d.lastDate[9] = ds[8], ds[9]
			d.lastDay, d.lastDD = day, dd
		}
	} else {
		if len(ds) == 0 {
			return d.fieldErr(d.dateC, "missing date")
		}
		var err error
		day, year, err = parseDateBytes(ds)
		if err != nil {
			return d.fieldErr(d.dateC, "date %v", err)
		}
		if day <= d.p.target && year < MinTotalYear {
			return d.fieldErr(d.dateC, "date %s is before the year %d", ds, MinTotalYear)
		}
		d.lastDate = append(d.lastDate[:0], ds...)
		d.lastDay, d.lastYear = day, year
		if len(ds) == 10 {
			m := int(ds[5]-'0')*10 + int(ds[6]-'0')
			d.lastDD = int(ds[8]-'0')*10 + int(ds[9]-'0')
			d.lastMonthDays = DaysInMonth(year, m)
		}
	}
	if d.afterTarget(day) {
		return nil
	}

	a, err := d.station(id, year)
	if err != nil {
		return err
	}

	var q int64
	reported := false
	if !d.flagged(f) {
		if v := dailyTrim(f[d.valC]); len(v) == 1 && v[0] == '0' {
			reported = true // the common dry day
		} else if len(v) != 0 {
			mm, ok, err := d.value(v)
			if err != nil {
				return err
			}
			if ok {
				q = int64(math.Floor(mm*dailyQuantum + 0.5))
				reported = true
			}
		}
	}
	if !d.add(a, day, year, q, reported) {
		return d.fieldErr(d.dateC, "station %s has a second row for %s (a station-day may be given once)", a.id, day)
	}
	return nil
}

// station returns the accumulator of the station id (not empty), made
// when the station is new; year is the row's.
func (d *dailyReader) station(id []byte, year int) (*dailyAcc, error) {
	a := d.cur
	if a != nil && bytes.Equal(id, d.curID) {
		return a, nil
	}
	a = d.accs[string(id)]
	if a == nil {
		if !utf8.Valid(id) {
			return nil, d.fieldErr(d.idC, "station id is not valid UTF-8 text")
		}
		a = d.newAcc(string(id), year)
		d.accs[a.id] = a
	}
	d.cur = a
	d.curID = append(d.curID[:0], id...)
	return a, nil
}

// afterTarget counts a row dated after the target and reports true for it.
func (d *dailyReader) afterTarget(day Day) bool {
	if day <= d.p.target {
		return false
	}
	if d.after == 0 {
		d.afterLine = d.lineNo
	}
	d.after++
	return true
}

// header gathers the lines up to the first non-blank one and reads the
// header from them with the station table reader (BOM, UTF-16, delimiter
// sniffing, quoted names).
func (d *dailyReader) header(raw []byte) error {
	d.prefix = append(d.prefix, raw...)
	d.prefix = append(d.prefix, '\n')
	if len(bytes.TrimSpace(raw)) == 0 {
		if len(d.prefix) > tableSniffLimit {
			return fmt.Errorf("daily %s: no header line within the first %d bytes", d.name, tableSniffLimit)
		}
		return nil
	}
	t, err := NewTable(d.name, bytes.NewReader(d.prefix))
	if err != nil {
		return fmt.Errorf("daily %w", err)
	}
	d.prefix = nil
	d.t = t
	d.delim = byte(t.Delim)
	d.nf = len(t.Header)
	d.fields = make([][]byte, 0, d.nf+1)
	// The header is listed in messages up to 200 bytes (it may be junk).
	header := strings.Join(t.Header, ", ")
	if len(header) > 200 {
		header = header[:200] + "..."
	}
	find := func(what, exact string, aliases []string) (int, error) {
		i := -1
		if exact != "" {
			if i = t.Column(exact); i < 0 {
				return -1, fmt.Errorf("daily %s line %d: no %s column named %q; the header has: %s", d.name, t.HeaderLine, what, exact, header)
			}
		} else if i = t.Column(aliases...); i < 0 {
			return -1, fmt.Errorf("daily %s line %d: no %s column (looked for %s); the header has: %s", d.name, t.HeaderLine, what, strings.Join(aliases, "|"), header)
		}
		return i, nil
	}
	if d.idC, err = find("station id", d.opt.IDColumn, IDAliases); err != nil {
		return err
	}
	if d.dateC, err = find("date", d.opt.DateColumn, DateAliases); err != nil {
		return err
	}
	if d.valC, err = find("precipitation", d.opt.ValueColumn, PrecipAliases); err != nil {
		return err
	}
	d.flagC = -1
	if d.opt.FlagColumn != "" {
		if d.flagC, err = find("flag", d.opt.FlagColumn, FlagAliases); err != nil {
			return err
		}
	} else {
		d.flagC = t.Column(FlagAliases...)
	}
	if d.flagC < 0 && len(d.p.flags) > 0 {
		return fmt.Errorf("daily %s line %d: flags to exclude are given, but there is no flag column (looked for %s); the header has: %s",
			d.name, t.HeaderLine, strings.Join(FlagAliases, "|"), header)
	}
	cols := []int{d.idC, d.dateC, d.valC, d.flagC}
	names := []string{"station id", "date", "precipitation", "flag"}
	for i := range cols {
		for j := range i {
			if cols[i] >= 0 && cols[i] == cols[j] {
				return fmt.Errorf("daily %s line %d: column %d (%s) is taken both for the %s and the %s", d.name, t.HeaderLine, cols[i]+1, t.Header[cols[i]], names[j], names[i])
			}
		}
	}
	return nil
}

// quoted splits a line holding a double quote with encoding/csv (one
// physical line: a quoted field cannot hold a newline here).
func (d *dailyReader) quoted(raw []byte, f [][]byte) ([][]byte, error) {
	cr := csv.NewReader(bytes.NewReader(raw))
	cr.Comma = rune(d.delim)
	cr.FieldsPerRecord = -1
	rec, err := cr.Read()
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return nil, fmt.Errorf("daily %s line %d (byte %d of the line): %w", d.name, d.lineNo, pe.Column, pe.Err)
		}
		return nil, fmt.Errorf("daily %s line %d: %w", d.name, d.lineNo, err)
	}
	for _, s := range rec {
		f = append(f, []byte(s))
	}
	return f, nil
}

// fieldErr formats an error at column col of the current line.
func (d *dailyReader) fieldErr(col int, format string, args ...any) error {
	return fmt.Errorf("daily %s %s %d column %d (%s): %s", d.name, d.where(), d.lineNo, col+1, d.t.Header[col], fmt.Sprintf(format, args...))
}

// where names what lineNo counts: lines of a table, rows of a Parquet file.
func (d *dailyReader) where() string {
	if d.parquet {
		return "row"
	}
	return "line"
}

// flagged reports whether the row's flag is one of the excluded ones.
func (d *dailyReader) flagged(f [][]byte) bool {
	if d.flagC < 0 || len(d.p.flags) == 0 {
		return false
	}
	fl := dailyTrim(f[d.flagC])
	for _, x := range d.p.flags {
		if bytes.Equal(fl, x) {
			return true
		}
	}
	return false
}

// value parses a non-empty precipitation cell into mm; ok is false for NA,
// N/A or null (missing).
func (d *dailyReader) value(v []byte) (mm float64, ok bool, err error) {
	x, ok := idxDecimal(v)
	if !ok {
		if dailyNA(v) {
			return 0, false, nil
		}
		if len(v) > 64 {
			return 0, false, d.fieldErr(d.valC, "precipitation %q is not a number", clip(v))
		}
		s := string(v)
		if x, err = d.t.ParseFloat(s); err != nil {
			return 0, false, d.fieldErr(d.valC, "precipitation %v", err)
		}
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, false, d.fieldErr(d.valC, "precipitation %s is not a finite number", s)
		}
		if x < 0 {
			return 0, false, d.fieldErr(d.valC, "precipitation %s is negative", s)
		}
		x += 0 // -0 becomes 0
	}
	mm, err = d.toMM(x, v)
	return mm, err == nil, err
}

// toMM converts a value (finite, not negative) to mm and checks it against
// MaxDailyMM; cell is the value as given, for the message.
func (d *dailyReader) toMM(x float64, cell []byte) (float64, error) {
	mm := x
	switch d.p.units {
	case UnitTenthMM:
		mm = x / 10
	case UnitInch:
		mm = x * 25.4
	}
	if mm > MaxDailyMM {
		return 0, d.fieldErr(d.valC, "precipitation %s (%g mm) is more than %d mm in a day; check the units", cell, mm, MaxDailyMM)
	}
	return mm, nil
}

// newAcc makes the accumulator of a station first seen in year.
func (d *dailyReader) newAcc(id string, year int) *dailyAcc {
	a := &dailyAcc{id: id, base: year}
	n := (d.p.tYear - year + 1) * len(d.p.windows)
	a.sum = make([]int64, n)
	a.days = make([]uint16, n)
	a.seenBase = civilDay(year, 1, 1)
	a.seen = make([]uint64, (int(d.p.target-a.seenBase)+1+63)/64)
	return a
}

// grow extends a to begin in year (before its base).
func (d *dailyReader) grow(a *dailyAcc, year int) {
	b := d.newAcc(a.id, year)
	off := (a.base - year) * len(d.p.windows)
	copy(b.sum[off:], a.sum)
	copy(b.days[off:], a.days)
	shift := int(a.seenBase - b.seenBase)
	for i, w := range a.seen {
		for w != 0 {
			k := i*64 + bits.TrailingZeros64(w) + shift
			b.seen[k>>6] |= 1 << (k & 63)
			w &= w - 1
		}
	}
	*a = *b
}

// add records day t (in year) for station a, with its value q (in 1e-6 mm)
// when reported; it reports false when the day was seen before.
func (d *dailyReader) add(a *dailyAcc, t Day, year int, q int64, reported bool) bool {
	if year < a.base {
		d.grow(a, year)
	}
	b := uint(t - a.seenBase)
	m := uint64(1) << (b & 63)
	if a.seen[b>>6]&m != 0 {
		return false
	}
	a.seen[b>>6] |= m
	if !reported {
		return true
	}
	nw := len(d.p.windows)
	ey := year - MinTotalYear
	yi := (year - a.base) * nw
	if t <= d.p.ends[ey] {
		// Windows of year: from their start to the end (t lies in year).
		for w, s := range d.p.starts[ey*nw : ey*nw+nw] {
			if t >= s {
				a.sum[yi+w] += q
				a.days[yi+w]++
			}
		}
	}
	if year < d.p.tYear {
		// Windows of the next year that reach back into this one.
		yi += nw
		for w, s := range d.p.starts[(ey+1)*nw : (ey+2)*nw] {
			if t >= s {
				a.sum[yi+w] += q
				a.days[yi+w]++
			}
		}
	}
	return true
}

// result gathers the accumulators, sorted by station id.
func (d *dailyReader) result() (*WindowTotals, error) {
	if len(d.accs) == 0 {
		if d.rows == 0 {
			return nil, fmt.Errorf("daily %s: no data rows", d.name)
		}
		return nil, fmt.Errorf("daily %s: no rows dated on or before the target date %s", d.name, d.p.target)
	}
	r := &WindowTotals{Target: d.p.target, Windows: d.p.windows, Need: d.p.need, MinShare: d.p.share,
		Units: d.p.units, Rows: d.rows, AfterTarget: d.after}
	r.Stations = make([]StationTotals, 0, len(d.accs))
	for _, a := range d.accs {
		r.Stations = append(r.Stations, StationTotals{ID: a.id, FirstYear: a.base, LastYear: d.p.tYear, Sum: a.sum, Days: a.days})
	}
	sort.Slice(r.Stations, func(i, j int) bool { return r.Stations[i].ID < r.Stations[j].ID })
	if d.after > 0 {
		plural := "s"
		if d.after == 1 {
			plural = ""
		}
		r.Warnings = append(r.Warnings, fmt.Sprintf("daily %s: ignored %d row%s dated after the target date %s (the first on %s %d)",
			d.name, d.after, plural, d.p.target, d.where(), d.afterLine))
	}
	return r, nil
}

// dailyTrim trims white space from a cell (ASCII fast path).
func dailyTrim(b []byte) []byte {
	if n := len(b); n > 0 && (b[0] <= ' ' || b[n-1] <= ' ' || b[0] >= utf8.RuneSelf || b[n-1] >= utf8.RuneSelf) {
		return bytes.TrimSpace(b)
	}
	return b
}

// dailyBlank reports whether every field is empty or white space.
func dailyBlank(f [][]byte) bool {
	for _, x := range f {
		if len(bytes.TrimSpace(x)) != 0 {
			return false
		}
	}
	return true
}

// dailyNA reports whether a cell is NA, N/A or null (IsMissing's words).
func dailyNA(b []byte) bool {
	return len(b) <= 4 && IsMissing(string(b))
}
