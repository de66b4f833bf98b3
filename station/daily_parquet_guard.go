package station

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"

	"github.com/parquet-go/parquet-go/encoding/thrift"
	"github.com/parquet-go/parquet-go/format"
)

// Limits on what a Parquet file may claim before the decoder allocates for
// it: the decoder sizes its buffers by the claims of the footer and the
// page headers, so a corrupt or hostile file could otherwise ask for
// gigabytes.
const (
	pqMaxFooter     = 16 << 20 // bytes of the footer (file metadata)
	pqMaxPage       = 64 << 20 // bytes of a page, uncompressed
	pqMaxPageValues = 1 << 22  // values in a page
	pqMaxRatio      = 256      // uncompressed / compressed page size, beyond 1 MiB
	pqMaxDepth      = 64       // nesting of the footer's structures
)

// pqCheckFooter checks the footer of the Parquet file before it is decoded:
// its length, and, walking its Thrift compact encoding, that no list, set,
// map or string claims more elements or bytes than there are left.
func pqCheckFooter(r io.ReaderAt, size int64) error {
	if size < 12 {
		return fmt.Errorf("%d bytes are too few for a Parquet file", size)
	}
	var tail [8]byte
	if _, err := r.ReadAt(tail[:], size-8); err != nil {
		return err
	}
	n := int64(binary.LittleEndian.Uint32(tail[:4]))
	if string(tail[4:]) != string(parquetMagic) {
		return fmt.Errorf("no Parquet magic at the end")
	}
	if n > size-12 || n > pqMaxFooter {
		return fmt.Errorf("a footer of %d bytes in a file of %d (the limit is %d)", n, size, pqMaxFooter)
	}
	b := make([]byte, n)
	if _, err := r.ReadAt(b, size-8-n); err != nil {
		return err
	}
	s := thriftSkim{b: b}
	if err := s.structure(0); err != nil {
		return fmt.Errorf("corrupt footer: %w", err)
	}
	return nil
}

// thriftSkim walks Thrift compact-protocol data without decoding it.
type thriftSkim struct{ b []byte }

var errThriftShort = fmt.Errorf("truncated")

func (s *thriftSkim) byte1() (byte, error) {
	if len(s.b) == 0 {
		return 0, errThriftShort
	}
	c := s.b[0]
	s.b = s.b[1:]
	return c, nil
}

func (s *thriftSkim) varint() (uint64, error) {
	var v uint64
	for i := 0; i < 10; i++ {
		c, err := s.byte1()
		if err != nil {
			return 0, err
		}
		v |= uint64(c&0x7f) << (7 * i)
		if c < 0x80 {
			return v, nil
		}
	}
	return 0, fmt.Errorf("varint too long")
}

func (s *thriftSkim) skip(n uint64) error {
	if n > uint64(len(s.b)) {
		return fmt.Errorf("%d bytes claimed, %d left", n, len(s.b))
	}
	s.b = s.b[n:]
	return nil
}

func (s *thriftSkim) structure(depth int) error {
	if depth > pqMaxDepth {
		return fmt.Errorf("nested too deep")
	}
	for {
		h, err := s.byte1()
		if err != nil {
			return err
		}
		if h == 0 {
			return nil
		}
		if h>>4 == 0 { // long form: the field id follows
			if _, err := s.varint(); err != nil {
				return err
			}
		}
		if t := h & 0x0f; t != 1 && t != 2 { // booleans are in the header
			if err := s.value(t, depth); err != nil {
				return err
			}
		}
	}
}

func (s *thriftSkim) value(t byte, depth int) error {
	switch t {
	case 1, 2, 3: // a boolean in a list, i8
		return s.skip(1)
	case 4, 5, 6:
		_, err := s.varint()
		return err
	case 7:
		return s.skip(8)
	case 8:
		n, err := s.varint()
		if err != nil {
			return err
		}
		return s.skip(n)
	case 9, 10:
		h, err := s.byte1()
		if err != nil {
			return err
		}
		n := uint64(h >> 4)
		if n == 15 {
			if n, err = s.varint(); err != nil {
				return err
			}
		}
		if n > uint64(len(s.b)) {
			return fmt.Errorf("a list of %d items in %d bytes", n, len(s.b))
		}
		for range n {
			if err := s.value(h&0x0f, depth+1); err != nil {
				return err
			}
		}
		return nil
	case 11:
		n, err := s.varint()
		if err != nil || n == 0 {
			return err
		}
		kv, err := s.byte1()
		if err != nil {
			return err
		}
		if n > uint64(len(s.b))/2 {
			return fmt.Errorf("a map of %d items in %d bytes", n, len(s.b))
		}
		for range n {
			if err := s.value(kv>>4, depth+1); err != nil {
				return err
			}
			if err := s.value(kv&0x0f, depth+1); err != nil {
				return err
			}
		}
		return nil
	case 12:
		return s.structure(depth + 1)
	}
	return fmt.Errorf("unknown type %d", t)
}

// pqCheckPages reads the page headers of the columns leaves of every row
// group and checks their claims: the chunk inside the file, pages within
// pqMaxPage and pqMaxRatio, at most pqMaxPageValues values each.
func pqCheckPages(r io.ReaderAt, size int64, md *format.FileMetaData, leaves []int) error {
	var proto thrift.CompactProtocol
	for g, rg := range md.RowGroups {
		for _, leaf := range leaves {
			if leaf >= len(rg.Columns) {
				return fmt.Errorf("row group %d has %d columns", g, len(rg.Columns))
			}
			cm := &rg.Columns[leaf].MetaData
			start := cm.DataPageOffset
			if cm.DictionaryPageOffset > 0 && cm.DictionaryPageOffset < start {
				start = cm.DictionaryPageOffset
			}
			if start < 4 || cm.TotalCompressedSize < 0 || cm.TotalCompressedSize > size-start {
				return fmt.Errorf("row group %d column %d lies outside the file", g, leaf)
			}
			br := bufio.NewReaderSize(io.NewSectionReader(r, start, cm.TotalCompressedSize), 4096)
			dec := thrift.NewDecoder(proto.NewReader(br))
			for {
				if _, err := br.Peek(1); err == io.EOF {
					break
				}
				var h format.PageHeader
				if err := dec.Decode(&h); err != nil {
					return fmt.Errorf("row group %d column %d: page header: %w", g, leaf, err)
				}
				c, u := int64(h.CompressedPageSize), int64(h.UncompressedPageSize)
				if c < 0 || u < 0 || u > pqMaxPage || (u > 1<<20 && u > pqMaxRatio*c) {
					return fmt.Errorf("row group %d column %d: a page of %d bytes (%d compressed; the limit is %d, or %d times the compressed size)", g, leaf, u, c, pqMaxPage, pqMaxRatio)
				}
				var nv int64
				switch {
				case h.DataPageHeader.Valid:
					nv = int64(h.DataPageHeader.V.NumValues)
				case h.DataPageHeaderV2.Valid:
					nv = int64(h.DataPageHeaderV2.V.NumValues)
				case h.DictionaryPageHeader.Valid:
					nv = int64(h.DictionaryPageHeader.V.NumValues)
				}
				if nv < 0 || nv > pqMaxPageValues {
					return fmt.Errorf("row group %d column %d: a page of %d values (the limit is %d)", g, leaf, nv, pqMaxPageValues)
				}
				if _, err := br.Discard(int(c)); err != nil {
					return fmt.Errorf("row group %d column %d: a page runs past its column chunk", g, leaf)
				}
			}
		}
	}
	return nil
}
