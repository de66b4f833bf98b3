package interp

// Test helpers that expose what the kernel computes, for the property tests.
// kBest, an insertion into a sorted list, chooses the k nearest
// independently of selectK.

// nearest lists the stations At would weight at lon, lat: input indices and
// great-circle distances in km, nearest first, ties by input order (for
// tests and diagnostics).
func (ip *Interpolator) nearest(lon, lat float64) (ids []int, distKm []float64) {
	c := newCands(ip.k)
	m := ip.selectAt(lon, lat, c)
	cx, cy, cz := unitVector(lon, lat)
	kb := newKBest(ip.k)
	for i := range m {
		kb.offer(c.cs[i].d2, ip.id[c.cs[i].rk], c.cs[i].rk)
	}
	for i := 0; i < kb.n; i++ {
		ids = append(ids, int(kb.id[i]))
		distKm = append(distKm, ip.distKm(kb.d2[i], kb.rk[i], cx, cy, cz))
	}
	return ids, distKm
}

// idwWeights are the normalised Shepard (1968) weights d_i^-p / sum d_j^-p
// for distances none below 1 m, nearest first, computed as estimate does.
func idwWeights(distKm []float64, p float64) []float64 {
	w := make([]float64, len(distKm))
	var s float64
	for i, d := range distKm {
		r := distKm[0] / d
		w[i] = relWeightSq(r*r, p)
		s += w[i]
	}
	for i := range w {
		w[i] /= s
	}
	return w
}

// kBest keeps the k smallest (chord squared, position in the input) pairs
// offered, in ascending order: distance ties go to the station that came
// first in the input, so the choice does not depend on the order of the
// offers.
type kBest struct {
	k, n int
	d2   []float64
	id   []int32 // position in the input (tie-break)
	rk   []int32 // rank in the interpolator's arrays
}

func newKBest(k int) kBest {
	return kBest{k: k, d2: make([]float64, k), id: make([]int32, k), rk: make([]int32, k)}
}

// offer inserts a candidate if it is among the k best so far.
func (b *kBest) offer(d2 float64, id, rk int32) {
	i := b.n
	if i == b.k {
		last := i - 1
		if d2 > b.d2[last] || (d2 == b.d2[last] && id > b.id[last]) {
			return
		}
		i = last
	} else {
		b.n++
	}
	for i > 0 && (b.d2[i-1] > d2 || (b.d2[i-1] == d2 && b.id[i-1] > id)) {
		b.d2[i], b.id[i], b.rk[i] = b.d2[i-1], b.id[i-1], b.rk[i-1]
		i--
	}
	b.d2[i], b.id[i], b.rk[i] = d2, id, rk
}
