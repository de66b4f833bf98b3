package geotiff

import (
	"bytes"
	"encoding/binary"

	"github.com/klauspost/compress/flate"
)

// zlibEncoder makes zlib streams (RFC 1950) of whole buffers: the header,
// the DEFLATE data from klauspost/compress at the level and the Adler-32 of
// the input (adler32Checksum, faster than the zlib writer's
// hash/adler32); the bytes are those of klauspost's zlib writer. Reuse one
// encoder for many buffers; it is not safe for concurrent use.
type zlibEncoder struct {
	head [2]byte
	kw   *flate.Writer
	out  bytes.Buffer
}

func newZlibEncoder(level int) (*zlibEncoder, error) {
	kw, err := flate.NewWriter(nil, level)
	if err != nil {
		return nil, err
	}
	return &zlibEncoder{head: zlibHeader(level), kw: kw}, nil
}

// encode is the zlib stream of raw, valid until the next call.
func (z *zlibEncoder) encode(raw []byte) ([]byte, error) {
	z.out.Reset()
	z.out.Write(z.head[:])
	z.kw.Reset(&z.out)
	if _, err := z.kw.Write(raw); err != nil {
		return nil, err
	}
	if err := z.kw.Close(); err != nil {
		return nil, err
	}
	z.out.Write(binary.BigEndian.AppendUint32(nil, adler32Checksum(raw)))
	return z.out.Bytes(), nil
}

// zlibHeader is the two-byte zlib header (RFC 1950, section 2.2) for a
// DEFLATE stream of the given klauspost/compress level, as its zlib
// writer makes it: CM 8, CINFO 7 (a 32 KiB window), FLEVEL from the level,
// no dictionary, FCHECK making the pair a multiple of 31.
func zlibHeader(level int) [2]byte {
	h := [2]byte{0x78, 0}
	switch {
	case level == -2 || level == 0 || level == 1:
		h[1] = 0 << 6
	case level >= 2 && level <= 5:
		h[1] = 1 << 6
	case level == 6 || level == -1:
		h[1] = 2 << 6
	default:
		h[1] = 3 << 6
	}
	h[1] += uint8(31 - binary.BigEndian.Uint16(h[:])%31)
	return h
}
