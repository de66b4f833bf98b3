package geotiff

import (
	"math"

	"drygrid/bands"
)

// tiffClassifier gives the same codes as bands.Scheme.Classify, band by
// band in scheme order with the same tests as bands.Band.Contains, from
// plain arrays (Classify copies each Band, strings included, per test).
type tiffClassifier struct {
	lo, hi       []float64
	loInc, hiInc []bool
	code         []uint8
	// disjoint is set for a scheme that passes Validate: no value is in two
	// bands, so the band of the previous cell may be tried first.
	disjoint bool
}

func newTiffClassifier(s *bands.Scheme) tiffClassifier {
	var c tiffClassifier
	if s == nil {
		return c
	}
	for _, b := range s.Bands {
		c.lo = append(c.lo, b.Min)
		c.hi = append(c.hi, b.Max)
		// Contains: z == Min is out unless MinInclusive or z is infinite
		// (then Min is too).
		c.loInc = append(c.loInc, b.MinInclusive || math.IsInf(b.Min, 0))
		c.hiInc = append(c.hiInc, b.MaxInclusive || math.IsInf(b.Max, 0))
		c.code = append(c.code, b.Code)
	}
	c.disjoint = s.Validate() == nil
	return c
}

// in reports whether z (not NaN) is in band i, as Band.Contains does.
func (c *tiffClassifier) in(i int, z float64) bool {
	lo, hi := c.lo[i], c.hi[i]
	return (z > lo || (z == lo && c.loInc[i])) && (z < hi || (z == hi && c.hiInc[i]))
}

// band is the index of the first band holding z, or -1 (NaN, or no band).
func (c *tiffClassifier) band(z float64) int {
	if z != z {
		return -1
	}
	for i := range c.code {
		if c.in(i, z) {
			return i
		}
	}
	return -1
}

// of is the code of z: Scheme.Classify(z).
func (c *tiffClassifier) of(z float64) uint8 {
	if i := c.band(z); i >= 0 {
		return c.code[i]
	}
	return 0
}

// classify writes the code of each value of src to dst: 0 for nodata,
// else of(v). With disjoint bands the previous value's band is tried
// first (neighbouring cells mostly share a band); the band holding a value
// is then the only one, so the code is the same.
func (c *tiffClassifier) classify(src []float32, nodata float32, dst []uint8) {
	last := -1
	for i, v := range src {
		if v == nodata {
			dst[i] = 0
			continue
		}
		z := float64(v)
		if last >= 0 && c.in(last, z) {
			dst[i] = c.code[last]
			continue
		}
		b := c.band(z)
		if b < 0 {
			dst[i], last = 0, -1
			continue
		}
		dst[i] = c.code[b]
		if c.disjoint {
			last = b
		}
	}
}
