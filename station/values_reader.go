package station

import (
	"io"
	"math"
)

// valuesReader reads the rows of a value table in a goroutine of its own,
// a batch ahead of readValues: it splits the lines, parses the numbers and
// checks each row on its own (ranges, a missing id), which is about half
// of the work, while readValues checks the rows against each other (ids,
// points). Errors are passed in file order, after the rows before them, so
// readValues returns the error a one-goroutine reader would.
type valuesReader struct {
	batches chan *valuesBatch
	free    chan *valuesBatch
	quit    chan struct{}
	cur     *valuesBatch
	at      int
	read    int // data rows read, as Values.Read counts them
}

// valuesParsed is one row as read: its id and value text (for messages)
// are spans of the batch's text.
type valuesParsed struct {
	line            int
	lat, lon, value float64
	missing         bool
	id, raw         []byte
}

// valuesBatch is a run of rows, and the error after them (io.EOF at the
// end of the table).
type valuesBatch struct {
	rows []valuesParsed
	text []byte
	read int
	err  error
}

// valuesBatchRows is the rows of a batch: small enough that the first
// batch comes soon, large enough that handing it over costs nothing.
const valuesBatchRows = 512

func newValuesReader(t *Table, kind Kind, idC, latC, lonC, valC int) *valuesReader {
	rd := &valuesReader{batches: make(chan *valuesBatch, 2), free: make(chan *valuesBatch, 4), quit: make(chan struct{})}
	go func() {
		defer close(rd.batches)
		for {
			var b *valuesBatch
			select {
			case b = <-rd.free:
			default:
				b = &valuesBatch{rows: make([]valuesParsed, 0, valuesBatchRows), text: make([]byte, 0, 16*valuesBatchRows)}
			}
			b.rows, b.text, b.read, b.err = b.rows[:0], b.text[:0], 0, nil
			for len(b.rows) < valuesBatchRows && b.err == nil {
				b.err = b.add(t, kind, idC, latC, lonC, valC)
			}
			select {
			case rd.batches <- b:
			case <-rd.quit:
				return
			}
			if b.err != nil {
				return
			}
		}
	}()
	return rd
}

// add reads and checks one row into b; an error (io.EOF at the end) stops
// the batch.
func (b *valuesBatch) add(t *Table, kind Kind, idC, latC, lonC, valC int) error {
	rec, idb, line, err := t.nextRecord(idC)
	if err == io.EOF {
		return err
	}
	b.read++
	if err != nil {
		return err
	}
	lat, err := t.floatField(rec, line, latC, "latitude")
	if err != nil {
		return err
	}
	if lat < -90 || lat > 90 {
		return t.FieldError(line, latC, "latitude %s outside [-90, 90]", rec[latC])
	}
	lon, err := t.floatField(rec, line, lonC, "longitude")
	if err != nil {
		return err
	}
	if lon < -180 || lon >= 360 {
		return t.FieldError(line, lonC, "longitude %s outside [-180, 360)", rec[lonC])
	}
	if lon >= 180 {
		lon -= 360 // 0-360 input normalised to [-180, 180)
	}
	r := valuesParsed{line: line, lat: lat, lon: lon}
	if x, ok := signedDecimal(rec[valC]); ok {
		r.value = x
	} else if r.missing = IsMissing(string(rec[valC])); !r.missing {
		r.value, err = t.floatField(rec, line, valC, string(kind))
		if err != nil {
			return err
		}
	}
	if !r.missing {
		x := r.value
		switch kind {
		case KindPercentile:
			if x < 0 || x > 100 {
				return t.FieldError(line, valC, "percentile %s outside [0, 100]", rec[valC])
			}
		case KindPctOfNormal:
			if x < 0 || x > MaxPctOfNormal {
				return t.FieldError(line, valC, "percent of normal %s outside [0, %d]", rec[valC], MaxPctOfNormal)
			}
		case KindSPI:
			if math.Abs(x) > SPILimit {
				return t.FieldError(line, valC, "spi %s outside [-%d, %d], implausible", rec[valC], SPILimit, SPILimit)
			}
		}
	}
	// The spans stay valid when the text grows: they keep the array they
	// were taken from.
	start := len(b.text)
	b.text = append(append(b.text, idb...), rec[valC]...)
	r.id = b.text[start : start+len(idb) : start+len(idb)]
	r.raw = b.text[start+len(idb) : len(b.text) : len(b.text)]
	b.rows = append(b.rows, r)
	return nil
}

// next is the next row; ok is false at the end of the table, err the
// error of a row that could not be read or checked.
func (rd *valuesReader) next() (r valuesParsed, ok bool, err error) {
	for rd.cur == nil || rd.at == len(rd.cur.rows) {
		if rd.cur != nil {
			err := rd.cur.err
			if err != nil {
				rd.cur = nil
				if err == io.EOF {
					return r, false, nil
				}
				return r, false, err
			}
			select {
			case rd.free <- rd.cur:
			default:
			}
		}
		b, open := <-rd.batches
		if !open {
			rd.cur = nil
			return r, false, nil
		}
		rd.cur, rd.at = b, 0
		rd.read += b.read
	}
	r = rd.cur.rows[rd.at]
	rd.at++
	return r, true, nil
}

// stop ends the goroutine and waits for it, so that the table is no
// longer read when readValues returns (and its caller closes it).
func (rd *valuesReader) stop() {
	close(rd.quit)
	for range rd.batches {
	}
}
