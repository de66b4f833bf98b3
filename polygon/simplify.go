package polygon

import (
	"math"
	"slices"

	"drygrid/grid"

	"github.com/paulmach/orb"
	"github.com/tidwall/rtree"
)

// PolygonizeSimplified is PolygonizeRFC7946 with the shared boundaries
// simplified to a tolerance of km kilometres, keeping the layer consistent:
//
//   - every ring is cut into arcs at nodes: vertices where three or more
//     regions meet (no data and the outside count as one region), saddle
//     vertices, grid corners and border vertices where the cells inside the
//     border change, so runs along the border (and along the 180 cut) stay
//     single exact segments;
//   - each arc is simplified once, by Douglas-Peucker (Douglas and Peucker
//     1973) in a local equirectangular frame at the arc's mean latitude
//     (x = lon cos(lat), y = lat, 1 deg = 111.195 km on the authalic sphere),
//     and the same result is used by both regions it separates, so no gap or
//     overlap can open between bands;
//   - a replacement of a run of vertices by a straight chord is accepted only
//     if the chord touches no other segment except at shared end points, and
//     no vertex of any other segment lies in the area swept between the run
//     and the chord (winding number); otherwise the run is split at its
//     farthest vertex and each half tried again, down to the exact cell
//     edges. Closed arcs keep at least three points.
//
// Kept vertices are a subset of the exact ones, so coordinates stay on the
// grid's decimals. km <= 0 gives PolygonizeRFC7946.
func PolygonizeSimplified(r *grid.Uint8, km float64) map[uint8]orb.MultiPolygon {
	if !(km > 0) || math.IsInf(km, 0) {
		km = 0
	}
	return polyWhole(r, km, true)
}

// polyKmPerDeg is one degree of arc on the authalic sphere, km.
var polyKmPerDeg = grid.AuthalicRadiusM / 1000 * math.Pi / 180

// polySimp simplifies the rings of one traced column part. nodes holds
// the vertex ids (vid) of its nodes, sorted: the sweep records them as it
// passes (polyIsNode), since the raster is not kept.
type polySimp struct {
	km         float64
	cols, rows int
	nodes      []int32
	lons, lats []float64
}

func (s *polySimp) vid(i, j int32) int32 { return j*int32(s.cols+1) + i }
func (s *polySimp) ij(v int32) (int32, int32) {
	return v % int32(s.cols+1), v / int32(s.cols+1)
}

// isNode: vertex (i, j) is a node (see polyIsNode).
func (s *polySimp) isNode(i, j int) bool {
	_, ok := slices.BinarySearch(s.nodes, s.vid(int32(i), int32(j)))
	return ok
}

// polyArc is one arc in its canonical direction; keep marks kept vertices.
type polyArc struct {
	v    []int32 // vertex ids; closed arcs repeat the first at the end
	keep []bool
}

type polyUse struct {
	arc int32
	rev bool
}

type polySeg [2]int32 // vertex ids of a segment

// apply simplifies the rings, whose vertices are held in pts, and returns
// the arena of the simplified vertices, to which it points the rings.
func (s *polySimp) apply(rings []polyRing, pts *polyArena) *polyArena {
	var arcs []*polyArc
	index := map[[2]int32]int32{}
	uses := make([][]polyUse, len(rings))
	addArc := func(v []int32) polyUse {
		n := len(v) - 1
		fk, rk := [2]int32{v[0], v[1]}, [2]int32{v[n], v[n-1]}
		rev := rk[0] < fk[0] || (rk[0] == fk[0] && rk[1] < fk[1])
		key := fk
		if rev {
			key = rk
		}
		if k, ok := index[key]; ok {
			return polyUse{k, rev}
		}
		c := append([]int32(nil), v...)
		if rev {
			for a, b := 0, len(c)-1; a < b; a, b = a+1, b-1 {
				c[a], c[b] = c[b], c[a]
			}
		}
		index[key] = int32(len(arcs))
		arcs = append(arcs, &polyArc{v: c})
		return polyUse{int32(len(arcs) - 1), rev}
	}
	for ri, rg := range rings {
		rp := pts.ring(&rg)
		n := len(rp) / 2
		ids := make([]int32, n)
		first := -1
		for k := 0; k < n; k++ {
			ids[k] = s.vid(rp[2*k], rp[2*k+1])
			if first < 0 && s.isNode(int(rp[2*k]), int(rp[2*k+1])) {
				first = k
			}
		}
		if first < 0 { // no node: one closed arc from the smallest vertex
			m := 0
			for k := range ids {
				if ids[k] < ids[m] {
					m = k
				}
			}
			loop := append(append(append([]int32(nil), ids[m:]...), ids[:m]...), ids[m])
			uses[ri] = append(uses[ri], addArc(loop))
			continue
		}
		rot := append(append(append([]int32(nil), ids[first:]...), ids[:first]...), ids[first])
		start := 0
		for k := 1; k < len(rot); k++ {
			i, j := s.ij(rot[k])
			if k == len(rot)-1 || s.isNode(int(i), int(j)) {
				uses[ri] = append(uses[ri], addArc(rot[start:k+1]))
				start = k
			}
		}
	}

	// The segment index holds every current segment, in vertex units.
	var tr rtree.RTreeGN[int32, polySeg]
	box := func(a, b int32) ([2]int32, [2]int32) {
		ai, aj := s.ij(a)
		bi, bj := s.ij(b)
		return [2]int32{min(ai, bi), min(aj, bj)}, [2]int32{max(ai, bi), max(aj, bj)}
	}
	for _, a := range arcs {
		for k := 0; k+1 < len(a.v); k++ {
			lo, hi := box(a.v[k], a.v[k+1])
			tr.Insert(lo, hi, polySeg{a.v[k], a.v[k+1]})
		}
	}
	for _, a := range arcs {
		s.simplifyArc(a, &tr, box)
	}

	out := &polyArena{}
	var buf []int32
	for ri := range rings {
		buf = buf[:0]
		for _, u := range uses[ri] {
			a := arcs[u.arc]
			var kept []int32
			for k, v := range a.v {
				if a.keep[k] {
					kept = append(kept, v)
				}
			}
			if u.rev {
				for x, y := 0, len(kept)-1; x < y; x, y = x+1, y-1 {
					kept[x], kept[y] = kept[y], kept[x]
				}
			}
			for _, v := range kept[:len(kept)-1] {
				i, j := s.ij(v)
				buf = append(buf, i, j)
			}
		}
		out.add(&rings[ri], buf)
	}
	return out
}

