//go:build !unix

package geotiff

// tiffCPUSeconds is not measured on this platform.
func tiffCPUSeconds() float64 { return 0 }
