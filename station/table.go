package station

import (
	"bufio"
	"bytes"
	"compress/flate"
	"compress/gzip"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"unicode/utf8"
)

// tableSniffLimit caps how many bytes are read ahead to find the header line
// (and so the delimiter), blank lines before it included; more is an error
// rather than a reason to load a whole file into memory.
const tableSniffLimit = 1 << 20

// MaxLineBytes bounds every physical line of a table, the header included,
// and every record (a quoted field may span lines): 1 MiB, far above any
// real station table's line (tens of bytes) yet small enough that a file
// without line ends (a 10 MB line, a gzip stream that expands to gigabytes
// of one line, /dev/zero) fails within the first MiB instead of filling
// memory. The error names the line and the limit, never the line itself.
const MaxLineBytes = 1 << 20

// gzipCheckLimit bounds how much of a gzip stream is decompressed, after a
// row error, to tell a corrupt stream from a bad row (a checksum is known
// only at the end of the stream).
const gzipCheckLimit = 256 << 20

// Table streams a CSV or TSV table (delimiter sniffed from the header line:
// tab, comma or semicolon), optionally gzip-compressed (detected by magic
// bytes, not by name), tolerant of a UTF-8 BOM and CRLF, with a header row.
// Lines are counted 1-based as in the file (header = line 1), so errors can
// name them.
type Table struct {
	// Path is the name used in error messages (the file path as given).
	Path string
	// Header holds the trimmed header fields.
	Header []string
	// Delim is the sniffed field delimiter: '\t', ',' or ';'.
	Delim rune
	// HeaderLine is the line of the header row (1 unless blank lines precede it).
	HeaderLine int

	csv     *csv.Reader
	closers []io.Closer
	last    int // line of the last record returned

	// Fast path: physical lines without a double quote are split here, straight
	// from the buffered input, exactly as encoding/csv would split them; any
	// other line (and the end of the input) goes to csv, which reads through
	// gate one physical line at a time so that it never reads ahead of the
	// record it parses (its line count plus fast is the file's line).
	br   *bufio.Reader
	gate *tableGate
	fast int      // physical lines consumed by the fast path (csv does not count them)
	rec  [][]byte // fields of the last record from nextFields (trimmed)
	size int64    // bytes of the input, when it could be told (0 otherwise)

	// A gzip-compressed table: the decompressor, the compressed bytes read
	// so far and the length of the gzip header (to place a corrupt byte).
	gz     *gzip.Reader
	gzRead *countReader
	gzHead int64
}

// countReader counts the bytes read through it.
type countReader struct {
	r io.Reader
	n int64
}

func (c *countReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// OpenTable opens the file at path and reads its header. Errors name the file.
func OpenTable(path string) (*Table, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("table %s: %w", path, err)
	}
	t, err := newTable(path, f, f)
	if err != nil {
		f.Close()
		return nil, err
	}
	if st, err := f.Stat(); err == nil {
		t.size = st.Size()
	}
	return t, nil
}

// rowsHint guesses the number of data rows from the input's size (a row of
// an id, a latitude, a longitude and a value takes 30 bytes or more), to
// size tables ahead: 1024 when the size is unknown, at most 1<<20.
func (t *Table) rowsHint() int {
	if t.size == 0 {
		return 1024
	}
	return int(min(t.size/30, 1<<20))
}

// NewTable reads a table from r (for tests and fuzzing); name is used in
// error messages. The caller closes r if it needs closing; Close releases only
// what NewTable opened (a gzip reader).
func NewTable(name string, r io.Reader) (*Table, error) {
	t, err := newTable(name, r, nil)
	if l, ok := r.(interface{ Len() int }); ok && err == nil {
		t.size = int64(l.Len()) // a bytes or strings reader: what is left of it, roughly the size
	}
	return t, err
}

