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
}

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
// 0 (no data) for nodata, else Code(v). With disjoint bands the previous
// value's band is tried first (neighbouring cells mostly share a band);
// the band holding a value is then the only one, so the code is the same.
func (c *Classifier) Row(dst []uint8, src []float32, nodata float32) {
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

// Raster classifies an index raster: a band raster on the same grid with
// 0 (no data) where index holds its no-data value.
func (c *Classifier) Raster(index *grid.Float32) *grid.Uint8 {
	out := grid.NewUint8(index.Spec, 0)
	c.Row(out.Data, index.Data, index.NoData)
	return out
}
