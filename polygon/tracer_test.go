package polygon

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"sort"
	"strings"
	"testing"

	"drygrid/grid"
	"drygrid/internal/rastertest"

	"github.com/paulmach/orb"
)

// traceBlocks feeds r to a Tracer in blocks of n rows (n <= 0: all rows at
// once).
func traceBlocks(t testing.TB, r *grid.Uint8, km float64, split bool, n int) map[uint8]orb.MultiPolygon {
	t.Helper()
	tr, err := newTracer(r.Spec, r.NoData, km, split)
	if err != nil {
		t.Fatal(err)
	}
	cols, rows := r.Spec.Cols, r.Spec.Rows
	if n <= 0 {
		n = rows
	}
	for row := 0; row < rows; row += n {
		end := min(row+n, rows)
		if err := tr.Rows(row, r.Data[row*cols:end*cols]); err != nil {
			t.Fatal(err)
		}
	}
	out, err := tr.Finish()
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// normRings is a layer as a sorted list of polygons, each written as its
// shell then its sorted holes, each ring rotated to its smallest position:
// equal for two layers with the same rings as vertex cycles, whatever the
// order.
func normRings(polys map[uint8]orb.MultiPolygon) string {
	ring := func(r orb.Ring) string {
		pts := r[:len(r)-1]
		m := 0
		for k, p := range pts {
			if p[1] > pts[m][1] || (p[1] == pts[m][1] && p[0] < pts[m][0]) {
				m = k
			}
		}
		var b strings.Builder
		for k := range pts {
			fmt.Fprint(&b, pts[(m+k)%len(pts)], " ")
		}
		return b.String()
	}
	var out []string
	for code, mp := range polys {
		for _, p := range mp {
			var holes []string
			for _, h := range p[1:] {
				holes = append(holes, ring(h))
			}
			sort.Strings(holes)
			out = append(out, fmt.Sprintf("code %d shell %s holes %v", code, ring(p[0]), holes))
		}
	}
	sort.Strings(out)
	return strings.Join(out, "\n")
}

// oracleCases: random rasters of several sizes with few codes (saddles,
// holes, holes touching shells at corners, no data), on grids crossing the
// antimeridian too, plus the shared random, simplification and
// antimeridian cases.
func oracleCases() []rastertest.SimplifyCase {
	var out []rastertest.SimplifyCase
	rng := rand.New(rand.NewPCG(77, 5))
	specs := []grid.Spec{
		{West: 10, North: 40, Res: 0.25},
		{West: 170, North: 10, Res: 1},       // crosses 180 on a cell edge
		{West: 179.2, North: -30, Res: 0.7},  // a column straddles 180
		{West: 179.75, North: 60, Res: 0.25}, // crosses after one column
		{West: -180, North: 90, Res: 0.5},
	}
	for k := 0; k < 400; k++ {
		s := specs[k%len(specs)]
		s.Cols, s.Rows = 1+rng.IntN(25), 1+rng.IntN(25)
		if k%5 == 1 || k%5 == 2 {
			s.Cols = max(s.Cols, 14) // make sure it reaches 180
		}
		r := grid.NewUint8(s, 0)
		nc := 1 + rng.IntN(3)
		p0 := rng.Float64() * 0.4 // share of no data
		for i := range r.Data {
			if rng.Float64() >= p0 {
				r.Data[i] = uint8(1 + rng.IntN(nc))
			}
		}
		km := []float64{0, 0, 10, 50, 300}[k%5]
		out = append(out, rastertest.SimplifyCase{C: rastertest.Case{Name: fmt.Sprintf("random%03d-%dx%d", k, s.Cols, s.Rows), R: r}, Km: km})
	}
	for _, c := range rastertest.RandomCases(5, 200) {
		out = append(out, rastertest.SimplifyCase{C: c, Km: 0})
	}
	for _, c := range rastertest.AntimeridianCases() {
		out = append(out, rastertest.SimplifyCase{C: c, Km: 0}, rastertest.SimplifyCase{C: c, Km: 60})
	}
	return append(out, rastertest.SimplifyCases()...)
}

// TestTracerOracle: for every case the streaming tracer gives the same
// layer for blocks of 1, 2, 7 and all rows (identical, order included), and
// the same rings as the previous implementation (polyTraceOld), compared as
// normalized ring sets; with and without the split at 180, with and without
// simplification.
func TestTracerOracle(t *testing.T) {
	for _, sc := range oracleCases() {
		r := sc.C.R
		for _, split := range []bool{false, true} {
			if !split && sc.Km > 0 {
				continue // simplification always splits
			}
			var want map[uint8]orb.MultiPolygon
			if split {
				want = polyRFC7946Old(r, sc.Km)
			} else {
				s := r.Spec
				d := GeoJSONDecimals(s)
				lons := make([]float64, s.Cols+1)
				for i := range lons {
					lons[i] = Round(s.West+float64(i)*s.Res, d)
				}
				want = polyTraceOld(r.Data, s.Cols, s.Rows, r.NoData, lons, polyLatTable(s, d), 0)
			}
			all := traceBlocks(t, r, sc.Km, split, 0)
			for _, n := range []int{1, 2, 7} {
				if got := traceBlocks(t, r, sc.Km, split, n); !reflect.DeepEqual(got, all) {
					t.Fatalf("%s (km %g, split %v): blocks of %d rows give another layer than all rows at once", sc.C.Name, sc.Km, split, n)
				}
			}
			if g, w := normRings(all), normRings(want); g != w {
				t.Fatalf("%s (km %g, split %v): rings differ from the previous tracer\ngot:\n%s\nwant:\n%s", sc.C.Name, sc.Km, split, g, w)
			}
			if split && sc.Km == 0 && !reflect.DeepEqual(all, PolygonizeRFC7946(r)) {
				t.Fatalf("%s: PolygonizeRFC7946 differs from the tracer", sc.C.Name)
			}
		}
	}
}

// TestTracerCanonicalOrder pins the documented order: each ring starts at
// its north-most, then west-most vertex; polygons of a code (per part) and
// the holes of a polygon are ordered by that start vertex.
func TestTracerCanonicalOrder(t *testing.T) {
	before := func(a, b orb.Ring) bool { return a[0][1] > b[0][1] || (a[0][1] == b[0][1] && a[0][0] < b[0][0]) }
	for _, sc := range oracleCases() {
		if sc.C.R.Spec.CrossesAntimeridian() {
			continue // two parts, each ordered on its own
		}
		for code, mp := range PolygonizeSimplified(sc.C.R, sc.Km) {
			for k, p := range mp {
				if k > 0 && !before(mp[k-1][0], p[0]) {
					t.Fatalf("%s: code %d polygon %d starts at %v, before polygon %d at %v", sc.C.Name, code, k, p[0][0], k-1, mp[k-1][0][0])
				}
				for ri, ring := range p {
					for _, q := range ring {
						if q[1] > ring[0][1] || (q[1] == ring[0][1] && q[0] < ring[0][0]) {
							t.Fatalf("%s: code %d ring starts at %v, not its north-most, west-most vertex %v", sc.C.Name, code, ring[0], q)
						}
					}
					if ri > 1 && !before(p[ri-1], ring) {
						t.Fatalf("%s: code %d holes out of order", sc.C.Name, code)
					}
				}
			}
		}
	}
}

// TestTracerErrors: misuse is an error, never a panic, and leaves the
// tracer usable.
func TestTracerErrors(t *testing.T) {
	s := grid.Spec{West: 0, North: 10, Res: 1, Cols: 4, Rows: 3}
	if _, err := NewTracer(grid.Spec{Res: 1}, 0, 0); err == nil {
		t.Error("a grid without cells: no error")
	}
	for _, km := range []float64{-1, math.NaN(), math.Inf(1)} {
		if _, err := NewTracer(s, 0, km); err == nil {
			t.Errorf("tolerance %g: no error", km)
		}
	}
	tr, err := NewTracer(s, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	row := []uint8{1, 1, 2, 0}
	if _, err := tr.Finish(); err == nil {
		t.Error("Finish before any row: no error")
	}
	tr, _ = NewTracer(s, 0, 0)
	if err := tr.Rows(1, row); err == nil {
		t.Error("first block at row 1: no error")
	}
	if err := tr.Rows(0, row[:3]); err == nil {
		t.Error("a block of 3 codes on 4 columns: no error")
	}
	if err := tr.Rows(0, slices.Concat(row, row)); err != nil {
		t.Fatal(err)
	}
	if err := tr.Rows(0, row); err == nil {
		t.Error("row 0 again: no error")
	}
	if err := tr.Rows(2, slices.Concat(row, row)); err == nil {
		t.Error("rows past the grid: no error")
	}
	if _, err := tr.Finish(); err == nil {
		t.Error("Finish with a row missing: no error")
	}
	if err := tr.Rows(2, row); err != nil {
		t.Fatal(err)
	}
	got, err := tr.Finish()
	if err != nil {
		t.Fatal(err)
	}
	r := grid.NewUint8(s, 0)
	copy(r.Data, slices.Concat(row, row, row))
	if !reflect.DeepEqual(got, PolygonizeRFC7946(r)) {
		t.Error("after the refused calls the layer differs from the whole raster's")
	}
	if _, err := tr.Finish(); err == nil {
		t.Error("Finish twice: no error")
	}
	if err := tr.Rows(3, row); err == nil {
		t.Error("rows after Finish: no error")
	}
}

// FuzzTracerOracle compares the streaming tracer, fed in blocks of
// arbitrary size, with the previous implementation on arbitrary small
// rasters (byte 0: width, byte 1: grid and tolerance, byte 2: block size),
// on grids that cross 180 too.
func FuzzTracerOracle(f *testing.F) {
	f.Add([]byte{3, 0, 1, 1, 1, 1, 1, 0, 1, 1, 1, 0})
	f.Add([]byte{4, 9, 2, 1, 2, 2, 1, 2, 1, 1, 2, 0, 2, 1, 1, 2, 2, 1, 2})
	f.Add([]byte{5, 22, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1, 0, 1})
	f.Fuzz(func(t *testing.T, b []byte) {
		if len(b) < 4 || len(b) > 500 {
			return
		}
		cols := 1 + int(b[0])%22
		specs := []grid.Spec{{West: 10, North: 40, Res: 0.25}, {West: 175, North: 10, Res: 1}, {West: 179.2, North: -30, Res: 0.7}}
		s := specs[int(b[1])%len(specs)]
		km := []float64{0, 0, 20, 200}[int(b[1]/3)%4]
		cells := b[3:]
		s.Cols, s.Rows = cols, len(cells)/cols
		if s.Rows == 0 {
			return
		}
		r := grid.NewUint8(s, 0)
		for i := range r.Data {
			r.Data[i] = cells[i] % 4
		}
		got := traceBlocks(t, r, km, true, 1+int(b[2])%s.Rows)
		if g, w := normRings(got), normRings(polyRFC7946Old(r, km)); g != w {
			t.Fatalf("rings differ from the previous tracer\ngot:\n%s\nwant:\n%s", g, w)
		}
	})
}
