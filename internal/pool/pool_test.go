package pool

import (
	"sync"
	"testing"
)

// TestRunCoversOnce: every index is visited exactly once, in chunks of the
// given size, by workers numbered below Count, never two calls of one
// worker at the same time (the law Run states; common practice for a
// counter-based pool).
func TestRunCoversOnce(t *testing.T) {
	for _, c := range []struct{ n, workers, chunk int }{
		{0, 4, 1}, {1, 4, 1}, {10, 1, 3}, {1000, 4, 1}, {1000, 3, 64}, {7, 16, 2}, {100, 0, 0},
	} {
		seen := make([]int, c.n)
		busy := make([]bool, Count(c.n, c.workers, c.chunk))
		var mu sync.Mutex
		Run(c.n, c.workers, c.chunk, func(w, lo, hi int) {
			mu.Lock()
			if w < 0 || w >= len(busy) || busy[w] {
				t.Errorf("%+v: worker %d out of range or busy", c, w)
				mu.Unlock()
				return
			}
			busy[w] = true
			mu.Unlock()
			if hi-lo > max(c.chunk, 1) || lo >= hi {
				t.Errorf("%+v: chunk [%d, %d)", c, lo, hi)
			}
			for i := lo; i < hi; i++ {
				seen[i]++ // distinct indices: no race
			}
			mu.Lock()
			busy[w] = false
			mu.Unlock()
		})
		for i, k := range seen {
			if k != 1 {
				t.Fatalf("%+v: index %d visited %d times", c, i, k)
			}
		}
	}
}
