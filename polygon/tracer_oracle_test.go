package polygon

// The previous implementation of the tracer, kept as a test oracle: it
// traced each ring with random access to a padded copy of the whole raster,
// a visited bitmap and a union-find over cells. TestTracerOracle compares
// the streaming tracer with it as normalized ring sets.

import (
	"math"
	"sort"

	"drygrid/grid"

	"github.com/paulmach/orb"
)

// polyRFC7946Old is the previous polyRFC7946: it splits at 180 and traces each part, simplifying to km when
// km > 0.
func polyRFC7946Old(r *grid.Uint8, km float64) map[uint8]orb.MultiPolygon {
	if r == nil || len(r.Data) != r.Spec.Len() || !specUsable(r.Spec) {
		return map[uint8]orb.MultiPolygon{}
	}
	s := r.Spec
	d := GeoJSONDecimals(s)
	if !s.CrossesAntimeridian() {
		lons := make([]float64, s.Cols+1)
		for i := range lons {
			lons[i] = Round(s.West+float64(i)*s.Res, d)
		}
		return polyTraceOld(r.Data, s.Cols, s.Rows, r.NoData, lons, polyLatTable(s, d), km)
	}
	lats := polyLatTable(s, d)
	x := (180 - s.West) / s.Res // column edge index of 180, maybe fractional
	kw := int(math.Ceil(x - 1e-9))
	ke := int(math.Floor(x + 1e-9))
	kw = min(max(kw, 0), s.Cols)
	ke = min(max(ke, 0), s.Cols)
	out := map[uint8]orb.MultiPolygon{}
	part := func(c0, c1 int, lon func(i int) float64) {
		n := c1 - c0
		if n <= 0 {
			return
		}
		data := make([]uint8, n*s.Rows)
		for row := 0; row < s.Rows; row++ {
			copy(data[row*n:(row+1)*n], r.Data[row*s.Cols+c0:row*s.Cols+c1])
		}
		lons := make([]float64, n+1)
		for i := range lons {
			lons[i] = lon(c0 + i)
		}
		for code, mp := range polyTraceOld(data, n, s.Rows, r.NoData, lons, lats, km) {
			out[code] = append(out[code], mp...)
		}
	}
	part(0, kw, func(i int) float64 { return Round(math.Min(s.West+float64(i)*s.Res, 180), d) })
	part(ke, s.Cols, func(i int) float64 { return Round(math.Max(s.West+float64(i)*s.Res, 180)-360, d) })
	return out
}

// Headings of the tracer, counter-clockwise from east in a y-up (north-up)
// frame: left turn is +1, right turn is +3 (mod 4).
const (
	polyE = iota
	polyN
	polyW
	polyS
)

var (
	polyDI = [4]int{1, 0, -1, 0}
	polyDJ = [4]int{0, -1, 0, 1} // vertex rows grow southward
)

