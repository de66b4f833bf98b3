package interp

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"drygrid/grid"
)

// randomGroup is a kernel call of m stations scattered around four
// neighbouring cells out to about twice the chord c, some on a cell itself
// (or within 1 m of it), some on one place (ties), with equal or
// signed-zero values, and lane windows that are empty, part or all of the
// m stations.
func randomGroup(r *rand.Rand, m int, c float64, k *windowConsts) *windowGroup {
	lon, lat := r.Float64()*360-180, r.Float64()*160-80
	g := &windowGroup{m: m, k: k, d2: make([]float64, windowLanes*m),
		cos: make([]float64, windowLanes), sin: make([]float64, windowLanes),
		lom1: make([]int64, windowLanes), him1: make([]int64, windowLanes), j0: int64(r.IntN(3))}
	g.u0, g.delta = math.Inf(1), 0.002
	if r.IntN(2) == 0 { // a chord known to hold the k nearest
		g.u0 = math.Sqrt(k.c2max[0]) * r.Float64()
	}
	sp, cp := math.Sincos(lat * degToRad)
	g.cp = cp
	var cx, cy [windowLanes]float64
	for l := range windowLanes {
		g.sin[l], g.cos[l] = math.Sincos(normLon(lon+0.1*float64(l)) * degToRad)
		g.cz[l] = sp
		cx[l], cy[l] = cp*g.cos[l], cp*g.sin[l]
		a, b := r.IntN(m+1), r.IntN(m+1)
		if r.IntN(3) == 0 {
			a, b = 0, m
		}
		g.lom1[l], g.him1[l] = g.j0+int64(min(a, b)-1), g.j0+int64(max(a, b)-1)
	}
	// The group's stations start at j0 of the row's columns, its cells at
	// c0: stations before them, and cells after them, that it must not read.
	j0 := int(g.j0)
	x, y, z, v := make([]float64, j0+m), make([]float64, j0+m), make([]float64, j0+m), make([]float64, j0+m)
	for i := range j0 {
		x[i], y[i], z[i], v[i] = cx[0], cy[0], g.cz[0], math.NaN()
	}
	g.x, g.y, g.z, g.v = x[j0:], y[j0:], z[j0:], v[j0:]
	defer func() {
		g.x, g.y, g.z, g.v = x, y, z, v
		c0 := r.IntN(3)
		pad := func(a []float64) []float64 {
			return append(append(make([]float64, c0), a...), math.NaN(), math.NaN())
		}
		padI := func(a []int64) []int64 {
			return append(append(make([]int64, c0), a...), 0, 0)
		}
		g.c0 = int64(c0)
		g.cos, g.sin, g.lom1, g.him1 = pad(g.cos), pad(g.sin), padI(g.lom1), padI(g.him1)
	}()
	for j := range m {
		l := r.IntN(windowLanes)
		switch r.IntN(8) {
		case 0: // on a cell, or within 1 m of it
			g.x[j], g.y[j], g.z[j] = cx[l], cy[l], g.cz[l]+r.Float64()*1e-8
		case 1: // on the place of the station before (a tie)
			if j > 0 {
				g.x[j], g.y[j], g.z[j] = g.x[j-1], g.y[j-1], g.z[j-1]
				break
			}
			fallthrough
		default:
			g.x[j] = cx[l] + (r.Float64()*2-1)*c
			g.y[j] = cy[l] + (r.Float64()*2-1)*c
			g.z[j] = g.cz[l] + (r.Float64()*2-1)*c
		}
		switch r.IntN(6) {
		case 0:
			g.v[j] = 0
		case 1:
			g.v[j] = math.Copysign(0, -1)
		case 2:
			g.v[j] = 1.25
		default:
			g.v[j] = r.Float64()*6 - 3
		}
	}
	return g
}

// TestWindowWeightIsGreatCircle: the kernel's weight of one station is
// 1/theta^2 for the central angle theta = 2 asin(c/2) of the chord c (the
// chord of a unit circle, common practice), computed with math.Asin, to
// 1e-15 relative (a few units in the last place on each side: the
// reference rounds in the square root, the arcsine and the square) from 1 m
// out to the kernel's largest radius (337 km): the series (1/c^2)(1 - t/3 -
// t^2/15 - 31 t^3/945 - 289 t^4/14175), t = c^2/4, is the reciprocal of
// asinSqSeries, worked out term by term with exact fractions, and stops
// below 3e-18.
func TestWindowWeightIsGreatCircle(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	c2max := 4 * shortSeriesMaxT
	g := &windowGroup{m: 1, k: newWindowConsts(c2max), d2: make([]float64, windowLanes),
		x: make([]float64, 1), y: make([]float64, 1), z: []float64{0}, v: []float64{1},
		cp: 1, cos: []float64{1, 1, 1, 1}, sin: make([]float64, windowLanes), him1: []int64{0, 0, 0, 0},
		lom1: []int64{-1, -1, -1, -1}, u0: math.Inf(1)}
	for range 20000 {
		c := math.Sqrt(exactChordSq) * math.Pow(math.Sqrt(c2max/exactChordSq), r.Float64()) * 0.999
		g.x[0], g.y[0] = 1-c*c/2, c*math.Sqrt(1-c*c/4)
		windowChordsGo(g)
		g.tau = g.k.c2max
		windowSumsGo(g)
		if g.n[0] != 1 || g.n2[0] != 1 {
			t.Fatalf("chord %g: %d and %d stations counted", c, g.n[0], g.n2[0])
		}
		theta := 2 * math.Asin(math.Sqrt(g.d2[0])/2)
		if want := 1 / (theta * theta); math.Abs(g.sw[0]-want) > 1e-15*want {
			t.Fatalf("chord %g: weight %.17g, 1/theta^2 %.17g (relative %.2g)", c, g.sw[0], want, (g.sw[0]-want)/want)
		}
	}
}

