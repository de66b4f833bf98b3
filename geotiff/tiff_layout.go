package geotiff

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
)

// TIFF field types (TIFF 6.0 section 2; LONG8 from the BigTIFF proposal,
// Aware Systems 2004, adopted by libtiff 4).
const (
	tiffASCII  = 2
	tiffSHORT  = 3
	tiffLONG   = 4
	tiffDOUBLE = 12
	tiffLONG8  = 16
)

// tiffGhost is GDAL's "ghost" structural metadata that its COG driver puts
// right after the header (GDAL's COG driver documentation, "Header ghost
// area"; copied byte for byte from a file written by gdal_translate -of COG,
// GDAL 3.6.2). It tells readers that the IFDs come first, tiles are in
// row-major order, each tile is preceded by its size as a little-endian
// uint32 and followed by a copy of its last 4 bytes.
const tiffGhost = "GDAL_STRUCTURAL_METADATA_SIZE=000140 bytes\n" +
	"LAYOUT=IFDS_BEFORE_DATA\n" +
	"BLOCK_ORDER=ROW_MAJOR\n" +
	"BLOCK_LEADER=SIZE_AS_UINT4\n" +
	"BLOCK_TRAILER=LAST_4_BYTES_REPEATED\n" +
	"KNOWN_INCOMPATIBLE_EDITION=NO\n "

// tiffImage describes what is written: sample type, tags shared by every
// level, and the levels (full resolution first, then overviews).
type tiffImage struct {
	float     bool // Float32 (else UInt8)
	nodataF   float32
	nodataU   uint8
	predictor int      // 1 none, 2 horizontal, 3 floating point
	colormap  []uint16 // 768 values for a palette image, else nil
	nodata    string   // GDAL_NODATA text
	software  string
	datetime  string // TIFFTAG_DATETIME text, or ""
	metadata  string // GDAL_METADATA XML, or ""
	west      float64
	north     float64
	res       float64
	levels    []*tiffLevel
	// spillFile holds the compressed tiles that are nil in their level
	// (the row encoders with Options.SpillDir).
	spillFile io.ReaderAt
}

func (img *tiffImage) bytesPerSample() int {
	if img.float {
		return 4
	}
	return 1
}

// tiffEntry is one IFD entry; data holds its values little-endian.
type tiffEntry struct {
	tag   uint16
	typ   uint16
	count uint64
	data  []byte
}

func tiffShort(tag uint16, v ...uint16) tiffEntry {
	b := make([]byte, 2*len(v))
	for i, x := range v {
		binary.LittleEndian.PutUint16(b[2*i:], x)
	}
	return tiffEntry{tag, tiffSHORT, uint64(len(v)), b}
}

func tiffLong(tag uint16, v ...uint32) tiffEntry {
	b := make([]byte, 4*len(v))
	for i, x := range v {
		binary.LittleEndian.PutUint32(b[4*i:], x)
	}
	return tiffEntry{tag, tiffLONG, uint64(len(v)), b}
}

func tiffDouble(tag uint16, v ...float64) tiffEntry {
	b := make([]byte, 8*len(v))
	for i, x := range v {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(x))
	}
	return tiffEntry{tag, tiffDOUBLE, uint64(len(v)), b}
}

func tiffASCIIEntry(tag uint16, s string) tiffEntry {
	b := append([]byte(s), 0)
	return tiffEntry{tag, tiffASCII, uint64(len(b)), b}
}

// tiffOffsets is a TileOffsets or TileByteCounts entry of n values, LONG in
// a classic TIFF and LONG8 in a BigTIFF; values are filled in later.
func tiffOffsets(tag uint16, n int, big bool) tiffEntry {
	if big {
		return tiffEntry{tag, tiffLONG8, uint64(n), make([]byte, 8*n)}
	}
	return tiffEntry{tag, tiffLONG, uint64(n), make([]byte, 4*n)}
}

func tiffPutOffset(e *tiffEntry, i int, v uint64) {
	if e.typ == tiffLONG8 {
		binary.LittleEndian.PutUint64(e.data[8*i:], v)
	} else {
		binary.LittleEndian.PutUint32(e.data[4*i:], uint32(v))
	}
}

// GeoTIFF keys for EPSG:4326 (OGC 19-008r4, GeoTIFF 1.1, sections 7.4 and
// Annex B), with the same keys and values GDAL 3.6 writes for EPSG:4326:
// GTModelTypeGeoKey 1024 = 2 (geographic 2D), GTRasterTypeGeoKey 1025 = 1
// (PixelIsArea), GeodeticCRSGeoKey 2048 = 4326, GeodeticCitationGeoKey 2049
// = "WGS 84", GeogAngularUnitsGeoKey 2054 = 9102 (degree), and the WGS84
// ellipsoid in GeogSemiMajorAxisGeoKey 2057 and GeogInvFlatteningGeoKey 2059.
// The directory header 1, 1, 1 declares GeoTIFF 1.1 (19-008r4 clause 7.1.2).
var (
	tiffGeoKeys = []uint16{
		1, 1, 1, 7,
		1024, 0, 1, 2,
		1025, 0, 1, 1,
		2048, 0, 1, 4326,
		2049, 34737, 7, 0,
		2054, 0, 1, 9102,
		2057, 34736, 1, 1,
		2059, 34736, 1, 0,
	}
	tiffGeoDoubles = []float64{298.257223563, 6378137}
	tiffGeoASCII   = "WGS 84|"
)