// polyTraceOld traces the boundary rings of every code of a cols x rows raster
// (row 0 north) and assembles them into polygons. lons[i] and lats[j] give the
// coordinates of vertex column i and vertex row j. km > 0 simplifies the
// rings (see PolygonizeSimplified).
func polyTraceOld(data []uint8, cols, rows int, nodata uint8, lons, lats []float64, km float64) map[uint8]orb.MultiPolygon {
	out := map[uint8]orb.MultiPolygon{}
	if cols <= 0 || rows <= 0 || len(data) < cols*rows {
		return out
	}
	// Padded copy: a ring of nodata around the raster, so that the 2x2
	// neighbourhood of every vertex can be read without bounds checks.
	P := cols + 2
	pad := make([]uint8, P*(rows+2))
	for i := range pad[:P] {
		pad[i] = nodata
		pad[len(pad)-P+i] = nodata
	}
	for row := 0; row < rows; row++ {
		line := pad[(row+1)*P : (row+2)*P]
		line[0], line[P-1] = nodata, nodata
		copy(line[1:P-1], data[row*cols:(row+1)*cols])
	}
	// Offsets of the cell front-left and front-right of a vertex for each
	// heading, relative to the vertex's north-west cell (pad index j*P+i).
	fl := [4]int{1, 0, P, P + 1}
	fr := [4]int{P + 1, 1, 0, P}

	var simp *polySimp
	isNode := func(i, j int) bool { return polyIsNodeOld(pad, P, cols, rows, i, j) }
	if km > 0 {
		// The old simplifier read its nodes from pad; the set is the same.
		var nodes []int32
		for j := 0; j <= rows; j++ {
			for i := 0; i <= cols; i++ {
				if isNode(i, j) {
					nodes = append(nodes, int32(j*(cols+1)+i))
				}
			}
		}
		simp = &polySimp{km: km, cols: cols, rows: rows, nodes: nodes, lons: lons, lats: lats}
	}
	vis := make([]uint8, (rows+1)*cols) // bit 1: traversed eastward, bit 2: westward
	var rings []polyRingOld
	var turns []int32
	var saddles []polySaddle
	trace := func(code uint8, i0, j0, d0 int, rep int32) {
		turns = turns[:0]
		saddles = saddles[:0]
		i, j, d := i0, j0, d0
		for {
			switch d {
			case polyE:
				vis[j*cols+i] |= 1
			case polyW:
				vis[j*cols+i-1] |= 2
			}
			i += polyDI[d]
			j += polyDJ[d]
			base := j*P + i
			nd := d
			if pad[base+fl[d]] != code {
				nd = (d + 1) & 3
				if pad[base+fr[d]] == code {
					saddles = append(saddles, polySaddle{int32(j*(cols+1) + i), int32(len(turns))})
				}
			} else if pad[base+fr[d]] == code {
				nd = (d + 3) & 3
			}
			if nd != d || (simp != nil && isNode(i, j)) {
				turns = append(turns, int32(i), int32(j))
			}
			d = nd
			if i == i0 && j == j0 && d == d0 {
				break
			}
		}
		for _, loop := range polySplitOld(turns, saddles) {
			rings = append(rings, polyRingOld{code: code, rep: rep, shell: polyArea2(loop) > 0, pts: loop})
		}
	}
	for j := 0; j <= rows; j++ {
		for i := 0; i < cols; i++ {
			above := pad[j*P+i+1]
			below := pad[(j+1)*P+i+1]
			if above == below {
				continue
			}
			if above != nodata && vis[j*cols+i]&1 == 0 {
				trace(above, i, j, polyE, int32((j-1)*cols+i))
			}
			if below != nodata && vis[j*cols+i]&2 == 0 {
				trace(below, i+1, j, polyW, int32(j*cols+i))
			}
		}
	}
	if len(rings) == 0 {
		return out
	}
	if simp != nil {
		// The simplifier now reads the rings from an arena.
		arena := &polyArena{}
		nr := make([]polyRing, len(rings))
		for k, rg := range rings {
			arena.add(&nr[k], rg.pts)
		}
		arena = simp.apply(nr, arena)
		for k := range rings {
			rings[k].pts = arena.ring(&nr[k])
		}
	}
	label := polyLabelOld(data, cols, rows, nodata)
	type where struct {
		code uint8
		k    int
	}
	shellOf := map[int32]where{}
	toRing := func(pts []int32) orb.Ring {
		ring := make(orb.Ring, 0, len(pts)/2+1)
		for k := 0; k < len(pts); k += 2 {
			ring = append(ring, orb.Point{lons[pts[k]], lats[pts[k+1]]})
		}
		return append(ring, ring[0])
	}
	for _, rg := range rings {
		if rg.shell {
			c := label(rg.rep)
			shellOf[c] = where{rg.code, len(out[rg.code])}
			out[rg.code] = append(out[rg.code], orb.Polygon{toRing(rg.pts)})
		}
	}
	for _, rg := range rings {
		if !rg.shell {
			w, ok := shellOf[label(rg.rep)]
			if !ok || w.code != rg.code {
				continue // cannot happen: every component has one shell
			}
			out[rg.code][w.k] = append(out[rg.code][w.k], toRing(rg.pts))
		}
	}
	return out
}

// polyLabelOld labels the 4-connected components of equal codes with a
// union-find over the raster and returns a lookup from cell to component.
func polyLabelOld(data []uint8, cols, rows int, nodata uint8) func(int32) int32 {
	parent := make([]int32, cols*rows)
	find := func(x int32) int32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	for row := 0; row < rows; row++ {
		for col := 0; col < cols; col++ {
			k := row*cols + col
			c := data[k]
			parent[k] = int32(k)
			if c == nodata {
				continue
			}
			if col > 0 && data[k-1] == c {
				parent[k] = find(int32(k - 1))
			}
			if row > 0 && data[k-cols] == c {
				a, b := find(int32(k-cols)), find(int32(k))
				if a != b {
					if a < b {
						parent[b] = a
					} else {
						parent[a] = b
					}
				}
			}
		}
	}
	return find
}

// polyIsNodeOld is the previous polySimp.isNode, reading the padded raster.
func polyIsNodeOld(pad []uint8, P, cols, rows, i, j int) bool {
	b := j*P + i
	a, bb, c, d := pad[b], pad[b+1], pad[b+P], pad[b+P+1] // NW, NE, SW, SE
	onX, onY := i == 0 || i == cols, j == 0 || j == rows
	switch {
	case onX && onY:
		return true
	case i == 0:
		return bb != d
	case i == cols:
		return a != c
	case j == 0:
		return c != d
	case j == rows:
		return a != bb
	}
	n := 1
	if bb != a {
		n++
	}
	if c != a && c != bb {
		n++
	}
	if d != a && d != bb && d != c {
		n++
	}
	return n >= 3 || (n == 2 && a == d && bb == c)
}

// polyRingOld is the previous polyRing.
type polyRingOld struct {
	code  uint8
	rep   int32 // a cell of the ring's 4-connected component
	shell bool
	pts   []int32 // i0, j0, i1, j1, ... (open: last != first)
}

// polySplitOld is the previous polySplit.
func polySplitOld(turns []int32, saddles []polySaddle) [][]int32 {
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
	var loops [][]int32
	keyAt := map[int32]int32{}
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
