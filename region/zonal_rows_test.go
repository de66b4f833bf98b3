package region

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"strings"
	"testing"

	"drygrid/grid"

	"github.com/paulmach/orb"
)

// starRing is a star-shaped ring of k vertices around (cx, cy), at radii
// between r/2 and r (latitude squeezed by 0.8), counter-clockwise unless cw.
func starRing(rng *rand.Rand, cx, cy, r float64, k int, cw bool) orb.Ring {
	var ring orb.Ring
	for i := range k {
		a := 2 * math.Pi * (float64(i) + 0.4*(rng.Float64()-0.5)) / float64(k)
		if cw {
			a = -a
		}
		rad := r * (0.5 + 0.5*rng.Float64())
		ring = append(ring, orb.Point{cx + rad*math.Cos(a), cy + 0.8*rad*math.Sin(a)})
	}
	return append(ring, ring[0])
}

// randomRegions gives many regions over and around the grid s: a jittered
// tiling of its box, stars with and without holes (some partly outside the
// grid), regions smaller than a cell, MultiPolygons of parts sharing cells
// (four small squares in one cell), and regions across the antimeridian,
// drawn past 180 or split at it.
func randomRegions(t testing.TB, rng *rand.Rand, s grid.Spec) []Region {
	t.Helper()
	var rs []Region
	add := func(g orb.Geometry) {
		rs = append(rs, Region{Key: fmt.Sprintf("r%d", len(rs)), Index: len(rs), Geom: mustNorm(t, g)})
	}
	tiles, err := jitterTiling(rng, s.West, s.South(), s.East(), s.North, 7, 5, 4)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range tiles {
		add(r.Geom)
	}
	w, e, so, n := s.West, s.East(), s.South(), s.North
	lat := func(r float64) float64 { // a centre latitude keeping the star within +-89
		lo, hi := math.Max(so-r, -89+r), math.Min(n+r, 89-r)
		return lo + rng.Float64()*(hi-lo)
	}
	for range 40 { // stars, some with a hole, some partly outside
		r := s.Res * (1 + 15*rng.Float64())
		cx, cy := w-r+rng.Float64()*(e-w+2*r), lat(r)
		p := orb.Polygon{starRing(rng, cx, cy, r, 5+rng.IntN(20), rng.IntN(2) == 0)}
		if rng.IntN(3) == 0 {
			p = append(p, starRing(rng, cx, cy, 0.3*r, 4+rng.IntN(8), true))
		}
		add(p)
	}
	for range 10 { // smaller than a cell
		r := s.Res * (0.02 + 0.3*rng.Float64())
		add(orb.Polygon{starRing(rng, w+rng.Float64()*(e-w), lat(r), r, 3+rng.IntN(6), false)})
	}
	for range 5 { // parts sharing cells: four squares within one cell, and a star
		c, row := rng.IntN(s.Cols), rng.IntN(s.Rows)
		x, y := s.West+float64(c)*s.Res, s.North-float64(row+1)*s.Res
		q := s.Res / 4
		var mp orb.MultiPolygon
		for k := range 4 {
			x0, y0 := x+float64(k%2)*2*q+q/4, y+float64(k/2)*2*q+q/4
			mp = append(mp, rect(x0, y0, x0+q*(1+rng.Float64()), y0+q*(1+rng.Float64())))
		}
		mp = append(mp, orb.Polygon{starRing(rng, x+3*s.Res, y, 2*s.Res, 9, false)})
		add(mp)
	}
	for range 6 { // across the antimeridian, drawn past 180 or split at it
		r := 1 + 6*rng.Float64()
		cy := lat(r)
		add(orb.Polygon{starRing(rng, 180+(rng.Float64()-0.5)*r, cy, r, 12, false)})
		y0, y1 := cy-r/2, cy+r/2
		add(orb.MultiPolygon{
			{{{180 - r, y0}, {180, y0}, {180, y1}, {180 - r/2, y1 + 0.3}, {180 - r, y0}}},
			{{{-180, y0}, {-180 + r/3, y0 - 0.2}, {-180 + r/2, y1}, {-180, y1}, {-180, y0}}},
		})
	}
	return rs
}

// randomRasters fills a band raster (no data 0, codes 1 to 11) and an index
// raster holding no data, NaN and infinities here and there.
func randomRasters(rng *rand.Rand, s grid.Spec) (*grid.Uint8, *grid.Float32) {
	b, z := grid.NewUint8(s, 0), grid.NewFloat32(s, grid.NoDataIndex)
	for i := range b.Data {
		b.Data[i] = uint8(rng.IntN(12))
		switch k := rng.IntN(40); k {
		case 0:
			z.Data[i] = float32(math.NaN())
		case 1:
			z.Data[i] = float32(math.Inf(1 - 2*rng.IntN(2)))
		case 2, 3:
			z.Data[i] = grid.NoDataIndex
		default:
			z.Data[i] = float32(rng.NormFloat64())
		}
	}
	return b, z
}

