package interp

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestSortKeys: the radix sort gives the order of slices.SortFunc by key,
// then position (the standard library's sort is the reference), on keys
// with ties, both zeros (-0 comes back as +0), negatives, huge and tiny
// magnitudes.
func TestSortKeys(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	specials := []float64{0, math.Copysign(0, -1), -180, 180, 1e-300, -1e-300, math.MaxFloat64, -math.MaxFloat64, 89.99}
	for trial := range 300 {
		n := trial % 60
		if trial == 299 {
			n = 20000
		}
		ks := make([]sortKey, n)
		for i := range ks {
			k := r.Float64()*360 - 180
			switch r.IntN(4) {
			case 0:
				k = specials[r.IntN(len(specials))]
			case 1:
				k = math.Round(k)
			}
			ks[i] = sortKey{k, int32(i)}
		}
		want := slices.Clone(ks)
		slices.SortFunc(want, func(a, b sortKey) int {
			if c := cmp.Compare(a.key, b.key); c != 0 {
				return c
			}
			return cmp.Compare(a.i, b.i)
		})
		sortKeys(ks)
		for i := range ks {
			if ks[i].i != want[i].i || ks[i].key != want[i].key || (ks[i].key == 0 && math.Signbit(ks[i].key)) {
				t.Fatalf("trial %d (n %d) at %d: %v, want %v", trial, n, i, ks[i], want[i])
			}
		}
	}
}
