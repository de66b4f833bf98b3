package station

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/parquet-go/parquet-go"
	"github.com/parquet-go/parquet-go/format"
)

// parquetMagic begins (and ends) every Parquet file.
var parquetMagic = []byte("PAR1")

// dailyParquetBatch is the number of rows read from each column at a time.
const dailyParquetBatch = 4096

// pqCol reads one flat column of a row group, across its pages.
type pqCol struct {
	pages parquet.Pages
	vr    parquet.ValueReader
	buf   []parquet.Value
}

// fill reads exactly len(c.buf[:n]) values.
func (c *pqCol) fill(n int) ([]parquet.Value, error) {
	buf := c.buf[:n]
	for got, stalls := 0, 0; got < n; {
		if c.vr == nil {
			pg, err := c.pages.ReadPage()
			if err != nil {
				if err == io.EOF {
					return nil, fmt.Errorf("the column ends before the row group")
				}
				return nil, err
			}
			c.vr = pg.Values()
		}
		k, err := c.vr.ReadValues(buf[got:])
		got += k
		switch {
		case err == io.EOF:
			c.vr = nil
		case err != nil:
			return nil, err
		case k == 0:
			if stalls++; stalls > 100 {
				return nil, fmt.Errorf("no progress reading the column")
			}
		}
	}
	return buf, nil
}

