package interp

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"drygrid/grid"
)

// randomWindow is m stations (plus padding) scattered around the cell
// (cx, cy, cz) out to about twice the chord c, some on the cell itself
// and some with equal or signed-zero values.
func randomWindow(r *rand.Rand, m int, c float64) (x, y, z, v []float64, cx, cy, cz float64) {
	lon, lat := r.Float64()*360-180, r.Float64()*160-80
	cx, cy, cz = unitVector(lon, lat)
	n := m + windowLanes
	x, y, z, v = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for j := range m {
		switch r.IntN(8) {
		case 0: // on the cell, or within 1 m of it
			x[j], y[j], z[j] = cx, cy, cz+r.Float64()*1e-8
		default:
			x[j], y[j], z[j] = cx+(r.Float64()*2-1)*c, cy+(r.Float64()*2-1)*c, cz+(r.Float64()*2-1)*c
		}
		switch r.IntN(6) {
		case 0:
			v[j] = 0
		case 1:
			v[j] = math.Copysign(0, -1)
		case 2:
			v[j] = 1.25
		default:
			v[j] = r.Float64()*6 - 3
		}
	}
	for j := m; j < n; j++ { // read after the window, which must not count them
		x[j], y[j], z[j], v[j] = cx, cy, cz, 99
	}
	return
}

// TestWindowWeightIsGreatCircle: the kernel's weight of one station is
// 1/theta^2 for the central angle theta = 2 asin(c/2) of the chord c (the
// chord of a unit circle, common practice), computed with math.Asin, to
// 1e-15 relative (a few units in the last place on each side: the
// reference rounds in the square root, the arcsine and the square) from 1 m out to the kernel's largest radius (337 km): the
// series (1/c^2)(1 - t/3 - t^2/15 - 31 t^3/945 - 289 t^4/14175), t = c^2/4,
// is the reciprocal of asinSqSeries, worked out term by term with exact
// fractions, and stops below 3e-18.
func TestWindowWeightIsGreatCircle(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	c2max := 4 * shortSeriesMaxT
	k := newWindowConsts(c2max)
	d2 := make([]float64, windowLanes)
	for range 20000 {
		c := math.Sqrt(exactChordSq) * math.Pow(math.Sqrt(c2max/exactChordSq), r.Float64()) * 0.999
		x := []float64{1 - c*c/2, 0, 0, 0}
		y := []float64{c * math.Sqrt(1-c*c/4), 0, 0, 0}
		z := []float64{0, 0, 0, 0}
		v := []float64{1, 0, 0, 0}
		call := &windowCell{x: x, y: y, z: z, v: v, d2: d2, m: 1, cx: 1, k: k}
		windowSumsGo(call)
		o := call.out
		if o.n != 1 {
			t.Fatalf("chord %g: %d stations counted", c, o.n)
		}
		theta := 2 * math.Asin(math.Sqrt(d2[0])/2)
		if want := 1 / (theta * theta); math.Abs(o.sw-want) > 1e-15*want {
			t.Fatalf("chord %g: weight %.17g, 1/theta^2 %.17g (relative %.2g)", c, o.sw, want, (o.sw-want)/want)
		}
	}
}

// TestWindowPathMatchesCandidates: the window kernel and the candidate list
// (the path of every other setting, and of At; the candidate list is
// checked against a NumPy brute force in reference_test.go) give the same
// grid to a unit in the last place of float32 (or 1e-15 where a weighted
// mean cancels to about zero: the sums are taken in other orders), on
// stations dense enough that most cells have more than k within the
// radius, with duplicates (ties at the k-th distance) and stations on cell
// centres (the 1 m rule).
func TestWindowPathMatchesCandidates(t *testing.T) {
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
		win := ip.Grid(spec, nil)
		ip.fast = false // the general path: the candidate list, exact angles
		cands := ip.Grid(spec, nil)
		diff := 0
		for i, a := range win.Data {
			b := cands.Data[i]
			if a == b {
				continue
			}
			tol := 0x1p-23*math.Max(math.Abs(float64(a)), math.Abs(float64(b))) + 1e-15
			if a == grid.NoDataIndex || b == grid.NoDataIndex || math.Abs(float64(a)-float64(b)) > tol {
				t.Fatalf("%+v cell %d: window %v, candidates %v", p, i, a, b)
			}
			diff++
		}
		t.Logf("%+v: %d of %d cells differ within the tolerance", p, diff, len(win.Data))
	}
}

// TestGridAntimeridianFewStations: a row with few stations near the
// antimeridian holds copies of some of them shifted by 360 degrees right
// after the others, so the stations read after a cell's window (the
// kernel reads whole blocks of four) can be copies of stations inside it;
// the kernel must count only the window. Grid agrees with At (rtree boxes,
// no copies) on 300 random sets of 40 stations across the antimeridian
// (a case the end-to-end NumPy test met with one of its random seeds).
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
