package interp

import "math"

// The window kernel: for one cell, the chords to every station of its
// longitude window and, over those within the radius, Shepard's sums, in one
// pass of four lanes. It serves the common case of the grid (power 2, a
// radius of up to 337 km, no sectors, at most k stations within the radius
// and none within 1 m); gridRow falls back to the candidate list for the
// rest.
//
// The sums are taken in four lanes: station j of the window goes to lane
// j mod 4, in window order, and the lanes are added as (0 + 1) + (2 + 3).
// That fixes the order of every floating-point operation, so windowSumsGo
// and the AVX2 version (window_amd64.s) give the same bits, and the result
// depends only on the window (which depends only on the input), never on
// the worker count or the processor.

// windowLanes is the width of the kernel; the station arrays of a row carry
// windowLanes-1 padding entries past their end, so that a window's last
// block can be read whole.
const windowLanes = 4

// windowConsts are the kernel's constants, each repeated in four lanes for
// the vector loads: the weight's series coefficients (see windowSumsGo) and
// the radius as a chord squared. The order is the one window_amd64.s reads
// (32 bytes each).
type windowConsts struct {
	r4, r3, r2, r1, one [windowLanes]float64
	posInf, negInf      [windowLanes]float64
	c2max               [windowLanes]float64
	lane, four          [windowLanes]int64 // 0, 1, 2, 3 and the step between blocks
}

func newWindowConsts(c2max float64) *windowConsts {
	k := &windowConsts{}
	for l := range windowLanes {
		// -1/3, -1/15, -31/945, -289/14175 times 4^-n (exact).
		k.r1[l], k.r2[l], k.r3[l], k.r4[l] = -1.0/3/4, -1.0/15/16, -31.0/945/64, -289.0/14175/256
		k.one[l], k.posInf[l], k.negInf[l] = 1, math.Inf(1), math.Inf(-1)
		k.c2max[l] = c2max
		k.lane[l], k.four[l] = int64(l), windowLanes
	}
	return k
}

// windowOut is what the kernel gives: over the stations within the radius,
// the sums of w and w v, the smallest and largest v and the largest chord
// squared (+0 for none), and their number n. Lanes are put together in
// their fixed order. The layout is the one window_amd64.s writes.
type windowOut struct {
	sw, swz, lo, hi, far float64
	n                    int64
}

// exactWeight bounds the sum of weights of a cell with a station within
// 1 m from below: that station's weight alone is about 1/exactChordSq (the
// series factor is 1 to 1e-14 there). A smaller sum has no such station; a
// larger one goes through the candidate list, which applies the 1 m rule
// (or finds no station that close).
var exactWeight = 0.5 / exactChordSq

// windowCell is one call of the kernel: the stations of a row at x, y, z,
// v, the window lo .. lo+m-1 of them, and the cell at the unit vector (cx,
// cy, cz). The kernel reads the window and the stations after it to a
// multiple of four (the row's padding makes them readable) but counts
// only the window: the stations after it may be copies of stations in it,
// shifted by 360 degrees, in a row with few stations near the antimeridian.
// It writes the chord squared of window station j to d2[j] (and of the
// stations read after it) and its sums to out. The layout is the one
// window_amd64.s reads.
type windowCell struct {
	x, y, z, v, d2 []float64
	lo, m          int
	cx, cy, cz     float64
	k              *windowConsts
	out            windowOut
	last           [windowLanes]int64 // m - 1 in every lane: the AVX2 kernel's scratch
}

// sums runs the kernel: the AVX2 version where the processor has it, else
// windowSumsGo; the same bits either way (TestWindowSumsAsm).
func (c *windowCell) sums() {
	if hasWindowAVX2 {
		windowSumsVec(c)
		return
	}
	windowSumsGo(c)
}

// windowSumsGo is the kernel in Go, lane by lane as the vector version
// computes it. A station outside the radius, or read after the window,
// adds nothing to its lane: the
// vector version adds +0 there, which changes no lane sum (a sum that starts
// at +0 never becomes -0), and offers +Inf and -Inf to the smallest and
// largest value.
//
// The weight is 1/theta^2 for the central angle theta = 2 asin(c/2) of the
// chord c: (1/c^2) R(c^2), where R(s) = c^2/theta^2 = 1 - t/3 - t^2/15 -
// 31 t^3/945 - 289 t^4/14175 with t = s/4 (the reciprocal of
// asinSqSeries, worked out term by term with exact fractions; the first
// omitted term is below 3e-18 for a radius of up to 337 km). It is written
// in s, with the coefficients scaled by powers of four (exactly), and
// evaluated in Estrin's scheme, which the vector version overlaps with the
// division.
func windowSumsGo(c *windowCell) {
	x, y, z, v := c.x[c.lo:], c.y[c.lo:], c.z[c.lo:], c.v[c.lo:]
	d2, m, cx, cy, cz, k := c.d2, c.m, c.cx, c.cy, c.cz, c.k
	var sw, swz, far [windowLanes]float64
	lo, hi := k.posInf, k.negInf
	var n int64
	for b := 0; b < m; b += windowLanes {
		for l := range windowLanes {
			j := b + l
			dx, dy, dz := x[j]-cx, y[j]-cy, z[j]-cz
			c2 := dx*dx + dy*dy + dz*dz
			d2[j] = c2
			if j >= m || !(c2 <= k.c2max[l]) {
				continue
			}
			n++
			far[l] = maxLane(far[l], c2)
			s2 := c2 * c2
			w := (k.one[l] / c2) * ((k.one[l] + k.r1[l]*c2) + s2*((k.r2[l]+k.r3[l]*c2)+k.r4[l]*s2))
			sw[l] += w
			swz[l] += w * v[j]
			lo[l] = minLane(lo[l], v[j])
			hi[l] = maxLane(hi[l], v[j])
		}
	}
	c.out = windowOut{
		sw:  (sw[0] + sw[1]) + (sw[2] + sw[3]),
		swz: (swz[0] + swz[1]) + (swz[2] + swz[3]),
		lo:  minLane(minLane(lo[0], lo[1]), minLane(lo[2], lo[3])),
		hi:  maxLane(maxLane(hi[0], hi[1]), maxLane(hi[2], hi[3])),
		far: maxLane(maxLane(far[0], far[1]), maxLane(far[2], far[3])),
		n:   n,
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

// value is the weighted mean of the kernel's sums, clamped to the smallest
// and largest value as weigh clamps it.
func (o *windowOut) value() float64 {
	return min(max(o.swz/o.sw, o.lo), o.hi)
}
