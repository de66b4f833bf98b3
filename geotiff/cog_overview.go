package geotiff

import "drygrid/internal/pool"

// cogMaxOverviewSide is the longest side of the smallest overview: overviews
// halve the image until both sides are at most this (GDAL's COG driver stops
// at its 512 px block size the same way).
const cogMaxOverviewSide = 512

// cogLevelSizes gives the width and height of each overview level, the
// first being half the image. Sizes round up, as GDAL's overviews do
// (DIV_ROUND_UP in gcore/gdaldefaultoverviews.cpp), so level k has
// ceil(cols/2^k) x ceil(rows/2^k) pixels. An image that already fits in
// 512 x 512 has none.
func cogLevelSizes(cols, rows int) [][2]int {
	var out [][2]int
	for f := 2; ; f *= 2 {
		pc, pr := cogCeilDiv(cols, f/2), cogCeilDiv(rows, f/2)
		if max(pc, pr) <= cogMaxOverviewSide {
			return out
		}
		out = append(out, [2]int{cogCeilDiv(cols, f), cogCeilDiv(rows, f)})
	}
}

func cogCeilDiv(a, b int) int { return (a + b - 1) / b }

// cogMeanSums are the sums and counts of the valid cells under each pixel
// of a mean overview (cols x rows). A mean overview's pixel is the mean,
// in float64 rounded to float32, of the valid full-resolution cells of its
// f x f block (blocks on the right and bottom edges cut short by the
// image); cells equal to nodata or NaN are skipped, and a block with none
// valid is nodata. The sums are built level by level: a 2 x 2 block's
// from its cells (cogMeanLevel1), a larger block's from the sums of its
// four quarters (half).
type cogMeanSums struct {
	cols, rows int
	sums       []float64
	counts     []int32
}

// cogMeanLevel1 sums the 2 x 2 blocks of data: row by row, west to east
// within a block (cogMeanAddRow).
func cogMeanLevel1(data []float32, cols, rows int, nodata float32, workers int) cogMeanSums {
	oc, or := cogCeilDiv(cols, 2), cogCeilDiv(rows, 2)
	s := cogMeanSums{cols: oc, rows: or, sums: make([]float64, oc*or), counts: make([]int32, oc*or)}
	pool.Run(or, workers, 1, func(_, oy, _ int) {
		sums, counts := s.sums[oy*oc:(oy+1)*oc], s.counts[oy*oc:(oy+1)*oc]
		for y := 2 * oy; y < min(2*oy+2, rows); y++ {
			cogMeanAddRow(data[y*cols:(y+1)*cols], 2, nodata, sums, counts)
		}
	})
	return s
}

// half is the next level: each pixel sums its four quarters of s, the
// upper two then the lower two, west to east (cogMeanAddSums).
func (s cogMeanSums) half(workers int) cogMeanSums {
	oc, or := cogCeilDiv(s.cols, 2), cogCeilDiv(s.rows, 2)
	h := cogMeanSums{cols: oc, rows: or, sums: make([]float64, oc*or), counts: make([]int32, oc*or)}
	pool.Run(or, workers, 1, func(_, oy, _ int) {
		sums, counts := h.sums[oy*oc:(oy+1)*oc], h.counts[oy*oc:(oy+1)*oc]
		for y := 2 * oy; y < min(2*oy+2, s.rows); y++ {
			cogMeanAddSums(s.sums[y*s.cols:(y+1)*s.cols], s.counts[y*s.cols:(y+1)*s.cols], sums, counts)
		}
	})
	return h
}

// means are the overview pixels: sum / count, or nodata for none.
func (s cogMeanSums) means(nodata float32) []float32 {
	out := make([]float32, len(s.sums))
	cogMeanRow(s.sums, s.counts, nodata, out)
	return out
}

// cogMeanRow puts the means of sums and counts into dst (nodata where the
// count is 0).
func cogMeanRow(sums []float64, counts []int32, nodata float32, dst []float32) {
	counts, dst = counts[:len(sums)], dst[:len(sums)]
	for i, s := range sums {
		if counts[i] == 0 {
			dst[i] = nodata
		} else {
			dst[i] = float32(s / float64(counts[i]))
		}
	}
}

