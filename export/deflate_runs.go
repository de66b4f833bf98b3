package export

import (
	"encoding/binary"
	"math/bits"
	"slices"
)

// The run DEFLATE encoder: the default compressor of the GeoTIFF tiles.
//
// A tile after the floating-point predictor (tiffFillFloatTile) is, row by
// row, the differenced sign-and-exponent bytes, mostly zero, then the
// mantissa bytes, close to noise. A general LZ77 search finds little but
// the runs of the first kind; this encoder looks only for those: runs of
// one byte value, sent as matches at distance 1 (the run strategy of zlib,
// Z_RLE), and everything else as literals, in one block with dynamic
// Huffman codes (RFC 1951, section 3.2.7) built from the tile's own
// counts. It is about twice as fast as klauspost/compress level 2 on index
// tiles for about one percent more bytes (BENCHMARKS.md). Any inflater
// reads the stream (TestRunDeflateRoundTrip checks it with compress/flate,
// the GeoTIFF tests with GDAL).

// Limits of RFC 1951: the longest match, the longest literal/length and
// distance code, the longest code-length code.
const (
	runMaxLen      = 258
	runMaxCodeBits = 15
	runMaxCLBits   = 7
)

// runLength* give, for a match length minus 3 (0 .. 255), its length code
// (257 .. 285), the number of extra bits and their value (RFC 1951, 3.2.5).
var runLengthSym, runLengthExtra, runLengthValue = func() (sym [256]uint16, extra, value [256]uint8) {
	base := [29]int{3, 4, 5, 6, 7, 8, 9, 10, 11, 13, 15, 17, 19, 23, 27, 31, 35, 43, 51, 59, 67, 83, 99, 115, 131, 163, 195, 227, 258}
	eb := [29]uint8{0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 2, 2, 2, 2, 3, 3, 3, 3, 4, 4, 4, 4, 5, 5, 5, 5, 0}
	for l := 3; l <= runMaxLen; l++ {
		c := 28
		for base[c] > l {
			c--
		}
		sym[l-3], extra[l-3], value[l-3] = uint16(257+c), eb[c], uint8(l-base[c])
	}
	return
}()

// runCLOrder is the order of the code-length code lengths in the block
// header (RFC 1951, 3.2.7).
var runCLOrder = [19]uint8{16, 17, 18, 0, 8, 7, 9, 6, 10, 5, 11, 4, 12, 3, 13, 2, 14, 1, 15}

// runDeflater is the scratch space of one encoder: reuse it for every tile.
type runDeflater struct {
	tok   []uint16 // a literal byte (< 256), or 256 + a match length - 3
	freq  [286]int32
	lens  [286 + 30]uint8 // literal/length then distance code lengths
	codes [286]uint16     // literal/length codes, bit-reversed for the stream
	cl    []uint16        // the code lengths run-length coded: symbol | extra value << 8
	huff  runHuff
}

// deflate appends to dst one final DEFLATE block holding raw.
func (d *runDeflater) deflate(dst, raw []byte) []byte {
	d.tokens(raw)
	nlit := 286
	for nlit > 257 && d.freq[nlit-1] == 0 {
		nlit--
	}
	d.huff.lengths(d.freq[:nlit], runMaxCodeBits, d.lens[:nlit])
	// Distance codes: only code 0 (distance 1) is used; two codes of one
	// bit make the code complete, as every inflater accepts.
	d.lens[nlit], d.lens[nlit+1] = 1, 1
	const ndist = 2
	runCanonical(d.lens[:nlit], d.codes[:nlit])

	// The code lengths, run-length coded (16: repeat the last 3-6 times,
	// 17: 3-10 zeros, 18: 11-138 zeros), and their own code.
	d.cl = runCodeLengths(d.cl[:0], d.lens[:nlit+ndist])
	var clFreq [19]int32
	for _, c := range d.cl {
		clFreq[c&0xff]++
	}
	var clLens [19]uint8
	var clCodes [19]uint16
	d.huff.lengths(clFreq[:], runMaxCLBits, clLens[:])
	runCanonical(clLens[:], clCodes[:])
	nclen := 19
	for nclen > 4 && clLens[runCLOrder[nclen-1]] == 0 {
		nclen--
	}

	// A literal takes at most 15 bits, a match of 3 or more 21, the header
	// less than 320 bytes: two bytes an input byte bound the block.
	start := len(dst)
	dst = slices.Grow(dst, 2*len(raw)+512)
	w := runBits{out: dst[start : start+2*len(raw)+512]}
	w.put(1, 1) // BFINAL
	w.put(2, 2) // BTYPE 10: dynamic Huffman codes
	w.put(uint64(nlit-257), 5)
	w.put(ndist-1, 5)
	w.put(uint64(nclen-4), 4)
	for _, s := range runCLOrder[:nclen] {
		w.put(uint64(clLens[s]), 3)
	}
	for _, c := range d.cl {
		s := c & 0xff
		w.put(uint64(clCodes[s]), uint(clLens[s]))
		switch s {
		case 16:
			w.put(uint64(c>>8), 2)
		case 17:
			w.put(uint64(c>>8), 3)
		case 18:
			w.put(uint64(c>>8), 7)
		}
	}
	// The data: a match is its length code, the extra bits and distance
	// code 0 (one bit, 0: the first code of the distance code).
	lens, codes := &d.lens, &d.codes
	for _, t := range d.tok {
		if t < 256 {
			w.put(uint64(codes[t]), uint(lens[t]))
			continue
		}
		m := t - 256
		s := runLengthSym[m]
		n := uint(lens[s])
		v := uint64(codes[s]) | uint64(runLengthValue[m])<<n
		n += uint(runLengthExtra[m])
		w.put(v, n+1) // the distance code's bit, 0, is the top bit
	}
	w.put(uint64(codes[256]), uint(lens[256]))
	return dst[:start+len(w.flush())]
}

