package geotiff

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/klauspost/compress/zlib"

	"drygrid/grid"
)

// ReadBands reads a band raster (UInt8 codes) from a GeoTIFF such as
// bands.tif. See DecodeBands for what is supported.
func ReadBands(path string) (*grid.Uint8, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("geotiff %s: %w", path, err)
	}
	return DecodeBands(path, data)
}

// ReadIndex reads an index raster (Float32 z) from a GeoTIFF such as
// index.tif. See DecodeBands for what is supported.
func ReadIndex(path string) (*grid.Float32, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("geotiff %s: %w", path, err)
	}
	return DecodeIndex(path, data)
}

// DecodeBands decodes a band raster from GeoTIFF bytes; name is used in
// errors. It is a minimal reader for the rasters drygrid and GDAL write:
// classic TIFF (not BigTIFF), either byte order, the first IFD only (COG
// overviews are ignored), one sample per pixel, tiled or stripped,
// uncompressed or DEFLATE (compression 8 or 32946), predictor 1, 2 or 3,
// UInt8 samples, georeferenced on EPSG:4326 by ModelPixelScale and
// ModelTiepoint (PixelIsArea or PixelIsPoint) with square cells that fit
// grid.Spec. No data comes from the GDAL_NODATA tag (0 without one).
// Anything else is refused with an error naming the file and what is wrong.
func DecodeBands(name string, data []byte) (*grid.Uint8, error) {
	img, err := tiffrDecode(name, data, 8)
	if err != nil {
		return nil, err
	}
	r := &grid.Uint8{Spec: img.spec, Data: img.pix}
	if img.nodata != "" {
		v, err := strconv.Atoi(strings.TrimSpace(img.nodata))
		if err != nil || v < 0 || v > 255 {
			return nil, fmt.Errorf("geotiff %s: GDAL_NODATA %q is not a UInt8 value", name, img.nodata)
		}
		r.NoData = uint8(v)
	}
	return r, nil
}

// DecodeIndex decodes an index raster (Float32 samples) from GeoTIFF
// bytes, as DecodeBands does for UInt8. No data comes from GDAL_NODATA
// (-9999 without one; NaN cells always count as no data).
func DecodeIndex(name string, data []byte) (*grid.Float32, error) {
	img, err := tiffrDecode(name, data, 32)
	if err != nil {
		return nil, err
	}
	r := &grid.Float32{Spec: img.spec, Data: make([]float32, len(img.pix)/4), NoData: grid.NoDataIndex}
	for i := range r.Data {
		r.Data[i] = math.Float32frombits(img.order.Uint32(img.pix[4*i:]))
	}
	if img.nodata != "" {
		v, err := strconv.ParseFloat(strings.TrimSpace(img.nodata), 64)
		if err != nil {
			return nil, fmt.Errorf("geotiff %s: GDAL_NODATA %q is not a number", name, img.nodata)
		}
		r.NoData = float32(v)
	}
	return r, nil
}

// TIFF tags read here (TIFF 6.0; GeoTIFF, OGC 19-008r4; GDAL).
const (
	tiffrImageWidth      = 256
	tiffrImageLength     = 257
	tiffrBitsPerSample   = 258
	tiffrCompression     = 259
	tiffrStripOffsets    = 273
	tiffrSamplesPerPixel = 277
	tiffrRowsPerStrip    = 278
	tiffrStripByteCounts = 279
	tiffrPlanarConfig    = 284
	tiffrPredictor       = 317
	tiffrTileWidth       = 322
	tiffrTileLength      = 323
	tiffrTileOffsets     = 324
	tiffrTileByteCounts  = 325
	tiffrSampleFormat    = 339
	tiffrPixelScale      = 33550
	tiffrTiepoint        = 33922
	tiffrTransformation  = 34264
	tiffrGeoKeys         = 34735
	tiffrGDALNoData      = 42113
)