// cogMeanAddSums adds one row of a level's sums and counts to those of the
// next level's row above it: pixel ox takes the pixels 2 ox and 2 ox + 1
// (the second cut off at the right edge), in that order.
func cogMeanAddSums(rowSums []float64, rowCounts []int32, sums []float64, counts []int32) {
	rowCounts = rowCounts[:len(rowSums)]
	sums, counts = sums[:cogCeilDiv(len(rowSums), 2)], counts[:cogCeilDiv(len(rowSums), 2)]
	ox := 0
	for ; 2*ox+1 < len(rowSums); ox++ {
		sums[ox] = sums[ox] + rowSums[2*ox] + rowSums[2*ox+1]
		counts[ox] += rowCounts[2*ox] + rowCounts[2*ox+1]
	}
	if 2*ox < len(rowSums) {
		sums[ox] += rowSums[2*ox]
		counts[ox] += rowCounts[2*ox]
	}
}

// cogMeanAddRow adds one full-resolution row to the sums and counts of
// the overview cells (f columns each) it falls in, skipping no data and
// NaN, west to east within a cell. Four cells are summed side by side:
// four independent chains of additions, each in its cell's order, so the
// sums are those of one cell at a time, bit for bit.
func cogMeanAddRow(row []float32, f int, nd float32, sums []float64, counts []int32) {
	ox := 0
	for ; (ox+4)*f <= len(row); ox += 4 {
		b := row[ox*f : (ox+4)*f]
		s0, s1, s2, s3 := sums[ox], sums[ox+1], sums[ox+2], sums[ox+3]
		n0, n1, n2, n3 := counts[ox], counts[ox+1], counts[ox+2], counts[ox+3]
		for j := range f {
			if v := b[j]; v != nd && v == v {
				s0 += float64(v)
				n0++
			}
			if v := b[f+j]; v != nd && v == v {
				s1 += float64(v)
				n1++
			}
			if v := b[2*f+j]; v != nd && v == v {
				s2 += float64(v)
				n2++
			}
			if v := b[3*f+j]; v != nd && v == v {
				s3 += float64(v)
				n3++
			}
		}
		sums[ox], sums[ox+1], sums[ox+2], sums[ox+3] = s0, s1, s2, s3
		counts[ox], counts[ox+1], counts[ox+2], counts[ox+3] = n0, n1, n2, n3
	}
	for ; ox < len(sums); ox++ {
		x1 := min((ox+1)*f, len(row))
		s, n := sums[ox], counts[ox]
		for _, v := range row[ox*f : x1] {
			if v != nd && v == v {
				s += float64(v)
				n++
			}
		}
		sums[ox], counts[ox] = s, n
	}
}

// cogModeOverview is the overview of codes (cols x rows) reduced by factor
// f: each pixel is the most frequent code of its f x f block other than
// nodata, the lowest such code on a tie, and nodata only when the whole
// block is nodata. (Our rule; GDAL's MODE resampling breaks ties
// differently.)
func cogModeOverview(data []uint8, cols, rows, f int, nodata uint8, workers int) []uint8 {
	oc, or := cogCeilDiv(cols, f), cogCeilDiv(rows, f)
	out := make([]uint8, oc*or)
	pool.Run(or, workers, 1, func(_, oy, _ int) {
		var counts [256]int32
		seen := make([]uint8, 0, 256)
		y0, y1 := oy*f, min((oy+1)*f, rows)
		for ox := 0; ox < oc; ox++ {
			x0, x1 := ox*f, min((ox+1)*f, cols)
			seen = seen[:0]
			for y := y0; y < y1; y++ {
				for _, v := range data[y*cols+x0 : y*cols+x1] {
					if counts[v] == 0 {
						seen = append(seen, v)
					}
					counts[v]++
				}
			}
			best, bestN := nodata, int32(0)
			for _, c := range seen {
				n := counts[c]
				counts[c] = 0
				if c == nodata {
					continue
				}
				if n > bestN || (n == bestN && c < best) {
					best, bestN = c, n
				}
			}
			out[oy*oc+ox] = best
		}
	})
	return out
}