func newTable(name string, r io.Reader, c io.Closer) (*Table, error) {
	t := &Table{Path: name}
	if c != nil {
		t.closers = append(t.closers, c)
	}
	cr0 := &countReader{r: r}
	br := bufio.NewReaderSize(cr0, 64<<10)
	if isGzip(br) {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, fmt.Errorf("%s: reading gzip header: %w", name, err)
		}
		t.closers = append([]io.Closer{zr}, t.closers...)
		t.gz, t.gzRead, t.gzHead = zr, cr0, cr0.n-int64(br.Buffered())
		br = bufio.NewReaderSize(zr, 64<<10)
		if isGzip(br) {
			return nil, fmt.Errorf("%s: the file is gzip inside gzip: decompress it once (gunzip it, and give drygrid the .gz it holds)", name)
		}
		if _, err := br.Peek(1); err != nil && err != io.EOF {
			return nil, t.wrapErr(err, 1)
		}
	}
	if bom, _ := br.Peek(3); bytes.Equal(bom, []byte{0xef, 0xbb, 0xbf}) {
		br.Discard(3)
	} else if len(bom) >= 2 && (bom[0] == 0xff && bom[1] == 0xfe || bom[0] == 0xfe && bom[1] == 0xff) {
		return nil, fmt.Errorf("%s line 1: the file is UTF-16; save it as UTF-8", name)
	}
	// Read physical lines up to the first non-blank one, to sniff the
	// delimiter; they are replayed to the CSV reader so its line numbers stay
	// those of the file.
	var prefix []byte
	var headerRaw []byte
	for n := 1; ; n++ {
		line, err := tableReadLine(br, MaxLineBytes+1) // the line end may follow the limit
		if err == errTableLineTooLong {
			return nil, tableLineTooLong(name, n)
		}
		prefix = append(prefix, line...)
		if len(bytes.TrimSpace(line)) > 0 {
			headerRaw = line
			break
		}
		if len(prefix) > tableSniffLimit {
			return nil, fmt.Errorf("%s: no header line within the first %d bytes (line %d is still blank)", name, tableSniffLimit, n)
		}
		if err != nil {
			if err == io.EOF {
				return nil, fmt.Errorf("%s: empty table, no header row", name)
			}
			return nil, t.wrapErr(err, n)
		}
	}
	if bytes.IndexByte(bytes.TrimRight(headerRaw, "\r\n"), '\r') >= 0 {
		return nil, fmt.Errorf("%s line 1: lines end in a bare carriage return (CR); save the file with LF or CRLF line endings", name)
	}
	t.Delim = tableSniff(headerRaw)
	t.br = br
	t.gate = &tableGate{prefix: prefix, br: br}
	cr := csv.NewReader(t.gate)
	cr.Comma = t.Delim
	cr.FieldsPerRecord = -1 // checked here, for a clearer message
	cr.ReuseRecord = false
	t.csv = cr
	hdr, err := cr.Read()
	if err != nil {
		return nil, t.wrapErr(err, 1)
	}
	t.HeaderLine, _ = cr.FieldPos(0)
	for i, h := range hdr {
		if !utf8.ValidString(h) {
			return nil, fmt.Errorf("%s line %d column %d: header is not valid UTF-8", name, t.HeaderLine, i+1)
		}
		hdr[i] = strings.TrimSpace(h)
	}
	t.Header = hdr
	t.last = t.HeaderLine
	return t, nil
}

var (
	errTableLineTooLong   = errors.New("line too long")
	errTableRecordTooLong = errors.New("record too long")
)

// tableLineTooLong is the error of line n beyond MaxLineBytes.
func tableLineTooLong(name string, n int) error {
	return fmt.Errorf("%s: line %d is longer than the limit of %s; a station table has short lines, so this is not one (or its line ends are missing)", name, n, tableLimitText)
}

// tableLimitText is MaxLineBytes in words.
const tableLimitText = "1 MiB"

// isGzip reports whether br starts with the gzip magic bytes.
func isGzip(br *bufio.Reader) bool {
	magic, _ := br.Peek(2)
	return len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b
}

// tableReadLine reads one physical line (with its newline) of at most limit
// bytes.
func tableReadLine(br *bufio.Reader, limit int) ([]byte, error) {
	var out []byte
	for {
		chunk, err := br.ReadSlice('\n')
		out = append(out, chunk...)
		if len(out) > limit {
			return out[:limit], errTableLineTooLong
		}
		if err == bufio.ErrBufferFull {
			continue
		}
		return out, err
	}
}

// tableSniff picks the delimiter that occurs most often in the header line
// outside double quotes: tab, then comma, then semicolon on ties; comma when
// none occurs (a one-column table).
func tableSniff(line []byte) rune {
	var tabs, commas, semis int
	inQuote := false
	for _, b := range line {
		switch b {
		case '"':
			inQuote = !inQuote
		case '\t':
			if !inQuote {
				tabs++
			}
		case ',':
			if !inQuote {
				commas++
			}
		case ';':
			if !inQuote {
				semis++
			}
		}
	}
	switch {
	case tabs > 0 && tabs >= commas && tabs >= semis:
		return '\t'
	case commas > 0 && commas >= semis:
		return ','
	case semis > 0:
		return ';'
	}
	return ','
}

