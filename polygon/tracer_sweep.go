package polygon

// The sweep. Vertex rows j = 0..rows are visited north to south; vertex row
// j lies between cell row j-1 (above) and cell row j (below), and cells
// outside the grid count as no data. Only those two cell rows are held.
//
// Every cell edge between two different codes carries up to two directed
// boundary edges, one per code that is not no data, each walked with its
// code on the left: so exterior rings come out counter-clockwise and holes
// clockwise (y up). At a vertex the four cells around it, taken clockwise
// from the north-west (NW, NE, SE, SW = quadrants 0..3), decide everything:
//
//   - a boundary edge of code x enters the vertex hugging quadrant q (q on
//     its left) when cell q is x and the next cell counter-clockwise is not;
//   - it leaves the vertex hugging the quadrant reached by stepping
//     clockwise from q while the cells are x. That is the tracing rule "turn
//     left where you can": at a saddle (x on one diagonal only) each of the
//     two x cells is wrapped on its own, so cells of a code join across
//     edges only (4-connectivity);
//   - entering hugging q and leaving hugging q+1 is going straight: the
//     vertex is collinear and is not recorded (unless it is a node for the
//     simplification); any other pair is a turn and is recorded.
//
// The edges around a vertex are, by quadrant: entering hugging NW comes
// from the west along the vertex row, hugging NE from above, hugging SE from
// the east, hugging SW from below; leaving hugging NW goes up, NE east, SE
// down, SW west. Those from above and from the west were met earlier in the
// sweep; the others are new.
//
// Boundary edges are linked into open chains: lists of recorded vertices
// whose two pending ends are the vertical edges in the cell row below the
// last vertex row (a chain's head goes down, its tail comes up), and, while
// a vertex row is swept west to east, the horizontal edge just passed. At a
// vertex each entering/leaving pair either starts a chain (both edges new),
// extends one at its head or tail (one edge new), or joins two (both old):
// when a chain is joined to itself it has closed into a ring. The ring is
// cut at every vertex it visits twice (polySplit), and each loop is a shell
// or a hole by its signed area. By the end every chain has closed.
//
// Components: each cell of the two rows holds a component id; a cell takes
// the id of its west neighbour of the same code, else of the one above,
// else a new id, and ids that meet are united (union-find over ids, a new
// id only where a run of a code starts with no equal cell above, which is a
// ring vertex). A ring records the id of a cell on its left; at the end the
// holes of a component go to its shell.

// polySweep traces one column range of the raster, row by row.
type polySweep struct {
	cols, rows int
	nodata     uint8
	j          int // next vertex row to sweep

	// Cell rows above and below vertex row j, padded with no data: cell
	// column c at index c+1. lab*: their component ids (-1: no data).
	up, down       []uint8
	labUp, labDown []int32
	parent         []int32 // union-find over component ids

	// Chain ends pending in the cell row below the last vertex row, per
	// vertex column: heads[i] is the last node of the chain going down at
	// column i, tails[i] the first node of the chain coming up there; -1
	// none. nheads, ntails are being filled for the row being swept.
	heads, tails, nheads, ntails []int32

	nodes []polyNode
	free  int32 // free list of nodes, through next

	rings [][]polyRing // closed rings, in chunks
	pts   *polyArena   // their vertices

	// Simplification: km > 0; nodeIDs are the vertex ids of the nodes
	// (polySimp.isNode), in sweep order, so sorted.
	km         float64
	nodeIDs    []int32
	lons, lats []float64

	turns   []int32 // scratch for closing rings
	saddles []polySaddle
}

func newPolySweep(cols, rows int, nodata uint8, km float64, lons, lats []float64) *polySweep {
	s := &polySweep{cols: cols, rows: rows, nodata: nodata, km: km, lons: lons, lats: lats, free: -1, pts: &polyArena{}}
	s.up = make([]uint8, cols+2)
	s.down = make([]uint8, cols+2)
	for k := range s.up {
		s.up[k], s.down[k] = nodata, nodata
	}
	s.labUp = make([]int32, cols+2)
	s.labDown = make([]int32, cols+2)
	for k := range s.labUp {
		s.labUp[k], s.labDown[k] = -1, -1
	}
	s.heads = make([]int32, cols+1)
	s.tails = make([]int32, cols+1)
	s.nheads = make([]int32, cols+1)
	s.ntails = make([]int32, cols+1)
	for k := range s.heads {
		s.heads[k], s.tails[k] = -1, -1
	}
	return s
}

