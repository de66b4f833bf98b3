package polygon

import "math"

// Chains and rings of the sweep (see tracer_sweep.go): recorded vertices
// are nodes in a pool, linked by next; a chain is known by its two end
// nodes, each holding the other as partner, so that starting, extending and
// joining chains take constant time, and a join of a chain with itself is
// seen at once. Nodes of closed rings go back to a free list.

// polyNode is a recorded vertex of an open chain or of a ring being closed.
// Its partner is, at a chain's first node, the chain's last node and the
// other way round (a one-node chain is its own partner); inner nodes keep
// a stale partner.
type polyNode struct {
	i, j          int32
	next, partner int32 // -1: none
	saddle        bool
}

func (s *polySweep) newNode(i, j int32, saddle bool) int32 {
	n := polyNode{i: i, j: j, next: -1, saddle: saddle}
	if s.free >= 0 {
		k := s.free
		s.free = s.nodes[k].next
		s.nodes[k] = n
		return k
	}
	s.nodes = append(s.nodes, n)
	return int32(len(s.nodes) - 1)
}

// link pairs an entering boundary edge with a leaving one at vertex (i, j).
// in is the last node of the entering chain when inOld (else the edge is
// new), out the first node of the leaving chain when outOld; rec records
// the vertex. It returns the chain ends the new edges get: st for a new
// entering edge (a chain's first node), en for a new leaving edge (a
// chain's last node). A chain joined to itself is a ring, with component
// id rep.
func (s *polySweep) link(in, out int32, inOld, outOld, rec bool, i, j int32, saddle bool, code uint8, rep int32) (st, en int32) {
	st, en = -1, -1
	n := int32(-1)
	if rec || (!inOld && !outOld) {
		n = s.newNode(i, j, saddle)
	}
	nd := s.nodes
	switch {
	case inOld && outOld:
		if n >= 0 {
			nd[in].next = n
			nd[n].next = out
		} else {
			nd[in].next = out
		}
		if nd[in].partner == out {
			s.closeRing(out, code, rep)
			return
		}
		f, l := nd[in].partner, nd[out].partner
		nd[f].partner, nd[l].partner = l, f
	case inOld:
		en = in
		if n >= 0 {
			nd[in].next = n
			f := nd[in].partner
			nd[f].partner, nd[n].partner = n, f
			en = n
		}
	case outOld:
		st = out
		if n >= 0 {
			nd[n].next = out
			l := nd[out].partner
			nd[l].partner, nd[n].partner = n, l
			st = n
		}
	default:
		nd[n].partner = n
		st, en = n, n
	}
	return
}

// closeRing takes the closed cycle of nodes through start off the chains,
// frees its nodes, cuts it at vertices visited twice and keeps the loops.
//
// When simplifying, the cycle is read from where the previous,
// whole-raster tracer began it, so that the simplification, which depends
// on the order it meets the rings in, gives the same result: that tracer scanned the horizontal cell
// edges row by row, west to east (at one edge the code above first) and
// traced a ring from the first edge it met, recording vertices from the
// end of that edge's segment on. The key of that edge orders the rings
// (polyRing.key).
func (s *polySweep) closeRing(start int32, code uint8, rep int32) {
	w := int64(s.cols + 1)
	first, key := start, int64(0)
	k := start
	for s.km > 0 { // the order matters only to the simplification
		if key == 0 {
			key = math.MaxInt64
		}
		p := &s.nodes[k]
		q := &s.nodes[p.next]
		if p.j == q.j {
			kk := (int64(p.j)*w + int64(min(p.i, q.i))) * 2
			if p.i > q.i {
				kk++ // westward: the code below the edge
			}
			if kk < key {
				key, first = kk, p.next
			}
		}
		k = p.next
		if k == start {
			break
		}
	}
	turns, saddles := s.turns[:0], s.saddles[:0]
	k = first
	for {
		nd := &s.nodes[k]
		if nd.saddle {
			saddles = append(saddles, polySaddle{nd.j*int32(w) + nd.i, int32(len(turns))})
		}
		turns = append(turns, nd.i, nd.j)
		nx := nd.next
		nd.next = s.free
		s.free = k
		k = nx
		if k == first {
			break
		}
	}
	polySplit(turns, saddles, func(loop []int32) {
		n := len(s.rings)
		if n == 0 || len(s.rings[n-1]) == cap(s.rings[n-1]) {
			s.rings = append(s.rings, make([]polyRing, 0, 1<<12))
			n++
		}
		rg := polyRing{code: code, shell: polyArea2(loop) > 0, rep: rep, key: key}
		s.pts.add(&rg, loop)
		s.rings[n-1] = append(s.rings[n-1], rg)
	})
	s.turns, s.saddles = turns, saddles
}
