package geotiff

import (
	"bytes"
	"drygrid/internal/pool"
	"encoding/binary"
	"fmt"
	"math"
)

// tiffLevel is one resolution of the image: the full raster (level 0) or an
// overview, with its tiles once compressed.
type tiffLevel struct {
	cols, rows int
	f32        []float32  // Float32 images
	u8         []uint8    // UInt8 images
	tiles      [][]byte   // compressed tiles, row-major (nil entries when spilled)
	spill      []tiffSpan // where the spilled tiles are (nil when none is)
}

// tiffSpan is where a spilled compressed tile lies in the spill file.
type tiffSpan struct {
	off int64
	n   int64
}

// tileLen is the compressed size of tile k.
func (l *tiffLevel) tileLen(k int) int {
	if l.tiles[k] == nil {
		return int(l.spill[k].n)
	}
	return len(l.tiles[k])
}

func (l *tiffLevel) tilesAcross(t int) int { return cogCeilDiv(l.cols, t) }
func (l *tiffLevel) tilesDown(t int) int   { return cogCeilDiv(l.rows, t) }

// tiffFillFloatTile writes tile (tx, ty) of l into buf (4*t*t bytes) with
// the floating-point predictor of TIFF Technical Note 3 (Adobe, 2005,
// "Adobe Photoshop TIFF Technical Note 3", Predictor = 3) applied row by
// row: the bytes of each row's samples are regrouped most significant byte
// first (all first bytes, then all second bytes, ...) and then each byte is
// replaced by its difference from the previous byte of the row, exactly as
// libtiff's fpDiff does. Cells outside the image are padded with nodata, and
// NaN cells are written as nodata.
func tiffFillFloatTile(l *tiffLevel, t, tx, ty int, nodata float32, buf []byte) {
	nd := math.Float32bits(nodata)
	for r := 0; r < t; r++ {
		out := buf[r*4*t : (r+1)*4*t]
		y := ty*t + r
		x0 := tx * t
		n := 0 // cells of this tile row inside the image
		if y < l.rows && x0 < l.cols {
			n = min(t, l.cols-x0)
			row := l.f32[y*l.cols+x0 : y*l.cols+x0+n]
			// The four byte planes as slices of the row's length, so the
			// loop needs no bounds checks.
			p0, p1, p2, p3 := out[:n], out[t:t+n], out[2*t:2*t+n], out[3*t:3*t+n]
			p0, p1, p2, p3 = p0[:len(row)], p1[:len(row)], p2[:len(row)], p3[:len(row)]
			for j, v := range row {
				b := math.Float32bits(v)
				if v != v {
					b = nd
				}
				p0[j], p1[j], p2[j], p3[j] = byte(b>>24), byte(b>>16), byte(b>>8), byte(b)
			}
		}
		for j := n; j < t; j++ {
			out[j], out[t+j], out[2*t+j], out[3*t+j] = byte(nd>>24), byte(nd>>16), byte(nd>>8), byte(nd)
		}
		tiffByteDiff(out)
	}
}

// tiffByteDiff replaces each byte of b but the first by its difference
// (modulo 256) from the byte before it, as
// "for i := len(b) - 1; i > 0; i-- { b[i] -= b[i-1] }" does, eight bytes
// at a time: each little-endian word w is subtracted bytewise from w
// shifted up by one byte with the last byte of the word before in the
// hole, without borrows between bytes (the subtraction of packed bytes,
// Warren, "Hacker's Delight", 2nd ed., section 2-18).
func tiffByteDiff(b []byte) {
	const hi = 0x8080808080808080
	var prev uint64 // last byte of the previous original word
	i := 0
	for ; i+8 <= len(b); i += 8 {
		w := binary.LittleEndian.Uint64(b[i:])
		s := w<<8 | prev
		prev = w >> 56
		binary.LittleEndian.PutUint64(b[i:], ((w|hi)-(s&^hi))^((w^^s)&hi))
	}
	p := byte(prev)
	if i == 0 && len(b) > 0 {
		p, i = b[0], 1
	}
	for ; i < len(b); i++ {
		p, b[i] = b[i], b[i]-p
	}
}

