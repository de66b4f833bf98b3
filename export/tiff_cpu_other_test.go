//go:build !unix

package export

// tiffCPUSeconds is not measured on this platform.
func tiffCPUSeconds() float64 { return 0 }
