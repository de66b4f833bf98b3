package bands

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestClassifier: the classifier gives
// bands.Scheme.Classify's code for the cut points, their float64
// neighbours, infinities, NaN and random values, on the default scheme and
// on one with the other inclusivity at each cut.
func TestClassifier(t *testing.T) {
	inf := math.Inf(1)
	other := &Scheme{Name: "other", Bands: []Band{
		{Code: 3, Key: "a", Min: -inf, Max: -1, MaxInclusive: false, Color: "#000000"},
		{Code: 1, Key: "b", Min: -1, Max: 0.25, MinInclusive: true, MaxInclusive: true, Color: "#000000"},
		{Code: 7, Key: "c", Min: 0.25, Max: inf, Color: "#000000"},
	}}
	r := rand.New(rand.NewPCG(4, 4))
	for _, s := range []*Scheme{Default(), other} {
		zs := []float64{math.NaN(), inf, -inf, 0, math.Copysign(0, -1)}
		for _, b := range s.Bands {
			for _, x := range []float64{b.Min, b.Max} {
				zs = append(zs, x, math.Nextafter(x, inf), math.Nextafter(x, -inf),
					float64(math.Nextafter32(float32(x), float32(inf))), float64(math.Nextafter32(float32(x), -float32(inf))))
			}
		}
		for range 10000 {
			zs = append(zs, r.NormFloat64()*2)
		}
		c := NewClassifier(s)
		for _, z := range zs {
			if got, want := c.Code(z), s.Classify(z); got != want {
				t.Errorf("%s: z = %v: code %d, Classify gives %d", s.Name, z, got, want)
			}
		}
		// Row, which tries the previous value's band first, on the
		// float32 values in the order given and sorted.
		f := make([]float32, 0, len(zs))
		for _, z := range zs {
			f = append(f, float32(z))
		}
		sorted := slices.Clone(f)
		slices.Sort(sorted)
		for _, src := range [][]float32{f, sorted} {
			got := make([]uint8, len(src))
			c.Row(got, src, -9999)
			for i, v := range src {
				want := s.Classify(float64(v))
				if v == -9999 {
					want = 0
				}
				if got[i] != want {
					t.Errorf("%s: Row %v: code %d, Classify gives %d", s.Name, v, got[i], want)
				}
			}
		}
	}
}

// TestClassifierEveryPrefix: Row's lookup table gives Scheme.Classify's
// code for float32 values of every one of the 65,536 top-16-bit prefixes
// (the prefix's two ends and random values between), on the default
// schemes of each unit and on a scheme with a band narrower than one
// prefix's span; -9999 stays no data.
func TestClassifierEveryPrefix(t *testing.T) {
	inf := math.Inf(1)
	narrow := &Scheme{Name: "narrow", Bands: []Band{
		{Code: 1, Key: "a", Min: -inf, Max: 0.1, Color: "#000000"},
		{Code: 2, Key: "b", Min: 0.1, Max: 0.1000001, MinInclusive: true, Color: "#000000"},
		{Code: 4, Key: "c", Min: 0.1000001, Max: inf, MinInclusive: true, Color: "#000000"},
	}}
	r := rand.New(rand.NewPCG(9, 9))
	for _, s := range []*Scheme{DefaultFor(UnitZ), DefaultFor(UnitPercentile), DefaultFor(UnitPctOfNormal), narrow} {
		c := NewClassifier(s)
		if c.lut == nil {
			t.Fatalf("%s: no lookup table for a valid scheme", s.Name)
		}
		src := make([]float32, 0, 1<<18)
		for k := range uint32(1 << 16) {
			src = append(src, math.Float32frombits(k<<16), math.Float32frombits(k<<16|0xFFFF),
				math.Float32frombits(k<<16|r.Uint32N(0x10000)), -9999)
		}
		got := make([]uint8, len(src))
		c.Row(got, src, -9999)
		bad := 0
		for i, v := range src {
			want := s.Classify(float64(v))
			if v == -9999 {
				want = 0
			}
			if got[i] != want && bad < 10 {
				bad++
				t.Errorf("%s: Row %v (bits %#x): code %d, Classify gives %d", s.Name, v, math.Float32bits(v), got[i], want)
			}
		}
	}
}

// BenchmarkClassifierRow: one million normal z values, as a grid row
// block holds them.
func BenchmarkClassifierRow(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 2))
	src := make([]float32, 1<<20)
	for i := range src {
		src[i] = float32(r.NormFloat64())
	}
	dst := make([]uint8, len(src))
	c := NewClassifier(Default())
	b.SetBytes(int64(len(src)) * 4)
	for b.Loop() {
		c.Row(dst, src, -9999)
	}
}
