package interp

import (
	"math"
	"math/bits"
	"sort"
	"sync"

	"drygrid/grid"
	"drygrid/internal/pool"
	"drygrid/interp/internal/lanes"
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
// order, and each cell scans only the span of them (a range in longitude)
// that its search circle can reach.
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
	var mu sync.Mutex
	done := 0
	ip.eachRow(spec, row0, n, func(w *rowWork, i int, lat float64) {
		ip.gridRow(w, lat, spec.Res, colLon, colCos, colSin, dst[i*spec.Cols:(i+1)*spec.Cols])
		if progress != nil {
			mu.Lock()
			done++
			progress(done, n)
			mu.Unlock()
		}
	})
}

// eachRow calls fn for rows row0 .. row0+n-1 of spec (i counting them from
// 0, lat the row's centre latitude), spread over Params.Workers goroutines
// (internal/pool), each with its own scratch space w, taken from ip.work
// and put back at the end.
func (ip *Interpolator) eachRow(spec grid.Spec, row0, n int, fn func(w *rowWork, i int, lat float64)) {
	works := make([]*rowWork, pool.Count(n, ip.p.Workers, 1))
	pool.Run(n, ip.p.Workers, 1, func(wk, i, _ int) {
		w := works[wk]
		if w == nil {
			w = ip.getRowWork()
			works[wk] = w
		}
		_, lat := spec.Center(0, row0+i)
		fn(w, i, lat)
	})
	for _, w := range works {
		if w != nil {
			ip.work.Put(w)
		}
	}
}

// rowWork is one worker's scratch space.
type rowWork struct {
	bits  []uint64
	ranks []int32
	// Candidates of the row in longitude order, three times: shifted by
	// -360, as they are, and shifted by +360, so that any span narrower
	// than 360 degrees is one contiguous range.
	lon []float64
	st  stationCols
	d2  []float64   // the lane kernel's chords squared, four lanes a station
	kth []uint64    // scratch of lanes.KthChord
	g   lanes.Group // the lane kernel's call
	// The lane kernel's view of a row's cells: their spans (the stations
	// lom1+1 .. him1), per column.
	lom1, him1 []int64
	c          *cands
}

// resized is s with length n, reallocated when its capacity is short.
func resized[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	return s[:n]
}

// stationCols are the candidate stations of a row, column by column (the
// layout the lane kernel reads): unit vector, value and rank.
type stationCols struct {
	x, y, z, v []float64
	rk         []int32
}

// resize makes the columns n stations long.
func (s *stationCols) resize(n int) {
	if cap(s.x) < n {
		c := max(n, 2*cap(s.x)) // rows ask for a little more each, towards the poles
		s.x, s.y, s.z, s.v, s.rk = make([]float64, c), make([]float64, c), make([]float64, c), make([]float64, c), make([]int32, c)
	}
	s.x, s.y, s.z, s.v, s.rk = s.x[:n], s.y[:n], s.z[:n], s.v[:n], s.rk[:n]
}

// set puts station i.
func (s *stationCols) set(i int, x, y, z, v float64, rk int32) {
	s.x[i], s.y[i], s.z[i], s.v[i], s.rk[i] = x, y, z, v, rk
}

// slice is stations lo .. hi-1.
func (s *stationCols) slice(lo, hi int) stationCols {
	return stationCols{s.x[lo:hi], s.y[lo:hi], s.z[lo:hi], s.v[lo:hi], s.rk[lo:hi]}
}

// getRowWork is a worker's scratch space, kept from an earlier call (Rows
// asks for it once a block of rows) or new.
func (ip *Interpolator) getRowWork() *rowWork {
	if w, ok := ip.work.Get().(*rowWork); ok {
		return w
	}
	return ip.newRowWork()
}

func (ip *Interpolator) newRowWork() *rowWork {
	return &rowWork{bits: make([]uint64, (len(ip.val)+63)/64), c: newCands(ip.k)}
}