// Column returns the index of the first header field matching any of the
// aliases (case-insensitive, trimmed), or -1 if none does.
func (t *Table) Column(aliases ...string) int {
	for i, h := range t.Header {
		for _, a := range aliases {
			if strings.EqualFold(h, strings.TrimSpace(a)) {
				return i
			}
		}
	}
	return -1
}

// ColumnName returns the header name of column index i (0-based), or "" when
// i is out of range.
func (t *Table) ColumnName(i int) string {
	if i < 0 || i >= len(t.Header) {
		return ""
	}
	return t.Header[i]
}

// FieldError formats an error at a field: "PATH line L column C (NAME): MSG",
// with col the 0-based column index (shown 1-based). A negative col leaves the
// column out.
func (t *Table) FieldError(line, col int, format string, args ...any) error {
	msg := fmt.Sprintf(format, args...)
	if col < 0 {
		return fmt.Errorf("%s line %d: %s", t.Path, line, msg)
	}
	return fmt.Errorf("%s line %d column %d (%s): %s", t.Path, line, col+1, t.ColumnName(col), msg)
}

// Next returns the next record (fields trimmed) and the file line it starts
// on. Blank lines, and lines whose fields are all empty, are skipped. At the
// end it returns io.EOF. Errors name the file and line (and column when
// known).
func (t *Table) Next() (rec []string, line int, err error) {
	fields, line, err := t.nextFields()
	if err != nil {
		return nil, line, err
	}
	rec = make([]string, len(fields))
	for i, f := range fields {
		rec[i] = string(f)
	}
	return rec, line, nil
}

// nextRecord is nextFields for a table keyed by station: it also returns
// the id in column idC, and a missing id is an error naming the cell.
func (t *Table) nextRecord(idC int) (rec [][]byte, id []byte, line int, err error) {
	rec, line, err = t.nextFields()
	if err != nil {
		return nil, nil, line, err
	}
	if id = rec[idC]; len(id) == 0 {
		return nil, nil, line, t.FieldError(line, idC, "missing station id")
	}
	return rec, id, line, nil
}

// nextFields is Next without copying: the fields (trimmed) are valid only
// until the next call. Errors and line numbers are those of Next.
func (t *Table) nextFields() ([][]byte, int, error) {
	if t.csv == nil {
		return nil, 0, io.EOF
	}
	for {
		var line int
		valid := false // every field is known to be valid UTF-8
		t.rec = t.rec[:0]
		if raw, ok := t.fastLine(); ok {
			t.fast++
			line = t.gate.lines + t.fast
			// As encoding/csv: CRLF counts as LF, an empty line is skipped,
			// and a line without quotes splits at every delimiter.
			raw = raw[:len(raw)-1]
			if n := len(raw); n > 0 && raw[n-1] == '\r' {
				raw = raw[:n-1]
			}
			if len(raw) == 0 {
				continue
			}
			// Valid UTF-8 splits at an ASCII delimiter into valid fields, so
			// one check of the line spares one per field.
			valid = utf8.Valid(raw)
			d := byte(t.Delim)
			for {
				i := bytes.IndexByte(raw, d)
				if i < 0 {
					t.rec = append(t.rec, raw)
					break
				}
				t.rec = append(t.rec, raw[:i])
				raw = raw[i+1:]
			}
		} else {
			t.gate.reset()
			rec, err := t.csv.Read()
			if err != nil {
				if err == io.EOF {
					return nil, 0, io.EOF
				}
				return nil, 0, t.structErr(t.wrapErr(err, t.last+1))
			}
			line, _ = t.csv.FieldPos(0)
			line += t.fast
			for _, f := range rec {
				t.rec = append(t.rec, []byte(f))
			}
		}
		t.last = line
		blank := true
		for i, f := range t.rec {
			if !valid && !utf8.Valid(f) {
				return nil, line, t.structErr(t.FieldError(line, tableCol(i, len(t.Header)), "not valid UTF-8 text"))
			}
			f = bytes.TrimSpace(f)
			t.rec[i] = f
			if len(f) != 0 {
				blank = false
			}
		}
		if blank {
			continue
		}
		if len(t.rec) != len(t.Header) {
			return nil, line, t.structErr(fmt.Errorf("%s line %d: %d fields, but the header (line %d) has %d", t.Path, line, len(t.rec), t.HeaderLine, len(t.Header)))
		}
		return t.rec, line, nil
	}
}

