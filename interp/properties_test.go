package interp

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"drygrid/grid"
)

// TestWeightsSumToOne: Shepard's (1968) normalised weights sum to one, fall
// with distance, and stand in the ratio (d_j/d_i)^p (the law that defines
// them).
func TestWeightsSumToOne(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	for range 2000 {
		n := 1 + r.IntN(20)
		d := make([]float64, n)
		for i := range d {
			d[i] = 0.001 + r.Float64()*500
		}
		slices.Sort(d)
		p := []float64{0.5, 1, 1.5, 2, 3, 4, 7.25}[r.IntN(7)]
		w := idwWeights(d, p)
		s := 0.0
		for i := range w {
			s += w[i]
			if i > 0 && w[i] > w[i-1] {
				t.Fatalf("weights not falling with distance: %v for %v", w, d)
			}
			if want := math.Pow(d[0]/d[i], p); math.Abs(w[i]/w[0]-want) > 1e-12*want {
				t.Fatalf("w[%d]/w[0] = %g, (d0/d%d)^%g = %g", i, w[i]/w[0], i, p, want)
			}
		}
		if math.Abs(s-1) > 1e-14 {
			t.Fatalf("weights sum to %.17g for %d distances", s, n)
		}
	}
}

// randomStations are invented stations in a lat-lon box, with values in
// [-3, 3].
func randomStations(r *rand.Rand, n int, w, s, e, nn float64) []Point {
	pts := make([]Point, n)
	for i := range pts {
		pts[i] = Point{w + r.Float64()*(e-w), s + r.Float64()*(nn-s), r.Float64()*6 - 3}
	}
	return pts
}

// TestEstimateIsShepardMean: At equals the weighted mean of its neighbours'
// values with idwWeights of their great-circle distances (DistanceKm), lies
// within their [min, max], and uses exactly the stations a brute-force
// search over all of them finds (within the radius, k nearest, ties by
// input order).
func TestEstimateIsShepardMean(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 22))
	for _, p := range []Params{
		{Power: 2, Neighbors: 6, RadiusKm: 300, MinStations: 1},
		{Power: 1.5, Neighbors: 4, RadiusKm: 900, MinStations: 2},
		{Power: 3, Neighbors: 12, RadiusKm: 500, MinStations: 3},
	} {
		pts := randomStations(r, 300, 160, 50, 220, 90) // across 180 and up to the pole
		ip, err := New(pts, p)
		if err != nil {
			t.Fatal(err)
		}
		for range 2000 {
			lon, lat := 150+r.Float64()*80, 45+r.Float64()*45
			z, n, ok := ip.At(lon, lat)
			ids, dist := ip.nearest(lon, lat)
			// Brute force: every station, DistanceKm, stable order.
			type sd struct {
				i int
				d float64
			}
			var all []sd
			for i, q := range pts {
				if d := DistanceKm(lon, lat, q.Lon, q.Lat); d <= p.RadiusKm {
					all = append(all, sd{i, d})
				}
			}
			slices.SortStableFunc(all, func(a, b sd) int {
				if a.d < b.d {
					return -1
				} else if a.d > b.d {
					return 1
				}
				return 0
			})
			if len(all) > p.Neighbors {
				all = all[:p.Neighbors]
			}
			if len(all) != n || len(ids) != n {
				t.Fatalf("(%g,%g): At uses %d, nearest %d, brute force %d", lon, lat, n, len(ids), len(all))
			}
			for i := range all {
				if all[i].i != ids[i] || math.Abs(all[i].d-dist[i]) > 1e-8 {
					t.Fatalf("(%g,%g) neighbour %d: %d at %g km, brute force %d at %g km", lon, lat, i, ids[i], dist[i], all[i].i, all[i].d)
				}
			}
			if ok != (n >= p.MinStations) {
				t.Fatalf("(%g,%g): ok %v with %d stations, min %d", lon, lat, ok, n, p.MinStations)
			}
			if !ok {
				continue
			}
			w := idwWeights(dist, p.Power)
			want, lo, hi := 0.0, math.Inf(1), math.Inf(-1)
			for i, id := range ids {
				v := pts[id].Z
				want += w[i] * v
				lo, hi = min(lo, v), max(hi, v)
			}
			if math.Abs(z-want) > 1e-12 {
				t.Fatalf("(%g,%g): At %.17g, weighted mean %.17g", lon, lat, z, want)
			}
			if z < lo || z > hi {
				t.Fatalf("(%g,%g): At %.17g outside the neighbours' [%g, %g]", lon, lat, z, lo, hi)
			}
		}
	}
}