// tokens splits raw into literals and runs (matches at distance 1, at least
// 3 long) and counts the literal/length symbols.
func (d *runDeflater) tokens(raw []byte) {
	d.freq = [286]int32{}
	n := len(raw)
	if cap(d.tok) < n+1 {
		d.tok = make([]uint16, n+1)
	}
	tok, freq := d.tok[:n+1], &d.freq
	k, i := 0, 0
	if n > 0 {
		tok[0] = uint16(raw[0])
		freq[raw[0]]++
		k, i = 1, 1
	}
	for i < n {
		b := raw[i]
		if b != raw[i-1] {
			tok[k] = uint16(b)
			k++
			freq[b]++
			i++
			continue
		}
		// The run of b from i, eight bytes a step.
		lim := min(n, i+runMaxLen)
		j := i + 1
		pat := uint64(b) * 0x0101010101010101
		for j+8 <= lim {
			if x := binary.LittleEndian.Uint64(raw[j:]) ^ pat; x != 0 {
				j += bits.TrailingZeros64(x) >> 3
				goto counted
			}
			j += 8
		}
		for j < lim && raw[j] == b {
			j++
		}
	counted:
		if l := j - i; l >= 3 {
			tok[k] = uint16(256 + l - 3)
			k++
			freq[runLengthSym[l-3]]++
		} else {
			for ; i < j; i++ {
				tok[k] = uint16(b)
				k++
				freq[b]++
			}
		}
		i = j
	}
	freq[256]++ // the end of the block, sent apart
	d.tok = tok[:k]
}

// runCodeLengths appends the run-length coding of the code lengths lens
// (RFC 1951, 3.2.7) to cl: each entry is a symbol 0-18 with its extra
// value in the high byte.
func runCodeLengths(cl []uint16, lens []uint8) []uint16 {
	for i := 0; i < len(lens); {
		l := lens[i]
		j := i + 1
		for j < len(lens) && lens[j] == l {
			j++
		}
		n := j - i
		i = j
		if l == 0 {
			for n >= 11 {
				k := min(n, 138)
				cl = append(cl, 18|uint16(k-11)<<8)
				n -= k
			}
			if n >= 3 {
				cl = append(cl, 17|uint16(n-3)<<8)
				n = 0
			}
			for ; n > 0; n-- {
				cl = append(cl, 0)
			}
			continue
		}
		cl = append(cl, uint16(l))
		n--
		for n >= 3 {
			k := min(n, 6)
			cl = append(cl, 16|uint16(k-3)<<8)
			n -= k
		}
		for ; n > 0; n-- {
			cl = append(cl, uint16(l))
		}
	}
	return cl
}

// runCanonical gives the canonical codes of RFC 1951 (3.2.2) for the code
// lengths lens, bit-reversed (the stream sends a code's top bit first).
func runCanonical(lens []uint8, codes []uint16) {
	var count [runMaxCodeBits + 1]uint16
	for _, l := range lens {
		count[l]++
	}
	count[0] = 0
	var next [runMaxCodeBits + 1]uint16
	code := uint16(0)
	for b := 1; b <= runMaxCodeBits; b++ {
		code = (code + count[b-1]) << 1
		next[b] = code
	}
	for s, l := range lens {
		if l == 0 {
			codes[s] = 0
			continue
		}
		codes[s] = bits.Reverse16(next[l]) >> (16 - l)
		next[l]++
	}
}