// simplifyArc runs Douglas-Peucker on one arc and accepts each chord only if
// it keeps the arrangement planar (see PolygonizeSimplified).
func (s *polySimp) simplifyArc(a *polyArc, tr *rtree.RTreeGN[int32, polySeg], box func(a, b int32) ([2]int32, [2]int32)) {
	n := len(a.v)
	a.keep = make([]bool, n)
	for k := range a.keep {
		a.keep[k] = true
	}
	if n < 3 {
		return
	}
	// Local frame in km at the arc's mean latitude.
	lat := 0.0
	for _, v := range a.v {
		_, j := s.ij(v)
		lat += s.lats[j]
	}
	cosLat := math.Cos(lat / float64(n) * math.Pi / 180)
	xy := func(v int32) (float64, float64) {
		i, j := s.ij(v)
		return s.lons[i] * cosLat * polyKmPerDeg, s.lats[j] * polyKmPerDeg
	}
	far := func(lo, hi int, from int) (int, float64) { // farthest from point `from` (lo..hi exclusive)
		best, bd := -1, -1.0
		x0, y0 := xy(a.v[from])
		for k := lo; k < hi; k++ {
			x, y := xy(a.v[k])
			if d := math.Hypot(x-x0, y-y0); d > bd {
				best, bd = k, d
			}
		}
		return best, bd
	}
	// Split points: the ends, and for a closed arc two more fixed points so
	// that at least three distinct points survive.
	fixed := []int{0, n - 1}
	if a.v[0] == a.v[n-1] {
		f, _ := far(1, n-1, 0)
		g, gd := -1, -1.0
		x0, y0 := xy(a.v[0])
		x1, y1 := xy(a.v[f])
		for k := 1; k < n-1; k++ {
			if k == f {
				continue
			}
			x, y := xy(a.v[k])
			if d := math.Abs((x1-x0)*(y-y0)-(y1-y0)*(x-x0)) / math.Hypot(x1-x0, y1-y0); d > gd {
				g, gd = k, d
			}
		}
		if g < 0 {
			return
		}
		fixed = []int{0, min(f, g), max(f, g), n - 1}
	}
	// Douglas-Peucker, where a chord within tolerance that would break the
	// arrangement is split at its farthest vertex like one beyond it.
	var stack [][2]int
	for k := len(fixed) - 2; k >= 0; k-- {
		stack = append(stack, [2]int{fixed[k], fixed[k+1]})
	}
	for len(stack) > 0 {
		lo, hi := stack[len(stack)-1][0], stack[len(stack)-1][1]
		stack = stack[:len(stack)-1]
		if hi-lo < 2 {
			continue
		}
		x0, y0 := xy(a.v[lo])
		x1, y1 := xy(a.v[hi])
		L := math.Hypot(x1-x0, y1-y0)
		best, bd := -1, -1.0
		for k := lo + 1; k < hi; k++ {
			x, y := xy(a.v[k])
			var d float64
			if L == 0 {
				d = math.Hypot(x-x0, y-y0)
			} else {
				d = math.Abs((x1-x0)*(y-y0)-(y1-y0)*(x-x0)) / L
			}
			if d > bd {
				best, bd = k, d
			}
		}
		if bd <= s.km && s.tryChord(a.v[lo:hi+1], tr, box) {
			for k := lo + 1; k < hi; k++ {
				a.keep[k] = false
			}
			continue
		}
		stack = append(stack, [2]int{best, hi}, [2]int{lo, best})
	}
}