// tiffrMaxCells bounds the raster size (a global grid at 0.005 deg is
// 2.6 G cells; drygrid's own limit is far lower).
const tiffrMaxCells = 1 << 31

type tiffrField struct {
	typ   uint16
	count uint64
	raw   []byte // the value bytes, in file order
}

type tiffrImage struct {
	spec   grid.Spec
	pix    []byte // samples in file byte order, row-major
	order  binary.ByteOrder
	nodata string
}

type tiffrFile struct {
	name   string
	data   []byte
	order  binary.ByteOrder
	fields map[uint16]tiffrField
}

func (f *tiffrFile) errf(format string, a ...any) error {
	return fmt.Errorf("geotiff %s: %s", f.name, fmt.Sprintf(format, a...))
}

var tiffrTypeSize = map[uint16]uint64{1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8, 16: 8, 17: 8, 18: 8}

func tiffrParseIFD(name string, data []byte) (*tiffrFile, error) {
	f := &tiffrFile{name: name, data: data, fields: map[uint16]tiffrField{}}
	if len(data) < 8 {
		return nil, f.errf("%d bytes is too short for a TIFF header", len(data))
	}
	switch string(data[:2]) {
	case "II":
		f.order = binary.LittleEndian
	case "MM":
		f.order = binary.BigEndian
	default:
		return nil, f.errf("not a TIFF file (no II or MM byte-order mark)")
	}
	switch f.order.Uint16(data[2:]) {
	case 42:
	case 43:
		return nil, f.errf("BigTIFF is not supported by this reader (use a classic TIFF under 4 GiB)")
	default:
		return nil, f.errf("not a TIFF file (version %d, want 42)", f.order.Uint16(data[2:]))
	}
	off := uint64(f.order.Uint32(data[4:]))
	if off < 8 || off+2 > uint64(len(data)) {
		return nil, f.errf("first IFD offset %d lies outside the %d-byte file", off, len(data))
	}
	n := uint64(f.order.Uint16(data[off:]))
	if off+2+12*n > uint64(len(data)) {
		return nil, f.errf("first IFD of %d entries runs past the end of the file", n)
	}
	for i := uint64(0); i < n; i++ {
		e := data[off+2+12*i:]
		tag, typ := f.order.Uint16(e), f.order.Uint16(e[2:])
		count := uint64(f.order.Uint32(e[4:]))
		size, ok := tiffrTypeSize[typ]
		if !ok {
			continue // unknown types are skipped, as TIFF 6.0 asks
		}
		total := size * count
		var raw []byte
		if total <= 4 {
			raw = e[8 : 8+total]
		} else {
			vo := uint64(f.order.Uint32(e[8:]))
			if vo > uint64(len(data)) || total > uint64(len(data))-vo {
				return nil, f.errf("tag %d: %d values at offset %d run past the end of the file", tag, count, vo)
			}
			raw = data[vo : vo+total]
		}
		f.fields[tag] = tiffrField{typ: typ, count: count, raw: raw}
	}
	return f, nil
}

// uints reads an integer field (BYTE, SHORT or LONG).
func (f *tiffrFile) uints(tag uint16) ([]uint64, bool, error) {
	fd, ok := f.fields[tag]
	if !ok {
		return nil, false, nil
	}
	out := make([]uint64, 0, fd.count)
	for i := uint64(0); i < fd.count; i++ {
		switch fd.typ {
		case 1:
			out = append(out, uint64(fd.raw[i]))
		case 3:
			out = append(out, uint64(f.order.Uint16(fd.raw[2*i:])))
		case 4:
			out = append(out, uint64(f.order.Uint32(fd.raw[4*i:])))
		case 16:
			out = append(out, f.order.Uint64(fd.raw[8*i:]))
		default:
			return nil, true, f.errf("tag %d has type %d, want an unsigned integer", tag, fd.typ)
		}
	}
	return out, true, nil
}

