package interp

import "math"

// The window kernel: four neighbouring cells of a row at once, one cell per
// lane, over the stations of their longitude windows. It serves the common
// case of the grid (power 2, a radius of up to 337 km, no sectors); gridRow
// falls back to the candidate list for the cells it cannot settle (a tie at
// the k-th distance, a station within 1 m), and finds the k-th chord with
// kthChord where more than k+windowTop-1 stations count.
//
// It runs in two passes over the union of the four windows (the stations
// from the first cell's window start to the last cell's window end):
//
//   - windowChords: the chord squared from each cell to each station, kept
//     where the station is in that cell's own window and within the cell's
//     limit, the radius or a chord known to hold its k nearest (+Inf
//     elsewhere); per cell the count and the windowTop largest of those
//     chords, from which the k-th smallest follows when there are at most
//     k+windowTop-1.
//   - windowSums: per cell, over the stations within its own chord tau (the
//     radius, or the k-th chord), Shepard's sums, the count and the
//     smallest and largest value.
//
// A cell's sums are taken station after station in window order, one
// accumulator per cell, and a station outside the cell's own window or
// chord adds +0 (a sum that starts at +0 never becomes -0). So a cell's
// value depends only on its window and the stations, not on the other
// cells of its group, the worker count or the processor: windowChordsGo and
// windowSumsGo are the definition, and the AVX2 version (window_amd64.s)
// gives the same bits (TestWindowAsm). Products that the vector version
// fuses are written with math.FMA, which rounds once on every processor,
// and the others are rounded by a conversion, which the compiler never fuses.

// windowLanes is the number of cells of a group, one per vector lane.
const windowLanes = 4

// windowTop is how many of the largest chords within the radius the first
// pass keeps per cell: the k-th smallest of n > k is the (n-k+1)-th largest.
const windowTop = 4

// windowConsts are the kernel's constants, each repeated in four lanes for
// the vector loads: the radius as a chord squared, the weight's series
// coefficients (see windowSumsGo) and the step of the station index. The
// order is the one window_amd64.s reads (32 bytes each).
type windowConsts struct {
	c2max, posInf, one, r1, r2, r3, r4 [windowLanes]float64
	step                               [windowLanes]int64
	lanes                              [windowLanes]float64 // 1, 2, 3, 4: columns from the cell before the group
}

func newWindowConsts(c2max float64) *windowConsts {
	k := &windowConsts{}
	for l := range windowLanes {
		k.c2max[l], k.posInf[l], k.one[l] = c2max, math.Inf(1), 1
		// -1/3, -1/15, -31/945, -289/14175 times 4^-n (exact).
		k.r1[l], k.r2[l], k.r3[l], k.r4[l] = -1.0/3/4, -1.0/15/16, -31.0/945/64, -289.0/14175/256
		k.step[l] = 1
		k.lanes[l] = float64(l + 1)
	}
	return k
}

// limSlack widens a limit from the triangle inequality by far more than
// the rounding of the chords.
const limSlack = 1 + 1e-12

// exactWeight bounds the sum of weights of a cell with a station within
// 1 m from below: that station's weight alone is about 1/exactChordSq (the
// series factor is 1 to 1e-14 there). A smaller sum has no such station; a
// larger one goes through the candidate list, which applies the 1 m rule
// (or finds no station that close).
var exactWeight = 0.5 / exactChordSq