// TestWindowChordsKeepLargest: the first pass counts exactly the stations
// of each lane's own window within the radius, writes +Inf for every other,
// and its largest chords are those of a sort of the counted ones (zero past
// their number), so that the k-th smallest of n > k is top[n-k].
func TestWindowChordsKeepLargest(t *testing.T) {
	r := rand.New(rand.NewPCG(13, 14))
	k := newWindowConsts(0.0022)
	for trial := range 2000 {
		g := randomGroup(r, trial%41, 0.07, k)
		windowChordsGo(g)
		for l := range windowLanes {
			var in []float64
			for j := range g.m {
				j0, c := int(g.j0), int(g.c0)+l
				dx, dy, dz := g.x[j0+j]-g.cp*g.cos[c], g.y[j0+j]-g.cp*g.sin[c], g.z[j0+j]-g.cz[l]
				c2 := dx*dx + dy*dy + dz*dz
				own := g.j0+int64(j) > g.lom1[c] && g.j0+int64(j) <= g.him1[c]
				if got := g.d2[windowLanes*j+l]; !own || c2 > g.lim[l]*(1+1e-12) {
					if !math.IsInf(got, 1) && !(own && math.Abs(c2-g.lim[l]) < 1e-15) {
						t.Fatalf("trial %d lane %d station %d: d2 %v, outside", trial, l, j, got)
					}
				} else if math.Abs(got-c2) > 1e-15 {
					t.Fatalf("trial %d lane %d station %d: d2 %v, want %v", trial, l, j, got, c2)
				}
				if got := g.d2[windowLanes*j+l]; !math.IsInf(got, 1) {
					in = append(in, got)
				}
			}
			if int(g.n[l]) != len(in) {
				t.Fatalf("trial %d lane %d: n %d, %d counted", trial, l, g.n[l], len(in))
			}
			slices.Sort(in)
			for i := range windowTop {
				want := 0.0
				if i < len(in) {
					want = in[len(in)-1-i]
				}
				if g.top[i][l] != want {
					t.Fatalf("trial %d lane %d: top %v, sorted %v", trial, l, g.top, in)
				}
			}
			if n := len(in); n > 12 {
				if got, want := kthChord(g.d2, l, g.m, 12, math.Inf(1), make([]uint64, g.m)), in[11]; got != want {
					t.Fatalf("trial %d lane %d: kthChord %v, sorted %v", trial, l, got, want)
				}
			}
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
// after the others, so the union of a group's windows can hold a station
// and its copy; each cell must count only its own window. Grid agrees with At (rtree boxes,
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

// TestLonWindowSpans: spans gives, column by column, the window move gives
// for that column, and repeats the last past the row's end: on random
// station longitudes with the shifted copies, columns in ascending order
// with a wrap back west (as a box across the antimeridian has), and
// windows that span every longitude.
func TestLonWindowSpans(t *testing.T) {
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
		// Stations right on the bounds of some columns' windows, where
		// < and <= differ.
		for i := 0; i < n && trial%2 == 0; i += 3 {
			l := colLon[rng.IntN(cols)]
			lons[i] = []float64{l - dl - lonEps, l + dl + lonEps}[i%2]
		}
		slices.Sort(lons)
		mk := func() lonWindow {
			return lonWindow{lons: lons, dl: dl, full: dl > 179, hi: len(lons), prev: math.Inf(1)}
		}
		lom1, him1 := make([]int64, cols+windowLanes-1), make([]int64, cols+windowLanes-1)
		w := mk()
		w.spans(colLon, lom1, him1)
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
				t.Fatalf("trial %d column %d (lon %g, dl %g): spans %d..%d, move %d..%d", trial, c, colLon[min(c, cols-1)], dl, lom1[c], him1[c], lo, hi)
			}
		}
	}
}