func (f *tiffrFile) uint1(tag uint16, def uint64, required bool) (uint64, error) {
	v, ok, err := f.uints(tag)
	if err != nil {
		return 0, err
	}
	if !ok {
		if required {
			return 0, f.errf("required tag %d is missing", tag)
		}
		return def, nil
	}
	if len(v) == 0 {
		return 0, f.errf("tag %d holds no value", tag)
	}
	for _, x := range v[1:] {
		if x != v[0] {
			return 0, f.errf("tag %d differs between samples (%v)", tag, v)
		}
	}
	return v[0], nil
}

func (f *tiffrFile) doubles(tag uint16) ([]float64, bool, error) {
	fd, ok := f.fields[tag]
	if !ok {
		return nil, false, nil
	}
	if fd.typ != 12 {
		return nil, true, f.errf("tag %d has type %d, want DOUBLE", tag, fd.typ)
	}
	out := make([]float64, fd.count)
	for i := range out {
		out[i] = math.Float64frombits(f.order.Uint64(fd.raw[8*i:]))
	}
	return out, true, nil
}

func tiffrDecode(name string, data []byte, wantBits uint64) (*tiffrImage, error) {
	f, err := tiffrParseIFD(name, data)
	if err != nil {
		return nil, err
	}
	width, err := f.uint1(tiffrImageWidth, 0, true)
	if err != nil {
		return nil, err
	}
	height, err := f.uint1(tiffrImageLength, 0, true)
	if err != nil {
		return nil, err
	}
	if width == 0 || height == 0 || width > tiffrMaxCells || height > tiffrMaxCells || width*height > tiffrMaxCells {
		return nil, f.errf("raster size %d x %d is empty or over %d cells", width, height, tiffrMaxCells)
	}
	spp, err := f.uint1(tiffrSamplesPerPixel, 1, false)
	if err != nil {
		return nil, err
	}
	if spp != 1 {
		return nil, f.errf("%d samples per pixel: want a single-band raster", spp)
	}
	if pc, err := f.uint1(tiffrPlanarConfig, 1, false); err != nil {
		return nil, err
	} else if pc != 1 && pc != 2 {
		return nil, f.errf("planar configuration %d is not 1 or 2", pc)
	}
	bps, err := f.uint1(tiffrBitsPerSample, 1, false)
	if err != nil {
		return nil, err
	}
	sf, err := f.uint1(tiffrSampleFormat, 1, false)
	if err != nil {
		return nil, err
	}
	want := map[uint64]string{8: "UInt8 (band codes)", 32: "Float32 (index z)"}[wantBits]
	wantSF := uint64(1)
	if wantBits == 32 {
		wantSF = 3
	}
	if bps != wantBits || sf != wantSF {
		return nil, f.errf("samples are %s, want %s", tiffrSampleName(bps, sf), want)
	}
	comp, err := f.uint1(tiffrCompression, 1, false)
	if err != nil {
		return nil, err
	}
	if comp != 1 && comp != 8 && comp != 32946 {
		return nil, f.errf("compression %d is not supported (only none 1 and DEFLATE 8/32946)", comp)
	}
	pred, err := f.uint1(tiffrPredictor, 1, false)
	if err != nil {
		return nil, err
	}
	if pred < 1 || pred > 3 || (pred == 3 && bps != 32) {
		return nil, f.errf("predictor %d is not supported for %d-bit samples", pred, bps)
	}
	spec, err := tiffrSpec(f, int(width), int(height))
	if err != nil {
		return nil, err
	}

	// Chunk layout: tiles or strips.
	var cw, ch uint64 // chunk width and height in pixels
	var offs, counts []uint64
	_, tiled := f.fields[tiffrTileWidth]
	if tiled {
		if cw, err = f.uint1(tiffrTileWidth, 0, true); err != nil {
			return nil, err
		}
		if ch, err = f.uint1(tiffrTileLength, 0, true); err != nil {
			return nil, err
		}
		if cw == 0 || ch == 0 || cw > 1<<16 || ch > 1<<16 {
			return nil, f.errf("tile size %d x %d is not usable", cw, ch)
		}
		offs, _, err = f.uints(tiffrTileOffsets)
		if err == nil {
			counts, _, err = f.uints(tiffrTileByteCounts)
		}
	} else {
		cw = width
		if ch, err = f.uint1(tiffrRowsPerStrip, height, false); err != nil {
			return nil, err
		}
		ch = min(max(ch, 1), height)
		offs, _, err = f.uints(tiffrStripOffsets)
		if err == nil {
			counts, _, err = f.uints(tiffrStripByteCounts)
		}
	}
	if err != nil {
		return nil, err
	}
	across, down := (width+cw-1)/cw, (height+ch-1)/ch
	nchunks := across * down
	if uint64(len(offs)) != nchunks || uint64(len(counts)) != nchunks {
		return nil, f.errf("%d chunk offsets and %d byte counts, want %d (%d x %d of %d x %d pixels)", len(offs), len(counts), nchunks, across, down, cw, ch)
	}
	bpp := bps / 8
	chunkBytes := cw * ch * bpp
	if tiled && chunkBytes > 1<<26 {
		return nil, f.errf("tiles of %d x %d pixels are too large", cw, ch)
	}
	// Refuse before allocating when the data cannot hold the raster:
	// DEFLATE expands at most about 1032 times.
	var avail uint64
	for i := range offs {
		if offs[i] > uint64(len(data)) || counts[i] > uint64(len(data))-offs[i] {
			return nil, f.errf("chunk %d at offset %d with %d bytes runs past the end of the file", i, offs[i], counts[i])
		}
		avail += counts[i]
	}
	need := width * height * bpp
	file := uint64(len(data))
	if comp == 1 && (avail < need || file < need) || comp != 1 && (avail*1040+nchunks*64 < need || file*1040 < need) {
		return nil, f.errf("the image data (%d bytes) cannot hold %d x %d samples", avail, width, height)
	}

	img := &tiffrImage{spec: spec, order: f.order, pix: make([]byte, need)}
	if nd, ok := f.fields[tiffrGDALNoData]; ok && nd.typ == 2 {
		img.nodata = strings.TrimRight(string(nd.raw), "\x00")
	}
	buf := make([]byte, chunkBytes)
	var zr io.ReadCloser
	for i := uint64(0); i < nchunks; i++ {
		cx, cy := i%across, i/across
		rows := ch
		if cy*ch+rows > height {
			rows = height - cy*ch
		}
		if counts[i] == 0 { // sparse chunk (GDAL SPARSE_OK): no data
			tiffrFillNoData(img, cx*cw, cy*ch, min(cw, width-cx*cw), rows, width, bpp)
			continue
		}
		src := data[offs[i] : offs[i]+counts[i]]
		// A strip holds only its rows; a tile always holds a whole tile.
		size := chunkBytes
		if !tiled {
			size = cw * rows * bpp
		}
		chunk := buf[:size]
		switch comp {
		case 1:
			if uint64(len(src)) < size {
				return nil, f.errf("chunk %d holds %d bytes, want %d", i, len(src), size)
			}
			copy(chunk, src)
		default:
			if zr == nil {
				zr, err = zlib.NewReader(bytes.NewReader(src))
			} else {
				err = zr.(zlib.Resetter).Reset(bytes.NewReader(src), nil)
			}
			if err != nil {
				return nil, f.errf("chunk %d: DEFLATE: %v", i, err)
			}
			if n, err := io.ReadFull(zr, chunk); err != nil {
				return nil, f.errf("chunk %d: DEFLATE data gives %d of %d bytes: %v", i, n, size, err)
			}
		}
		if err := tiffrUnpredict(chunk, int(cw), int(bpp), pred, f.order); err != nil {
			return nil, f.errf("chunk %d: %v", i, err)
		}
		// Copy the chunk's pixels that lie inside the image.
		x0, y0 := cx*cw, cy*ch
		ncols := min(cw, width-x0)
		for r := uint64(0); r < rows; r++ {
			dst := ((y0+r)*width + x0) * bpp
			copy(img.pix[dst:dst+ncols*bpp], chunk[r*cw*bpp:])
		}
	}
	return img, nil
}