// rowCandidates collects the ranks of the stations whose latitude is within
// the search radius of lat (lo <= latitude <= hi, the stations an R-tree
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
// circle covers every longitude, and returns the cursor of the cells' spans
// over them; ok is false when the row has fewer candidates than
// MinStations, so every cell of it is no data.
func (ip *Interpolator) rowStations(w *rowWork, lat float64) (span lonSpan, ok bool) {
	return ip.rowStationsMin(w, lat, ip.p.MinStations)
}

// rowStationsMin is rowStations with ok false when the row has fewer than
// minSt candidates (Support asks for one).
func (ip *Interpolator) rowStationsMin(w *rowWork, lat float64, minSt int) (span lonSpan, ok bool) {
	ranks := ip.rowCandidates(w, lat)
	if len(ranks) < minSt {
		return lonSpan{}, false
	}
	dl := lonHalfWidth(lat, ip.theta)
	full := dl > 179
	pre, post := ranks[:0], ranks[:0]
	if !full {
		// No span reaches below -180 - dl - lonEps or above
		// 180 + dl + lonEps, so the shifted copies need only the stations
		// within dl (plus a degree to spare) of the antimeridian: every
		// span holds the same stations, in the same order, as with
		// three whole copies.
		j := len(ranks)
		for j > 0 && ip.lon[ranks[j-1]] >= 180-dl-1 {
			j--
		}
		q := 0
		for q < len(ranks) && ip.lon[ranks[q]] <= -180+dl+1 {
			q++
		}
		pre, post = ranks[j:], ranks[:q]
	}
	n := len(pre) + len(ranks) + len(post)
	// Two more longitudes for sentinels past the end, so that the span
	// can move without testing the length (no bound is above +Inf).
	if cap(w.lon) < n+2 {
		w.lon = make([]float64, max(n+2, 2*cap(w.lon)))
	}
	w.lon = w.lon[:n+2]
	w.lon[n], w.lon[n+1] = math.Inf(1), math.Inf(1)
	w.lon = w.lon[:n]
	w.st.resize(n)
	at := 0
	for _, part := range [...]struct {
		ranks []int32
		shift float64
	}{{pre, -360}, {ranks, 0}, {post, 360}} {
		for _, r := range part.ranks {
			w.lon[at] = ip.lon[r] + part.shift
			w.st.set(at, ip.x[r], ip.y[r], ip.z[r], ip.val[r], r)
			at++
		}
	}
	return lonSpan{lons: w.lon, dl: dl, full: full, hi: len(w.lon), prev: math.Inf(1)}, true
}

// lonSpan is the range [lo, hi) of a row's stations (in longitude order,
// with a +Inf sentinel past the end) within dl (plus lonEps) of a cell's
// longitude: all of them when full.
type lonSpan struct {
	lons   []float64
	dl     float64
	full   bool
	lo, hi int
	prev   float64 // the longitude of the last move
}

// move puts the span on the cell at longitude l: searched for when l is
// west of the last cell, else stepped. The span moves by a station or
// none from one cell to the next, most of the time: one step without a
// branch, then a loop that is seldom entered. lons[len(lons)] is the
// sentinel.
func (s *lonSpan) move(l float64) {
	if s.full {
		return
	}
	a, b := l-s.dl-lonEps, l+s.dl+lonEps
	lons := s.lons
	west := l < s.prev
	s.prev = l
	if west {
		s.lo = sort.SearchFloat64s(lons, a)
		s.hi = s.lo + sort.Search(len(lons)-s.lo, func(i int) bool { return lons[s.lo+i] > b })
		return
	}
	sl := lons[:len(lons)+1]
	lo, hi := s.lo+b2i(sl[s.lo] < a), s.hi+b2i(sl[s.hi] <= b)
	for sl[lo] < a {
		lo++
	}
	for sl[hi] <= b {
		hi++
	}
	s.lo, s.hi = lo, hi
}

