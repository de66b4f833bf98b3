package polygon

import (
	"cmp"
	"slices"

	"github.com/paulmach/orb"
)

// polyRing is one closed ring in vertex indices; its vertices are held in
// a polyArena: i0, j0, i1, j1, ... (open: last != first).
type polyRing struct {
	code          uint8
	shell         bool
	rep           int32 // component id of a cell on the ring's left
	key           int64 // when simplifying, where the previous tracer met the ring's cycle (see closeRing)
	chunk, off, n int32 // where its vertices are in the arena, and how many int32
}

// polyArena holds the vertices of many rings in chunks, so that it grows
// without copying what it holds; each ring is contiguous in one chunk.
type polyArena struct{ chunks [][]int32 }

const polyChunk = 1 << 16

// add copies v into the arena and points r at it.
func (a *polyArena) add(r *polyRing, v []int32) {
	n := len(a.chunks)
	if n == 0 || len(a.chunks[n-1])+len(v) > cap(a.chunks[n-1]) {
		a.chunks = append(a.chunks, make([]int32, 0, max(polyChunk, len(v))))
		n++
	}
	c := a.chunks[n-1]
	r.chunk, r.off, r.n = int32(n-1), int32(len(c)), int32(len(v))
	a.chunks[n-1] = append(c, v...)
}

// ring is r's vertices (capped: appending copies).
func (a *polyArena) ring(r *polyRing) []int32 {
	return a.chunks[r.chunk][r.off : r.off+r.n : r.off+r.n]
}

// polySaddle records that the ring passed saddle vertex v when it had
// recorded pos int32 values of the turn list.
type polySaddle struct{ v, pos int32 }

// polySplit cuts a closed ring at every vertex it visits twice (only saddle
// vertices can be) into simple loops, passed to emit (valid during the
// call only). Cutting a loop out at a repeated vertex is the same as
// pairing that saddle's edges the other way.
func polySplit(turns []int32, saddles []polySaddle, emit func(loop []int32)) {
	if len(saddles) < 2 {
		emit(turns)
		return
	}
	slices.SortFunc(saddles, func(a, b polySaddle) int { return cmp.Compare(a.v, b.v) })
	var dup map[int32]bool
	for k := 1; k < len(saddles); k++ {
		if saddles[k].v == saddles[k-1].v {
			if dup == nil {
				dup = map[int32]bool{}
			}
			dup[saddles[k].v] = true
		}
	}
	if len(dup) == 0 {
		emit(turns)
		return
	}
	// The saddle's vertex is recorded at the position saved in pos; walk
	// the turn list with a stack and cut a loop whenever a repeated vertex
	// reappears on it.
	keyAt := map[int32]int32{} // turn position -> repeated saddle vertex
	for _, sd := range saddles {
		if dup[sd.v] {
			keyAt[sd.pos] = sd.v
		}
	}
	stack := make([]int32, 0, len(turns))
	at := map[int32]int{}
	for k := 0; k < len(turns); k += 2 {
		if key, ok := keyAt[int32(k)]; ok {
			if p, ok := at[key]; ok && p+1 < len(stack) && stack[p] == turns[k] && stack[p+1] == turns[k+1] {
				emit(stack[p:])
				stack = stack[:p]
			}
			at[key] = len(stack)
		}
		stack = append(stack, turns[k], turns[k+1])
	}
	emit(stack)
}

// polyArea2 is twice the signed area of a ring in vertex units, y up
// (positive = counter-clockwise on the map).
func polyArea2(pts []int32) int64 {
	var a int64
	n := len(pts)
	for k := 0; k < n; k += 2 {
		x0, y0 := int64(pts[k]), -int64(pts[k+1])
		k1 := (k + 2) % n
		x1, y1 := int64(pts[k1]), -int64(pts[k1+1])
		a += x0*y1 - x1*y0
	}
	return a
}

// polyStart rotates a ring in place to start at its north-most, then
// west-most vertex (smallest vertex row, then column), keeping its
// direction.
func polyStart(pts []int32) {
	m := 0
	for k := 2; k < len(pts); k += 2 {
		if pts[k+1] < pts[m+1] || (pts[k+1] == pts[m+1] && pts[k] < pts[m]) {
			m = k
		}
	}
	if m > 0 {
		slices.Reverse(pts[:m])
		slices.Reverse(pts[m:])
		slices.Reverse(pts)
	}
}

