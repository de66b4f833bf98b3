package main

import (
	"fmt"
	"os"
	"runtime"
	"runtime/pprof"
)

// startProfile writes a CPU profile of the whole run to the file named by
// DRYGRID_CPUPROFILE and a heap profile at its end (where the run's
// memory was allocated: go tool pprof -sample_index=alloc_space) to the
// file named by DRYGRID_MEMPROFILE, for developers (DEVELOPERS.md,
// "Profiling"); it returns the function that stops them. Without the
// variables it does nothing.
func startProfile() (stop func()) {
	stopCPU := startCPUProfile()
	path := os.Getenv("DRYGRID_MEMPROFILE")
	if path == "" {
		return stopCPU
	}
	return func() {
		stopCPU()
		f, err := os.Create(path)
		if err == nil {
			runtime.GC() // the heap profile's in-use figures are as of the last collection
			err = pprof.Lookup("heap").WriteTo(f, 0)
			if cerr := f.Close(); err == nil {
				err = cerr
			}
		}
		if err != nil {
			fmt.Fprintf(os.Stderr, "drygrid: DRYGRID_MEMPROFILE: %v\n", err)
		}
	}
}

// startCPUProfile starts the CPU profile of DRYGRID_CPUPROFILE.
func startCPUProfile() (stop func()) {
	path := os.Getenv("DRYGRID_CPUPROFILE")
	if path == "" {
		return func() {}
	}
	f, err := os.Create(path)
	if err != nil {
		fmt.Fprintf(os.Stderr, "drygrid: DRYGRID_CPUPROFILE: %v\n", err)
		return func() {}
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		fmt.Fprintf(os.Stderr, "drygrid: DRYGRID_CPUPROFILE: %v\n", err)
		f.Close()
		return func() {}
	}
	return func() {
		pprof.StopCPUProfile()
		if err := f.Close(); err != nil {
			fmt.Fprintf(os.Stderr, "drygrid: DRYGRID_CPUPROFILE: %v\n", err)
		}
	}
}