// zonalInBlocks runs ZonalRows over the rasters in blocks of the given
// number of rows (index may be nil).
func zonalInBlocks(t testing.TB, b *grid.Uint8, z *grid.Float32, rs []Region, block int) []ZonalStats {
	t.Helper()
	s := b.Spec
	zr := NewZonalRows(s, rs)
	for r0 := 0; r0 < s.Rows; r0 += block {
		r1 := min(r0+block, s.Rows)
		var idx []float32
		var nd float32
		if z != nil {
			idx, nd = z.Data[r0*s.Cols:r1*s.Cols], z.NoData
		}
		if err := zr.Rows(r0, b.Data[r0*s.Cols:r1*s.Cols], b.NoData, idx, nd); err != nil {
			t.Fatal(err)
		}
	}
	st, err := zr.Stats()
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// testGrids: a regional grid (regions run past its edges), one across the
// antimeridian, and a global one.
func testGrids(t testing.TB) []grid.Spec {
	var out []grid.Spec
	for _, g := range [][5]float64{{-20, -15, 25, 18, 0.25}, {170, -20, -170, 0, 0.1}, {-180, -90, 180, 90, 1.5}} {
		s, err := grid.NewSpec(g[0], g[1], g[2], g[3], g[4])
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, s)
	}
	return out
}

// TestZonalRowsIsPrevZonal: ZonalRows, in blocks of 1, 3, 256 rows or all
// of them, with and without an index, on 1 or 4 cores, gives the previous
// Zonal's statistics exactly (==, every field and band), and so does Zonal.
func TestZonalRowsIsPrevZonal(t *testing.T) {
	prevProcs := runtime.GOMAXPROCS(0)
	defer runtime.GOMAXPROCS(prevProcs)
	for gi, s := range testGrids(t) {
		rng := rand.New(rand.NewPCG(uint64(gi), 77))
		rs := randomRegions(t, rng, s)
		b, z := randomRasters(rng, s)
		for _, idx := range []*grid.Float32{z, nil} {
			want := prevZonal(b, idx, rs)
			reached, withZ := 0, 0
			for _, w := range want {
				if w.AreaKm2 > 0 {
					reached++
				}
				if w.HasMeanZ {
					withZ++
				}
			}
			if reached < len(rs)*2/3 || (idx != nil && withZ < reached) {
				t.Fatalf("grid %s: %d of %d regions reach it, %d with a mean: the case checks too little", s, reached, len(rs), withZ)
			}
			check := func(what string, got []ZonalStats) {
				t.Helper()
				if len(got) != len(want) {
					t.Fatalf("grid %s, %s: %d stats, want %d", s, what, len(got), len(want))
				}
				for i := range want {
					if got[i] != want[i] {
						t.Fatalf("grid %s, %s: region %s: area %v covered %v mean %v %v, previous Zonal %v %v %v %v",
							s, what, rs[i].Key, got[i].AreaKm2, got[i].CoveredKm2, got[i].MeanZ, got[i].HasMeanZ,
							want[i].AreaKm2, want[i].CoveredKm2, want[i].MeanZ, want[i].HasMeanZ)
					}
				}
			}
			for _, procs := range []int{1, 4} {
				runtime.GOMAXPROCS(procs)
				for _, block := range []int{1, 3, 256, s.Rows} {
					check(fmt.Sprintf("blocks of %d rows, %d cores, index %v", block, procs, idx != nil), zonalInBlocks(t, b, idx, rs, block))
				}
				check(fmt.Sprintf("Zonal, %d cores, index %v", procs, idx != nil), Zonal(b, idx, rs))
			}
		}
	}
}

// TestCoverageIsPrev: Coverage, now made row by row, gives the previous
// Coverage's weights exactly, and a region's mask (its shares row by row,
// as ZonalRows takes them) holds exactly those weights.
func TestCoverageIsPrev(t *testing.T) {
	for gi, s := range testGrids(t) {
		rs := randomRegions(t, rand.New(rand.NewPCG(uint64(gi), 78)), s)
		row := make([]float64, s.Cols)
		for _, r := range rs {
			want := prevCoverage(s, r.Geom)
			got := Coverage(s, r.Geom)
			if len(got) != len(want) {
				t.Fatalf("grid %s region %s: %d cells, previous Coverage %d", s, r.Key, len(got), len(want))
			}
			for i := range want {
				if got[i] != want[i] {
					t.Fatalf("grid %s region %s: weight %d %+v, previous Coverage %+v", s, r.Key, i, got[i], want[i])
				}
			}
			m, err := NewMask(s, []Region{r})
			if errors.Is(err, ErrMaskOutside) && len(want) == 0 {
				continue
			}
			if err != nil {
				t.Fatalf("grid %s region %s: %v", s, r.Key, err)
			}
			k := 0
			for rr := range s.Rows {
				m.Row(rr, row)
				for c, v := range row {
					if v == 0 {
						continue
					}
					if k >= len(want) || want[k].Cell != s.Index(c, rr) || want[k].Frac != v {
						t.Fatalf("grid %s region %s: row %d col %d share %v, not the previous Coverage's weight", s, r.Key, rr, c, v)
					}
					k++
				}
			}
			if k != len(want) {
				t.Fatalf("grid %s region %s: the mask holds %d cells, previous Coverage %d", s, r.Key, k, len(want))
			}
		}
	}
}

