package main

import (
	"fmt"
	"os"
	"runtime/pprof"
)

// startProfile writes a CPU profile of the whole run to the file named by
// DRYGRID_CPUPROFILE, for developers (DEVELOPERS.md, "Profiling"); it
// returns the function that stops it. Without the variable it does nothing.
func startProfile() (stop func()) {
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