// columns puts the spans of the cells at longitudes lons (the row's
// columns, from the span's position on) into lom1 and him1 (the stations
// lom1[c]+1 .. him1[c]), as move would, and repeats the last into the
// entries past len(lons). Where a column lies west of the one before it
// calls move; spanRun steps along the columns in between.
func (s *lonSpan) columns(lons []float64, lom1, him1 []int64) {
	if s.full {
		for c := range lom1 {
			lom1[c], him1[c] = -1, int64(len(s.lons)-1)
		}
		return
	}
	sl := s.lons[:len(s.lons)+2] // the sentinels
	for c := 0; c < len(lons); {
		if lons[c] < s.prev {
			s.move(lons[c])
			lom1[c], him1[c] = int64(s.lo-1), int64(s.hi-1)
			c++
			continue
		}
		c += spanRun(sl, lons[c:], lom1[c:len(lons)], him1[c:len(lons)], s)
	}
	for c := len(lons); c < len(lom1); c++ {
		lom1[c], him1[c] = lom1[c-1], him1[c-1]
	}
}

// spanRun is move's step for the columns at lons while they do not go
// west, the spans put into lom1 and him1 (as long as lons); it returns
// how many columns it took. sl are the row's longitudes with two +Inf
// sentinels. A leaf function, so that its loop keeps everything in
// registers.
func spanRun(sl, lons []float64, lom1, him1 []int64, s *lonSpan) int {
	lo, hi, prev, dl := s.lo, s.hi, s.prev, s.dl
	c := 0
	for ; c < len(lons) && c < len(lom1) && c < len(him1); c++ {
		l := lons[c]
		if l < prev {
			break
		}
		prev = l
		a, b := l-dl-lonEps, l+dl+lonEps
		// Most often a step or none. The longitudes at the bound and the
		// one after it are loaded together and give up to two steps
		// without a branch (they are sorted); more are seldom needed.
		l0, l1, h0, h1 := sl[lo], sl[lo+1], sl[hi], sl[hi+1]
		lo += b2i(l0 < a) + b2i(l1 < a)
		hi += b2i(h0 <= b) + b2i(h1 <= b)
		if l1 < a || h1 <= b {
			for sl[lo] < a {
				lo++
			}
			for sl[hi] <= b {
				hi++
			}
		}
		lom1[c], him1[c] = int64(lo-1), int64(hi-1)
	}
	s.lo, s.hi, s.prev = lo, hi, prev
	return c
}

// gridRow fills one row of cells at latitude lat; colStep is the longitude
// step between cell centres.
func (ip *Interpolator) gridRow(w *rowWork, lat, colStep float64, colLon, colCos, colSin []float64, dst []float32) {
	switch {
	case ip.p.Sectors > 0:
		ip.gridRowSectors(w, lat, colLon, colCos, colSin, dst) // sectors.go
	case ip.fast && ip.c2max/4 <= shortSeriesMaxT:
		ip.gridRowLanes(w, lat, colStep, colLon, colCos, colSin, dst)
	default:
		ip.gridRowCands(w, lat, colStep, colLon, colCos, colSin, dst)
	}
}

