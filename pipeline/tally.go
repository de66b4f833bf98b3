package pipeline

import "drygrid/grid"

// bandTally sums the band areas from band codes row by row (code 0 is no
// data), cells weighted by their ellipsoidal area, for the summary and the
// manifest: the same sums in the same order whether the rows come streamed
// or from a band raster in memory. The cells of a row have one area, so a
// row adds its count of each code times that area.
type bandTally struct {
	areas          []float64
	cols           int
	total, covered float64
	byCode         [256]float64 // area by band code
	seen           [256]bool
	cells          int
}

func newBandTally(s grid.Spec) *bandTally {
	return &bandTally{areas: s.RowAreasKm2(), cols: s.Cols}
}

func (t *bandTally) add(row0, n int, codes []uint8) {
	var count [256]int
	for r := range n {
		count = [256]int{}
		for _, c := range codes[r*t.cols : (r+1)*t.cols] {
			count[c]++
		}
		a := t.areas[row0+r]
		t.total += a * float64(t.cols)
		t.covered += a * float64(t.cols-count[0])
		t.cells += t.cols - count[0]
		for c := 1; c < len(count); c++ {
			if count[c] > 0 {
				t.byCode[c] += a * float64(count[c])
				t.seen[c] = true
			}
		}
	}
}

// shares gives the covered share of the tallied area and each band's share
// of the covered area, both in percent.
func (t *bandTally) shares() (coveredPct float64, bandPct map[uint8]float64) {
	bandPct = map[uint8]float64{}
	for c, a := range t.byCode {
		if t.seen[c] {
			bandPct[uint8(c)] = 100 * a / t.covered
		}
	}
	if t.total > 0 {
		coveredPct = 100 * t.covered / t.total
	}
	return coveredPct, bandPct
}