// runHuff is the scratch space of the Huffman code lengths.
type runHuff struct {
	sym    []int32 // symbols by frequency
	weight []int64 // nodes: leaves then internal nodes
	parent []int32
	depth  []uint8
}

// lengths puts in lens the lengths of a Huffman code for freq, none longer
// than maxBits, and complete (inflaters reject incomplete codes). Symbols
// of frequency 0 get 0; when fewer than two symbols occur, the first two
// symbols (or the one and another) get 1. Codes longer than maxBits are
// shortened through the counts per length (see the Kraft sum below), then
// the lengths are handed out again, the longest to the rarest symbols.
func (h *runHuff) lengths(freq []int32, maxBits int, lens []uint8) {
	clear(lens)
	h.sym = h.sym[:0]
	for s, f := range freq {
		if f > 0 {
			h.sym = append(h.sym, int32(s))
		}
	}
	if len(h.sym) < 2 {
		for a := int32(0); len(h.sym) < 2 && int(a) < len(freq); a++ {
			if len(h.sym) == 0 || h.sym[0] != a {
				h.sym = append(h.sym, a)
			}
		}
		for _, s := range h.sym {
			lens[s] = 1
		}
		return
	}
	// Leaves by frequency (then symbol), and the two-queue construction:
	// internal nodes are made in order of weight.
	slices.SortFunc(h.sym, func(a, b int32) int {
		if freq[a] != freq[b] {
			return int(freq[a] - freq[b])
		}
		return int(a - b)
	})
	n := len(h.sym)
	h.weight = h.weight[:0]
	for _, s := range h.sym {
		h.weight = append(h.weight, int64(freq[s]))
	}
	h.parent = slices.Grow(h.parent[:0], 2*n-1)[:2*n-1]
	leaf, inner := 0, n
	pick := func() int {
		if leaf < n && (inner >= len(h.weight) || h.weight[leaf] <= h.weight[inner]) {
			leaf++
			return leaf - 1
		}
		inner++
		return inner - 1
	}
	for len(h.weight) < 2*n-1 {
		a, b := pick(), pick()
		h.parent[a], h.parent[b] = int32(len(h.weight)), int32(len(h.weight))
		h.weight = append(h.weight, h.weight[a]+h.weight[b])
	}
	// Depths from the root (the last node) down, counted per length with
	// the leaves below maxBits raised to it.
	h.depth = slices.Grow(h.depth[:0], 2*n-1)[:2*n-1]
	h.depth[2*n-2] = 0
	var count [runMaxCodeBits + 1]int
	for i := 2*n - 3; i >= 0; i-- {
		h.depth[i] = h.depth[h.parent[i]] + 1
		if i < n {
			count[min(int(h.depth[i]), maxBits)]++
		}
	}
	// Kraft's sum in units of 2^-maxBits: a complete code has exactly
	// 2^maxBits. Raising leaves made it larger: move leaves from the
	// deepest length below maxBits one down until it is not; then, if it
	// fell short, move the deepest leaves one up (each move adds the
	// smallest step there is, so none overshoots) until it is exact.
	kraft, full := 0, 1<<maxBits
	for b := 1; b <= maxBits; b++ {
		kraft += count[b] << (maxBits - b)
	}
	for kraft > full {
		b := maxBits - 1
		for count[b] == 0 {
			b--
		}
		count[b]--
		count[b+1]++
		kraft -= 1 << (maxBits - b - 1)
	}
	for kraft < full {
		b := maxBits
		for count[b] == 0 {
			b--
		}
		count[b]--
		count[b-1]++
		kraft += 1 << (maxBits - b)
	}
	// The rarest symbols (first in h.sym) take the longest lengths.
	k := 0
	for b := maxBits; b >= 1; b-- {
		for range count[b] {
			lens[h.sym[k]] = uint8(b)
			k++
		}
	}
}

// runBits writes bits least significant first (RFC 1951, 3.1.1) into out,
// whose length bounds what is written (runBound).
type runBits struct {
	out []byte
	pos int
	acc uint64
	n   uint
}

// put writes the low nb bits of v (nb <= 32).
func (w *runBits) put(v uint64, nb uint) {
	w.acc |= v << w.n
	w.n += nb
	if w.n >= 32 {
		binary.LittleEndian.PutUint32(w.out[w.pos:], uint32(w.acc))
		w.pos += 4
		w.acc >>= 32
		w.n -= 32
	}
}

// flush writes the last bits, padded to a byte, and returns what was
// written.
func (w *runBits) flush() []byte {
	for w.n > 0 {
		w.out[w.pos] = byte(w.acc)
		w.pos++
		w.acc >>= 8
		w.n -= min(w.n, 8)
	}
	return w.out[:w.pos]
}