// tiffEntries builds the IFD of level li. Offsets and byte counts come back
// as pointers into the returned slice, to be filled once the layout is known.
func tiffEntries(img *tiffImage, li int, t int, big bool) (es []tiffEntry, offs, counts int) {
	l := img.levels[li]
	bits, format, photometric := uint16(8), uint16(1), uint16(1)
	if img.float {
		bits, format = 32, 3
	}
	if img.colormap != nil {
		photometric = 3
	}
	if li > 0 {
		es = append(es, tiffLong(254, 1)) // NewSubfileType: reduced-resolution image
	}
	es = append(es,
		tiffLong(256, uint32(l.cols)),
		tiffLong(257, uint32(l.rows)),
		tiffShort(258, bits),
		tiffShort(259, 8), // Compression: Adobe Deflate (zlib)
		tiffShort(262, photometric),
		tiffShort(277, 1),
		tiffShort(284, 1))
	if li == 0 && img.software != "" {
		es = append(es, tiffASCIIEntry(305, img.software))
	}
	if li == 0 && img.datetime != "" {
		es = append(es, tiffASCIIEntry(306, img.datetime))
	}
	if img.predictor != 1 {
		es = append(es, tiffShort(317, uint16(img.predictor)))
	}
	if img.colormap != nil {
		es = append(es, tiffShort(320, img.colormap...))
	}
	n := l.tilesAcross(t) * l.tilesDown(t)
	es = append(es, tiffShort(322, uint16(t)), tiffShort(323, uint16(t)))
	offs = len(es)
	es = append(es, tiffOffsets(324, n, big))
	counts = len(es)
	es = append(es, tiffOffsets(325, n, big))
	es = append(es, tiffShort(339, format))
	if li == 0 {
		es = append(es,
			tiffDouble(33550, img.res, img.res, 0),
			tiffDouble(33922, 0, 0, 0, img.west, img.north, 0),
			tiffShort(34735, tiffGeoKeys...),
			tiffDouble(34736, tiffGeoDoubles...),
			tiffASCIIEntry(34737, tiffGeoASCII))
		if img.metadata != "" {
			es = append(es, tiffASCIIEntry(42112, img.metadata))
		}
	}
	es = append(es, tiffASCIIEntry(42113, img.nodata))
	return es, offs, counts
}

// tiffIFDSize is the size of an IFD with its out-of-line values.
func tiffIFDSize(es []tiffEntry, big bool) uint64 {
	head, entry, next, inline := uint64(2), uint64(12), uint64(4), 4
	if big {
		head, entry, next, inline = 8, 20, 8, 8
	}
	n := head + entry*uint64(len(es)) + next
	for _, e := range es {
		if len(e.data) > inline {
			n += uint64(len(e.data)+1) &^ 1
		}
	}
	return n
}

// tiffAppendIFD serialises an IFD placed at pos, pointing to next.
func tiffAppendIFD(b []byte, es []tiffEntry, pos, next uint64, big bool) []byte {
	le := binary.LittleEndian
	head, entry, nextSize, inline := uint64(2), uint64(12), uint64(4), 4
	if big {
		head, entry, nextSize, inline = 8, 20, 8, 8
	}
	blob := pos + head + entry*uint64(len(es)) + nextSize
	if big {
		b = le.AppendUint64(b, uint64(len(es)))
	} else {
		b = le.AppendUint16(b, uint16(len(es)))
	}
	var extra []byte
	for _, e := range es {
		b = le.AppendUint16(b, e.tag)
		b = le.AppendUint16(b, e.typ)
		if big {
			b = le.AppendUint64(b, e.count)
		} else {
			b = le.AppendUint32(b, uint32(e.count))
		}
		if len(e.data) <= inline {
			v := make([]byte, inline)
			copy(v, e.data)
			b = append(b, v...)
			continue
		}
		at := blob + uint64(len(extra))
		if big {
			b = le.AppendUint64(b, at)
		} else {
			b = le.AppendUint32(b, uint32(at))
		}
		extra = append(extra, e.data...)
		if len(e.data)%2 == 1 {
			extra = append(extra, 0)
		}
	}
	if big {
		b = le.AppendUint64(b, next)
	} else {
		b = le.AppendUint32(b, uint32(next))
	}
	return append(b, extra...)
}

