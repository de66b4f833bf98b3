package geotiff

import (
	"bufio"
	"cmp"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/publish"
)

// RowFunc fills index, which holds n rows of the grid (n * Cols values,
// row-major, row 0 = north), with rows row0 .. row0+n-1 of the index
// raster and, when codes is not nil (a band file is written), codes with
// the band codes of the same cells (0 = no data). The row encoders call it
// one call at a time, with row0 increasing from 0 in steps of the tile
// size; n is the tile size except for the last block. It may use all
// cores inside the call. A returned error stops the encoding and is passed
// back, wrapped.
type RowFunc func(row0, n int, index []float32, codes []uint8) error

// EncodeIndexRows writes the same bytes as EncodeIndex on the
// raster whose rows produce gives, without holding that raster: rows come
// in blocks of opt.TileSize rows, each block's tiles are compressed as it
// arrives (only compressed tiles are kept) and the overview levels are
// accumulated row by row. Memory is the compressed file plus a few blocks
// of rows.
func EncodeIndexRows(w io.Writer, spec grid.Spec, nodata float32, produce RowFunc, opt Options) error {
	return EncodeIndexBandsRows(w, nil, spec, nodata, nil, produce, opt)
}

// EncodeIndexBandsRows makes the index GeoTIFF and the band GeoTIFF from
// one pass over the rows produce gives (see EncodeIndexRows). index gets
// the bytes EncodeIndex writes for the index raster, bands those
// EncodeBands writes for the band raster of the codes, with s's colours
// and no data 0. Either writer may be nil to skip that file; s may be nil
// only when bands is. Both files are written after the last row is
// produced, index first.
func EncodeIndexBandsRows(index, bands io.Writer, spec grid.Spec, nodata float32, s *bands.Scheme, produce RowFunc, opt Options) error {
	st, opt, err := runRows(index != nil, bands != nil, spec, nodata, s, produce, opt)
	if err != nil {
		return err
	}
	defer st.close()
	if index != nil {
		if err := tiffWrite(index, st.fimg, opt); err != nil {
			return err
		}
	}
	if bands != nil {
		return tiffWrite(bands, st.bimg, opt)
	}
	return nil
}

// runRows is the row encoders' common part: it checks the arguments,
// normalises opt and runs produce through a new tiffRowState building the
// index image (wantIndex) and the band image (wantBands). The caller
// writes st.fimg and st.bimg with the options returned and closes st.
func runRows(wantIndex, wantBands bool, spec grid.Spec, nodata float32, s *bands.Scheme, produce RowFunc, opt Options) (*tiffRowState, Options, error) {
	if produce == nil {
		return nil, opt, errors.New("geotiff: nil row function")
	}
	if !wantIndex && !wantBands {
		return nil, opt, errors.New("geotiff: no output for the rows")
	}
	if wantBands && s == nil {
		return nil, opt, errors.New("geotiff: a band file asked for without a scheme")
	}
	if err := tiffCheckSpec(spec, spec.Cols*spec.Rows); err != nil {
		return nil, opt, err
	}
	opt, err := tiffNormalize(opt)
	if err != nil {
		return nil, opt, err
	}
	st := newTiffRowState(spec, nodata, s, wantIndex, wantBands, opt)
	if err := st.run(produce); err != nil {
		st.close()
		return nil, opt, err
	}
	return st, opt, nil
}

// WriteIndexRows writes EncodeIndexRows's output to path through a
// temporary file renamed at the end (publish.WriteFile), spilling the
// compressed tiles beside path unless opt.SpillDir says otherwise.
func WriteIndexRows(path string, spec grid.Spec, nodata float32, produce RowFunc, opt Options) error {
	return WriteIndexBandsRows(path, "", spec, nodata, nil, produce, opt)
}