// tryChord replaces the run by its chord in the index if that keeps every
// ring simple and every other vertex on its side; else it leaves the index.
func (s *polySimp) tryChord(run []int32, tr *rtree.RTreeGN[int32, polySeg], box func(a, b int32) ([2]int32, [2]int32)) bool {
	for k := 0; k+1 < len(run); k++ {
		lo, hi := box(run[k], run[k+1])
		tr.Delete(lo, hi, polySeg{run[k], run[k+1]})
	}
	p, q := run[0], run[len(run)-1]
	ok := p != q
	if ok {
		lo, hi := box(p, q)
		tr.Search(lo, hi, func(_, _ [2]int32, sg polySeg) bool {
			if s.segsMeet(p, q, sg[0], sg[1]) {
				ok = false
			}
			return ok
		})
	}
	if ok {
		// Bounding box of the run: any vertex inside the swept area lies there.
		lo, hi := box(run[0], run[0])
		for _, v := range run {
			l2, h2 := box(v, v)
			lo = [2]int32{min(lo[0], l2[0]), min(lo[1], l2[1])}
			hi = [2]int32{max(hi[0], h2[0]), max(hi[1], h2[1])}
		}
		seen := map[int32]bool{}
		tr.Search(lo, hi, func(_, _ [2]int32, sg polySeg) bool {
			for _, v := range sg {
				if v == p || v == q || seen[v] {
					continue
				}
				seen[v] = true
				if s.winding(run, v) != 0 {
					ok = false
					return false
				}
			}
			return true
		})
	}
	if ok {
		lo, hi := box(p, q)
		tr.Insert(lo, hi, polySeg{p, q})
		return true
	}
	for k := 0; k+1 < len(run); k++ {
		lo, hi := box(run[k], run[k+1])
		tr.Insert(lo, hi, polySeg{run[k], run[k+1]})
	}
	return false
}

func (s *polySimp) xy64(v int32) (int64, int64) {
	i, j := s.ij(v)
	return int64(i), int64(j)
}

func polyOrient(ax, ay, bx, by, cx, cy int64) int64 {
	return (bx-ax)*(cy-ay) - (by-ay)*(cx-ax)
}

func polySign(x int64) int {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	}
	return 0
}

// segsMeet reports whether segments pq and cd share any point other than a
// common end point at which they otherwise diverge.
func (s *polySimp) segsMeet(p, q, c, d int32) bool {
	if (p == c && q == d) || (p == d && q == c) {
		return true // the same segment twice: a ring would collapse
	}
	px, py := s.xy64(p)
	qx, qy := s.xy64(q)
	cx, cy := s.xy64(c)
	dx, dy := s.xy64(d)
	share := func(ax, ay, bx, by, ex, ey int64) bool { // segments a-b and a-e share end a
		return polyOrient(ax, ay, bx, by, ex, ey) == 0 && (bx-ax)*(ex-ax)+(by-ay)*(ey-ay) > 0
	}
	switch {
	case p == c:
		return share(px, py, qx, qy, dx, dy)
	case p == d:
		return share(px, py, qx, qy, cx, cy)
	case q == c:
		return share(qx, qy, px, py, dx, dy)
	case q == d:
		return share(qx, qy, px, py, cx, cy)
	}
	o1 := polySign(polyOrient(px, py, qx, qy, cx, cy))
	o2 := polySign(polyOrient(px, py, qx, qy, dx, dy))
	o3 := polySign(polyOrient(cx, cy, dx, dy, px, py))
	o4 := polySign(polyOrient(cx, cy, dx, dy, qx, qy))
	if o1 != o2 && o3 != o4 {
		return true
	}
	on := func(ax, ay, bx, by, x, y int64) bool {
		return min(ax, bx) <= x && x <= max(ax, bx) && min(ay, by) <= y && y <= max(ay, by)
	}
	return (o1 == 0 && on(px, py, qx, qy, cx, cy)) || (o2 == 0 && on(px, py, qx, qy, dx, dy)) ||
		(o3 == 0 && on(cx, cy, dx, dy, px, py)) || (o4 == 0 && on(cx, cy, dx, dy, qx, qy))
}

// winding is the winding number of the closed path run + chord (back to the
// start) around vertex v (the crossing-rule winding number, D. Sunday 2001,
// from memory; exact in integers).
func (s *polySimp) winding(run []int32, v int32) int {
	x, y := s.xy64(v)
	w := 0
	n := len(run)
	for k := 0; k < n; k++ {
		ax, ay := s.xy64(run[k])
		bx, by := s.xy64(run[(k+1)%n])
		if ay <= y {
			if by > y && polyOrient(ax, ay, bx, by, x, y) > 0 {
				w++
			}
		} else if by <= y && polyOrient(ax, ay, bx, by, x, y) < 0 {
			w--
		}
	}
	return w
}
