package lanes

import "math"

// The kernel runs in two passes over the union of the four cells' spans
// (the stations from the first cell's span start to the last cell's span
// end):
//
//   - Chords: the chord squared from each cell to each station, kept where
//     the station is in that cell's own span and within the cell's limit,
//     the radius or a chord known to hold its k nearest (+Inf elsewhere);
//     per cell the count and the Kept largest of those chords, from which
//     the k-th smallest follows when there are at most k+Kept-1.
//   - Sums: per cell, over the stations within its own chord Tau (the
//     radius, or the k-th chord), Shepard's sums, the count and the
//     smallest and largest value.
//
// A cell's sums are taken station after station in span order, one
// accumulator per cell, and a station outside the cell's own span or chord
// adds +0 (a sum that starts at +0 never becomes -0). So a cell's value
// depends only on its span and the stations, not on the other cells of its
// group, the worker count or the processor: chordsGo and sumsGo are the
// definition, and the AVX2 version (kernel_amd64.s) gives the same bits
// (TestAsm). Products that the vector version fuses are written with
// math.FMA, which rounds once on every processor, and the others are
// rounded by a conversion, which the compiler never fuses.

// Width is the number of cells of a group, one per vector lane.
const Width = 4

// Kept is how many of the largest chords within the radius the first pass
// keeps per cell: the k-th smallest of n > k is the (n-k+1)-th largest.
const Kept = 4

// Consts are the kernel's constants, each repeated in four lanes for the
// vector loads: the radius as a chord squared, the weight's series
// coefficients (see sumsGo) and the step of the station number. The order
// is the one kernel_amd64.s reads (32 bytes each).
type Consts struct {
	C2max, posInf, one, r1, r2, r3, r4 [Width]float64
	step                               [Width]int64
	lanes                              [Width]float64 // 1, 2, 3, 4: columns from the cell before the group
}

// NewConsts are the constants for the radius whose chord squared on the
// unit sphere is c2max. The weight's series holds for a radius of up to
// 337 km (c2max up to 4 * 7e-4).
func NewConsts(c2max float64) *Consts {
	k := &Consts{}
	for l := range Width {
		k.C2max[l], k.posInf[l], k.one[l] = c2max, math.Inf(1), 1
		// -1/3, -1/15, -31/945, -289/14175 times 4^-n (exact).
		k.r1[l], k.r2[l], k.r3[l], k.r4[l] = -1.0/3/4, -1.0/15/16, -31.0/945/64, -289.0/14175/256
		k.step[l] = 1
		k.lanes[l] = float64(l + 1)
	}
	return k
}

// Slack widens a limit from the triangle inequality by far more than the
// rounding of the chords.
const Slack = 1 + 1e-12

// Group is one call of the kernel: the stations J0 .. J0+M-1 of the row's
// X, Y, Z, V (the union of the spans) and the cells C0 .. C0+3 of the
// row's columns. Lane l is the cell at the unit vector (Cp Cos[C0+l],
// Cp Sin[C0+l], Cz[l]), Cp the cosine of the row's latitude (each product
// rounded, as the other paths of the grid have it), whose own span is the
// row's stations Lom1[C0+l]+1 .. Him1[C0+l]. The slices are the row's, set
// once a row; a group sets J0, M and C0. The first pass writes D2 (station
// J0+j, lane l at D2[4j+l]), N and Top; the second reads D2 and Tau and
// writes the sums. The layout is the one kernel_amd64.s reads.
type Group struct {
	X, Y, Z, V []float64
	D2         []float64
	M          int
	K          *Consts
	Cp         float64
	Cos, Sin   []float64 // the row's columns, at least C0+4
	Lom1, Him1 []int64   // the row's columns, at least C0+4
	J0         int64
	C0         int64
	Cz         [Width]float64
	// The first pass's limit: lane l counts the stations within the chord
	// squared Lim[l] = min(C2max, (U0 + (l+1) Delta)^2 (1 + 1e-12)), for U0
	// the k-th chord of the cell before the group (+Inf for none) and Delta
	// the chord between neighbouring cells. The pass writes Lim.
	U0, Delta float64
	Lim       [Width]float64

	N   [Width]int64         // stations within the radius
	Top [Kept][Width]float64 // their largest chords squared, largest first (+0 for none)

	Tau             [Width]float64 // the second pass's chord squared
	Sw, Swz, Lo, Hi [Width]float64 // Shepard's sums, smallest and largest value within Tau
	N2              [Width]int64   // stations within Tau
	Val             [Width]float64 // Swz/Sw clamped to [Lo, Hi]
}

// Chords runs the first pass: the AVX2 version where the processor has it,
// else chordsGo; the same bits either way.
func (g *Group) Chords() {
	if hasAVX2 {
		chordsVec(g)
		return
	}
	chordsGo(g)
}

// Sums runs the second pass, as Chords does.
func (g *Group) Sums() {
	if hasAVX2 {
		sumsVec(g)
		return
	}
	sumsGo(g)
}