// WriteIndexBandsRows writes the index GeoTIFF to indexPath and the band
// GeoTIFF to bandsPath (with its .aux.xml sidecar, as WriteBands does)
// from one pass over the rows (EncodeIndexBandsRows), each through a
// temporary file renamed at the end. An empty path skips that file. The
// compressed tiles wait in a temporary file in opt.SpillDir, or beside the
// output when that is empty, so memory stays at a few blocks of rows
// whatever the size of the grid.
func WriteIndexBandsRows(indexPath, bandsPath string, spec grid.Spec, nodata float32, s *bands.Scheme, produce RowFunc, opt Options) error {
	if indexPath == "" && bandsPath == "" {
		return errors.New("geotiff: no output path for the rows")
	}
	if opt.SpillDir == "" {
		opt.SpillDir = filepath.Dir(indexPath)
		if indexPath == "" {
			opt.SpillDir = filepath.Dir(bandsPath)
		}
	}
	st, opt, err := runRows(indexPath != "", bandsPath != "", spec, nodata, s, produce, opt)
	if err != nil {
		return err
	}
	defer st.close()
	if indexPath != "" {
		if err := publish.WriteFile(indexPath, func(w *bufio.Writer) error { return tiffWrite(w, st.fimg, opt) }); err != nil {
			return err
		}
	}
	if bandsPath == "" {
		return nil
	}
	if err := publish.WriteFile(bandsPath, func(w *bufio.Writer) error { return tiffWrite(w, st.bimg, opt) }); err != nil {
		return err
	}
	return writeAux(bandsPath, s, 0)
}

// tiffIndexImage is the image description of an index raster on spec
// (levels not yet filled).
func tiffIndexImage(spec grid.Spec, nodata float32, opt Options) *tiffImage {
	img := tiffNewImage(spec, opt)
	img.float = true
	img.nodataF = nodata
	img.predictor = 3
	img.nodata = tiffFormatNoData(float64(nodata))
	return img
}

// tiffBandsImage is the image description of a band raster on spec.
func tiffBandsImage(spec grid.Spec, nodata uint8, s *bands.Scheme, opt Options) *tiffImage {
	opt.Units = ""
	if opt.BandsDescription != "" {
		opt.Description = opt.BandsDescription
	}
	img := tiffNewImage(spec, opt)
	img.nodataU = nodata
	img.predictor = tiffBandsPredictor
	img.nodata = strconv.Itoa(int(nodata))
	img.colormap = tiffColorMap(s)
	return img
}

// tiffRowState is the streaming encoder's state: the images being built,
// the overview accumulators and the tile rows of each level not yet full.
type tiffRowState struct {
	spec   grid.Spec
	t      int
	nodata float32
	opt    Options
	fimg   *tiffImage // nil when the index is not wanted
	bimg   *tiffImage // nil when the bands are not wanted
	// Per overview level k (factor 2<<k): the mean and mode accumulators of
	// the overview row being built and the tile row being filled.
	fov      []*tiffMeanAcc
	bov      []*tiffModeAcc
	list     []tiffTileJob   // tiles of the current block
	comp     tiffCompressors // their compressors, kept from block to block
	compFull tiffCompressors // those of the index's full-resolution tiles

	spillDir string   // where to spill ("": never)
	inMemory int64    // bytes of compressed tiles kept in memory
	spill    *os.File // nil until the tiles pass tiffMemoryTiles
	spillW   *bufio.Writer
	spillPos int64
}

// tiffMemoryTiles is how many bytes of compressed tiles the row encoders
// keep in memory before the rest go to the spill file (Options.SpillDir):
// a global 0.1 degree index COG (25 MB) needs no file, a larger raster
// spills all but its first tiles. A variable so that tests can spill
// from the first tile.
var tiffMemoryTiles int64 = 32 << 20

