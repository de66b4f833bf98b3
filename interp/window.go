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
// the vector loads: the asinSqSeries4 coefficients, the radius and the 1 m
// rule as chords squared, and the lane numbers. The order is the one
// window_amd64.s reads (32 bytes each).
type windowConsts struct {
	quarter, r4, r3, r2, r1, one [windowLanes]float64
	posInf, negInf               [windowLanes]float64
	four                         [windowLanes]int64 // the step of the lane numbers
	c2max, exact                 [windowLanes]float64
	lane                         [windowLanes]int64 // 0, 1, 2, 3
}

func newWindowConsts(c2max float64) *windowConsts {
	k := &windowConsts{}
	for l := range windowLanes {
		k.quarter[l], k.r4[l], k.r3[l], k.r2[l], k.r1[l], k.one[l] = 0.25, -289.0/14175, -31.0/945, -1.0/15, -1.0/3, 1
		k.posInf[l], k.negInf[l] = math.Inf(1), math.Inf(-1)
		k.four[l], k.lane[l] = windowLanes, int64(l)
		k.c2max[l], k.exact[l] = c2max, exactChordSq
	}
	return k
}

// windowOut is what the kernel gives, over the stations within the radius:
// the sums of w and w v and the smallest and largest v, the lanes put
// together in their fixed order; the largest chord squared (+0 for none);
// ex, not zero when one of them is within 1 m; n, their number. The layout
// is the one window_amd64.s writes.
type windowOut struct {
	sw, swz, lo, hi, far float64
	ex, n                int64
}

// windowSums runs the kernel over the m stations at x, y, z, v (each
// readable to m rounded up to a multiple of four) for the cell at the unit
// vector (cx, cy, cz), writing every chord squared to d2 (as long) and the
// sums to out. It is windowSumsAVX2 where the processor has AVX2, else
// windowSumsGo: the same bits either way (TestWindowSumsAsm).
var windowSums = windowSumsGo

// windowSumsGo is the kernel in Go, lane by lane as the vector version
// computes it. A station outside the radius (or past m) adds nothing to its
// lane: the vector version adds +0 there, which changes no lane sum (a sum
// that starts at +0 never becomes -0), and offers +Inf and -Inf to the
// smallest and largest.
func windowSumsGo(x, y, z, v, d2 []float64, m int, cx, cy, cz float64, k *windowConsts, out *windowOut) {
	var sw, swz, far [windowLanes]float64
	lo, hi := k.posInf, k.negInf
	*out = windowOut{}
	for b := 0; b < m; b += windowLanes {
		for l := range windowLanes {
			j := b + l
			dx, dy, dz := x[j]-cx, y[j]-cy, z[j]-cz
			c2 := dx*dx + dy*dy + dz*dz
			d2[j] = c2
			if j >= m || !(c2 <= k.c2max[l]) {
				continue
			}
			out.n++
			if c2 < k.exact[l] {
				out.ex = 1
			}
			t := c2 * k.quarter[l]
			t2 := t * t
			w := (k.one[l] / c2) * ((k.one[l] + k.r1[l]*t) + t2*((k.r2[l]+k.r3[l]*t)+k.r4[l]*t2))
			sw[l] += w
			swz[l] += w * v[j]
			lo[l] = minLane(lo[l], v[j])
			hi[l] = maxLane(hi[l], v[j])
			far[l] = maxLane(far[l], c2)
		}
	}
	out.sw = (sw[0] + sw[1]) + (sw[2] + sw[3])
	out.swz = (swz[0] + swz[1]) + (swz[2] + swz[3])
	out.lo = minLane(minLane(lo[0], lo[1]), minLane(lo[2], lo[3]))
	out.hi = maxLane(maxLane(hi[0], hi[1]), maxLane(hi[2], hi[3]))
	out.far = maxLane(maxLane(far[0], far[1]), maxLane(far[2], far[3]))
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