// TestConstantField: a constant field gives that constant exactly in every
// cell that has data (the weights are a convex combination).
func TestConstantField(t *testing.T) {
	r := rand.New(rand.NewPCG(31, 32))
	pts := randomStations(r, 400, -30, -40, 30, 10)
	for i := range pts {
		pts[i].Z = 0.7
	}
	for _, p := range []Params{DefaultParams(), {Power: 1.3, Neighbors: 7, RadiusKm: 700, MinStations: 2}} {
		ip, err := New(pts, p)
		if err != nil {
			t.Fatal(err)
		}
		spec, _ := grid.NewSpec(-30, -40, 30, 10, 0.25)
		out := ip.Grid(spec, nil)
		have := 0
		for i, v := range out.Data {
			if v == grid.NoDataIndex {
				continue
			}
			have++
			if v != float32(0.7) {
				t.Fatalf("cell %d = %.9g, want 0.7 exactly", i, v)
			}
		}
		if have < spec.Len()/2 {
			t.Fatalf("only %d of %d cells have data", have, spec.Len())
		}
		if z, _, ok := ip.At(1.234, -5.678); !ok || z != 0.7 {
			t.Fatalf("At = %v, %v; want 0.7", z, ok)
		}
	}
}

// TestStationOnCellCentre: a cell closer than 1 m to a station takes that
// station's value (the 1 m rule of the package doc); of two, the nearest;
// of two at the same place, the first in the input.
func TestStationOnCellCentre(t *testing.T) {
	spec, _ := grid.NewSpec(0, 0, 2, 2, 0.5)
	lon, lat := spec.Center(1, 2)             // 0.75, 0.75
	off := 0.0004 / 6371.0088 * 180 / math.Pi // 40 cm north
	pts := []Point{
		{lon, lat, 1.5},
		{0.5, 0.5, -2}, {1.5, 1.5, 2}, {0.1, 1.9, 0},
		{lon + 0.5, lat + off, -1.25},                     // 40 cm north of the centre of cell (2, 2)
		{lon + 0.5, lat + off/2, 2.75},                    // 20 cm: nearer, wins
		{lon + 1, lat + 1, 0.5}, {lon + 1, lat + 1, -0.5}, // centre of cell (3, 0) twice: the first wins
	}
	ip, err := New(pts, DefaultParams())
	if err != nil {
		t.Fatal(err)
	}
	out := ip.Grid(spec, nil)
	for _, c := range []struct {
		col, row int
		want     float32
	}{{1, 2, 1.5}, {2, 2, 2.75}, {3, 0, 0.5}} {
		if v, _ := out.At(c.col, c.row); v != c.want {
			t.Errorf("cell (%d,%d) = %v, want %v", c.col, c.row, v, c.want)
		}
	}
	// 2 m away is no longer exact.
	ip2, _ := New([]Point{{lon, lat + 2*off*2.5, 1.5}, {0.5, 0.5, -2}, {1.5, 1.5, 2}}, DefaultParams())
	if z, _, _ := ip2.At(lon, lat); z == 1.5 {
		t.Errorf("a station 2 m away gave its value exactly")
	}
}

// TestTiesByInputOrder: with k = 1 and two stations at exactly the same
// distance (mirror images across the prime meridian, where the cell is), the
// one first in the input is used, whichever it is.
func TestTiesByInputOrder(t *testing.T) {
	p := Params{Power: 2, Neighbors: 1, RadiusKm: 300, MinStations: 1}
	a, b := Point{-1, 46, 1}, Point{1, 46, -1}
	for _, c := range []struct {
		pts  []Point
		want float64
	}{{[]Point{a, b}, 1}, {[]Point{b, a}, -1}} {
		ip, _ := New(c.pts, p)
		if z, n, ok := ip.At(0, 46); !ok || n != 1 || z != c.want {
			t.Errorf("input %v: At = %v, %d, %v; want %v", c.pts, z, n, ok, c.want)
		}
		spec := grid.Spec{West: -0.5, North: 46.5, Res: 1, Cols: 1, Rows: 1} // one cell centred on (0, 46)
		if v := ip.Grid(spec, nil).Data[0]; float64(v) != c.want {
			t.Errorf("input %v: Grid = %v; want %v", c.pts, v, c.want)
		}
	}
}