func newTiffRowState(spec grid.Spec, nodata float32, s *bands.Scheme, wantIndex, wantBands bool, opt Options) *tiffRowState {
	st := &tiffRowState{spec: spec, t: opt.TileSize, nodata: nodata, opt: opt, spillDir: opt.SpillDir}
	var sizes [][2]int
	if opt.Overviews {
		sizes = cogLevelSizes(spec.Cols, spec.Rows)
	}
	mk := func(img *tiffImage) {
		img.levels = []*tiffLevel{{cols: spec.Cols, rows: spec.Rows}}
		for _, sz := range sizes {
			img.levels = append(img.levels, &tiffLevel{cols: sz[0], rows: sz[1]})
		}
		for _, l := range img.levels {
			l.tiles = make([][]byte, l.tilesAcross(st.t)*l.tilesDown(st.t))
		}
	}
	if wantIndex {
		st.fimg = tiffIndexImage(spec, nodata, opt)
		mk(st.fimg)
		for _, sz := range sizes {
			st.fov = append(st.fov, newTiffMeanAcc(sz[0], st.t, nodata))
		}
	}
	if wantBands {
		st.bimg = tiffBandsImage(spec, 0, s, opt)
		mk(st.bimg)
		m := int(s.MaxCode()) + 1
		for k, sz := range sizes {
			st.bov = append(st.bov, newTiffModeAcc(sz[0], 2<<k, st.t, m))
		}
	}
	return st
}

// close removes the spill file.
func (st *tiffRowState) close() {
	if st.spill != nil {
		st.spill.Close()
		os.Remove(st.spill.Name())
	}
}

// spillTiles keeps the tiles just compressed in memory while they fit in
// tiffMemoryTiles, and moves them to the spill file (created then) once
// they do not.
func (st *tiffRowState) spillTiles() error {
	if st.spillDir == "" {
		return nil
	}
	for _, j := range st.list {
		tile := j.dst.tiles[j.slot]
		if st.spill == nil && st.inMemory+int64(len(tile)) <= tiffMemoryTiles {
			st.inMemory += int64(len(tile))
			continue
		}
		if err := st.openSpill(); err != nil {
			return err
		}
		if j.dst.spill == nil {
			j.dst.spill = make([]tiffSpan, len(j.dst.tiles))
		}
		if _, err := st.spillW.Write(tile); err != nil {
			return fmt.Errorf("geotiff: spill compressed tiles to %s: %w", st.spill.Name(), err)
		}
		j.dst.spill[j.slot] = tiffSpan{off: st.spillPos, n: int64(len(tile))}
		j.dst.tiles[j.slot] = nil
		st.spillPos += int64(len(tile))
	}
	return nil
}

// openSpill creates the spill file, unless it is open.
func (st *tiffRowState) openSpill() error {
	if st.spill != nil {
		return nil
	}
	f, err := os.CreateTemp(st.spillDir, ".drygrid-tiles-*")
	if err != nil {
		return fmt.Errorf("geotiff: spill file for the compressed tiles: %w", err)
	}
	st.spill, st.spillW = f, bufio.NewWriterSize(f, 1<<20)
	for _, img := range []*tiffImage{st.fimg, st.bimg} {
		if img != nil {
			img.spillFile = f
		}
	}
	return nil
}

// tiffBlock is one block of rows handed from the producer to the encoder.
type tiffBlock struct {
	row0, n int
	f32     []float32
	u8      []uint8 // nil when no band file is written
	err     error
}

// run drives produce one block ahead of the encoder: while block i is
// folded into the overviews and compressed, block i+1 is being produced.
// produce is still called one call at a time, in row order.
func (st *tiffRowState) run(produce RowFunc) error {
	t, cols, rows := st.t, st.spec.Cols, st.spec.Rows
	free := make(chan tiffBlock, 2)
	for range 2 {
		b := tiffBlock{f32: make([]float32, t*cols)}
		if st.bimg != nil {
			b.u8 = make([]uint8, t*cols)
		}
		free <- b
	}
	full := make(chan tiffBlock, 1)
	stop := make(chan struct{})
	go func() {
		defer close(full)
		for row0 := 0; row0 < rows; row0 += t {
			var b tiffBlock
			select {
			case b = <-free:
			case <-stop:
				return
			}
			n := min(t, rows-row0)
			b.row0, b.n, b.f32 = row0, n, b.f32[:n*cols]
			if b.u8 != nil {
				b.u8 = b.u8[:n*cols]
			}
			if err := produce(row0, n, b.f32, b.u8); err != nil {
				b.err = fmt.Errorf("geotiff: rows %d-%d: %w", row0, row0+n-1, err)
			}
			select {
			case full <- b:
			case <-stop:
				return
			}
			if b.err != nil {
				return
			}
		}
	}()
	var err error
	for b := range full {
		if err == nil {
			err = b.err
		}
		if err == nil {
			err = st.block(b)
		}
		if err != nil {
			close(stop)
			for range full {
			}
			return err
		}
		free <- b
	}
	if st.spill != nil {
		if err := st.spillW.Flush(); err != nil {
			return fmt.Errorf("geotiff: spill compressed tiles to %s: %w", st.spill.Name(), err)
		}
	}
	return nil
}

