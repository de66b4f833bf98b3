package rastertest

import (
	"drygrid/bands"
	"drygrid/grid"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// Case is a named test raster.
type Case struct {
	Name string
	R    *grid.Uint8
}

var resolutions = []float64{0.1, 0.25, 1, 0.01, 0.5, 0.05}

// NewRaster makes a cols x rows raster at a random position on a
// multiple of its resolution.
func NewRaster(rng *rand.Rand, cols, rows int) *grid.Uint8 {
	res := resolutions[rng.IntN(len(resolutions))]
	k := int(math.Round(1 / res))
	west := float64(rng.IntN(300*k)-150*k) / float64(k)
	north := float64(rng.IntN(140*k)-70*k) / float64(k)
	return grid.NewUint8(grid.Spec{West: west, North: north, Res: res, Cols: cols, Rows: rows}, 0)
}

// RandomCases builds n deterministic rasters of every kind the tracer must
// handle: random sizes and noise, checkerboards, single cells, holes in
// holes, no-data islands, one-row and one-column grids, smooth blobs.
func RandomCases(seed uint64, n int) []Case {
	rng := rand.New(rand.NewPCG(seed, 7))
	var out []Case
	for k := 0; k < n; k++ {
		kind := k % 8
		cols, rows := 1+rng.IntN(14), 1+rng.IntN(14)
		var r *grid.Uint8
		switch kind {
		case 0: // noise over a few codes including no data
			r = NewRaster(rng, cols, rows)
			nc := 1 + rng.IntN(4)
			for i := range r.Data {
				r.Data[i] = uint8(rng.IntN(nc + 1))
			}
		case 1: // checkerboard, sometimes with no data as one colour
			r = NewRaster(rng, cols, rows)
			a, b := uint8(1+rng.IntN(3)), uint8(rng.IntN(2)*4)
			for i := range r.Data {
				if (i%cols+i/cols)%2 == 0 {
					r.Data[i] = a
				} else {
					r.Data[i] = b
				}
			}
		case 2: // a single cell in no data (or alone in a 1x1 grid)
			r = NewRaster(rng, cols, rows)
			r.Data[rng.IntN(len(r.Data))] = uint8(1 + rng.IntN(9))
		case 3: // concentric squares: holes in holes, alternating codes
			r = NewRaster(rng, cols, rows)
			codes := []uint8{1, 2, 0, 3}
			off := rng.IntN(4)
			for i := range r.Data {
				c, w := i%cols, i/cols
				d := min(c, w, cols-1-c, rows-1-w)
				r.Data[i] = codes[(d+off)%len(codes)]
			}
		case 4: // one band with no-data islands
			r = NewRaster(rng, cols, rows)
			for i := range r.Data {
				r.Data[i] = 5
				if rng.Float64() < 0.3 {
					r.Data[i] = 0
				}
			}
		case 5: // one row
			r = NewRaster(rng, 1+rng.IntN(20), 1)
			for i := range r.Data {
				r.Data[i] = uint8(rng.IntN(3))
			}
		case 6: // one column
			r = NewRaster(rng, 1, 1+rng.IntN(20))
			for i := range r.Data {
				r.Data[i] = uint8(rng.IntN(3))
			}
		case 7: // smooth blobs with mild noise, like a classified field
			r = NewRaster(rng, cols+6, rows+6)
			c := r.Spec.Cols
			fx, fy, ph := 0.3+rng.Float64(), 0.3+rng.Float64(), rng.Float64()*6
			for i := range r.Data {
				x, y := float64(i%c), float64(i/c)
				z := 1.6*math.Sin(fx*x+ph)*math.Cos(fy*y) + 0.4*rng.NormFloat64()
				r.Data[i] = uint8(math.Max(0, math.Min(9, math.Round(z*2+4))))
			}
		}
		out = append(out, Case{fmt.Sprintf("case%03d-kind%d-%dx%d", k, kind, r.Spec.Cols, r.Spec.Rows), r})
	}
	return out
}

// Components counts the 4-connected components of each code with a
// breadth-first search, independently of the tracer's union-find.
func Components(r *grid.Uint8) map[uint8]int {
	cols, rows := r.Spec.Cols, r.Spec.Rows
	seen := make([]bool, len(r.Data))
	out := map[uint8]int{}
	for s := range r.Data {
		c := r.Data[s]
		if seen[s] || c == r.NoData {
			continue
		}
		out[c]++
		queue := []int{s}
		seen[s] = true
		for len(queue) > 0 {
			k := queue[0]
			queue = queue[1:]
			col, row := k%cols, k/cols
			for _, nb := range [][2]int{{col - 1, row}, {col + 1, row}, {col, row - 1}, {col, row + 1}} {
				if nb[0] < 0 || nb[0] >= cols || nb[1] < 0 || nb[1] >= rows {
					continue
				}
				n := nb[1]*cols + nb[0]
				if !seen[n] && r.Data[n] == c {
					seen[n] = true
					queue = append(queue, n)
				}
			}
		}
	}
	return out
}

// Check is the Go-side law check of one polygonized raster:
//   - every ring is closed, has >= 4 positions, never visits a position
//     twice and has no collinear vertex (Polygonize drops collinear
//     vertices);
//   - exterior rings are counter-clockwise and holes clockwise (RFC 7946
//     section 3.1.6), by the sign of orb/planar.Area;
//   - per code, the planar area equals cell count x res^2 (common practice:
//     shoelace area of a union of disjoint unit squares);
//   - every cell centre lies in exactly the multipolygon of its own code
//     (point in polygon, orb/planar), no-data centres in none;
//   - one Polygon per 4-connected component (the documented rule).
func Check(t testing.TB, name string, r *grid.Uint8, polys map[uint8]orb.MultiPolygon) {
	t.Helper()
	sp := r.Spec
	count := map[uint8]int{}
	for _, c := range r.Data {
		if c != r.NoData {
			count[c]++
		}
	}
	comps := Components(r)
	for code, mp := range polys {
		if count[code] == 0 {
			t.Fatalf("%s: code %d has polygons but no cells", name, code)
		}
		if len(mp) != comps[code] {
			t.Fatalf("%s: code %d: %d polygons, want %d 4-connected components", name, code, len(mp), comps[code])
		}
		var area float64
		for pi, poly := range mp {
			for ri, ring := range poly {
				where := fmt.Sprintf("%s: code %d polygon %d ring %d", name, code, pi, ri)
				if len(ring) < 4 || ring[0] != ring[len(ring)-1] {
					t.Fatalf("%s: not a closed ring of >= 4 positions: %v", where, ring)
				}
				a := planar.Area(ring)
				if (ri == 0) != (a > 0) {
					t.Fatalf("%s: signed area %g: exterior must be CCW (> 0), holes CW (< 0)", where, a)
				}
				seen := map[orb.Point]bool{}
				n := len(ring) - 1
				for k := 0; k < n; k++ {
					if seen[ring[k]] {
						t.Fatalf("%s: position %v visited twice", where, ring[k])
					}
					seen[ring[k]] = true
					p, q, s := ring[(k+n-1)%n], ring[k], ring[(k+1)%n]
					if (p[0] == q[0] && q[0] == s[0]) || (p[1] == q[1] && q[1] == s[1]) {
						t.Fatalf("%s: collinear vertex %v", where, q)
					}
				}
			}
			area += planar.Area(poly)
		}
		want := float64(count[code]) * sp.Res * sp.Res
		if math.Abs(area-want) > 1e-9*want {
			t.Fatalf("%s: code %d area %.12g deg2, want %d cells x res^2 = %.12g", name, code, area, count[code], want)
		}
	}
	for code, n := range count {
		if len(polys[code]) == 0 {
			t.Fatalf("%s: code %d has %d cells but no polygon", name, code, n)
		}
	}
	if sp.CrossesAntimeridian() {
		return // centres east of 180 are checked by the antimeridian test
	}
	for row := 0; row < sp.Rows; row++ {
		for col := 0; col < sp.Cols; col++ {
			lon, lat := sp.Center(col, row)
			c := r.Data[sp.Index(col, row)]
			for code, mp := range polys {
				if in := planar.MultiPolygonContains(mp, orb.Point{lon, lat}); in != (code == c) {
					t.Fatalf("%s: centre of cell (%d,%d) with code %d: inside code %d is %v", name, col, row, c, code, in)
				}
			}
		}
	}
}

// Smooth is a smooth classified field, full coverage or with no data.
func Smooth(seed uint64, cols, rows int, res float64, nodata bool) *grid.Uint8 {
	rng := rand.New(rand.NewPCG(seed, 99))
	sp := grid.Spec{West: -20 + float64(rng.IntN(10)), North: 60 - float64(rng.IntN(10)), Res: res, Cols: cols, Rows: rows}
	r := grid.NewUint8(sp, 0)
	fx, fy, ph := 0.05+0.2*rng.Float64(), 0.05+0.2*rng.Float64(), 6*rng.Float64()
	s := bands.Default()
	for i := range r.Data {
		x, y := float64(i%cols), float64(i/cols)
		z := 1.8*math.Sin(fx*x+ph)*math.Cos(fy*y) + 0.7*math.Sin(0.3*x-0.2*y) + 0.03*rng.NormFloat64()
		if nodata && math.Cos(0.11*x+ph)*math.Sin(0.13*y) < -0.5 {
			continue
		}
		r.Data[i] = s.Classify(z)
	}
	return r
}

// SimplifyCase is a raster with a simplification tolerance in km.
type SimplifyCase struct {
	C  Case
	Km float64
}

// SimplifyCases: smooth fields (full coverage and with no data), noisy
// rasters, and rasters crossing the antimeridian, each with a tolerance.
func SimplifyCases() []SimplifyCase {
	var out []SimplifyCase
	add := func(name string, r *grid.Uint8, km float64) {
		out = append(out, SimplifyCase{Case{name, r}, km})
	}
	for k := 0; k < 30; k++ {
		add("smooth-full", Smooth(uint64(k), 30+k, 25+k%7, 0.1, false), []float64{5, 12, 40}[k%3])
		add("smooth-nodata", Smooth(uint64(100+k), 28+k, 30, 0.25, true), []float64{8, 30, 100}[k%3])
	}
	for _, c := range RandomCases(21, 120) {
		add(c.Name, c.R, []float64{3, 15, 60, 500}[len(out)%4])
	}
	for _, c := range AntimeridianCases() {
		add(c.Name, c.R, 80)
	}
	return out
}

// RingArea is the planar shoelace area of a ring (positive when
// counter-clockwise).
func RingArea(r orb.Ring) float64 {
	s := 0.0
	for i := 0; i+1 < len(r); i++ {
		s += (r[i][0]-r[0][0])*(r[i+1][1]-r[0][1]) - (r[i+1][0]-r[0][0])*(r[i][1]-r[0][1])
	}
	return s / 2
}

// PlanarCheck checks, in grid vertex units (exact integers), that the
// segments of all rings of a simplified layer form a planar arrangement:
// two segments are either the same boundary walked in opposite directions
// by two neighbouring rings, or share at most one end point without
// overlapping, or do not meet at all (OGC Simple Features: rings simple,
// touching only at points; polygons' interiors disjoint). Exact layers are
// checked by shapely instead (their T-junctions touch edge interiors).
func PlanarCheck(t testing.TB, name string, sp grid.Spec, polys map[uint8]orb.MultiPolygon) {
	t.Helper()
	type pt [2]int64
	type seg struct{ a, b pt }
	var segs []seg
	dir := map[seg]bool{}
	toPt := func(p orb.Point) pt {
		return pt{int64(math.Round((p[0] - sp.West) / sp.Res)), int64(math.Round((sp.North - p[1]) / sp.Res))}
	}
	for code, mp := range polys {
		for _, p := range mp {
			for _, ring := range p {
				for k := 0; k+1 < len(ring); k++ {
					s := seg{toPt(ring[k]), toPt(ring[k+1])}
					if s.a == s.b || dir[s] {
						t.Fatalf("%s: code %d: zero-length or repeated segment %v", name, code, s)
					}
					dir[s] = true
					segs = append(segs, s)
				}
			}
		}
	}
	orient := func(a, b, c pt) int64 { return (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0]) }
	on := func(a, b, c pt) bool { // c on segment ab, given collinear
		return min(a[0], b[0]) <= c[0] && c[0] <= max(a[0], b[0]) && min(a[1], b[1]) <= c[1] && c[1] <= max(a[1], b[1])
	}
	for x := range segs {
		for y := x + 1; y < len(segs); y++ {
			s, u := segs[x], segs[y]
			if s.a == u.b && s.b == u.a {
				continue // a shared boundary, walked both ways
			}
			var shared, other1, other2 pt
			switch {
			case s.a == u.a:
				shared, other1, other2 = s.a, s.b, u.b
			case s.a == u.b:
				shared, other1, other2 = s.a, s.b, u.a
			case s.b == u.a:
				shared, other1, other2 = s.b, s.a, u.b
			case s.b == u.b:
				shared, other1, other2 = s.b, s.a, u.a
			default:
				o1, o2 := orient(s.a, s.b, u.a), orient(s.a, s.b, u.b)
				o3, o4 := orient(u.a, u.b, s.a), orient(u.a, u.b, s.b)
				meet := ((o1 > 0) != (o2 > 0) && o1 != 0 && o2 != 0 && (o3 > 0) != (o4 > 0) && o3 != 0 && o4 != 0) ||
					(o1 == 0 && on(s.a, s.b, u.a)) || (o2 == 0 && on(s.a, s.b, u.b)) ||
					(o3 == 0 && on(u.a, u.b, s.a)) || (o4 == 0 && on(u.a, u.b, s.b))
				if meet {
					t.Fatalf("%s: segments %v and %v meet", name, s, u)
				}
				continue
			}
			d1 := pt{other1[0] - shared[0], other1[1] - shared[1]}
			d2 := pt{other2[0] - shared[0], other2[1] - shared[1]}
			if d1[0]*d2[1]-d1[1]*d2[0] == 0 && d1[0]*d2[0]+d1[1]*d2[1] > 0 {
				t.Fatalf("%s: segments %v and %v overlap", name, s, u)
			}
		}
	}
}