// fastLine returns the next physical line (with its LF) when it is complete
// in the buffer and holds no double quote, consuming it; otherwise it
// consumes nothing and reports false (csv then reads the record). The line is
// valid until the next read.
func (t *Table) fastLine() ([]byte, bool) {
	if len(t.gate.prefix) > 0 || t.gate.err != nil {
		return nil, false
	}
	for {
		n := t.br.Buffered()
		buf, _ := t.br.Peek(n)
		if i := bytes.IndexByte(buf, '\n'); i >= 0 {
			line := buf[:i+1]
			if bytes.IndexByte(line, '"') >= 0 {
				return nil, false
			}
			t.br.Discard(i + 1)
			return line, true
		}
		if n >= t.br.Size() {
			return nil, false // longer than the buffer
		}
		if _, err := t.br.Peek(n + 1); err != nil {
			if err != bufio.ErrBufferFull {
				t.gate.err = err // owed to csv after the buffered bytes
			}
			return nil, false
		}
	}
}

// tableGate feeds the csv reader: first the replayed lines before the
// header, then the buffered input, one physical line per Read, so that csv
// never reads ahead of the record it parses. It counts the LFs it hands out,
// and holds every line, and every record (from reset to reset), to
// MaxLineBytes: beyond it, Read fails with errTableLineTooLong or
// errTableRecordTooLong, and errLine is the line it was reading.
type tableGate struct {
	prefix  []byte
	br      *bufio.Reader
	err     error // a read error met by the fast path, returned once after the buffered bytes
	lines   int
	lineLen int // bytes handed out of the current line
	recLen  int // bytes handed out since reset
	errLine int
}

// reset starts a record.
func (g *tableGate) reset() { g.recLen = 0 }

// Read implements io.Reader.
func (g *tableGate) Read(p []byte) (int, error) {
	if len(p) == 0 {
		return 0, nil
	}
	src := g.prefix
	if len(src) == 0 {
		if g.br.Buffered() == 0 {
			if err := g.err; err != nil {
				g.err = nil
				return 0, err
			}
			if _, err := g.br.Peek(1); err != nil {
				return 0, err
			}
		}
		src, _ = g.br.Peek(g.br.Buffered())
	}
	if i := bytes.IndexByte(src, '\n'); i >= 0 {
		src = src[:i+1]
	}
	src = src[:min(len(src), len(p))]
	n, lf := len(src), src[len(src)-1] == '\n'
	// Nothing of a line or record beyond the limit is handed out, so csv
	// never holds more than MaxLineBytes of it.
	content := g.lineLen + n
	if lf {
		content--
	}
	switch {
	case content > MaxLineBytes:
		g.errLine = g.lines + 1
		return 0, errTableLineTooLong
	case g.recLen+n > MaxLineBytes+1:
		g.errLine = g.lines + 1
		return 0, errTableRecordTooLong
	}
	copy(p, src)
	if len(g.prefix) > 0 {
		g.prefix = g.prefix[n:]
	} else {
		g.br.Discard(n)
	}
	g.lineLen += n
	g.recLen += n
	if lf {
		g.lines++
		g.lineLen = 0
	}
	return n, nil
}

// tableCol returns i when it is a header column, else -1 (no column name).
func tableCol(i, n int) int {
	if i < n {
		return i
	}
	return -1
}

