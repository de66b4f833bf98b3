package interp

import "math"

// sortKey is a sort key and the position (in the slice being sorted) it
// belongs to.
type sortKey struct {
	key float64
	i   int32
}

// sortKeys sorts ks, given in position order (ks[j].i == j), by key, then
// position; keys are never NaN. It is a least-significant-digit radix sort of
// the keys' bits made to order as the values do (the sign bit set for
// positive numbers, every bit flipped for negative ones, -0 taken as +0):
// stable, so equal keys keep position order. The keys come back as sorted,
// with -0 as +0.
func sortKeys(ks []sortKey) {
	n := len(ks)
	if n == 0 {
		return
	}
	u, pos := make([]uint64, 2*n), make([]int32, 2*n)
	src, dst, si, di := u[:n], u[n:], pos[:n], pos[n:]
	for j, k := range ks {
		b := math.Float64bits(k.key)
		if k.key == 0 {
			b = 0 // -0 is +0 here, as for cmp.Compare
		}
		if b>>63 != 0 {
			b = ^b
		} else {
			b |= 1 << 63
		}
		src[j], si[j] = b, k.i
	}
	for shift := uint(0); shift < 64; shift += 8 {
		var count [257]int
		for _, b := range src {
			count[(b>>shift)&0xff+1]++
		}
		if count[(src[0]>>shift)&0xff+1] == n {
			continue // every key has this digit
		}
		for d := 1; d < 257; d++ {
			count[d] += count[d-1]
		}
		for j, b := range src {
			d := (b >> shift) & 0xff
			dst[count[d]], di[count[d]] = b, si[j]
			count[d]++
		}
		src, dst, si, di = dst, src, di, si
	}
	for j, b := range src {
		if b>>63 != 0 {
			b &^= 1 << 63
		} else {
			b = ^b
		}
		ks[j] = sortKey{math.Float64frombits(b), si[j]}
	}
}
