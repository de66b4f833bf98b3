package pool

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// Workers is n when n > 0, else runtime.GOMAXPROCS(0).
func Workers(n int) int {
	if n > 0 {
		return n
	}
	return runtime.GOMAXPROCS(0)
}

// Run calls fn(w, lo, hi) for consecutive chunks [lo, hi) of at most chunk
// indices (chunk < 1 counts as 1) that together cover [0, n) once, on at
// most workers goroutines (Workers(workers), and no more than there are
// chunks); w, in [0, that number), names the goroutine running the call,
// and no two calls with the same w run at once. With one worker the calls
// run on the caller's goroutine, in order. Run returns when every call
// has returned.
func Run(n, workers, chunk int, fn func(w, lo, hi int)) {
	if n <= 0 {
		return
	}
	chunk = max(chunk, 1)
	workers = Count(n, workers, chunk)
	if workers == 1 {
		for lo := 0; lo < n; lo += chunk {
			fn(0, lo, min(lo+chunk, n))
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := range workers {
		wg.Go(func() {
			for {
				lo := int(next.Add(int64(chunk))) - chunk
				if lo >= n {
					return
				}
				fn(w, lo, min(lo+chunk, n))
			}
		})
	}
	wg.Wait()
}

// Count is how many workers Run starts for n indices in chunks of chunk:
// the size of a per-worker scratch slice.
func Count(n, workers, chunk int) int {
	chunk = max(chunk, 1)
	return max(1, min(Workers(workers), (n+chunk-1)/chunk))
}
