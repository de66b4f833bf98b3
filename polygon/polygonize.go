package polygon

import (
	"math"
	"sort"

	"drygrid/grid"

	"github.com/paulmach/orb"
)

// Polygonize dissolves every cell of each code (except r.NoData) into a
// MultiPolygon whose rings follow cell edges, with collinear vertices
// dropped; exterior rings counter-clockwise, holes clockwise (RFC 7946
// section 3.1.6), coordinates in degrees rounded to the decimals the grid
// needs (see GeoJSONDecimals). Used by the GeoJSON writer and by the picture
// and page code.
//
// Connectivity rule: the cells of one code are 4-connected (they join across
// shared edges, never across a corner alone). Each Polygon is one
// 4-connected set of cells. Where two cells of a code touch only at a corner
// (a saddle vertex), the tracer pairs the ring edges at that vertex so that
// no ring visits a vertex twice: diagonal neighbours become separate
// polygons touching at a point, a hole that touches its own shell at a
// corner becomes a hole touching the shell at a point, and holes that touch
// diagonally become separate holes touching at a point. All of these are
// valid in the OGC Simple Features sense (and for shapely/GEOS).
//
// Coordinates follow the grid: on a grid that crosses the antimeridian they
// run east past 180. PolygonizeRFC7946 splits them at 180 instead. A nil
// raster, or one whose data does not match its grid, gives an empty map.
func Polygonize(r *grid.Uint8) map[uint8]orb.MultiPolygon {
	if !polyUsable(r) {
		return map[uint8]orb.MultiPolygon{}
	}
	s := r.Spec
	d := GeoJSONDecimals(s)
	lons := make([]float64, s.Cols+1)
	for i := range lons {
		lons[i] = Round(s.West+float64(i)*s.Res, d)
	}
	return polyTrace(r.Data, s.Cols, s.Rows, r.NoData, lons, polyLatTable(s, d), 0)
}

// PolygonizeRFC7946 is Polygonize with a grid that crosses the antimeridian
// split at 180 (RFC 7946 section 3.1.9): the part east of 180 is shifted by
// -360, so every longitude lies in [-180, 180]. A column that straddles 180
// (when the resolution does not divide 180) is cut along 180 into both
// parts. On other grids it equals Polygonize.
func PolygonizeRFC7946(r *grid.Uint8) map[uint8]orb.MultiPolygon { return polyRFC7946(r, 0) }

// polyRFC7946 splits at 180 and traces each part, simplifying to km when
// km > 0.
func polyRFC7946(r *grid.Uint8, km float64) map[uint8]orb.MultiPolygon {
	if !polyUsable(r) {
		return map[uint8]orb.MultiPolygon{}
	}
	s := r.Spec
	d := GeoJSONDecimals(s)
	if !s.CrossesAntimeridian() {
		lons := make([]float64, s.Cols+1)
		for i := range lons {
			lons[i] = Round(s.West+float64(i)*s.Res, d)
		}
		return polyTrace(r.Data, s.Cols, s.Rows, r.NoData, lons, polyLatTable(s, d), km)
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
		for code, mp := range polyTrace(data, n, s.Rows, r.NoData, lons, lats, km) {
			out[code] = append(out[code], mp...)
		}
	}
	part(0, kw, func(i int) float64 { return Round(math.Min(s.West+float64(i)*s.Res, 180), d) })
	part(ke, s.Cols, func(i int) float64 { return Round(math.Max(s.West+float64(i)*s.Res, 180)-360, d) })
	return out
}

// polyUsable: a raster the tracer can read (others give no polygons).
func polyUsable(r *grid.Uint8) bool {
	return r != nil && r.Spec.Cols > 0 && r.Spec.Rows > 0 && len(r.Data) == r.Spec.Len() &&
		r.Spec.Res > 0 && !math.IsInf(r.Spec.Res, 0) && !math.IsNaN(r.Spec.West) && !math.IsInf(r.Spec.West, 0)
}

// GeoJSONDecimals is the number of decimals that represents every cell edge
// of the grid exactly: the fewest d <= 9 for which Res, West and North are
// whole multiples of 10^-d (0.1 -> 1, 0.25 -> 2, 0.01 -> 2). A resolution
// with no short decimal form (1/12 deg) gets 9 decimals (about 0.1 mm).
func GeoJSONDecimals(s grid.Spec) int {
	p := 1.0
	for d := 0; d < 9; d++ {
		ok := true
		for _, v := range []float64{s.Res, s.West, s.North} {
			x := v * p
			if math.Abs(x-math.Round(x)) > 1e-6*math.Max(1, math.Abs(x))*1e-3 {
				ok = false
			}
		}
		if ok {
			return d
		}
		p *= 10
	}
	return 9
}

// Round rounds v to d decimals, giving the float64 nearest that decimal
// (so 0.30000000000000004 becomes 0.3).
func Round(v float64, d int) float64 {
	p := math.Pow(10, float64(d))
	r := math.Round(v*p) / p
	if r == 0 {
		return 0 // no negative zero
	}
	return r
}

func polyLatTable(s grid.Spec, d int) []float64 {
	lats := make([]float64, s.Rows+1)
	for j := range lats {
		lats[j] = Round(s.North-float64(j)*s.Res, d)
	}
	return lats
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

// polyRing is one traced ring in vertex indices before conversion.
type polyRing struct {
	code  uint8
	rep   int32 // a cell of the ring's 4-connected component
	shell bool
	pts   []int32 // i0, j0, i1, j1, ... (open: last != first)
}

// polyTrace traces the boundary rings of every code of a cols x rows raster
// (row 0 north) and assembles them into polygons. lons[i] and lats[j] give the
// coordinates of vertex column i and vertex row j. km > 0 simplifies the
// rings (see PolygonizeSimplified).
func polyTrace(data []uint8, cols, rows int, nodata uint8, lons, lats []float64, km float64) map[uint8]orb.MultiPolygon {
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
	if km > 0 {
		simp = &polySimp{km: km, cols: cols, rows: rows, P: P, pad: pad, lons: lons, lats: lats}
	}
	vis := make([]uint8, (rows+1)*cols) // bit 1: traversed eastward, bit 2: westward
	var rings []polyRing
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
			if nd != d || (simp != nil && simp.isNode(i, j)) {
				turns = append(turns, int32(i), int32(j))
			}
			d = nd
			if i == i0 && j == j0 && d == d0 {
				break
			}
		}
		for _, loop := range polySplit(turns, saddles) {
			rings = append(rings, polyRing{code: code, rep: rep, shell: polyArea2(loop) > 0, pts: loop})
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
		simp.apply(rings)
	}
	label := polyLabel(data, cols, rows, nodata)
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

// polySaddle records that the tracer passed saddle vertex v when it had
// recorded pos int32 values of the turn list.
type polySaddle struct{ v, pos int32 }

// polySplit cuts a traced ring at every vertex it visits twice (only saddle
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
	// The saddle's turn is recorded at the position saved in pos; walk the
	// turn list with a stack and cut a loop whenever a repeated vertex
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

// polyLabel labels the 4-connected components of equal codes with a
// union-find over the raster and returns a lookup from cell to component.
func polyLabel(data []uint8, cols, rows int, nodata uint8) func(int32) int32 {
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