// TestZonalRowsErrors: blocks out of order, of part of a row, past the
// grid, with an index of another length or only in some blocks, and Stats
// before the last row are errors.
func TestZonalRowsErrors(t *testing.T) {
	s, _ := grid.NewSpec(0, 0, 4, 3, 1) // 4 x 3
	rs := []Region{{Key: "r", Geom: mustNorm(t, rect(0.5, 0.5, 3, 2))}}
	codes, idx := make([]uint8, 4), make([]float32, 4)
	for _, c := range []struct {
		name string
		do   func(z *ZonalRows) error
		want string
	}{
		{"skips a row", func(z *ZonalRows) error { return z.Rows(1, codes, 0, nil, 0) }, "want row 0"},
		{"repeats a row", func(z *ZonalRows) error {
			_ = z.Rows(0, codes, 0, nil, 0)
			return z.Rows(0, codes, 0, nil, 0)
		}, "want row 1"},
		{"part of a row", func(z *ZonalRows) error { return z.Rows(0, codes[:3], 0, nil, 0) }, "not whole rows"},
		{"no rows", func(z *ZonalRows) error { return z.Rows(0, nil, 0, nil, 0) }, "not whole rows"},
		{"past the grid", func(z *ZonalRows) error { return z.Rows(0, make([]uint8, 16), 0, nil, 0) }, "runs past"},
		{"index length", func(z *ZonalRows) error { return z.Rows(0, codes, 0, idx[:2], 0) }, "index values"},
		{"index in some blocks", func(z *ZonalRows) error {
			_ = z.Rows(0, codes, 0, idx, 0)
			return z.Rows(1, codes, 0, nil, 0)
		}, "without an index, the blocks before with one"},
		{"index in later blocks", func(z *ZonalRows) error {
			_ = z.Rows(0, codes, 0, nil, 0)
			return z.Rows(1, codes, 0, idx, 0)
		}, "with an index, the blocks before without"},
		{"after the last row", func(z *ZonalRows) error {
			_ = z.Rows(0, make([]uint8, 12), 0, nil, 0)
			return z.Rows(3, codes, 0, nil, 0)
		}, "after the last row"},
		{"stats too early", func(z *ZonalRows) error {
			_ = z.Rows(0, codes, 0, nil, 0)
			_, err := z.Stats()
			return err
		}, "after 1 of the grid's 3 rows"},
	} {
		err := c.do(NewZonalRows(s, rs))
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want an error saying %q", c.name, err, c.want)
		}
	}
	z := NewZonalRows(s, rs)
	for r := range 3 {
		if err := z.Rows(r, codes, 0, idx, 0); err != nil {
			t.Fatal(err)
		}
	}
	if st, err := z.Stats(); err != nil || len(st) != 1 || st[0].AreaKm2 == 0 {
		t.Errorf("whole grid: %v %+v", err, st)
	}
}

// BenchmarkZonalRowsGlobal0025: 300 jittered regions (20 x 15, continent
// sized) tiling the globe, over a global 0.025 deg grid (14400 x 7200, 104 M
// cells) fed in blocks of 256 rows made block by block, with an index. The
// two block buffers (3.7 MB of codes, 14.7 MB of index) are the caller's and
// made once; B/op is what ZonalRows allocates, to be compared with the 104 M
// cells (415 MB of index and 104 MB of codes for whole rasters).
func BenchmarkZonalRowsGlobal0025(b *testing.B) {
	s, err := grid.Global(0.025)
	if err != nil {
		b.Fatal(err)
	}
	rs, err := jitterTiling(rand.New(rand.NewPCG(3, 300)), -180, -90, 180, 90, 20, 15, 8)
	if err != nil {
		b.Fatal(err)
	}
	const block = 256
	codes := make([]uint8, block*s.Cols)
	index := make([]float32, block*s.Cols)
	for b.Loop() {
		z := NewZonalRows(s, rs)
		for r0 := 0; r0 < s.Rows; r0 += block {
			n := min(block, s.Rows-r0)
			for k := range n * s.Cols {
				i := r0*s.Cols + k
				codes[k] = uint8(i / 7919 % 10)
				index[k] = float32(i%101)/25 - 2
			}
			if err := z.Rows(r0, codes[:n*s.Cols], 0, index[:n*s.Cols], grid.NoDataIndex); err != nil {
				b.Fatal(err)
			}
		}
		if st, err := z.Stats(); err != nil || len(st) != 300 {
			b.Fatal(err, len(st))
		}
	}
	b.ReportMetric(float64(s.Len()), "cells")
}