// TestWorkersByteIdentical: the raster does not depend on the number of
// workers (the output never depends on the core count); progress reaches
// every row once, in order.
func TestWorkersByteIdentical(t *testing.T) {
	r := rand.New(rand.NewPCG(41, 42))
	pts := append(randomStations(r, 3000, -180, -90, 180, 90), randomStations(r, 500, 170, -20, 190, 20)...)
	spec, _ := grid.Global(1)
	var outs [][]float32
	for _, w := range []int{1, 7, 0} {
		p := DefaultParams()
		p.Workers = w
		ip, err := New(pts, p)
		if err != nil {
			t.Fatal(err)
		}
		last := 0
		out := ip.Grid(spec, func(done, rows int) {
			if done != last+1 || rows != spec.Rows {
				t.Errorf("progress %d/%d after %d", done, rows, last)
			}
			last = done
		})
		if last != spec.Rows {
			t.Errorf("workers %d: progress ended at %d of %d rows", w, last, spec.Rows)
		}
		outs = append(outs, out.Data)
	}
	for i := range outs[0] {
		if math.Float32bits(outs[0][i]) != math.Float32bits(outs[1][i]) || math.Float32bits(outs[0][i]) != math.Float32bits(outs[2][i]) {
			t.Fatalf("cell %d: %v (1 worker), %v (7), %v (GOMAXPROCS)", i, outs[0][i], outs[1][i], outs[2][i])
		}
	}
}

// TestMinStationsMask: a cell is no data exactly when fewer than
// MinStations stations lie within the radius (counted here by brute force
// with DistanceKm).
func TestMinStationsMask(t *testing.T) {
	r := rand.New(rand.NewPCG(51, 52))
	pts := randomStations(r, 60, 0, 0, 10, 10)
	spec, _ := grid.NewSpec(-2, -2, 12, 12, 0.2)
	for _, min := range []int{1, 3, 5} {
		p := Params{Power: 2, Neighbors: 5, RadiusKm: 150, MinStations: min}
		ip, _ := New(pts, p)
		out := ip.Grid(spec, nil)
		masked := 0
		for row := range spec.Rows {
			for col := range spec.Cols {
				lon, lat := spec.Center(col, row)
				cnt := 0
				for _, q := range pts {
					if DistanceKm(lon, lat, q.Lon, q.Lat) <= p.RadiusKm {
						cnt++
					}
				}
				v, has := out.At(col, row)
				if has != (cnt >= min) {
					t.Fatalf("min %d, cell (%d,%d): %d stations within %g km, value %v", min, col, row, cnt, p.RadiusKm, v)
				}
				if _, n, ok := ip.At(lon, lat); ok != has || n != minInt(cnt, p.Neighbors) {
					t.Fatalf("min %d, cell (%d,%d): At n %d ok %v, brute force %d", min, col, row, n, ok, cnt)
				}
				if !has {
					masked++
				}
			}
		}
		if masked == 0 {
			t.Fatalf("min %d: nothing masked; the test needs gaps", min)
		}
	}
}

func minInt(a, b int) int {
	if a < b {
		return a
	}
	return b
}

// TestAntimeridianAndPole: a cell at 179.95 sees a station at -179.9
// (8.4 km away on the equator); a grid whose spec runs east past 180 equals
// At at its centres; a search circle holding the pole reaches stations on
// the far side.
func TestAntimeridianAndPole(t *testing.T) {
	one := Params{Power: 2, Neighbors: 4, RadiusKm: 20, MinStations: 1}
	ip, _ := New([]Point{{-179.9, 0, 1.75}, {170, 0, -1}}, one)
	if z, n, ok := ip.At(179.95, 0); !ok || n != 1 || z != 1.75 {
		t.Errorf("At(179.95, 0) = %v, %d, %v; want the station at -179.9", z, n, ok)
	}
	if z, n, ok := ip.At(539.95, 0); !ok || n != 1 || z != 1.75 { // another form of 179.95
		t.Errorf("At(539.95, 0) = %v, %d, %v", z, n, ok)
	}
	// Across the pole: (0, 89.9) and (180, 89.9) are 0.2 deg = 22.2 km apart.
	ipp, _ := New([]Point{{180, 89.9, -0.5}}, Params{Power: 2, Neighbors: 4, RadiusKm: 25, MinStations: 1})
	if z, n, ok := ipp.At(0, 89.9); !ok || n != 1 || z != -0.5 {
		t.Errorf("across the pole: At = %v, %d, %v", z, n, ok)
	}
	r := rand.New(rand.NewPCG(61, 62))
	pts := append(randomStations(r, 400, 150, -30, 210, 30), randomStations(r, 200, -180, 70, 180, 90)...)
	ip2, _ := New(pts, DefaultParams())
	for _, bb := range [][4]float64{{170, -10, -170, 10}, {-180, 75, 180, 90}} {
		spec, _ := grid.NewSpec(bb[0], bb[1], bb[2], bb[3], 0.5)
		if have := gridMatchesAt(t, ip2, spec, fmt.Sprintf("bbox %v", bb)); have == 0 {
			t.Fatalf("bbox %v: no data at all", bb)
		}
	}
}