// wrapErr turns a CSV or read error into one naming the file and line.
func (t *Table) wrapErr(err error, line int) error {
	var pe *csv.ParseError
	var ce flate.CorruptInputError
	switch {
	case errors.Is(err, errTableLineTooLong):
		return tableLineTooLong(t.Path, t.gate.errLine+t.fast)
	case errors.Is(err, errTableRecordTooLong):
		return fmt.Errorf("%s: the record running to line %d is longer than the limit of %s; is a double quote left open?", t.Path, t.gate.errLine+t.fast, tableLimitText)
	case errors.As(err, &pe):
		return fmt.Errorf("%s line %d (byte %d of the line): %w", t.Path, pe.Line+t.fast, pe.Column, pe.Err)
	case errors.As(err, &ce) && t.gz != nil:
		return fmt.Errorf("%s: gzip data corrupt at byte %d of the file (decompressed as far as line %d); the file is damaged: fetch or compress it again", t.Path, t.gzHead+int64(ce), line)
	case errors.Is(err, gzip.ErrChecksum):
		return fmt.Errorf("%s: gzip data corrupt: the checksum at the end of the stream (byte %d) does not match the data; the file is damaged: fetch or compress it again", t.Path, t.gzRead.n)
	case errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, gzip.ErrHeader):
		return fmt.Errorf("%s line %d: truncated or corrupt compressed data: %w", t.Path, line, err)
	}
	return fmt.Errorf("%s line %d: %w", t.Path, line, err)
}

// structErr returns err, a row that does not parse, unless the table is
// gzip-compressed and the stream turns out corrupt: then garbage was
// decompressed, and the corruption is the error. The rest of the stream
// (up to gzipCheckLimit) is read to find out.
func (t *Table) structErr(err error) error {
	if t.gz == nil {
		return err
	}
	_, cerr := io.Copy(io.Discard, io.LimitReader(t.gz, gzipCheckLimit))
	var ce flate.CorruptInputError
	if errors.As(cerr, &ce) || errors.Is(cerr, gzip.ErrChecksum) {
		return t.wrapErr(cerr, t.last)
	}
	return err
}

// Close releases the file and decompressor opened for the table.
func (t *Table) Close() error {
	var first error
	for _, c := range t.closers {
		if err := c.Close(); err != nil && first == nil {
			first = err
		}
	}
	t.closers = nil
	t.csv = nil
	return first
}

// IsMissing reports whether a cell means "no value": empty, NA, N/A or null
// (case-insensitive). NaN is not missing; it is rejected as non-finite.
func IsMissing(s string) bool {
	s = strings.TrimSpace(s)
	if s == "" {
		return true
	}
	switch strings.ToLower(s) {
	case "na", "n/a", "null":
		return true
	}
	return false
}

// ParseFloat parses a decimal number from a cell. It accepts a decimal comma
// when the table's delimiter is a semicolon (common practice in European
// spreadsheet exports). Hexadecimal and underscore forms are refused; NaN and
// Inf parse (callers reject them as non-finite with their own message).
func (t *Table) ParseFloat(s string) (float64, error) {
	s = strings.TrimSpace(s)
	if t != nil && t.Delim == ';' && strings.Count(s, ",") == 1 && !strings.Contains(s, ".") {
		s = strings.Replace(s, ",", ".", 1)
	}
	if strings.ContainsAny(s, "_xXpP") {
		return 0, fmt.Errorf("%q is not a decimal number", s)
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		var ne *strconv.NumError
		if errors.As(err, &ne) && ne.Err == strconv.ErrRange {
			return 0, fmt.Errorf("%q is out of range", s)
		}
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v, nil
}

// floatField is Float for a record of nextFields: the common form of a
// decimal (signedDecimal) without a copy, anything else through Float.
func (t *Table) floatField(rec [][]byte, line, col int, what string) (float64, error) {
	if x, ok := signedDecimal(rec[col]); ok {
		return x, nil
	}
	return t.floatCell(string(rec[col]), line, col, what)
}

// signedDecimal is idxDecimal with an optional leading minus sign: exactly
// strconv.ParseFloat's value for those forms (including -0).
func signedDecimal(b []byte) (float64, bool) {
	if len(b) > 0 && b[0] == '-' {
		x, ok := idxDecimal(b[1:])
		return -x, ok
	}
	return idxDecimal(b)
}

// Float reads a required finite number from column col of a record: a
// missing cell, a non-number, NaN or Inf is an error naming the file, line
// and column; what names the quantity in the message.
func (t *Table) Float(rec []string, line, col int, what string) (float64, error) {
	return t.floatCell(rec[col], line, col, what)
}

// floatCell is Float of the cell s in column col.
func (t *Table) floatCell(s string, line, col int, what string) (float64, error) {
	if IsMissing(s) {
		return 0, t.FieldError(line, col, "missing %s", what)
	}
	x, err := t.ParseFloat(s)
	if err != nil {
		return 0, t.FieldError(line, col, "%s %v", what, err)
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, t.FieldError(line, col, "%s %s is not a finite number", what, s)
	}
	return x, nil
}