func Raster(cols int, res float64, cells ...uint8) *grid.Uint8 {
	sp := grid.Spec{West: 0, North: float64(len(cells)/cols) * res, Res: res, Cols: cols, Rows: len(cells) / cols}
	r := grid.NewUint8(sp, 0)
	copy(r.Data, cells)
	return r
}

// BenchRaster is a deterministic, realistic band raster on the global
// 0.1 deg grid (3600 x 1800): a smooth z field (sines plus Gaussian blobs
// plus mild noise) classified with bands.Default(), and about 30% no data
// (where a second smooth field is low, like areas without stations).
func BenchRaster(tb testing.TB) *grid.Uint8 {
	sp, err := grid.Global(0.1)
	if err != nil {
		tb.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(2026, 12))
	type blob struct{ x, y, s, a float64 }
	blobs := make([]blob, 40)
	for i := range blobs {
		blobs[i] = blob{rng.Float64() * 360, rng.Float64()*180 - 90, 3 + rng.Float64()*12, rng.NormFloat64() * 1.5}
	}
	s := bands.Default()
	r := grid.NewUint8(sp, 0)
	for row := 0; row < sp.Rows; row++ {
		for col := 0; col < sp.Cols; col++ {
			lon, lat := sp.Center(col, row)
			x, y := (lon+180)*math.Pi/180, lat*math.Pi/180
			mask := math.Sin(2*x+1)*math.Cos(3*y) + 0.6*math.Sin(5*x+3*y)
			if mask < -0.38 {
				continue // no data
			}
			z := 0.8*math.Sin(3*x)*math.Cos(2*y) + 0.5*math.Sin(7*x+5*y+0.5) + 0.3*math.Cos(11*x-9*y)
			for _, b := range blobs {
				dx, dy := lon+180-b.x, lat-b.y
				if d2 := dx*dx + dy*dy; d2 < 9*b.s*b.s {
					z += b.a * math.Exp(-d2/(2*b.s*b.s))
				}
			}
			z += 0.08 * rng.NormFloat64()
			r.Data[sp.Index(col, row)] = s.Classify(z)
		}
	}
	return r
}