// row takes cell row s.j (codes of the part's columns; nil after the last
// row: the outside, no data) and sweeps vertex row s.j.
func (s *polySweep) row(codes []uint8) {
	cols := s.cols
	down, up := s.down, s.up
	if codes == nil {
		for k := 1; k <= cols; k++ {
			down[k] = s.nodata
			s.labDown[k] = -1
		}
	} else {
		copy(down[1:cols+1], codes)
		s.label()
	}
	J := int32(s.j)
	onY := s.j == 0 || s.j == s.rows
	var carryE, carryW int32 = -1, -1 // chain ends on the horizontal edges just east of the previous vertex
	for i := 0; i <= cols; i++ {
		a, b, c, d := up[i], up[i+1], down[i], down[i+1] // NW, NE, SW, SE
		if a == b && c == d && a == c {
			s.nheads[i], s.ntails[i] = -1, -1
			carryE, carryW = -1, -1
			continue
		}
		cell := [4]uint8{a, b, d, c} // clockwise from NW
		node := false
		if s.km > 0 && polyIsNode(a, b, c, d, i == 0 || i == cols, onY, i == 0, i == cols, s.j == 0, s.j == s.rows) {
			node = true
			s.nodeIDs = append(s.nodeIDs, J*int32(cols+1)+int32(i))
		}
		// Ends of the edges around the vertex, by quadrant hugged: enter[q]
		// is the last node of the chain entering, leave[q] the first node
		// of the chain leaving; for new edges they are filled below.
		enter := [4]int32{carryE, s.heads[i], -1, -1}
		leave := [4]int32{s.tails[i], -1, -1, carryW}
		for q := 0; q < 4; q++ {
			x := cell[q]
			if x == s.nodata || cell[(q+3)&3] == x {
				continue
			}
			q2 := q
			for cell[(q2+1)&3] == x {
				q2 = (q2 + 1) & 3
			}
			saddle := q2 == q && cell[(q+2)&3] == x
			rec := q2 != (q+1)&3 || node
			rep := s.labUp[i+(q&1)] // NW or NE: the cell on an old entering edge's left
			st, en := s.link(enter[q], leave[q2], q <= 1, q2 == 0 || q2 == 3, rec, int32(i), J, saddle, x, rep)
			if q > 1 {
				enter[q] = st
			}
			if q2 == 1 || q2 == 2 {
				leave[q2] = en
			}
		}
		carryW, s.ntails[i] = enter[2], enter[3]
		carryE, s.nheads[i] = leave[1], leave[2]
	}
	s.heads, s.nheads = s.nheads, s.heads
	s.tails, s.ntails = s.ntails, s.tails
	s.up, s.down = down, up
	s.labUp, s.labDown = s.labDown, s.labUp
	s.j++
}

// label gives the cells of the row below (s.down) their component ids.
func (s *polySweep) label() {
	up, down, lu, ld := s.up, s.down, s.labUp, s.labDown
	for k := 1; k <= s.cols; k++ {
		x := down[k]
		if x == s.nodata {
			ld[k] = -1
			continue
		}
		var l int32
		switch {
		case down[k-1] == x:
			l = ld[k-1]
		case up[k] == x:
			l = lu[k]
		default:
			l = int32(len(s.parent))
			s.parent = append(s.parent, l)
		}
		ld[k] = l
		// Unite with the cell above unless the west neighbour already did
		// for the same pair.
		if up[k] == x && lu[k] != l && (down[k-1] != x || up[k-1] != x || lu[k-1] != lu[k]) {
			s.union(l, lu[k])
		}
	}
}

func (s *polySweep) find(x int32) int32 {
	p := s.parent
	for p[x] != x {
		p[x] = p[p[x]]
		x = p[x]
	}
	return x
}

func (s *polySweep) union(a, b int32) {
	a, b = s.find(a), s.find(b)
	switch {
	case a < b:
		s.parent[b] = a
	case b < a:
		s.parent[a] = b
	}
}

// polyIsNode: a vertex where three or more regions meet (no data and the
// outside count as one region), a saddle, a grid corner, or a border vertex
// where the regions just inside the border change. a, b, c, d are the NW,
// NE, SW and SE cells; west..south tell which borders the vertex is on.
func polyIsNode(a, b, c, d uint8, onX, onY, west, east, north, south bool) bool {
	switch {
	case onX && onY:
		return true
	case west:
		return b != d
	case east:
		return a != c
	case north:
		return c != d
	case south:
		return a != b
	}
	n := 1
	if b != a {
		n++
	}
	if c != a && c != b {
		n++
	}
	if d != a && d != b && d != c {
		n++
	}
	return n >= 3 || (n == 2 && a == d && b == c)
}