func tiffrSampleName(bps, sf uint64) string {
	kind := map[uint64]string{1: "UInt", 2: "Int", 3: "Float", 4: "untyped "}[sf]
	if kind == "" {
		kind = fmt.Sprintf("sample format %d, ", sf)
	}
	return fmt.Sprintf("%s%d", kind, bps)
}

func tiffrFillNoData(img *tiffrImage, x0, y0, ncols, rows, width, bpp uint64) {
	var cell [4]byte
	if bpp == 1 {
		v, err := strconv.Atoi(strings.TrimSpace(img.nodata))
		if err == nil && v >= 0 && v < 256 {
			cell[0] = byte(v)
		}
	} else {
		v := float64(grid.NoDataIndex)
		if x, err := strconv.ParseFloat(strings.TrimSpace(img.nodata), 64); err == nil {
			v = x
		}
		img.order.PutUint32(cell[:], math.Float32bits(float32(v)))
	}
	for r := uint64(0); r < rows; r++ {
		for c := uint64(0); c < ncols; c++ {
			copy(img.pix[((y0+r)*width+x0+c)*bpp:], cell[:bpp])
		}
	}
}

// tiffrUnpredict undoes the TIFF predictor on a chunk of rows of w samples:
// 2 is horizontal differencing of whole samples (TIFF 6.0 section 14), 3 the
// floating-point predictor (Adobe Photoshop TIFF Technical Note 3): bytes
// differenced along the row, samples stored as byte planes, most
// significant first. Samples end up in the file's byte order.
func tiffrUnpredict(b []byte, w, bpp int, pred uint64, order binary.ByteOrder) error {
	rowBytes := w * bpp
	if rowBytes == 0 || len(b)%rowBytes != 0 {
		return fmt.Errorf("chunk of %d bytes is not whole rows of %d", len(b), rowBytes)
	}
	switch pred {
	case 1:
	case 2:
		for r := 0; r < len(b); r += rowBytes {
			row := b[r : r+rowBytes]
			switch bpp {
			case 1:
				for i := 1; i < len(row); i++ {
					row[i] += row[i-1]
				}
			case 4:
				prev := order.Uint32(row)
				for i := 4; i < len(row); i += 4 {
					prev += order.Uint32(row[i:])
					order.PutUint32(row[i:], prev)
				}
			}
		}
	case 3:
		tmp := make([]byte, rowBytes)
		for r := 0; r < len(b); r += rowBytes {
			row := b[r : r+rowBytes]
			for i := 1; i < len(row); i++ {
				row[i] += row[i-1]
			}
			copy(tmp, row)
			for i := 0; i < w; i++ {
				var v uint32
				for k := 0; k < bpp; k++ {
					v = v<<8 | uint32(tmp[k*w+i])
				}
				order.PutUint32(row[4*i:], v)
			}
		}
	}
	return nil
}