// block folds a block of rows into the overview accumulators and
// compresses the tiles that are complete.
func (st *tiffRowState) block(b tiffBlock) error {
	cols, ty := st.spec.Cols, b.row0/st.t
	u8 := b.u8
	st.list = st.list[:0]
	last := b.row0+b.n == st.spec.Rows
	// The index's full-resolution tiles are compressed while this
	// goroutine folds the block into the overviews (at
	// the end of the raster nothing else would keep the other cores busy).
	full := make(chan error, 1)
	nFull := 0 // jobs at the head of st.list that the goroutine compresses
	if st.fimg == nil {
		full <- nil
	} else {
		st.addJobs(st.fimg, 0, &tiffLevel{cols: cols, rows: b.n, f32: b.f32}, ty)
		nFull = len(st.list)
		jobs := st.list[:nFull:nFull]
		go func() { full <- tiffCompressJobs(jobs, st.opt, &st.compFull) }()
		for y := range b.n {
			st.foldMeans(b.f32[y*cols:(y+1)*cols], last && y == b.n-1)
		}
	}
	if st.bimg != nil {
		st.addJobs(st.bimg, 0, &tiffLevel{cols: cols, rows: b.n, u8: u8}, ty)
		for y := range b.n {
			row := u8[y*cols : (y+1)*cols]
			for k, acc := range st.bov {
				acc.add(row)
				if done := acc.endRow(last && y == b.n-1); done != nil {
					st.addJobs(st.bimg, k+1, done, acc.ty-1)
				}
			}
		}
	}
	errRest := tiffCompressJobs(st.list[nFull:], st.opt, &st.comp)
	if err := cmp.Or(<-full, errRest); err != nil {
		return err
	}
	return st.spillTiles()
}

// foldMeans adds a full-resolution row to the mean overviews: the first
// level sums the rows, each level above the finished rows of sums of the
// one below (cogMeanSums); finished tile rows are queued.
func (st *tiffRowState) foldMeans(row []float32, lastRow bool) {
	if len(st.fov) == 0 {
		return
	}
	st.fov[0].add(row)
	for k, acc := range st.fov {
		if !acc.ready(lastRow) {
			return // so are the levels above
		}
		if k+1 < len(st.fov) {
			st.fov[k+1].addSums(acc.sums, acc.counts)
		}
		if done := acc.endRow(lastRow); done != nil {
			st.addJobs(st.fimg, k+1, done, acc.ty-1)
		}
	}
}

// addJobs queues the tiles of tile row ty of level li, held in src.
func (st *tiffRowState) addJobs(img *tiffImage, li int, src *tiffLevel, ty int) {
	l := img.levels[li]
	ta := l.tilesAcross(st.t)
	for tx := range ta {
		st.list = append(st.list, tiffTileJob{img: img, li: li, dst: l, src: src, tx: tx, slot: ty*ta + tx})
	}
}

// tiffMeanAcc builds one mean overview level: the sums and counts of the
// overview row being built, from two full-resolution rows (the first
// level) or two finished rows of sums of the level below, added in the
// order cogMeanSums adds them, so the bytes agree; finished overview
// rows go to a tile row of t rows.
type tiffMeanAcc struct {
	tiffOverviewRows[float32]
	nodata float32
	sums   []float64
	counts []int32
}

func newTiffMeanAcc(oc, t int, nodata float32) *tiffMeanAcc {
	return &tiffMeanAcc{tiffOverviewRows: newTiffOverviewRows[float32](oc, 2, t), nodata: nodata,
		sums: make([]float64, oc), counts: make([]int32, oc)}
}

