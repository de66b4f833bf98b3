package polygon

import (
	"sort"

	"github.com/paulmach/orb"
)

// polyRing is one traced ring in vertex indices before conversion.
type polyRing struct {
	code  uint8
	rep   int32 // component id of a cell on the ring's left
	key   int64 // where the ring's cycle was first met (see closeRing)
	shell bool
	pts   []int32 // i0, j0, i1, j1, ... (open: last != first)
}

// polySaddle records that the ring passed saddle vertex v when it had
// recorded pos int32 values of the turn list.
type polySaddle struct{ v, pos int32 }

// polySplit cuts a closed ring at every vertex it visits twice (only saddle
// vertices can be) into simple loops. Cutting a loop out at a repeated
// vertex is the same as pairing that saddle's edges the other way.
func polySplit(turns []int32, saddles []polySaddle) [][]int32 {
	own := func() [][]int32 { return [][]int32{append([]int32(nil), turns...)} }
	if len(saddles) < 2 {
		return own()
	}
	sort.Slice(saddles, func(a, b int) bool { return saddles[a].v < saddles[b].v })
	dup := map[int32]bool{}
	for k := 1; k < len(saddles); k++ {
		if saddles[k].v == saddles[k-1].v {
			dup[saddles[k].v] = true
		}
	}
	if len(dup) == 0 {
		return own()
	}
	// The saddle's vertex is recorded at the position saved in pos; walk
	// the turn list with a stack and cut a loop whenever a repeated vertex
	// reappears on it.
	var loops [][]int32
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
				loops = append(loops, append([]int32(nil), stack[p:]...))
				stack = stack[:p]
			}
			at[key] = len(stack)
		}
		stack = append(stack, turns[k], turns[k+1])
	}
	return append(loops, stack)
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

// polyStart rotates a ring to start at its north-most, then west-most
// vertex (smallest vertex row, then column), keeping its direction.
func polyStart(pts []int32) []int32 {
	m := 0
	for k := 2; k < len(pts); k += 2 {
		if pts[k+1] < pts[m+1] || (pts[k+1] == pts[m+1] && pts[k] < pts[m]) {
			m = k
		}
	}
	if m == 0 {
		return pts
	}
	out := make([]int32, 0, len(pts))
	return append(append(out, pts[m:]...), pts[:m]...)
}

// polyBefore orders rings by their start vertex, north to south, then west
// to east.
func polyBefore(a, b []int32) bool {
	return a[1] < b[1] || (a[1] == b[1] && a[0] < b[0])
}

// polygons assembles the closed rings into each code's MultiPolygon, after
// simplifying them when asked, in the canonical order: rings start at
// their north-most, then west-most vertex; polygons by their shell's start,
// holes likewise.
func (s *polySweep) polygons() map[uint8]orb.MultiPolygon {
	out := map[uint8]orb.MultiPolygon{}
	rings := s.rings
	s.rings = nil
	if len(rings) == 0 {
		return out
	}
	// The order the previous tracer found the rings in; the loops cut from
	// one cycle keep their order.
	sort.SliceStable(rings, func(a, b int) bool { return rings[a].key < rings[b].key })
	if s.km > 0 {
		simp := &polySimp{km: s.km, cols: s.cols, rows: s.rows, nodes: s.nodeIDs, lons: s.lons, lats: s.lats}
		simp.apply(rings)
	}
	type poly struct {
		code  uint8
		rings [][]int32 // shell first
	}
	var polys []*poly
	shellOf := map[int32]*poly{}
	for k := range rings {
		rg := &rings[k]
		rg.pts = polyStart(rg.pts)
		rg.rep = s.find(rg.rep)
		if rg.shell {
			p := &poly{code: rg.code, rings: [][]int32{rg.pts}}
			shellOf[rg.rep] = p
			polys = append(polys, p)
		}
	}
	for _, rg := range rings {
		if !rg.shell {
			p, ok := shellOf[rg.rep]
			if !ok || p.code != rg.code {
				continue // cannot happen: every component has one shell
			}
			p.rings = append(p.rings, rg.pts)
		}
	}
	sort.SliceStable(polys, func(a, b int) bool { return polyBefore(polys[a].rings[0], polys[b].rings[0]) })
	for _, p := range polys {
		holes := p.rings[1:]
		sort.SliceStable(holes, func(a, b int) bool { return polyBefore(holes[a], holes[b]) })
		pg := make(orb.Polygon, len(p.rings))
		for k, pts := range p.rings {
			ring := make(orb.Ring, 0, len(pts)/2+1)
			for m := 0; m < len(pts); m += 2 {
				ring = append(ring, orb.Point{s.lons[pts[m]], s.lats[pts[m+1]]})
			}
			pg[k] = append(ring, ring[0])
		}
		out[p.code] = append(out[p.code], pg)
	}
	return out
}
