package geotiff

// Adler-32 (RFC 1950, section 8.2), the checksum of a zlib stream, which
// every DEFLATE tile of a GeoTIFF carries: s1 is 1 plus the sum of the
// bytes, s2 the sum of the s1 after each byte, both modulo 65521, and the
// checksum is s2 << 16 | s1. Over 32-byte blocks the sums are the byte sum
// and, for s2, 32 times s1 before the block plus the bytes weighted 32, 31,
// ..., 1: adlerBlocks gives those for many blocks at once (AVX2 on amd64),
// and the checksum is tested against hash/adler32.

const adlerMod = 65521

// adlerMaxBlocks bounds the 32-byte blocks of one adlerBlocks call, so
// that its 32-bit vector lanes cannot overflow (see adler32_amd64.s).
const adlerMaxBlocks = 2048

// adler32Checksum is the Adler-32 of p.
func adler32Checksum(p []byte) uint32 {
	s1, s2 := uint64(1), uint64(0)
	for len(p) >= 32 {
		n := min(len(p)>>5, adlerMaxBlocks)
		bytes, prefix, weighted := adlerBlocks(p[:n<<5])
		s2 = (s2 + 32*uint64(n)*s1 + 32*prefix + weighted) % adlerMod
		s1 = (s1 + bytes) % adlerMod
		p = p[n<<5:]
	}
	for _, b := range p {
		s1 += uint64(b)
		s2 += s1
	}
	return uint32(s2%adlerMod)<<16 | uint32(s1%adlerMod)
}

// adlerBlocksGo is adlerBlocks in Go: for the 32-byte blocks of p, the sum
// of all bytes, the sum over blocks of the byte sum of the blocks before
// it, and the sum of the bytes weighted 32 - (their place in the block).
func adlerBlocksGo(p []byte) (bytes, prefix, weighted uint64) {
	for b := 0; b+32 <= len(p); b += 32 {
		prefix += bytes
		for i, c := range p[b : b+32] {
			bytes += uint64(c)
			weighted += uint64(32-i) * uint64(c)
		}
	}
	return bytes, prefix, weighted
}
