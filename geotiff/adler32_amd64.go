//go:build !purego

package geotiff

import "golang.org/x/sys/cpu"

//go:noescape
func adlerBlocksAVX2(p []byte) (bytes, prefix, weighted uint64)

var hasAdlerAVX2 = cpu.X86.HasAVX2

// adlerBlocks is adlerBlocksGo, in AVX2 where the processor has it.
func adlerBlocks(p []byte) (bytes, prefix, weighted uint64) {
	if hasAdlerAVX2 {
		return adlerBlocksAVX2(p)
	}
	return adlerBlocksGo(p)
}
