package geojson

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/grid"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// polyCase is a named test raster.
type polyCase struct {
	name string
	r    *grid.Uint8
}

var polyResolutions = []float64{0.1, 0.25, 1, 0.01, 0.5, 0.05}

// polyNewRaster makes a cols x rows raster at a random position on a
// multiple of its resolution.
func polyNewRaster(rng *rand.Rand, cols, rows int) *grid.Uint8 {
	res := polyResolutions[rng.IntN(len(polyResolutions))]
	k := int(math.Round(1 / res))
	west := float64(rng.IntN(300*k)-150*k) / float64(k)
	north := float64(rng.IntN(140*k)-70*k) / float64(k)
	return grid.NewUint8(grid.Spec{West: west, North: north, Res: res, Cols: cols, Rows: rows}, 0)
}

// polyRandomCases builds n deterministic rasters of every kind the issue
// names: random sizes and noise, checkerboards, single cells, holes in
// holes, no-data islands, one-row and one-column grids, smooth blobs.
func polyRandomCases(seed uint64, n int) []polyCase {
	rng := rand.New(rand.NewPCG(seed, 7))
	var out []polyCase
	for k := 0; k < n; k++ {
		kind := k % 8
		cols, rows := 1+rng.IntN(14), 1+rng.IntN(14)
		var r *grid.Uint8
		switch kind {
		case 0: // noise over a few codes including no data
			r = polyNewRaster(rng, cols, rows)
			nc := 1 + rng.IntN(4)
			for i := range r.Data {
				r.Data[i] = uint8(rng.IntN(nc + 1))
			}
		case 1: // checkerboard, sometimes with no data as one colour
			r = polyNewRaster(rng, cols, rows)
			a, b := uint8(1+rng.IntN(3)), uint8(rng.IntN(2)*4)
			for i := range r.Data {
				if (i%cols+i/cols)%2 == 0 {
					r.Data[i] = a
				} else {
					r.Data[i] = b
				}
			}
		case 2: // a single cell in no data (or alone in a 1x1 grid)
			r = polyNewRaster(rng, cols, rows)
			r.Data[rng.IntN(len(r.Data))] = uint8(1 + rng.IntN(9))
		case 3: // concentric squares: holes in holes, alternating codes
			r = polyNewRaster(rng, cols, rows)
			codes := []uint8{1, 2, 0, 3}
			off := rng.IntN(4)
			for i := range r.Data {
				c, w := i%cols, i/cols
				d := min(c, w, cols-1-c, rows-1-w)
				r.Data[i] = codes[(d+off)%len(codes)]
			}
		case 4: // one band with no-data islands
			r = polyNewRaster(rng, cols, rows)
			for i := range r.Data {
				r.Data[i] = 5
				if rng.Float64() < 0.3 {
					r.Data[i] = 0
				}
			}
		case 5: // one row
			r = polyNewRaster(rng, 1+rng.IntN(20), 1)
			for i := range r.Data {
				r.Data[i] = uint8(rng.IntN(3))
			}
		case 6: // one column
			r = polyNewRaster(rng, 1, 1+rng.IntN(20))
			for i := range r.Data {
				r.Data[i] = uint8(rng.IntN(3))
			}
		case 7: // smooth blobs with mild noise, like a classified field
			r = polyNewRaster(rng, cols+6, rows+6)
			c := r.Spec.Cols
			fx, fy, ph := 0.3+rng.Float64(), 0.3+rng.Float64(), rng.Float64()*6
			for i := range r.Data {
				x, y := float64(i%c), float64(i/c)
				z := 1.6*math.Sin(fx*x+ph)*math.Cos(fy*y) + 0.4*rng.NormFloat64()
				r.Data[i] = uint8(math.Max(0, math.Min(9, math.Round(z*2+4))))
			}
		}
		out = append(out, polyCase{fmt.Sprintf("case%03d-kind%d-%dx%d", k, kind, r.Spec.Cols, r.Spec.Rows), r})
	}
	return out
}

// polyComponents counts the 4-connected components of each code with a
// breadth-first search, independently of the tracer's union-find.
func polyComponents(r *grid.Uint8) map[uint8]int {
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

// polyCheck is the Go-side law check of one polygonized raster:
//   - every ring is closed, has >= 4 positions, never visits a position
//     twice and has no collinear vertex (the "drop collinear");
//   - exterior rings are counter-clockwise and holes clockwise (RFC 7946
//     section 3.1.6), by the sign of orb/planar.Area;
//   - per code, the planar area equals cell count x res^2 (common practice:
//     shoelace area of a union of disjoint unit squares);
//   - every cell centre lies in exactly the multipolygon of its own code
//     (point in polygon, orb/planar), no-data centres in none;
//   - one Polygon per 4-connected component (the documented rule).
func polyCheck(t testing.TB, name string, r *grid.Uint8, polys map[uint8]orb.MultiPolygon) {
	t.Helper()
	sp := r.Spec
	count := map[uint8]int{}
	for _, c := range r.Data {
		if c != r.NoData {
			count[c]++
		}
	}
	comps := polyComponents(r)
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
