package export

import (
	"bytes"
	stdzlib "compress/zlib"
	"io"
	"math/rand/v2"
	"testing"

	"github.com/klauspost/compress/flate"
	"github.com/klauspost/compress/zlib"
)

// TestZlibCompressIsZlib: zlibCompress writes byte for byte what
// klauspost/compress's zlib writer writes at every level, on tiles of
// noise, of a smooth field and of one value, and the standard library's
// zlib reader (compress/zlib, which checks the header and the Adler-32)
// gives the raw bytes back.
func TestZlibCompressIsZlib(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	raws := [][]byte{make([]byte, 65536), make([]byte, 65536), make([]byte, 1000)}
	for i := range raws[0] {
		raws[0][i] = byte(r.Uint32())
		raws[1][i] = byte(i / 300)
	}
	for level := zlib.BestSpeed; level <= zlib.BestCompression; level++ {
		zw, err := flate.NewWriter(nil, level)
		if err != nil {
			t.Fatal(err)
		}
		for k, raw := range raws {
			var got, want bytes.Buffer
			if err := zlibCompress(zw, zlibHeader(level), raw, &got); err != nil {
				t.Fatal(err)
			}
			ref, _ := zlib.NewWriterLevel(&want, level)
			ref.Write(raw)
			ref.Close()
			if !bytes.Equal(got.Bytes(), want.Bytes()) {
				t.Errorf("level %d, raw %d: %d bytes, the zlib writer %d", level, k, got.Len(), want.Len())
			}
			zr, err := stdzlib.NewReader(bytes.NewReader(got.Bytes()))
			if err != nil {
				t.Fatal(err)
			}
			back, err := io.ReadAll(zr)
			if err != nil || !bytes.Equal(back, raw) {
				t.Errorf("level %d, raw %d: read back %d bytes, %v", level, k, len(back), err)
			}
		}
	}
}
