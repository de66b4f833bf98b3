//go:build unix

package geotiff

import "syscall"

// tiffCPUSeconds is the user plus system CPU time of the process so far
// (getrusage), reported beside wall time because the machine is shared.
func tiffCPUSeconds() float64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
}
