package bands

import (
	"math"
	"testing"

	"drygrid/grid"
)

// TestAddWeighted: weights of 1 tally what Add tallies, exactly; weights of
// 0 count nowhere; a half-weighted cell counts half its area (a property of
// the tally: areas are cell area times share).
func TestAddWeighted(t *testing.T) {
	s, err := grid.NewSpec(10, 40, 11, 41, 0.25)
	if err != nil {
		t.Fatal(err)
	}
	codes := make([]uint8, s.Len())
	for i := range codes {
		codes[i] = uint8(i % 4) // 0 (no data), 1, 2, 3
	}
	ones := make([]float64, s.Len())
	for i := range ones {
		ones[i] = 1
	}
	a, b := NewTally(s), NewTally(s)
	a.Add(0, s.Rows, codes)
	b.AddWeighted(0, codes, ones)
	if a.Shares != b.Shares || a.Cells != b.Cells || b.Inside != s.Len() {
		t.Errorf("weights of 1: %+v vs %+v", b.Shares.CoveredKm2, a.Shares.CoveredKm2)
	}
	w := make([]float64, s.Len())
	w[0], w[1], w[s.Cols+2] = 1, 0.5, 0.25 // codes 0, 1, 2 (row 1 starts at code 0)
	c := NewTally(s)
	c.AddWeighted(0, codes, w)
	a0, a1 := s.CellAreaKm2(0), s.CellAreaKm2(1)
	if c.Inside != 3 || c.Cells != 2 || c.AreaKm2 != a0*1.5+a1*0.25 || c.CoveredKm2 != a0*0.5+a1*0.25 ||
		c.CodeKm2[1] != a0*0.5 || c.CodeKm2[2] != a1*0.25 || math.IsNaN(c.CodeKm2[3]) || c.CodeKm2[3] != 0 {
		t.Errorf("weighted tally %+v", c)
	}
}