// tiffLayout computes where everything goes and returns the header, ghost
// and IFD bytes, and the total file size. The Cloud Optimized layout (OGC
// 21-026 clause 7; GDAL's COG driver): header, ghost block, the IFD of the
// full image then those of the overviews from largest to smallest, then the
// tiles of the smallest overview first and of the full image last, each
// tile row-major with a 4-byte size leader and a 4-byte trailer.
func tiffLayout(img *tiffImage, t int, big bool) (head []byte, size uint64) {
	le := binary.LittleEndian
	hdr := uint64(8)
	if big {
		hdr = 16
	}
	pos := hdr + uint64(len(tiffGhost))
	pos += pos & 1
	type ifd struct {
		es           []tiffEntry
		offs, counts int
		at           uint64
	}
	ifds := make([]ifd, len(img.levels))
	for i := range img.levels {
		es, o, c := tiffEntries(img, i, t, big)
		ifds[i] = ifd{es, o, c, pos}
		pos += tiffIFDSize(es, big)
	}
	for i := len(img.levels) - 1; i >= 0; i-- {
		d := &ifds[i]
		l := img.levels[i]
		for k := range l.tiles {
			n := uint64(l.tileLen(k))
			pos += 4 // leader
			tiffPutOffset(&d.es[d.offs], k, pos)
			tiffPutOffset(&d.es[d.counts], k, n)
			pos += n + 4 // tile and trailer
		}
	}
	size = pos
	if big {
		head = append(head, 'I', 'I', 43, 0, 8, 0, 0, 0)
		head = le.AppendUint64(head, ifds[0].at)
	} else {
		head = append(head, 'I', 'I', 42, 0)
		head = le.AppendUint32(head, uint32(ifds[0].at))
	}
	head = append(head, tiffGhost...)
	for uint64(len(head)) < ifds[0].at {
		head = append(head, 0)
	}
	for i, d := range ifds {
		next := uint64(0)
		if i+1 < len(ifds) {
			next = ifds[i+1].at
		}
		head = tiffAppendIFD(head, d.es, d.at, next, big)
	}
	return head, size
}

// tiffClassicLimit is the largest file a classic TIFF can address (32-bit
// offsets, TIFF 6.0 section 2).
const tiffClassicLimit = math.MaxUint32

// tiffChooseBig decides on BigTIFF from the classic layout's size.
func tiffChooseBig(classicSize uint64, mode int) (bool, error) {
	switch {
	case mode > 0:
		return true, nil
	case classicSize <= tiffClassicLimit:
		return false, nil
	case mode < 0:
		return false, fmt.Errorf("geotiff: the file would be %d bytes, past the 4 GiB of a classic TIFF, and BigTIFF is off", classicSize)
	}
	return true, nil
}

// tiffWrite lays out the compressed image and writes it to w.
func tiffWrite(w io.Writer, img *tiffImage, opt Options) error {
	head, size := tiffLayout(img, opt.TileSize, false)
	big, err := tiffChooseBig(size, opt.BigTIFF)
	if err != nil {
		return err
	}
	if big {
		head, size = tiffLayout(img, opt.TileSize, true)
	}
	cw := &tiffCountWriter{w: w}
	bw := bufio.NewWriterSize(cw, 1<<16)
	if _, err := bw.Write(head); err != nil {
		return fmt.Errorf("geotiff: write header: %w", err)
	}
	var lead [4]byte
	var buf []byte
	for i := len(img.levels) - 1; i >= 0; i-- {
		l := img.levels[i]
		for k, tile := range l.tiles {
			if tile == nil {
				sp := l.spill[k]
				if cap(buf) < int(sp.n) {
					buf = make([]byte, sp.n)
				}
				tile = buf[:sp.n]
				if _, err := img.spillFile.ReadAt(tile, sp.off); err != nil {
					return fmt.Errorf("geotiff: read back tile %d of level %d: %w", k, i, err)
				}
			}
			binary.LittleEndian.PutUint32(lead[:], uint32(len(tile)))
			bw.Write(lead[:])
			bw.Write(tile)
			if _, err := bw.Write(tile[len(tile)-4:]); err != nil {
				return fmt.Errorf("geotiff: write tiles of level %d: %w", i, err)
			}
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("geotiff: write: %w", err)
	}
	if cw.n != size {
		return fmt.Errorf("geotiff: internal error: wrote %d bytes, layout planned %d", cw.n, size)
	}
	return nil
}

// tiffCountWriter counts the bytes that reach the destination.
type tiffCountWriter struct {
	w io.Writer
	n uint64
}

func (c *tiffCountWriter) Write(p []byte) (int, error) {
	n, err := c.w.Write(p)
	c.n += uint64(n)
	return n, err
}