// tiffFillByteTile writes tile (tx, ty) of l into buf (t*t bytes), padded
// with nodata, with horizontal differencing (TIFF 6.0 section 14, Predictor
// = 2) when predict is set.
func tiffFillByteTile(l *tiffLevel, t, tx, ty int, nodata uint8, predict bool, buf []byte) {
	for r := 0; r < t; r++ {
		out := buf[r*t : (r+1)*t]
		y := ty*t + r
		x0 := tx * t
		n := 0
		if y < l.rows && x0 < l.cols {
			n = copy(out, l.u8[y*l.cols+x0:y*l.cols+min(x0+t, l.cols)])
		}
		for j := n; j < t; j++ {
			out[j] = nodata
		}
		if predict {
			tiffByteDiff(out)
		}
	}
}

// tiffCompressTiles fills and DEFLATE-compresses (zlib stream, TIFF
// compression 8) every tile of every level on opt.Workers goroutines.
func tiffCompressTiles(levels []*tiffLevel, img *tiffImage, opt Options) error {
	t := opt.TileSize
	var jobs []tiffTileJob
	for li, l := range levels {
		ta, td := l.tilesAcross(t), l.tilesDown(t)
		l.tiles = make([][]byte, ta*td)
		for ty := 0; ty < td; ty++ {
			for tx := 0; tx < ta; tx++ {
				jobs = append(jobs, tiffTileJob{img: img, li: li, dst: l, src: l, tx: tx, ty: ty, slot: ty*ta + tx})
			}
		}
	}
	return tiffCompressJobs(jobs, opt, nil)
}

// tiffTileJob is one tile to compress: tile (tx, ty) of the pixels in src,
// stored as dst.tiles[slot]; li is the level, for messages. src is the
// whole level, or (for the row encoders) one tile row of it with ty 0.
type tiffTileJob struct {
	img      *tiffImage
	li       int
	dst, src *tiffLevel
	tx, ty   int
	slot     int
}

// tiffCompressors are the per-goroutine states of tiffCompressJobs (a tile
// buffer and a zlib encoder), kept between calls by the row encoders so
// that each block of rows does not allocate them again.
type tiffCompressors struct {
	level, tile int
	states      []*tiffCompressor
}

type tiffCompressor struct {
	raw []byte
	zw  *zlibEncoder
	err error
}

// get returns n states for opt, made or reused.
func (c *tiffCompressors) get(n int, opt Options) ([]*tiffCompressor, error) {
	if c.level != opt.Level || c.tile != opt.TileSize {
		*c = tiffCompressors{level: opt.Level, tile: opt.TileSize}
	}
	for len(c.states) < n {
		zw, err := newZlibEncoder(opt.Level)
		if err != nil {
			return nil, fmt.Errorf("geotiff: deflate level %d: %w", opt.Level, err)
		}
		c.states = append(c.states, &tiffCompressor{raw: make([]byte, opt.TileSize*opt.TileSize*4), zw: zw})
	}
	for _, s := range c.states[:n] {
		s.err = nil
	}
	return c.states[:n], nil
}

// tiffCompressJobs fills and compresses the tiles of jobs on opt.Workers
// goroutines, with states from cache (nil: made for this call). Each tile
// is always compressed alone by one goroutine with a fresh stream, so the
// bytes do not depend on the number of workers.
func tiffCompressJobs(jobs []tiffTileJob, opt Options, cache *tiffCompressors) error {
	if len(jobs) == 0 {
		return nil
	}
	t := opt.TileSize
	workers := min(opt.Workers, len(jobs))
	if cache == nil {
		cache = &tiffCompressors{}
	}
	states, err := cache.get(max(workers, 1), opt)
	if err != nil {
		return err
	}
	// Each worker takes jobs from a shared counter (pool.Run) with the
	// compressor state of its own number.
	pool.Run(len(jobs), workers, 1, func(w, i, _ int) {
		s := states[w]
		if s.err != nil {
			return
		}
		j := jobs[i]
		img := j.img
		raw := s.raw[:t*t*img.bytesPerSample()]
		if img.float {
			tiffFillFloatTile(j.src, t, j.tx, j.ty, img.nodataF, raw)
		} else {
			tiffFillByteTile(j.src, t, j.tx, j.ty, img.nodataU, img.predictor == 2, raw)
		}
		z, err := s.zw.encode(raw)
		if err != nil {
			s.err = fmt.Errorf("geotiff: compress tile %d of level %d: %w", j.slot, j.li, err)
			return
		}
		j.dst.tiles[j.slot] = bytes.Clone(z)
	})
	for _, s := range states {
		if s.err != nil {
			return s.err
		}
	}
	return nil
}
