package bands

import (
	"drygrid/grid"
)

// Shares are the areas of a part of the grid (the whole grid, or a region)
// by band code: the one place where band shares and the share in drought
// are worked out. Shares of bands are percent of the covered area (cells
// holding a band code), not of the whole area.
type Shares struct {
	AreaKm2    float64      // the whole area
	CoveredKm2 float64      // of which cells hold a band code
	CodeKm2    [256]float64 // area by band code (code 0, no data, unused)
}

// CoveredPct is the covered share of the area in percent, 0 for no area.
func (s *Shares) CoveredPct() float64 {
	if s.AreaKm2 > 0 {
		return 100 * s.CoveredKm2 / s.AreaKm2
	}
	return 0
}

// BandPct is the share of the covered area in band code, in percent, and
// false when nothing is covered.
func (s *Shares) BandPct(code uint8) (float64, bool) {
	if s.CoveredKm2 > 0 {
		return 100 * s.CodeKm2[code] / s.CoveredKm2, true
	}
	return 0, false
}

// InDroughtKm2 is the area in the scheme's drought bands.
func (s *Shares) InDroughtKm2(sch *Scheme) float64 {
	km2 := 0.0
	for _, b := range sch.Bands {
		if b.Drought {
			km2 += s.CodeKm2[b.Code]
		}
	}
	return km2
}

// InDroughtPct is the share of the covered area in the scheme's drought
// bands, in percent, and false when nothing is covered.
func (s *Shares) InDroughtPct(sch *Scheme) (float64, bool) {
	if s.CoveredKm2 > 0 {
		return 100 * s.InDroughtKm2(sch) / s.CoveredKm2, true
	}
	return 0, false
}

// Tally sums the band areas of a grid from band codes, row by row in any
// row blocks (code 0 is no data), cells weighted by their area on the
// WGS84 ellipsoid: the same sums in the same order whether the rows come
// streamed or from a band raster in memory. The cells of a row have one
// area, so a row adds its count of each code times that area.
//
// AddWeighted tallies rows whose cells count only in part (the share of
// each cell inside a mask): each cell's area is weighted, so that AreaKm2
// is the area of the mask within the grid and the band areas sum to the
// covered part of it.
type Tally struct {
	Shares
	Cells  int // covered cells
	Inside int // cells with a weight above 0 (AddWeighted only)

	areas []float64
	cols  int
}

// NewTally starts a tally of the grid s.
func NewTally(s grid.Spec) *Tally {
	return &Tally{areas: s.RowAreasKm2(), cols: s.Cols}
}

// Add tallies n rows from row0 whose band codes are codes (n * Cols).
func (t *Tally) Add(row0, n int, codes []uint8) {
	var count [256]int
	for r := range n {
		count = [256]int{}
		for _, c := range codes[r*t.cols : (r+1)*t.cols] {
			count[c]++
		}
		a := t.areas[row0+r]
		t.AreaKm2 += a * float64(t.cols)
		t.CoveredKm2 += a * float64(t.cols-count[0])
		t.Cells += t.cols - count[0]
		for c := 1; c < len(count); c++ {
			if count[c] > 0 {
				t.CodeKm2[c] += a * float64(count[c])
			}
		}
	}
}

// AddWeighted tallies the rows from row0 whose band codes are codes (a
// whole number of rows), each cell's area weighted by weights[i], its
// share in [0, 1] inside a mask: the area is that of the cells' weighted
// parts, and a cell with weight 0 counts nowhere (its code should be 0).
// Within a row the weights are summed per code, in column order, and the
// sums multiplied by the row's cell area.
func (t *Tally) AddWeighted(row0 int, codes []uint8, weights []float64) {
	var sum [256]float64
	n := len(codes) / t.cols
	for r := range n {
		sum = [256]float64{}
		row := codes[r*t.cols : (r+1)*t.cols]
		wts := weights[r*t.cols : (r+1)*t.cols]
		all, covered := 0.0, 0.0
		for i, c := range row {
			w := wts[i]
			if w <= 0 {
				continue
			}
			all += w
			sum[c] += w
			t.Inside++
			if c != 0 {
				t.Cells++
				covered += w
			}
		}
		a := t.areas[row0+r]
		t.AreaKm2 += a * all
		t.CoveredKm2 += a * covered
		for c := 1; c < len(sum); c++ {
			if sum[c] > 0 {
				t.CodeKm2[c] += a * sum[c]
			}
		}
	}
}