// gridRowLanes is gridRow through the lane kernel (package lanes), for
// power 2 and a radius of up to 337 km, four cells at a time. A cell whose
// k nearest stations within the radius are the stations within some chord
// of it (the radius when at most k are within it, else the k-th smallest
// chord) is the kernel's weighted mean over that chord; any other (a tie at
// the k-th distance, a station within 1 m) goes through the candidate list
// as in gridRowCands.
func (ip *Interpolator) gridRowLanes(w *rowWork, lat, colStep float64, colLon, colCos, colSin []float64, dst []float32) {
	span, ok := ip.rowStations(w, lat)
	if !ok {
		return // already no data
	}
	sp, cp := math.Sincos(lat * degToRad)
	if need := lanes.Width * len(span.lons); cap(w.d2) < need {
		// Half again as much: the rows' spans grow and shrink with the
		// latitude, and a worker's scratch should not be remade each row.
		w.d2 = make([]float64, need+need/2)
		w.kth = make([]uint64, len(span.lons)+len(span.lons)/2)
	}
	c := w.c
	c.reset(len(span.lons) + 1)
	st, k, minSt := &w.st, ip.k, ip.p.MinStations
	// The row's cells and their spans, column by column, with the last
	// column repeated into the lanes past the row's end.
	cols := len(dst)
	w.lom1, w.him1 = resized(w.lom1, cols+lanes.Width-1), resized(w.him1, cols+lanes.Width-1)
	span.columns(colLon, w.lom1, w.him1)
	g := &w.g
	g.K, g.D2, g.Cz = ip.lanes, w.d2[:cap(w.d2)], [lanes.Width]float64{sp, sp, sp, sp}
	g.X, g.Y, g.Z, g.V = st.x, st.y, st.z, st.v
	g.Cp, g.Cos, g.Sin = cp, colCos[:cols+lanes.Width-1], colSin[:cols+lanes.Width-1] // rowsColumns pads them
	g.Lom1, g.Him1 = w.lom1, w.him1
	// The k-th chord of a cell bounds that of a cell i columns on by its
	// square root plus i delta (delta: the chord between neighbouring cell
	// centres; the triangle inequality): the kernel's first pass then
	// counts only the stations within that limit, among which are the k
	// nearest, and lanes.KthChord looks only at the chords within the
	// bound from the cell before. prevTau is the previous cell's k-th chord
	// squared, -1 when it had fewer than k stations within the radius.
	delta := neighbourChord(cp, colStep)
	g.Delta = delta
	prevTau := -1.0
	for col0 := 0; col0 < cols; col0 += lanes.Width {
		nc := min(lanes.Width, cols-col0)
		lom1, him1 := w.lom1[col0:col0+lanes.Width], w.him1[col0:col0+lanes.Width]
		// The union of the spans: they move right along the row, but for
		// a wrap at the antimeridian.
		glo := int(min(lom1[0], lom1[1], lom1[2], lom1[3])) + 1
		ghi := int(max(him1[0], him1[1], him1[2], him1[3])) + 1
		if ghi-glo < minSt {
			prevTau = -1
			continue // no data in any of the four
		}
		g.C0, g.J0, g.M = int64(col0), int64(glo), ghi-glo
		g.U0 = math.Inf(1)
		if prevTau >= 0 {
			g.U0 = math.Sqrt(prevTau)
		}
		g.Chords()
		for l := range nc {
			if int(g.N[l]) < k && g.Lim[l] < ip.c2max {
				// Fewer than k within the limit: the triangle inequality
				// says this cannot be; to be safe, the radius again.
				g.U0 = math.Inf(1)
				g.Chords()
				break
			}
		}
		active := false // a lane with data
		for l := range nc {
			n := int(g.N[l])
			prev := prevTau
			prevTau = -1
			switch {
			case n < minSt:
				g.Tau[l] = -1 // no data: counts nothing
				continue
			case n < k:
				g.Tau[l] = ip.c2max
			case n == k:
				g.Tau[l], prevTau = ip.c2max, g.Top[0][l]
			case n-k < lanes.Kept:
				g.Tau[l] = g.Top[n-k][l]
				prevTau = g.Tau[l]
			default:
				bound := math.Inf(1)
				if prev >= 0 {
					bound = kthBound(prev, delta)
				}
				g.Tau[l] = lanes.KthChord(g.D2, l, g.M, k, bound, w.kth)
				prevTau = g.Tau[l]
			}
			active = true
		}
		if !active {
			continue
		}
		if nc < lanes.Width {
			prevTau = -1 // the row's end
		}
		g.Sums()
		for l := range nc {
			n := int(g.N[l])
			if n < minSt {
				continue
			}
			if int(g.N2[l]) == min(n, k) && g.Sw[l] < exactWeight {
				dst[col0+l] = float32(g.Val[l])
				continue
			}
			// A tie at the k-th distance, or a station within 1 m: the
			// candidate list, from the chords the kernel wrote.
			n = gatherLane(st.slice(glo, ghi), g.D2, l, c.cs)
			if v, _, ok := ip.estimate(c, n, cp*colCos[col0+l], cp*colSin[col0+l], sp); ok {
				dst[col0+l] = float32(v)
			}
		}
	}
}