// chordsGo is the first pass in Go, lane by lane as the vector version
// computes it: the chord squared (chordSq, as every other path of the grid
// has it, so that all agree on ties), and the largest chords kept by a
// network of maxima and minima (exact, so any order of the operands gives
// the same bits: chords squared are never NaN nor -0).
func chordsGo(g *Group) {
	j0, j1, c0, c1 := g.J0, g.J0+int64(g.M), g.C0, g.C0+Width
	x, y, z, d2, k := g.X[j0:j1], g.Y[j0:j1], g.Z[j0:j1], g.D2[:Width*g.M], g.K
	cos, sin, lom1, him1 := g.Cos[c0:c1], g.Sin[c0:c1], g.Lom1[c0:c1], g.Him1[c0:c1]
	var cx, cy [Width]float64
	for l := range Width {
		cx[l], cy[l] = float64(g.Cp*cos[l]), float64(g.Cp*sin[l])
	}
	g.N = [Width]int64{}
	g.Top = [Kept][Width]float64{}
	for l := range Width {
		u := g.U0 + float64(k.lanes[l]*g.Delta)
		g.Lim[l] = minLane(float64(float64(u*u)*Slack), k.C2max[l])
	}
	for j := range x {
		for l := range Width {
			dx, dy, dz := x[j]-cx[l], y[j]-cy[l], z[j]-g.Cz[l]
			c2 := chordSq(dx, dy, dz)
			i := j0 + int64(j)
			if i <= lom1[l] || i > him1[l] || !(c2 <= g.Lim[l]) {
				d2[Width*j+l] = math.Inf(1)
				continue
			}
			d2[Width*j+l] = c2
			g.N[l]++
			for t := range Kept {
				g.Top[t][l], c2 = max(g.Top[t][l], c2), min(g.Top[t][l], c2)
			}
		}
	}
}

// chordSq is the chord squared dx^2 + dy^2 + dz^2 between two unit vectors
// whose difference is (dx, dy, dz), rounded after every operation (the
// conversions keep the compiler from fusing them), as interp's chordSq and
// the assembly compute it.
func chordSq(dx, dy, dz float64) float64 {
	return float64(dx*dx) + float64(dy*dy) + float64(dz*dz)
}

// sumsGo is the second pass in Go, lane by lane as the vector version
// computes it. The weight is 1/theta^2 for the central angle theta = 2
// asin(c/2) of the chord c: (1/c^2) R(c^2), where R(s) = c^2/theta^2 = 1 -
// t/3 - t^2/15 - 31 t^3/945 - 289 t^4/14175 with t = s/4 (the reciprocal of
// the Maclaurin series of 4 asin^2(c/2) / c^2, worked out term by term with
// exact fractions; the first omitted term is below 3e-18 for a radius of up
// to 337 km). It is written in s, with the coefficients scaled by powers of
// four (exactly), and evaluated in Estrin's scheme, which the vector
// version overlaps with the division. The smallest and largest value, and
// the clamp of the weighted mean between them, follow MINPD and MAXPD
// (minLane, maxLane).
func sumsGo(g *Group) {
	v, d2, k := g.V[g.J0:g.J0+int64(g.M)], g.D2[:Width*g.M], g.K
	for l := range Width {
		g.Sw[l], g.Swz[l], g.Lo[l], g.Hi[l], g.N2[l] = 0, 0, math.Inf(1), math.Inf(-1), 0
	}
	for j, vj := range v {
		for l := range Width {
			c2 := d2[Width*j+l]
			if !(c2 <= g.Tau[l]) {
				continue
			}
			s2 := c2 * c2
			p := math.FMA(c2, k.r1[l], k.one[l])
			q := math.FMA(c2, k.r3[l], k.r2[l])
			q = math.FMA(s2, k.r4[l], q)
			p = math.FMA(s2, q, p)
			w := float64((k.one[l] / c2) * p) // rounded here, never fused into the sum
			g.Sw[l] += w
			g.Swz[l] = math.FMA(w, vj, g.Swz[l])
			g.Lo[l] = minLane(g.Lo[l], vj)
			g.Hi[l] = maxLane(g.Hi[l], vj)
			g.N2[l]++
		}
	}
	// The weighted mean is a convex combination of the values; the clamp
	// only removes rounding beyond them (and makes a constant field give
	// that constant exactly).
	for l := range Width {
		g.Val[l] = minLane(maxLane(g.Swz[l]/g.Sw[l], g.Lo[l]), g.Hi[l])
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

// KthChord is the k-th smallest of the finite chords squared of lane l in
// d2 (m stations, four lanes each, as Chords writes them), when more than k
// are, found in scratch (at least m long). bound is an upper bound of it
// (+Inf for none): only the chords within it are looked at, then the
// largest are dropped until k are left. Chords squared are never NaN nor
// -0, so their bits order as their values, and an integer maximum chooses
// without a branch.
func KthChord(d2 []float64, l, m, k int, bound float64, scratch []uint64) float64 {
	b := scratch[:m]
	n := 0
	inf, lim := math.Float64bits(math.Inf(1)), math.Float64bits(bound)
	for j := range m {
		u := math.Float64bits(d2[Width*j+l])
		b[n] = u
		n += b2i(u != inf && u <= lim)
	}
	if n < k { // the bound was not one (cannot happen, but to be safe)
		return KthChord(d2, l, m, k, math.Inf(1), scratch)
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

// b2i is 1 for true and 0 for false; the compiler makes it a SETcc, so that
// counting with it takes no branch.
func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}