// windowGroup is one call of the kernel: the stations j0 .. j0+m-1 of the
// row's x, y, z, v (the union of the windows) and the cells c0 .. c0+3 of
// the row's columns. Lane l is the cell at the unit vector (cp cos[c0+l],
// cp sin[c0+l], cz[l]), cp the cosine of the row's latitude (each product
// rounded, as the other paths of the grid have it), whose own window is
// the row's stations lom1[c0+l]+1 .. him1[c0+l]. The slices are the row's,
// set once a row; a group sets j0, m and c0. The first pass writes d2
// (station j0+j, lane l at d2[4j+l]), n and top; the second reads d2 and
// tau and writes the sums. The layout is the one window_amd64.s reads.
type windowGroup struct {
	x, y, z, v []float64
	d2         []float64
	m          int
	k          *windowConsts
	cp         float64
	cos, sin   []float64 // the row's columns, at least c0+4
	lom1, him1 []int64   // the row's columns, at least c0+4
	j0         int64
	c0         int64
	cz         [windowLanes]float64
	// The first pass's limit: lane l counts the stations within the chord
	// squared lim[l] = min(c2max, (u0 + (l+1) delta)^2 (1 + 1e-12)), for u0
	// the k-th chord of the cell before the group (+Inf for none) and delta
	// the chord between neighbouring cells (see gridRowWindow). The pass
	// writes lim.
	u0, delta float64
	lim       [windowLanes]float64

	n   [windowLanes]int64              // stations within the radius
	top [windowTop][windowLanes]float64 // their largest chords squared, largest first (+0 for none)

	tau             [windowLanes]float64 // the second pass's chord squared
	sw, swz, lo, hi [windowLanes]float64 // Shepard's sums, smallest and largest value within tau
	n2              [windowLanes]int64   // stations within tau
	val             [windowLanes]float64 // swz/sw clamped to [lo, hi]
}

// chords runs the first pass: the AVX2 version where the processor has it,
// else windowChordsGo; the same bits either way.
func (g *windowGroup) chords() {
	if hasWindowAVX2 {
		windowChordsVec(g)
		return
	}
	windowChordsGo(g)
}

// sums runs the second pass, as chords does.
func (g *windowGroup) sums() {
	if hasWindowAVX2 {
		windowSumsVec(g)
		return
	}
	windowSumsGo(g)
}

// windowChordsGo is the first pass in Go, lane by lane as the vector
// version computes it: the chord squared (chordSq, as every other path of
// the grid has it, so that all agree on ties), and the largest chords kept by a network of
// maxima and minima (exact, so any order of the operands gives the same
// bits: chords squared are never NaN nor -0).
func windowChordsGo(g *windowGroup) {
	j0, j1, c0, c1 := g.j0, g.j0+int64(g.m), g.c0, g.c0+windowLanes
	x, y, z, d2, k := g.x[j0:j1], g.y[j0:j1], g.z[j0:j1], g.d2[:windowLanes*g.m], g.k
	cos, sin, lom1, him1 := g.cos[c0:c1], g.sin[c0:c1], g.lom1[c0:c1], g.him1[c0:c1]
	var cx, cy [windowLanes]float64
	for l := range windowLanes {
		cx[l], cy[l] = float64(g.cp*cos[l]), float64(g.cp*sin[l])
	}
	g.n = [windowLanes]int64{}
	g.top = [windowTop][windowLanes]float64{}
	for l := range windowLanes {
		u := g.u0 + float64(k.lanes[l]*g.delta)
		g.lim[l] = minLane(float64(float64(u*u)*limSlack), k.c2max[l])
	}
	for j := range x {
		for l := range windowLanes {
			dx, dy, dz := x[j]-cx[l], y[j]-cy[l], z[j]-g.cz[l]
			c2 := chordSq(dx, dy, dz)
			i := j0 + int64(j)
			if i <= lom1[l] || i > him1[l] || !(c2 <= g.lim[l]) {
				d2[windowLanes*j+l] = math.Inf(1)
				continue
			}
			d2[windowLanes*j+l] = c2
			g.n[l]++
			for t := range windowTop {
				g.top[t][l], c2 = max(g.top[t][l], c2), min(g.top[t][l], c2)
			}
		}
	}
}