// GeoKeys (OGC 19-008r4 section 7.1).
const (
	tiffrKeyModelType  = 1024
	tiffrKeyRasterType = 1025
	tiffrKeyGeographic = 2048
	tiffrKeyProjected  = 3072
)

// tiffrSpec reads the georeferencing into a grid.Spec.
func tiffrSpec(f *tiffrFile, width, height int) (grid.Spec, error) {
	if _, ok := f.fields[tiffrTransformation]; ok {
		if _, ok := f.fields[tiffrPixelScale]; !ok {
			return grid.Spec{}, f.errf("georeferenced by ModelTransformation: only ModelPixelScale + ModelTiepoint (no rotation) is supported")
		}
	}
	keys, ok, err := f.uints(tiffrGeoKeys)
	if err != nil {
		return grid.Spec{}, err
	}
	if !ok || len(keys) < 4 {
		return grid.Spec{}, f.errf("no GeoKeyDirectory: not a GeoTIFF (want EPSG:4326)")
	}
	n := int(keys[3])
	if len(keys) < 4+4*n {
		return grid.Spec{}, f.errf("GeoKeyDirectory holds %d keys but only %d values", n, len(keys))
	}
	pointRaster := false
	var geog, model, projected uint64
	for k := 0; k < n; k++ {
		e := keys[4+4*k : 8+4*k]
		id, loc, val := e[0], e[1], e[3]
		if loc != 0 {
			continue // values held in other tags (citations, doubles): not needed
		}
		switch id {
		case tiffrKeyModelType:
			model = val
		case tiffrKeyRasterType:
			pointRaster = val == 2
		case tiffrKeyGeographic:
			geog = val
		case tiffrKeyProjected:
			projected = val
		}
	}
	if projected != 0 {
		return grid.Spec{}, f.errf("projected CRS EPSG:%d: want EPSG:4326 longitude-latitude", projected)
	}
	if model != 0 && model != 2 {
		return grid.Spec{}, f.errf("model type %d is not geographic (2): want EPSG:4326 longitude-latitude", model)
	}
	if geog != 4326 {
		return grid.Spec{}, f.errf("geographic CRS code %d: want EPSG:4326", geog)
	}
	scale, ok, err := f.doubles(tiffrPixelScale)
	if err != nil {
		return grid.Spec{}, err
	}
	if !ok || len(scale) < 2 {
		return grid.Spec{}, f.errf("no ModelPixelScale tag")
	}
	tie, ok, err := f.doubles(tiffrTiepoint)
	if err != nil {
		return grid.Spec{}, err
	}
	if !ok || len(tie) < 6 {
		return grid.Spec{}, f.errf("no ModelTiepoint tag")
	}
	sx, sy := scale[0], scale[1]
	if !(sx > 0) || !(sy > 0) || math.IsInf(sx, 0) || math.IsInf(sy, 0) || math.Abs(sx-sy) > 1e-9*sx {
		return grid.Spec{}, f.errf("pixel scale %g x %g: want equal positive cell sizes", sx, sy)
	}
	res := tiffrSnapRes(sx)
	west := tie[3] - tie[0]*sx
	north := tie[4] + tie[1]*sy
	if pointRaster { // tiepoint at the centre of the first cell
		west -= sx / 2
		north += sy / 2
	}
	west, north = tiffrSnap(west, res), tiffrSnap(north, res)
	if math.IsNaN(west) || math.IsNaN(north) || west < -180-1e-9 || west >= 180 || north > 90+1e-9 ||
		north-float64(height)*res < -90-1e-9 || float64(width)*res > 360+1e-9 {
		return grid.Spec{}, f.errf("extent west %g north %g, %d x %d cells of %g deg does not fit a lat-lon grid", west, north, width, height, res)
	}
	return grid.Spec{West: max(west, -180), North: min(north, 90), Res: res, Cols: width, Rows: height}, nil
}

// tiffrSnapRes turns a stored 0.1 (or 0.25, 1/12...) into the double that
// grid.NewSpec makes, so specs compare equal.
func tiffrSnapRes(res float64) float64 {
	if inv := math.Round(1 / res); inv >= 1 && math.Abs(1/res-inv) < 1e-9*inv {
		return 1 / inv
	}
	return res
}

// tiffrSnap rounds an edge within 1e-6 cells of a multiple of res onto it,
// computed as grid.NewSpec does (k / (1/res) when 1/res is whole).
func tiffrSnap(v, res float64) float64 {
	k := math.Round(v / res)
	if math.Abs(v/res-k) > 1e-6 {
		return v
	}
	if inv := math.Round(1 / res); inv >= 1 && math.Abs(1/res-inv) < 1e-9*inv {
		return k / inv
	}
	return k * res
}
