package geotiff

import (
	"hash/adler32"
	"math/rand/v2"
	"testing"
)

// TestAdler32: adler32Checksum against the standard library's Adler-32
// (hash/adler32, RFC 1950) on every length up to 300 and on long inputs
// (past adlerMaxBlocks blocks, and of all 0xff bytes, the largest sums),
// and on RFC 1950's start value (the checksum of nothing is 1).
func TestAdler32(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	check := func(p []byte) {
		t.Helper()
		if got, want := adler32Checksum(p), adler32.Checksum(p); got != want {
			t.Fatalf("%d bytes: %08x, hash/adler32 %08x", len(p), got, want)
		}
		if b, pr, w := adlerBlocks(p); true {
			gb, gp, gw := adlerBlocksGo(p)
			if b != gb || pr != gp || w != gw {
				t.Fatalf("%d bytes: blocks %d %d %d, Go %d %d %d", len(p), b, pr, w, gb, gp, gw)
			}
		}
	}
	if adler32Checksum(nil) != 1 {
		t.Fatalf("checksum of nothing %08x, want 1", adler32Checksum(nil))
	}
	for n := range 301 {
		p := make([]byte, n)
		for i := range p {
			p[i] = byte(r.Uint32())
		}
		check(p)
	}
	for _, n := range []int{adlerMaxBlocks * 32, adlerMaxBlocks*32 + 31, 3*adlerMaxBlocks*32 + 77, 262144} {
		p := make([]byte, n)
		for i := range p {
			p[i] = byte(r.Uint32())
		}
		check(p)
		for i := range p {
			p[i] = 0xff
		}
		check(p[:min(n, adlerMaxBlocks*32)])
		check(p)
	}
}

// BenchmarkAdler32 is the checksum of one 256 x 256 float tile, ours and
// the standard library's.
func BenchmarkAdler32(b *testing.B) {
	p := make([]byte, 262144)
	for i := range p {
		p[i] = byte(i * 7)
	}
	for _, c := range []struct {
		name string
		sum  func([]byte) uint32
	}{{"ours", adler32Checksum}, {"stdlib", adler32.Checksum}} {
		b.Run(c.name, func(b *testing.B) {
			b.SetBytes(int64(len(p)))
			for b.Loop() {
				c.sum(p)
			}
		})
	}
}
