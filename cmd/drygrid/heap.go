package main

import (
	"math"
	"os"
	"runtime"
	"runtime/debug"
)

// startingHeap is the heap size below which drygrid does not collect
// garbage: a run's first collection waits until the heap reaches it, and
// from then on the collector paces itself as usual (GOGC 100). The global
// 0.1 degree job (20,000 stations, the COG streamed) peaks at about 55 MB
// of heap, so it runs without a collection, which saves about 7 % of its
// wall time on two cores (BENCHMARKS.md); larger runs pay one collection
// more at most. The Go compiler starts its heap the same way
// (cmd/compile/internal/base.AdjustStartingHeap).
const startingHeap = 96 << 20

// adjustStartingHeap turns collections off under a soft memory limit of
// startingHeap (runtime/debug.SetMemoryLimit), and back to the usual
// pacing after the first collection. It does nothing when the user set
// GOGC or GOMEMLIMIT.
func adjustStartingHeap() {
	if os.Getenv("GOGC") != "" || os.Getenv("GOMEMLIMIT") != "" {
		return
	}
	debug.SetGCPercent(-1)
	debug.SetMemoryLimit(startingHeap)
	// A cleanup runs after the collection that found its object
	// unreachable: the first one.
	runtime.AddCleanup(new([16]byte), func(int) {
		debug.SetGCPercent(100)
		debug.SetMemoryLimit(math.MaxInt64)
	}, 0)
}