// TestAtRejectsBadLatitude: no panic and no value off the sphere.
func TestAtRejectsBadLatitude(t *testing.T) {
	ip, _ := New([]Point{{0, 0, 1}}, Params{Power: 2, Neighbors: 1, RadiusKm: 10, MinStations: 1})
	for _, q := range [][2]float64{{0, 91}, {0, -90.5}, {0, math.NaN()}, {math.NaN(), 0}, {math.Inf(1), 0}} {
		if _, _, ok := ip.At(q[0], q[1]); ok {
			t.Errorf("At(%v, %v) gave a value", q[0], q[1])
		}
	}
}

// FuzzInterp: any finite station set and query gives no panic, and a value
// inside the range of the station values.
func FuzzInterp(f *testing.F) {
	f.Add(179.95, 0.0, 1.0, -179.9, 0.1, 2.0, 180.0, 0.05, 300.0, 2.0)
	f.Add(0.0, 90.0, -1.0, 123.0, 89.9, 1.0, 45.0, 89.95, 50.0, 3.0)
	f.Fuzz(func(t *testing.T, lon1, lat1, z1, lon2, lat2, z2, qlon, qlat, radius, power float64) {
		p := Params{Power: power, Neighbors: 2, RadiusKm: radius, MinStations: 1}
		ip, err := New([]Point{{lon1, lat1, z1}, {lon2, lat2, z2}}, p)
		if err != nil {
			return
		}
		z, _, ok := ip.At(qlon, qlat)
		if ok && (z < min(z1, z2) || z > max(z1, z2) || math.IsNaN(z)) {
			t.Fatalf("At = %v outside [%v, %v]", z, min(z1, z2), max(z1, z2))
		}
		if spec, err := grid.NewSpec(qlon-1, max(qlat-1, -90), qlon+1, min(qlat+1, 90), 0.5); err == nil {
			ip.Grid(spec, nil)
		}
	})
}

// TestGridMatchesAtDense: where many more than k stations lie within the
// radius, Grid (row spans, the previous cell's k-th distance as a bound)
// chooses the same neighbours as At (R-tree boxes, plain selection), which
// TestEstimateIsShepardMean checks against brute force.
func TestGridMatchesAtDense(t *testing.T) {
	r := rand.New(rand.NewPCG(81, 82))
	pts := randomStations(r, 3000, -10, -10, 10, 10)
	for i := range 200 { // duplicates and exact ties
		pts = append(pts, Point{pts[i].Lon, pts[i].Lat, -pts[i].Z})
	}
	for _, p := range []Params{
		{Power: 2, Neighbors: 3, RadiusKm: 150, MinStations: 2},
		{Power: 2, Neighbors: 12, RadiusKm: 250, MinStations: 12},
		{Power: 2.5, Neighbors: 7, RadiusKm: 700, MinStations: 1},
	} {
		ip, _ := New(pts, p)
		spec, _ := grid.NewSpec(-12, -12, 12, 12, 0.1)
		gridMatchesAt(t, ip, spec, fmt.Sprintf("%+v", p))
	}
}

// gridMatchesAt checks that Grid and At agree on every cell of spec (the
// same coverage, values to 1e-6: At adds in another order) and returns
// the number of covered cells; what names the case in a failure.
func gridMatchesAt(t *testing.T, ip *Interpolator, spec grid.Spec, what string) int {
	t.Helper()
	out := ip.Grid(spec, nil)
	have := 0
	for row := range spec.Rows {
		for col := range spec.Cols {
			lon, lat := spec.Center(col, row)
			z, _, ok := ip.At(lon, lat)
			v, has := out.At(col, row)
			if ok != has || (ok && math.Abs(float64(v)-z) > 1e-6) {
				t.Fatalf("%s: cell (%d,%d) at (%g,%g): Grid %v %v, At %v %v", what, col, row, lon, lat, v, has, z, ok)
			}
			have += b2i(has)
		}
	}
	return have
}
