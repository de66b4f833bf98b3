package geotiff

import (
	"bytes"

	"github.com/klauspost/compress/zlib"
)

// zlibEncoder makes zlib streams (RFC 1950) of whole buffers with
// klauspost/compress's zlib writer at the level. Reuse one encoder for
// many buffers; it is not safe for concurrent use.
type zlibEncoder struct {
	zw  *zlib.Writer
	out bytes.Buffer
}

func newZlibEncoder(level int) (*zlibEncoder, error) {
	zw, err := zlib.NewWriterLevel(nil, level)
	if err != nil {
		return nil, err
	}
	return &zlibEncoder{zw: zw}, nil
}

// encode is the zlib stream of raw, valid until the next call.
func (z *zlibEncoder) encode(raw []byte) ([]byte, error) {
	z.out.Reset()
	z.zw.Reset(&z.out)
	if _, err := z.zw.Write(raw); err != nil {
		return nil, err
	}
	if err := z.zw.Close(); err != nil {
		return nil, err
	}
	return z.out.Bytes(), nil
}
