package pipeline

import (
	"context"
	"math"
	"testing"
)

// TestPreview: the preview of a grid larger than its limit holds, at
// each of its cells, the band code of the run's cell whose centre is its
// centre (the centre cell of each f x f block, f odd), for any row block
// size; its far cells are those of the whole band raster at the same
// cells; a grid within the limit is its own preview.
func TestPreview(t *testing.T) {
	res, err := Compute(context.Background(), exampleJob("", 0.05, 12, 150))
	if err != nil {
		t.Fatal(err)
	}
	s := res.Spec
	if p := newPreview(s, s.Len()); p.f != 1 || p.r.Spec != s {
		t.Fatalf("a grid within the limit: step %d, grid %v", p.f, p.r.Spec)
	}
	const km = 30.0
	whole, err := res.farCells(res.Bands, km)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct{ limit, f int }{{s.Len() / 4, 3}, {s.Len() / 20, 5}} {
		for _, block := range []int{1, 7, s.Rows} {
			p := newPreview(s, tc.limit)
			if p.f != tc.f {
				t.Fatalf("limit %d: step %d, want %d", tc.limit, p.f, tc.f)
			}
			ps := p.r.Spec
			if ps.Len() > tc.limit || ps.Cols != s.Cols/p.f || ps.Rows != s.Rows/p.f {
				t.Fatalf("limit %d: preview grid %v of %v", tc.limit, ps, s)
			}
			for row0 := 0; row0 < s.Rows; row0 += block {
				n := min(block, s.Rows-row0)
				cells := res.Bands.Data[row0*s.Cols : (row0+n)*s.Cols]
				if err := p.rows(row0, n, nil, cells); err != nil {
					t.Fatal(err)
				}
			}
			far, err := res.farCells(p.r, km)
			if err != nil {
				t.Fatal(err)
			}
			bad, nFar := 0, 0
			for r := range ps.Rows {
				for c := range ps.Cols {
					fr, fc := r*p.f+p.f/2, c*p.f+p.f/2
					lon, lat := ps.Center(c, r)
					wlon, wlat := s.Center(fc, fr)
					got, want := p.r.Data[r*ps.Cols+c], res.Bands.Data[fr*s.Cols+fc]
					gf, wf := far.Data[r*ps.Cols+c], whole.Data[fr*s.Cols+fc]
					nFar += int(gf)
					if (got != want || gf != wf || math.Abs(lon-wlon) > 1e-9 || math.Abs(lat-wlat) > 1e-9) && bad < 5 {
						bad++
						t.Errorf("f %d block %d: preview cell %d,%d (%.4f, %.4f): code %d far %d; cell %d,%d (%.4f, %.4f): code %d far %d",
							p.f, block, c, r, lon, lat, got, gf, fc, fr, wlon, wlat, want, wf)
					}
				}
			}
			if nFar == 0 {
				t.Errorf("f %d: no far cell at %g km: the check compares nothing", p.f, km)
			}
		}
	}
}
