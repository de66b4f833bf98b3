package export

import (
	"bytes"
	"encoding/binary"

	"github.com/klauspost/compress/flate"
)

// zlibCompress puts in out the zlib stream (RFC 1950) of raw: head
// (zlibHeader of zw's level), the DEFLATE data from zw, the Adler-32 of raw
// (adler32Checksum, faster than the zlib writer's hash/adler32). The bytes
// are those of klauspost/compress's zlib writer at that level.
func zlibCompress(zw *flate.Writer, head [2]byte, raw []byte, out *bytes.Buffer) error {
	out.Reset()
	out.Write(head[:])
	zw.Reset(out)
	if _, err := zw.Write(raw); err != nil {
		return err
	}
	if err := zw.Close(); err != nil {
		return err
	}
	out.Write(binary.BigEndian.AppendUint32(nil, adler32Checksum(raw)))
	return nil
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
