package bands

import (
	"math"

	"drygrid/grid"
)

// Classifier gives the codes of a scheme from plain arrays: the same code
// as Scheme.Classify, band by band in scheme order with the same tests as
// Band.Contains, without copying a Band per test. It is the one
// classification of index values into band codes; Row classifies a row
// of an index raster, Raster a whole one.
type Classifier struct {
	lo, hi       []float64
	loInc, hiInc []bool
	code         []uint8
	// disjoint is set for a scheme that passes Validate: no value is in two
	// bands, so the band of the previous cell may be tried first.
	disjoint bool
	// lut, with disjoint bands, gives the code of every float32 whose top
	// 16 bits (sign, exponent, 7 mantissa bits) are its index, when all of
	// them lie in one band: lutSure | code. An entry without lutSure (the
	// prefix's values straddle a cut, lie outside every band, or are NaN)
	// sends the value to the band tests.
	lut []uint16
}

// lutSure marks a lut entry that holds the code of all its values.
const lutSure = 0x100

// NewClassifier prepares the classification of s.
func NewClassifier(s *Scheme) *Classifier {
	c := &Classifier{}
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
	if c.disjoint {
		c.lut = make([]uint16, 1<<16)
		for k := range c.lut {
			// The values of one prefix form an interval between these two
			// (bits grow with the magnitude); a band is an interval, so
			// when it holds both ends it holds every value between.
			a := float64(math.Float32frombits(uint32(k) << 16))
			b := float64(math.Float32frombits(uint32(k)<<16 | 0xFFFF))
			if i := c.band(a); i >= 0 && c.band(b) == i {
				c.lut[k] = lutSure | uint16(c.code[i])
			}
		}
	}
	return c
}

// in reports whether z (not NaN) is in band i, as Band.Contains does.
func (c *Classifier) in(i int, z float64) bool {
	lo, hi := c.lo[i], c.hi[i]
	return (z > lo || (z == lo && c.loInc[i])) && (z < hi || (z == hi && c.hiInc[i]))
}

// band is the index of the first band holding z, or -1 (NaN, or no band).
func (c *Classifier) band(z float64) int {
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

// Code is the code of z: Scheme.Classify(z).
func (c *Classifier) Code(z float64) uint8 {
	if i := c.band(z); i >= 0 {
		return c.code[i]
	}
	return 0
}

// Row writes the code of each value of src to dst (len(dst) >= len(src)):
// 0 (no data) for nodata, else Code(v). With disjoint bands a lookup
// table on the value's top 16 bits gives the code of all but the values
// next to a cut, which take the band tests: the code is the same. Row
// only reads the Classifier, so goroutines may classify rows at once.
func (c *Classifier) Row(dst []uint8, src []float32, nodata float32) {
	dst = dst[:len(src)]
	if c.lut == nil {
		for i, v := range src {
			if v == nodata {
				dst[i] = 0
				continue
			}
			dst[i] = c.Code(float64(v))
		}
		return
	}
	lut := c.lut
	for i, v := range src {
		if e := lut[math.Float32bits(v)>>16]; e&lutSure != 0 && v != nodata {
			dst[i] = uint8(e)
			continue
		}
		if v == nodata {
			dst[i] = 0
			continue
		}
		dst[i] = c.Code(float64(v))
	}
}

// Raster classifies an index raster: a band raster on the same grid with
// 0 (no data) where index holds its no-data value.
func (c *Classifier) Raster(index *grid.Float32) *grid.Uint8 {
	out := grid.NewUint8(index.Spec, 0)
	c.Row(out.Data, index.Data, index.NoData)
	return out
}
