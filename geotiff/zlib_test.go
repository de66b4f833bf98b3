package geotiff

import (
	"bytes"
	stdzlib "compress/zlib"
	"io"
	"math/rand/v2"
	"testing"

	"github.com/klauspost/compress/zlib"
)

// TestZlibEncoderIsZlib: at every level the encoder writes byte for byte
// what klauspost/compress's zlib writer writes, and the standard library's
// zlib reader (compress/zlib, which checks the header and the Adler-32,
// RFC 1950) gives the raw bytes back, on noise, on a smooth ramp, on one
// value and on nothing.
func TestZlibEncoderIsZlib(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	raws := [][]byte{make([]byte, 65536), make([]byte, 65536), make([]byte, 1000), nil}
	for i := range raws[0] {
		raws[0][i] = byte(r.Uint32())
		raws[1][i] = byte(i / 300)
	}
	for level := zlib.BestSpeed; level <= zlib.BestCompression; level++ {
		z, err := newZlibEncoder(level)
		if err != nil {
			t.Fatal(err)
		}
		for k, raw := range raws {
			got, err := z.encode(raw)
			if err != nil {
				t.Fatal(err)
			}
			var want bytes.Buffer
			ref, _ := zlib.NewWriterLevel(&want, level)
			ref.Write(raw)
			ref.Close()
			if !bytes.Equal(got, want.Bytes()) {
				t.Errorf("level %d, raw %d: %d bytes, the zlib writer %d", level, k, len(got), want.Len())
			}
			zr, err := stdzlib.NewReader(bytes.NewReader(got))
			if err != nil {
				t.Fatalf("level %d, raw %d: %v", level, k, err)
			}
			back, err := io.ReadAll(zr)
			if err != nil || !bytes.Equal(back, raw) {
				t.Errorf("level %d, raw %d: read back %d bytes, %v", level, k, len(back), err)
			}
		}
	}
}