// windowSumsGo is the second pass in Go, lane by lane as the vector version
// computes it. The weight is 1/theta^2 for the central angle theta = 2
// asin(c/2) of the chord c: (1/c^2) R(c^2), where R(s) = c^2/theta^2 = 1 -
// t/3 - t^2/15 - 31 t^3/945 - 289 t^4/14175 with t = s/4 (the reciprocal of
// asinSqSeries, worked out term by term with exact fractions; the first
// omitted term is below 3e-18 for a radius of up to 337 km). It is written
// in s, with the coefficients scaled by powers of four (exactly), and
// evaluated in Estrin's scheme, which the vector version overlaps with the
// division. The smallest and largest value, and the clamp of the weighted
// mean between them, follow MINPD and MAXPD (minLane, maxLane).
func windowSumsGo(g *windowGroup) {
	v, d2, k := g.v[g.j0:g.j0+int64(g.m)], g.d2[:windowLanes*g.m], g.k
	for l := range windowLanes {
		g.sw[l], g.swz[l], g.lo[l], g.hi[l], g.n2[l] = 0, 0, math.Inf(1), math.Inf(-1), 0
	}
	for j, vj := range v {
		for l := range windowLanes {
			c2 := d2[windowLanes*j+l]
			if !(c2 <= g.tau[l]) {
				continue
			}
			s2 := c2 * c2
			p := math.FMA(c2, k.r1[l], k.one[l])
			q := math.FMA(c2, k.r3[l], k.r2[l])
			q = math.FMA(s2, k.r4[l], q)
			p = math.FMA(s2, q, p)
			w := float64((k.one[l] / c2) * p) // rounded here, never fused into the sum
			g.sw[l] += w
			g.swz[l] = math.FMA(w, vj, g.swz[l])
			g.lo[l] = minLane(g.lo[l], vj)
			g.hi[l] = maxLane(g.hi[l], vj)
			g.n2[l]++
		}
	}
	// The weighted mean is a convex combination of the values; the clamp
	// only removes rounding beyond them (and makes a constant field give
	// that constant exactly).
	for l := range windowLanes {
		g.val[l] = minLane(maxLane(g.swz[l]/g.sw[l], g.lo[l]), g.hi[l])
	}
}

// minLane and maxLane are the SSE/AVX MINPD and MAXPD of one lane: the first
// operand if it is strictly smaller (larger), else the second. For the
// finite values here that is min and max, with either zero taken for a tie
// of -0 and +0.
func minLane(a, b float64) float64 {
	if a < b {
		return a
	}
	return b
}

func maxLane(a, b float64) float64 {
	if a > b {
		return a
	}
	return b
}

// kthChord is the k-th smallest of the finite chords squared of lane l in
// d2 (m stations, four lanes each), when more than k are, found in scratch
// (at least m long). bound is an upper bound of it (+Inf for none): only
// the chords within it are looked at, then the largest are dropped until
// k are left. Chords squared are never NaN nor -0, so their bits order as
// their values (maxD2), and an integer maximum chooses without a branch.
func kthChord(d2 []float64, l, m, k int, bound float64, scratch []uint64) float64 {
	b := scratch[:m]
	n := 0
	inf, lim := math.Float64bits(math.Inf(1)), math.Float64bits(bound)
	for j := range m {
		u := math.Float64bits(d2[windowLanes*j+l])
		b[n] = u
		n += b2i(u != inf && u <= lim)
	}
	if n < k { // the bound was not one (cannot happen, but to be safe)
		return kthChord(d2, l, m, k, math.Inf(1), scratch)
	}
	b = b[:n]
	for len(b) > k {
		top := maxBits(b)
		i := 0
		for b[i] != top {
			i++
		}
		b[i] = b[len(b)-1]
		b = b[:len(b)-1]
	}
	return math.Float64frombits(maxBits(b))
}

// maxBits is the largest of b (not empty), with two running maxima.
func maxBits(b []uint64) uint64 {
	x, y := b[0], b[0]
	i := 1
	for ; i+1 < len(b); i += 2 {
		x, y = max(x, b[i]), max(y, b[i+1])
	}
	if i < len(b) {
		x = max(x, b[i])
	}
	return max(x, y)
}