// polygons assembles the closed rings into each code's MultiPolygon, after
// simplifying them when asked, in the canonical order: rings start at
// their north-most, then west-most vertex; polygons by their shell's start,
// holes likewise (ties, possible only after simplification, by the order
// the rings closed in, which the sweep fixes).
func (s *polySweep) polygons() map[uint8]orb.MultiPolygon {
	out := map[uint8]orb.MultiPolygon{}
	n := 0
	for _, c := range s.rings {
		n += len(c)
	}
	rings := make([]polyRing, 0, n)
	for _, c := range s.rings {
		rings = append(rings, c...)
	}
	arena := s.pts
	s.rings, s.pts = nil, nil
	if len(rings) == 0 {
		return out
	}
	if s.km > 0 {
		// The simplification depends on the order it meets the rings in:
		// the order the previous tracer found them in (closeRing); the
		// loops cut from one cycle keep their order.
		slices.SortStableFunc(rings, func(a, b polyRing) int { return cmp.Compare(a.key, b.key) })
		simp := &polySimp{km: s.km, cols: s.cols, rows: s.rows, nodes: s.nodeIDs, lons: s.lons, lats: s.lats}
		arena = simp.apply(rings, arena)
	}
	// Shells in canonical order give each component its polygon number.
	// Sort keys: the start vertex's id in the high half, the ring's index
	// (the order rings closed in) in the low half.
	w := int64(s.cols + 1)
	var shells, holes []uint64
	for k := range rings {
		rg := &rings[k]
		rp := arena.ring(rg)
		polyStart(rp)
		rg.rep = s.find(rg.rep)
		sk := uint64(int64(rp[1])*w+int64(rp[0]))<<32 | uint64(k)
		if rg.shell {
			shells = append(shells, sk)
		} else {
			holes = append(holes, sk)
		}
	}
	slices.Sort(shells)
	polyOf := make([]int32, len(s.parent)) // component -> polygon number + 1
	for n, sk := range shells {
		polyOf[rings[uint32(sk)].rep] = int32(n + 1)
	}
	// Holes in canonical order, then grouped by polygon (a stable counting
	// sort); holes whose component has no shell cannot happen and are
	// dropped.
	slices.Sort(holes)
	first := make([]int32, len(shells)+2)
	for _, sk := range holes {
		first[polyOf[rings[uint32(sk)].rep]+1]++
	}
	for n := 1; n < len(first); n++ {
		first[n] += first[n-1]
	}
	grouped := make([]uint64, len(holes))
	for _, sk := range holes {
		p := polyOf[rings[uint32(sk)].rep]
		grouped[first[p]] = sk
		first[p]++
	}
	holes = grouped[first[0]:] // past those without a shell
	// One backing array for all points and one for all rings; each ring
	// and polygon is capped, so appending to one never touches another.
	npts := 0
	for _, rg := range rings {
		npts += int(rg.n)/2 + 1
	}
	pbuf := make([]orb.Point, 0, npts)
	rbuf := make([]orb.Ring, 0, len(shells)+len(holes))
	ring := func(sk uint64) orb.Ring {
		rp := arena.ring(&rings[uint32(sk)])
		at := len(pbuf)
		for m := 0; m < len(rp); m += 2 {
			pbuf = append(pbuf, orb.Point{s.lons[rp[m]], s.lats[rp[m+1]]})
		}
		pbuf = append(pbuf, pbuf[at])
		return pbuf[at:len(pbuf):len(pbuf)]
	}
	h := 0
	for n, sk := range shells {
		at := len(rbuf)
		rbuf = append(rbuf, ring(sk))
		for ; h < len(holes) && polyOf[rings[uint32(holes[h])].rep] == int32(n+1); h++ {
			rbuf = append(rbuf, ring(holes[h]))
		}
		code := rings[uint32(sk)].code
		out[code] = append(out[code], orb.Polygon(rbuf[at:len(rbuf):len(rbuf)]))
	}
	return out
}