// readDailyParquet reads a Parquet daily table: flat columns found by the
// same names as in a text table. The station id may be a string or an
// integer; the date a DATE, a TIMESTAMP (the UTC day is taken) or an ISO
// YYYY-MM-DD string; the precipitation a float, double, integer or decimal
// string; the flag a string. Nulls are missing values (a null id or date is
// an error). Errors name the file, row (1-based) and column.
func readDailyParquet(name string, f io.ReaderAt, size int64, p *dailyPlan, opt DailyOptions) (res *WindowTotals, err error) {
	defer func() {
		// The Parquet decoder is not ours: a corrupt file must not take the
		// program down with it.
		if r := recover(); r != nil {
			res, err = nil, fmt.Errorf("daily %s: corrupt Parquet file (%v)", name, r)
		}
	}()
	if err := pqCheckFooter(f, size); err != nil {
		return nil, fmt.Errorf("daily %s: reading Parquet: %w", name, err)
	}
	pf, err := parquet.OpenFile(f, size, parquet.SkipPageIndex(true), parquet.SkipBloomFilters(true))
	if err != nil {
		return nil, fmt.Errorf("daily %s: reading Parquet: %w", name, err)
	}
	fields := pf.Schema().Fields()
	names := make([]string, len(fields))
	for i, fl := range fields {
		names[i] = fl.Name()
	}
	d := &dailyReader{name: name, p: p, opt: opt, accs: make(map[string]*dailyAcc), parquet: true}
	d.t = &Table{Path: name, Header: names}
	columns := strings.Join(names, ", ")
	if len(columns) > 200 {
		columns = columns[:200] + "..."
	}
	find := func(what, exact string, aliases []string, required bool) (int, error) {
		i := -1
		if exact != "" {
			if i = d.t.Column(exact); i < 0 {
				return -1, fmt.Errorf("daily %s: no %s column named %q; the columns are: %s", name, what, exact, columns)
			}
		} else if i = d.t.Column(aliases...); i < 0 && required {
			return -1, fmt.Errorf("daily %s: no %s column (looked for %s); the columns are: %s", name, what, strings.Join(aliases, "|"), columns)
		}
		if i >= 0 && (!fields[i].Leaf() || fields[i].Repeated()) {
			return -1, fmt.Errorf("daily %s: column %s (the %s) is not a flat column", name, names[i], what)
		}
		return i, nil
	}
	if d.idC, err = find("station id", opt.IDColumn, IDAliases, true); err != nil {
		return nil, err
	}
	if d.dateC, err = find("date", opt.DateColumn, DateAliases, true); err != nil {
		return nil, err
	}
	if d.valC, err = find("precipitation", opt.ValueColumn, PrecipAliases, true); err != nil {
		return nil, err
	}
	if d.flagC, err = find("flag", opt.FlagColumn, FlagAliases, opt.FlagColumn != ""); err != nil {
		return nil, err
	}
	if d.flagC < 0 && len(p.flags) > 0 {
		return nil, fmt.Errorf("daily %s: flags to exclude are given, but there is no flag column (looked for %s); the columns are: %s",
			name, strings.Join(FlagAliases, "|"), columns)
	}
	used := []int{d.idC, d.dateC, d.valC}
	if d.flagC >= 0 {
		used = append(used, d.flagC)
	}
	leaf := make([]int, len(used))
	kinds := make([]parquet.Kind, len(used))
	for k, c := range used {
		lc, ok := pf.Schema().Lookup(names[c])
		if !ok {
			return nil, fmt.Errorf("daily %s: column %s not found in the schema", name, names[c])
		}
		leaf[k] = lc.ColumnIndex
		kinds[k] = fields[c].Type().Kind()
	}
	if err := pqCheckPages(f, size, pf.Metadata(), leaf); err != nil {
		return nil, fmt.Errorf("daily %s: reading Parquet: %w", name, err)
	}
	for k, c := range used {
		switch kinds[k] {
		case parquet.ByteArray, parquet.FixedLenByteArray, parquet.Int32, parquet.Int64:
		case parquet.Float, parquet.Double:
			if c == d.valC {
				break
			}
			fallthrough
		default:
			return nil, fmt.Errorf("daily %s: column %s has the Parquet type %s, which cannot hold a %s", name, names[c], fields[c].Type(), []string{"station id", "date", "precipitation", "flag"}[k])
		}
	}
	// The date: DATE (days), TIMESTAMP (units a day), or text.
	var perDay int64
	if kinds[1] == parquet.Int32 || kinds[1] == parquet.Int64 {
		lt := fields[d.dateC].Type().LogicalType()
		switch v := logicalValue(lt).(type) {
		case *format.DateType:
			perDay = 1
		case *format.TimestampType:
			switch v.Unit.Value.(type) {
			case *format.MilliSeconds:
				perDay = 86400e3
			case *format.MicroSeconds:
				perDay = 86400e6
			case *format.NanoSeconds:
				perDay = 86400e9
			}
		}
		if perDay == 0 {
			return nil, fmt.Errorf("daily %s: column %s is an integer column without a DATE or TIMESTAMP type", name, names[d.dateC])
		}
	}
	var idText []byte
	vals := make([][]parquet.Value, len(used))
	// One row group at a time, its column pages closed when it is done or
	// fails.
	rowGroup := func(rg parquet.RowGroup) error {
		chunks := rg.ColumnChunks()
		cols := make([]*pqCol, len(used))
		for k := range used {
			cols[k] = &pqCol{pages: chunks[leaf[k]].Pages(), buf: make([]parquet.Value, dailyParquetBatch)}
			defer cols[k].pages.Close()
		}
		n := rg.NumRows()
		for done := int64(0); done < n; {
			m := int(min(int64(dailyParquetBatch), n-done))
			for k, c := range cols {
				if vals[k], err = c.fill(m); err != nil {
					return fmt.Errorf("daily %s row %d column %d (%s): reading Parquet: %w", name, d.lineNo+1, used[k]+1, names[used[k]], err)
				}
			}
			for i := range m {
				d.lineNo++
				var flag parquet.Value
				if len(vals) > 3 {
					flag = vals[3][i]
				}
				if idText, err = d.parquetRow(vals[0][i], vals[1][i], vals[2][i], flag, perDay, kinds, idText); err != nil {
					return err
				}
			}
			done += int64(m)
		}
		return nil
	}
	for _, rg := range pf.RowGroups() {
		if err := rowGroup(rg); err != nil {
			return nil, err
		}
	}
	return d.result()
}

// logicalValue is the annotation of a logical type, or nil.
func logicalValue(lt *format.LogicalType) format.LogicalTypeValue {
	if lt == nil {
		return nil
	}
	return lt.Value
}

