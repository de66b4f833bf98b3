package interp

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"drygrid/grid"
	"drygrid/interp/internal/lanes"
)

// TestLanePathMatchesCandidates: the lane kernel and the candidate list
// (the path of every other setting, and of At; the candidate list is
// checked against a NumPy brute force in reference_test.go) give the same
// grid to a unit in the last place of float32 (or 1e-15 where a weighted
// mean cancels to about zero: the sums are taken in other orders), on
// stations dense enough that most cells have more than k within the
// radius, with duplicates (ties at the k-th distance) and stations on cell
// centres (the 1 m rule).
func TestLanePathMatchesCandidates(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	pts := randomStations(r, 2000, -20, -10, 20, 10)
	for i := range 100 {
		pts = append(pts, Point{pts[i].Lon, pts[i].Lat, -pts[i].Z})
	}
	for i := range 50 {
		pts = append(pts, Point{-15 + 0.05 + 0.1*float64(i), 0.05, float64(i) / 25})
	}
	spec, _ := grid.NewSpec(-20, -10, 20, 10, 0.1)
	for _, p := range []Params{
		{Power: 2, Neighbors: 12, RadiusKm: 300, MinStations: 3},
		{Power: 2, Neighbors: 4, RadiusKm: 120, MinStations: 1},
	} {
		ip, _ := New(pts, p)
		lane := ip.Grid(spec, nil)
		ip.fast = false // the general path: the candidate list, exact angles
		cands := ip.Grid(spec, nil)
		diff := 0
		for i, a := range lane.Data {
			b := cands.Data[i]
			if a == b {
				continue
			}
			tol := 0x1p-23*math.Max(math.Abs(float64(a)), math.Abs(float64(b))) + 1e-15
			if a == grid.NoDataIndex || b == grid.NoDataIndex || math.Abs(float64(a)-float64(b)) > tol {
				t.Fatalf("%+v cell %d: lane kernel %v, candidates %v", p, i, a, b)
			}
			diff++
		}
		t.Logf("%+v: %d of %d cells differ within the tolerance", p, diff, len(lane.Data))
	}
}

// TestGridAntimeridianFewStations: a row with few stations near the
// antimeridian holds copies of some of them shifted by 360 degrees right
// after the others, so the union of a group's spans can hold a station and
// its copy; each cell must count only its own span. Grid agrees with At
// (R-tree boxes, no copies) on 300 random sets of 40 stations across the
// antimeridian (a case the end-to-end NumPy test met with one of its random
// seeds).
func TestGridAntimeridianFewStations(t *testing.T) {
	spec, _ := grid.NewSpec(174, -25, -174, -15, 0.25)
	p := Params{Power: 2, Neighbors: 8, RadiusKm: 250, MinStations: 3}
	for seed := range uint64(300) {
		r := rand.New(rand.NewPCG(seed, 9))
		pts := make([]Point, 40)
		for i := range pts {
			pts[i] = Point{180 + (r.Float64()*2-1)*6, -20 + (r.Float64()*2-1)*4, r.Float64()*4 - 2}
		}
		ip, _ := New(pts, p)
		gridMatchesAt(t, ip, spec, fmt.Sprintf("seed %d", seed))
	}
}

// TestLonSpanColumns: columns gives, column by column, the span move gives
// for that column, and repeats the last past the row's end: on random
// station longitudes with the shifted copies, columns in ascending order
// with a wrap back west (as a box across the antimeridian has), and spans
// that cover every longitude.
func TestLonSpanColumns(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := range 300 {
		n := rng.IntN(60)
		lons := make([]float64, n)
		for i := range lons {
			lons[i] = -200 + 400*rng.Float64()
		}
		if trial%3 == 0 && n > 2 {
			lons[1] = lons[0] // equal longitudes
		}
		slices.Sort(lons)
		buf := append(lons, math.Inf(1), math.Inf(1)) // the sentinels past the end
		lons = buf[:n]
		dl := []float64{0.05, 1, 7, 45, 180}[trial%5]
		cols := 1 + rng.IntN(40)
		step := 360.0 / float64(cols) * rng.Float64()
		colLon := make([]float64, cols)
		start := -180 + 360*rng.Float64()
		for c := range colLon {
			colLon[c] = normLon(start + float64(c)*step)
		}
		// Stations right on the bounds of some columns' spans, where
		// < and <= differ.
		for i := 0; i < n && trial%2 == 0; i += 3 {
			l := colLon[rng.IntN(cols)]
			lons[i] = []float64{l - dl - lonEps, l + dl + lonEps}[i%2]
		}
		slices.Sort(lons)
		mk := func() lonSpan {
			return lonSpan{lons: lons, dl: dl, full: dl > 179, hi: len(lons), prev: math.Inf(1)}
		}
		lom1, him1 := make([]int64, cols+lanes.Width-1), make([]int64, cols+lanes.Width-1)
		w := mk()
		w.columns(colLon, lom1, him1)
		ref := mk()
		for c := range lom1 {
			if c < cols {
				ref.move(colLon[c])
			}
			lo, hi := int64(ref.lo-1), int64(ref.hi-1)
			if ref.full {
				lo, hi = -1, int64(len(lons)-1)
			}
			if lom1[c] != lo || him1[c] != hi {
				t.Fatalf("trial %d column %d (lon %g, dl %g): columns %d..%d, move %d..%d", trial, c, colLon[min(c, cols-1)], dl, lom1[c], him1[c], lo, hi)
			}
		}
	}
}
