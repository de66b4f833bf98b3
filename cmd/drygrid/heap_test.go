package main

import (
	"math"
	"runtime"
	"runtime/debug"
	"testing"
	"time"
)

// TestAdjustStartingHeap: collections are off under the starting limit
// until the first one, after which the usual pacing (GOGC 100, no memory
// limit) is back; with GOGC set by the user nothing changes.
func TestAdjustStartingHeap(t *testing.T) {
	defer debug.SetGCPercent(debug.SetGCPercent(100))
	defer debug.SetMemoryLimit(debug.SetMemoryLimit(math.MaxInt64))
	t.Setenv("GOGC", "")
	t.Setenv("GOMEMLIMIT", "")
	adjustStartingHeap()
	if p := debug.SetGCPercent(-1); p != -1 {
		t.Fatalf("GC percent %d after the adjustment, want off", p)
	}
	if l := debug.SetMemoryLimit(-1); l != startingHeap {
		t.Fatalf("memory limit %d, want %d", l, startingHeap)
	}
	runtime.GC()
	deadline := time.Now().Add(5 * time.Second)
	for debug.SetMemoryLimit(-1) != math.MaxInt64 {
		if time.Now().After(deadline) {
			t.Fatal("the usual pacing did not come back after a collection")
		}
		runtime.GC()
		time.Sleep(10 * time.Millisecond)
	}
	if p := debug.SetGCPercent(100); p != 100 {
		t.Fatalf("GC percent %d after the first collection, want 100", p)
	}

	t.Setenv("GOGC", "50")
	debug.SetGCPercent(50)
	adjustStartingHeap()
	if p := debug.SetGCPercent(50); p != 50 {
		t.Fatalf("GC percent %d with GOGC=50 set, want it left alone", p)
	}
}