// exactWeight bounds the sum of weights of a cell with a station within
// 1 m from below: that station's weight alone is about 1/exactChordSq (the
// series factor is 1 to 1e-14 there). A smaller sum has no such station; a
// larger one goes through the candidate list, which applies the 1 m rule
// (or finds no station that close).
var exactWeight = 0.5 / exactChordSq

// neighbourChord is the chord between neighbouring cell centres colStep
// degrees apart on a row where the cosine of the latitude is cp, a little
// widened (the triangle-inequality bounds of gridRowCands and
// gridRowLanes add it).
func neighbourChord(cp, colStep float64) float64 {
	return 2 * cp * math.Sin(colStep*degToRad/2) * (1 + 1e-9)
}

// kthBound bounds the k-th chord squared of a cell by (sqrt(tau) + d)^2,
// widened by lanes.Slack, for tau the k-th chord squared of a cell d away
// (triangle inequality): at least k stations lie within it, so the k
// nearest are among those.
func kthBound(tau, d float64) float64 {
	u := math.Sqrt(tau) + d
	return u * u * lanes.Slack
}

// gatherLane puts in cs the stations of st that lane l of the lane kernel's
// chords d2 counts (those within the radius and the lane's own span: the
// others are +Inf), in span order, and returns their number.
func gatherLane(st stationCols, d2 []float64, l int, cs []cand) int {
	n := 0
	for j := range st.v {
		if c2 := d2[lanes.Width*j+l]; c2 != math.Inf(1) {
			cs[n] = cand{c2, st.v[j], st.rk[j]}
			n++
		}
	}
	return n
}

// gridRowCands is gridRow through the candidate list of each cell, for
// the settings the lane kernel does not serve.
func (ip *Interpolator) gridRowCands(w *rowWork, lat, colStep float64, colLon, colCos, colSin []float64, dst []float32) {
	span, ok := ip.rowStations(w, lat)
	if !ok {
		return // already no data
	}
	sp, cp := math.Sincos(lat * degToRad)
	c2max := ip.c2max
	c := w.c
	c.reset(len(span.lons) + 1)
	cs := c.cs
	k := ip.k
	kth := -1.0 // k-th chord squared at the previous cell, when it had k or more
	delta := neighbourChord(cp, colStep)
	for col := range dst {
		span.move(colLon[col])
		cx, cy, cz := cp*colCos[col], cp*colSin[col], sp
		// The k-th nearest of the previous cell, delta away, bounds this
		// cell's k-th nearest by sqrt(kth) + delta (triangle inequality):
		// when at least k candidates lie within that, the k nearest are
		// among them and the rest need not be kept. Otherwise, scan again
		// out to the radius.
		st := w.st.slice(span.lo, span.hi)
		thr := c2max
		if kth >= 0 {
			thr = min(c2max, kthBound(kth, delta))
		}
		n := scanSpan(st, cs, cx, cy, cz, thr)
		if n < k && thr < c2max {
			n = scanSpan(st, cs, cx, cy, cz, c2max)
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

// scanSpan puts in cs the stations of st within chord squared c2max of
// the unit vector (cx, cy, cz) and returns their number; cs must be longer
// than st. A function of its own, so that the compiler keeps the loop in
// registers.
func scanSpan(st stationCols, cs []cand, cx, cy, cz, c2max float64) int {
	n := 0
	x := st.x
	y, z, v, rk := st.y[:len(x)], st.z[:len(x)], st.v[:len(x)], st.rk[:len(x)]
	cs = cs[:len(x)+1]
	for j := range x {
		// x[j] - cx is exactly -(cx - x[j]), so the square has the same
		// bits; written this way round the compiler needs no copies of
		// cx, cy, cz (the subtraction overwrites its first operand).
		dx, dy, dz := x[j]-cx, y[j]-cy, z[j]-cz
		d2 := chordSq(dx, dy, dz)
		cs[n] = cand{d2, v[j], rk[j]}
		n += b2i(d2 <= c2max) // branch-free: the test is unpredictable
	}
	return n
}
