//go:build !amd64 || purego

package geotiff

const hasAdlerAVX2 = false

// adlerBlocks is adlerBlocksGo: there is no vector version here.
func adlerBlocks(p []byte) (bytes, prefix, weighted uint64) { return adlerBlocksGo(p) }
