package interp

import (
	"math"
	"math/bits"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"

	"drygrid/grid"
)

// Grid interpolates every cell centre of spec into a raster whose masked
// cells hold grid.NoDataIndex. Rows are spread over Params.Workers
// goroutines (0 = GOMAXPROCS); each cell is computed the same way whatever
// the split, so the raster is byte-identical for any worker count.
// progress, when not nil, is called after each row with the number of rows
// done so far, from one goroutine at a time and with rowsDone increasing.
//
// Per row the stations in the latitude band of the search radius are a
// range of the stations sorted by latitude; they are put in longitude
// order, and each cell scans only the longitude window its search circle
// can reach.
func (ip *Interpolator) Grid(spec grid.Spec, progress func(rowsDone, rows int)) *grid.Float32 {
	if spec.Cols <= 0 || spec.Rows <= 0 {
		return &grid.Float32{Spec: spec, NoData: grid.NoDataIndex}
	}
	out := grid.NewFloat32(spec, grid.NoDataIndex)
	ip.rows(spec, 0, spec.Rows, out.Data, progress)
	return out
}

// rows fills rows row0 .. row0+n-1 of spec into dst (already no data),
// spread over Params.Workers goroutines; progress, when not nil, is called
// after each row as Grid documents.
func (ip *Interpolator) rows(spec grid.Spec, row0, n int, dst []float32, progress func(rowsDone, rows int)) {
	colLon, colCos, colSin := rowsColumns(spec)
	workers := ip.p.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, n)
	var next atomic.Int64
	var mu sync.Mutex
	done := 0
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			w := ip.newRowWork()
			for {
				i := int(next.Add(1) - 1)
				if i >= n {
					return
				}
				_, lat := spec.Center(0, row0+i)
				ip.gridRow(w, lat, spec.Res, colLon, colCos, colSin, dst[i*spec.Cols:(i+1)*spec.Cols])
				if progress != nil {
					mu.Lock()
					done++
					progress(done, n)
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
}

// rowWork is one worker's scratch space.
type rowWork struct {
	bits  []uint64
	ranks []int32
	// Candidates of the row in longitude order, three times: shifted by
	// -360, as they are, and shifted by +360, so that any window narrower
	// than 360 degrees is one contiguous range.
	lon []float64
	st  []rowStation
	c   *cands
}

// rowStation is a candidate of a row: unit vector, value and rank.
type rowStation struct {
	x, y, z, v float64
	rk         int32
}

func (ip *Interpolator) newRowWork() *rowWork {
	return &rowWork{bits: make([]uint64, (len(ip.val)+63)/64), c: newCands(ip.k)}
}

// rowCandidates collects the ranks of the stations whose latitude is within
// the search radius of lat (lo <= latitude <= hi, the stations an rtree
// query of that band returns), in ascending rank (that is longitude)
// order: a range of the stations sorted by latitude, put in rank order
// through a bit set.
func (ip *Interpolator) rowCandidates(w *rowWork, lat float64) []int32 {
	lo, hi := lat-ip.thetaDeg-lonEps, lat+ip.thetaDeg+lonEps
	i0 := sort.SearchFloat64s(ip.latVal, lo)
	i1 := i0 + sort.Search(len(ip.latVal)-i0, func(i int) bool { return ip.latVal[i0+i] > hi })
	for _, r := range ip.latRank[i0:i1] {
		w.bits[r>>6] |= 1 << (uint(r) & 63)
	}
	w.ranks = w.ranks[:0]
	for i, word := range w.bits {
		for word != 0 {
			t := bits.TrailingZeros64(word)
			w.ranks = append(w.ranks, int32(i*64+t))
			word &= word - 1
		}
		w.bits[i] = 0
	}
	return w.ranks
}

// rowStations gathers the candidate stations of a row at latitude lat into
// w.lon and w.st, with copies shifted by -360 and +360 unless the search
// window spans every longitude (full). dl is the half-width of the window
// in longitude; ok is false when the row has fewer candidates than
// MinStations, so every cell of it is no data.
func (ip *Interpolator) rowStations(w *rowWork, lat float64) (dl float64, full, ok bool) {
	ranks := ip.rowCandidates(w, lat)
	if len(ranks) < ip.p.MinStations {
		return 0, false, false
	}
	dl = lonHalfWidth(lat, ip.theta)
	full = dl > 179
	w.lon, w.st = w.lon[:0], w.st[:0]
	add := func(r int32, shift float64) {
		w.lon = append(w.lon, ip.lon[r]+shift)
		w.st = append(w.st, rowStation{ip.x[r], ip.y[r], ip.z[r], ip.val[r], r})
	}
	if full {
		for _, r := range ranks {
			add(r, 0)
		}
	} else {
		// No window reaches below -180 - dl - lonEps or above
		// 180 + dl + lonEps, so the shifted copies need only the stations
		// within dl (plus a degree to spare) of the antimeridian: every
		// window holds the same stations, in the same order, as with
		// three whole copies.
		j := len(ranks)
		for j > 0 && ip.lon[ranks[j-1]] >= 180-dl-1 {
			j--
		}
		for _, r := range ranks[j:] {
			add(r, -360)
		}
		for _, r := range ranks {
			add(r, 0)
		}
		for _, r := range ranks {
			if ip.lon[r] > -180+dl+1 {
				break
			}
			add(r, 360)
		}
	}
	// A sentinel past the end, so that gridRow's window can move without
	// testing the length: no bound is above +Inf.
	w.lon = append(w.lon, math.Inf(1))
	w.lon = w.lon[:len(w.lon)-1]
	return dl, full, true
}

// gridRow fills one row of cells at latitude lat; colStep is the longitude
// step between cell centres.
func (ip *Interpolator) gridRow(w *rowWork, lat, colStep float64, colLon, colCos, colSin []float64, dst []float32) {
	if ip.p.Sectors > 0 {
		ip.gridRowSectors(w, lat, colLon, colCos, colSin, dst) // sectors.go
		return
	}
	dl, full, ok := ip.rowStations(w, lat)
	if !ok {
		return // already no data
	}
	sp, cp := math.Sincos(lat * degToRad)
	c2max := ip.c2max
	c := w.c
	c.reset(len(w.lon) + 1)
	cs := c.cs
	lons, st := w.lon, w.st
	lo, hi := 0, len(lons)
	prev := math.Inf(1)
	k := ip.k
	kth := -1.0                                                 // k-th chord squared at the previous cell, when it had k or more
	delta := 2 * cp * math.Sin(colStep*degToRad/2) * (1 + 1e-9) // chord between neighbouring cell centres
	for col := range dst {
		l := colLon[col]
		if !full {
			a, b := l-dl-lonEps, l+dl+lonEps
			if l < prev {
				lo = sort.SearchFloat64s(lons, a)
				hi = lo + sort.Search(len(lons)-lo, func(i int) bool { return lons[lo+i] > b })
			} else {
				// The window moves by a station or none from one cell to
				// the next, most of the time: one step without a branch,
				// then a loop that is seldom entered. lons[len(lons)] is
				// rowStations's sentinel.
				sl := lons[:len(lons)+1]
				lo += b2i(sl[lo] < a)
				hi += b2i(sl[hi] <= b)
				for sl[lo] < a {
					lo++
				}
				for sl[hi] <= b {
					hi++
				}
			}
			prev = l
		}
		cx, cy, cz := cp*colCos[col], cp*colSin[col], sp
		// The k-th nearest of the previous cell, delta away, bounds this
		// cell's k-th nearest by sqrt(kth) + delta (triangle inequality):
		// when at least k candidates lie within that, the k nearest are
		// among them and the rest need not be kept. Otherwise, scan again
		// out to the radius.
		win := st[lo:hi]
		thr := c2max
		if kth >= 0 {
			u := math.Sqrt(kth) + delta
			thr = min(c2max, u*u)
		}
		n := scanWindow(win, cs, cx, cy, cz, thr)
		if n < k && thr < c2max {
			n = scanWindow(win, cs, cx, cy, cz, c2max)
		}
		if n < ip.p.MinStations {
			kth = -1
			continue
		}
		kth = -1
		if n >= k {
			if n > k {
				ip.selectK(cs[:n], k)
				n = k
			}
			kth = maxD2(cs[:k])
		}
		if v, _, ok := ip.estimate(c, n, cx, cy, cz); ok {
			dst[col] = float32(v)
		}
	}
}

// scanWindow puts in cs the stations of win within chord squared c2max of
// the unit vector (cx, cy, cz) and returns their number; cs must be at
// least as long as win. A function of its own, so that the compiler keeps
// the loop in registers.
func scanWindow(win []rowStation, cs []cand, cx, cy, cz, c2max float64) int {
	n := 0
	cs = cs[:len(win)+1]
	for j := range win {
		s := &win[j]
		// s.x - cx is exactly -(cx - s.x), so the square has the same
		// bits; written this way round the compiler needs no copies of
		// cx, cy, cz (the subtraction overwrites its first operand).
		dx, dy, dz := s.x-cx, s.y-cy, s.z-cz
		d2 := dx*dx + dy*dy + dz*dz
		cs[n] = cand{d2, s.v, s.rk}
		n += b2i(d2 <= c2max) // branch-free: the test is unpredictable
	}
	return n
}