// BenchField is a smooth classified field made row by row, for the
// benchmarks that stream a grid too large to hold (like BenchRaster without
// blobs and noise): z and the no-data mask are sums of sines separable in
// column and row, so a cell costs a few multiplications. Codes are
// bands.Default()'s, 0 for no data.
type BenchField struct {
	sp  grid.Spec
	col [][8]float64
}

// NewBenchField makes the field on the grid sp; the column terms are
// computed once here.
func NewBenchField(sp grid.Spec) *BenchField {
	f := &BenchField{sp: sp, col: make([][8]float64, sp.Cols)}
	for c := range f.col {
		x := (float64(c) + 0.5) / float64(sp.Cols) * 2 * math.Pi
		f.col[c] = [8]float64{math.Sin(2*x + 1), math.Sin(5 * x), math.Cos(5 * x), math.Sin(3 * x),
			math.Sin(7*x + 0.5), math.Cos(7*x + 0.5), math.Sin(11 * x), math.Cos(11 * x)}
	}
	return f
}

// Rows fills block, whole rows of the grid from row0 on, with the field's
// band codes.
func (f *BenchField) Rows(row0 int, block []uint8) {
	sc := bands.Default()
	cols := f.sp.Cols
	for k := 0; k < len(block)/cols; k++ {
		y := (float64(row0+k) + 0.5) / float64(f.sp.Rows) * math.Pi
		s2, c2, s3, c3 := math.Sin(2*y), math.Cos(2*y), math.Sin(3*y), math.Cos(3*y)
		s5, c5, s9, c9 := math.Sin(5*y), math.Cos(5*y), math.Sin(9*y), math.Cos(9*y)
		line := block[k*cols : (k+1)*cols]
		for c := range line {
			t := &f.col[c]
			if t[0]*c3+0.6*(t[1]*c3+t[2]*s3) < -0.38 {
				line[c] = 0
				continue
			}
			line[c] = sc.Classify(0.8*t[3]*c2 + 0.5*(t[4]*c5+t[5]*s5) + 0.3*(t[7]*c9+t[6]*s9) + 0.2*s2)
		}
	}
}

// AntimeridianCases are random rasters on grids that cross 180: one
// whose cell edges meet 180, one (res 0.7) whose column straddles it.
func AntimeridianCases() []Case {
	rng := rand.New(rand.NewPCG(11, 3))
	specs := []grid.Spec{
		{West: 170, North: 10, Res: 1, Cols: 20, Rows: 8},
		{West: 179.2, North: -30, Res: 0.7, Cols: 6, Rows: 5},
		{West: 179.75, North: 60, Res: 0.25, Cols: 3, Rows: 4},
	}
	var out []Case
	for k, s := range specs {
		r := grid.NewUint8(s, 0)
		for i := range r.Data {
			r.Data[i] = uint8(rng.IntN(4))
		}
		out = append(out, Case{"antimeridian" + strconv.Itoa(k), r})
	}
	return out
}
