package interp

// Test helpers that expose what the kernel computes, for the property tests.

// nearest lists the stations At would weight at lon, lat: input indices and
// great-circle distances in km, nearest first, ties by input order (for
// tests and diagnostics).
func (ip *Interpolator) nearest(lon, lat float64) (ids []int, distKm []float64) {
	c := newCands(ip.k)
	m := ip.selectAt(lon, lat, c)
	cx, cy, cz := unitVector(lon, lat)
	kb := &c.kb
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