// parquetRow handles one row; scratch holds an integer id's text.
func (d *dailyReader) parquetRow(id, date, val, flag parquet.Value, perDay int64, kinds []parquet.Kind, scratch []byte) ([]byte, error) {
	var idb []byte
	if !id.IsNull() {
		switch kinds[0] {
		case parquet.Int32, parquet.Int64:
			scratch = strconv.AppendInt(scratch[:0], id.Int64(), 10)
			idb = scratch
		default:
			idb = dailyTrim(id.ByteArray())
		}
	}
	if len(idb) == 0 {
		return scratch, d.fieldErr(d.idC, "missing station id")
	}
	d.rows++
	if date.IsNull() {
		return scratch, d.fieldErr(d.dateC, "missing date")
	}
	var day Day
	var year int
	if perDay == 0 {
		ds := dailyTrim(date.ByteArray())
		if len(ds) == 0 {
			return scratch, d.fieldErr(d.dateC, "missing date")
		}
		var err error
		if day, year, err = parseDateBytes(ds); err != nil {
			return scratch, d.fieldErr(d.dateC, "date %v", err)
		}
	} else {
		v := date.Int64()
		if kinds[1] == parquet.Int32 {
			v = int64(date.Int32())
		}
		q := v / perDay
		if v%perDay < 0 {
			q-- // floor: a time before 1970 belongs to the day before
		}
		lo, hi := civilDay(1, 1, 1), civilDay(9999, 12, 31)
		if q < int64(lo) || q > int64(hi) {
			return scratch, d.fieldErr(d.dateC, "date %d is outside the years 1 to 9999", v)
		}
		day = Day(q)
		if day == d.lastDay && d.lastYear != 0 {
			year = d.lastYear
		} else {
			year = day.Year()
			d.lastDay, d.lastYear = day, year
		}
	}
	if day <= d.p.target && year < MinTotalYear {
		return scratch, d.fieldErr(d.dateC, "date %s is before the year %d", day, MinTotalYear)
	}
	if d.afterTarget(day) {
		return scratch, nil
	}
	a, err := d.station(idb, year)
	if err != nil {
		return scratch, err
	}
	var q int64
	reported := false
	flagged := false
	if d.flagC >= 0 && len(d.p.flags) > 0 && !flag.IsNull() {
		var fb []byte
		switch kinds[3] {
		case parquet.Int32, parquet.Int64:
			fb = strconv.AppendInt(nil, flag.Int64(), 10)
		default:
			fb = dailyTrim(flag.ByteArray())
		}
		for _, x := range d.p.flags {
			if bytes.Equal(fb, x) {
				flagged = true
				break
			}
		}
	}
	if !flagged && !val.IsNull() {
		var mm float64
		ok := true
		switch kinds[2] {
		case parquet.ByteArray, parquet.FixedLenByteArray:
			v := dailyTrim(val.ByteArray())
			if len(v) == 0 {
				ok = false
			} else if mm, ok, err = d.value(v); err != nil {
				return scratch, err
			}
		default:
			var x float64
			switch kinds[2] {
			case parquet.Float:
				x = float64(val.Float())
			case parquet.Double:
				x = val.Double()
			case parquet.Int32:
				x = float64(val.Int32())
			default:
				x = float64(val.Int64())
			}
			if math.IsNaN(x) || math.IsInf(x, 0) || x < 0 || x > MaxDailyMM/25.4 {
				// Rare: the value as text, for a message.
				show := []byte(strconv.FormatFloat(x, 'g', -1, 64))
				if math.IsNaN(x) || math.IsInf(x, 0) {
					return scratch, d.fieldErr(d.valC, "precipitation %s is not a finite number", show)
				}
				if x < 0 {
					return scratch, d.fieldErr(d.valC, "precipitation %s is negative", show)
				}
				if mm, err = d.toMM(x, show); err != nil {
					return scratch, err
				}
			} else if mm, err = d.toMM(x+0, nil); err != nil {
				return scratch, err // not reached: x is below every unit's limit
			}
		}
		if ok {
			q = int64(math.Floor(mm*dailyQuantum + 0.5))
			reported = true
		}
	}
	if !d.add(a, day, year, q, reported) {
		return scratch, d.fieldErr(d.dateC, "station %s has a second row for %s (a station-day may be given once)", a.id, day)
	}
	return scratch, nil
}

// isParquet reports whether the input at r starts with the Parquet magic.
func isParquet(r io.ReaderAt) bool {
	var b [4]byte
	n, _ := r.ReadAt(b[:], 0)
	return n == 4 && bytes.Equal(b[:], parquetMagic)
}

var errParquetStream = errors.New("a Parquet table must be read from a file (it is read from its end), not from a stream")