// tiffOverviewRows is the bookkeeping both overview accumulators share:
// full-resolution rows in (in) towards the overview row being built (f of
// them make one), finished overview rows gathered into a tile row of t
// rows (filled), tile rows given out (ty).
type tiffOverviewRows[T float32 | uint8] struct {
	f, oc, t int
	in       int // full-resolution rows added to the current overview row
	tile     []T
	filled   int // overview rows in tile
	ty       int // tile rows finished
}

func newTiffOverviewRows[T float32 | uint8](oc, f, t int) tiffOverviewRows[T] {
	return tiffOverviewRows[T]{f: f, oc: oc, t: t, tile: make([]T, t*oc)}
}

// ready reports whether the overview row is complete: f rows in, or the
// image's last row.
func (r *tiffOverviewRows[T]) ready(lastRow bool) bool { return r.in >= r.f || lastRow }

// row is the overview row being finished.
func (r *tiffOverviewRows[T]) row() []T { return r.tile[r.filled*r.oc : (r.filled+1)*r.oc] }

// next closes the overview row and returns the tile row (its rows and
// pixels) when it is complete or the image ends, else nil. The pixels stay
// valid: a new tile is made for the next rows (the jobs still read the
// old one).
func (r *tiffOverviewRows[T]) next(lastRow bool) (rows int, tile []T) {
	r.in = 0
	r.filled++
	if r.filled < r.t && !lastRow {
		return 0, nil
	}
	rows, tile = r.filled, r.tile[:r.filled*r.oc]
	r.tile = make([]T, r.t*r.oc)
	r.filled = 0
	r.ty++
	return rows, tile
}

// add adds a full-resolution row (the first level).
func (a *tiffMeanAcc) add(row []float32) {
	cogMeanAddRow(row, 2, a.nodata, a.sums, a.counts)
	a.in++
}

// addSums adds a finished row of sums and counts of the level below.
func (a *tiffMeanAcc) addSums(sums []float64, counts []int32) {
	cogMeanAddSums(sums, counts, a.sums, a.counts)
	a.in++
}

// endRow closes the overview row after f rows (or at the image's last row)
// and returns the tile row when it is complete (or at the end), else nil.
// The returned level stays valid until the next call.
func (a *tiffMeanAcc) endRow(lastRow bool) *tiffLevel {
	if !a.ready(lastRow) {
		return nil
	}
	cogMeanRow(a.sums, a.counts, a.nodata, a.row())
	clear(a.sums)
	clear(a.counts)
	rows, tile := a.next(lastRow)
	if tile == nil {
		return nil
	}
	return &tiffLevel{cols: a.oc, rows: rows, f32: tile}
}

// tiffModeAcc builds one most-frequent-code overview level (cogModeOverview's
// rule) from full-resolution rows of codes 0..m-1, 0 being no data.
type tiffModeAcc struct {
	tiffOverviewRows[uint8]
	m      int
	counts []int32 // oc x m
}

func newTiffModeAcc(oc, f, t, m int) *tiffModeAcc {
	return &tiffModeAcc{tiffOverviewRows: newTiffOverviewRows[uint8](oc, f, t), m: m, counts: make([]int32, oc*m)}
}

func (a *tiffModeAcc) add(row []uint8) {
	f, m := a.f, a.m
	for x, v := range row {
		a.counts[(x/f)*m+int(v)]++
	}
	a.in++
}

func (a *tiffModeAcc) endRow(lastRow bool) *tiffLevel {
	if !a.ready(lastRow) {
		return nil
	}
	dst := a.row()
	for ox := range dst {
		c := a.counts[ox*a.m : (ox+1)*a.m]
		// The most frequent code other than no data (0), the lowest on a
		// tie: codes in ascending order, replaced only by a strictly larger
		// count; no data when every cell is no data.
		best, bestN := uint8(0), int32(0)
		for code := 1; code < a.m; code++ {
			if c[code] > bestN {
				best, bestN = uint8(code), c[code]
			}
		}
		dst[ox] = best
		clear(c)
	}
	rows, tile := a.next(lastRow)
	if tile == nil {
		return nil
	}
	return &tiffLevel{cols: a.oc, rows: rows, u8: tile}
}
