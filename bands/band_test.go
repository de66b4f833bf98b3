package bands

import (
	"drygrid/spi"
	"image/color"
	"math"
	"math/rand/v2"
	"testing"
)

// defaultBands is the "Default bands" table of docs/design.md and the
// package doc, copied by hand: that table is our contract, so Default() must
// match it field by field. Colours: ColorBrewer 9-class BrBG (Brewer, Penn
// State); the hex values agree with ColorBrewer's published list (from
// memory). "In drought" means codes 1-3.
var defaultBands = []struct {
	code    uint8
	key     string
	label   string
	zRange  string
	color   string
	drought bool
}{
	{1, "parched", "Parched", "z <= -2.0", "#8c510a", true},
	{2, "very-dry", "Very dry", "-2.0 < z <= -1.5", "#bf812d", true},
	{3, "dry", "Dry", "-1.5 < z <= -1.0", "#dfc27d", true},
	{4, "slightly-dry", "Slightly dry", "-1.0 < z <= -0.5", "#f6e8c3", false},
	{5, "normal", "Near normal", "-0.5 < z < 0.5", "#f5f5f5", false},
	{6, "slightly-wet", "Slightly wet", "0.5 <= z < 1.0", "#c7eae5", false},
	{7, "wet", "Wet", "1.0 <= z < 1.5", "#80cdc1", false},
	{8, "very-wet", "Very wet", "1.5 <= z < 2.0", "#35978f", false},
	{9, "soaked", "Soaked", "z >= 2.0", "#01665e", false},
}

func TestDefaultMatchesBandTable(t *testing.T) {
	s := Default()
	if len(s.Bands) != len(defaultBands) {
		t.Fatalf("%d bands, the table has %d", len(s.Bands), len(defaultBands))
	}
	for i, want := range defaultBands {
		b := s.Bands[i]
		if b.Code != want.code || b.Key != want.key || b.Label != want.label || b.Color != want.color || b.Drought != want.drought {
			t.Errorf("band %d = %+v, the table says %+v", i+1, b, want)
		}
		if got := b.Range(); got != want.zRange {
			t.Errorf("band %s range %q, the table says %q", b.Key, got, want.zRange)
		}
	}
	if s.MaxCode() != 9 {
		t.Errorf("MaxCode %d", s.MaxCode())
	}
	if err := s.Validate(); err != nil {
		t.Errorf("Default does not validate: %v", err)
	}
}

// Values exactly on the cut points fall where the band table puts them;
// cut points +/-1.0, 1.5, 2.0 from McKee et al. (1993) and WMO-No. 1090
// (2012, SPI User Guide), +/-0.5 ours. The nextafter neighbours show each
// cut is a hard edge between exactly the two bands either side.
func TestDefaultBoundaries(t *testing.T) {
	s := Default()
	cases := []struct {
		cut                 float64
		at, justBelow, over uint8
	}{
		{-2.0, 1, 1, 2}, // z <= -2.0 is parched
		{-1.5, 2, 2, 3}, // -2.0 < z <= -1.5 very dry
		{-1.0, 3, 3, 4}, // -1.5 < z <= -1.0 dry
		{-0.5, 4, 4, 5}, // -1.0 < z <= -0.5 slightly dry
		{0.5, 6, 5, 6},  // 0.5 <= z < 1.0 slightly wet
		{1.0, 7, 6, 7},  // 1.0 <= z < 1.5 wet
		{1.5, 8, 7, 8},  // 1.5 <= z < 2.0 very wet
		{2.0, 9, 8, 9},  // z >= 2.0 soaked
	}
	for _, c := range cases {
		if got := s.Classify(c.cut); got != c.at {
			t.Errorf("Classify(%v) = %d, want %d", c.cut, got, c.at)
		}
		if got := s.Classify(math.Nextafter(c.cut, math.Inf(-1))); got != c.justBelow {
			t.Errorf("Classify(just below %v) = %d, want %d", c.cut, got, c.justBelow)
		}
		if got := s.Classify(math.Nextafter(c.cut, math.Inf(1))); got != c.over {
			t.Errorf("Classify(just above %v) = %d, want %d", c.cut, got, c.over)
		}
	}
	// "In drought" is z <= -1.0 (codes 1-3): -1.0 is, its upper neighbour is not.
	for z, want := range map[float64]bool{-1.0: true, math.Nextafter(-1, 0): false, -5: true, 0: false} {
		b, _ := s.Band(s.Classify(z))
		if b.Drought != want {
			t.Errorf("z = %v drought %v, want %v", z, b.Drought, want)
		}
	}
}

// NaN is no data (code 0). Infinities follow the table literally:
// -Inf satisfies z <= -2.0, +Inf satisfies z >= 2.0.
func TestDefaultSpecialValues(t *testing.T) {
	s := Default()
	cases := []struct {
		z    float64
		want uint8
	}{
		{math.NaN(), 0},
		{math.Inf(-1), 1},
		{math.Inf(1), 9},
		{-math.MaxFloat64, 1},
		{math.MaxFloat64, 9},
		{0, 5},
		{math.Copysign(0, -1), 5},
		{math.SmallestNonzeroFloat64, 5},
		{-math.SmallestNonzeroFloat64, 5},
	}
	for _, c := range cases {
		if got := s.Classify(c.z); got != c.want {
			t.Errorf("Classify(%v) = %d, want %d", c.z, got, c.want)
		}
	}
}

// Law: the bands tile the real line, so every z lies in exactly one band,
// Classify returns that band's code, and codes never decrease as z grows
// (bands are ordered driest first). Sample: wide normal draws, uniform
// draws, and the neighbourhoods of the cut points.
func TestEveryZInExactlyOneBand(t *testing.T) {
	s := Default()
	rng := rand.New(rand.NewPCG(1, 2))
	var zs []float64
	for range 20000 {
		zs = append(zs, 3*rng.NormFloat64(), -10+20*rng.Float64())
	}
	for _, c := range []float64{-2, -1.5, -1, -0.5, 0.5, 1, 1.5, 2} {
		for k := -3; k <= 3; k++ {
			zs = append(zs, c+float64(k)*1e-15, c+float64(k)*1e-9)
		}
	}
	for _, z := range zs {
		n, code := 0, uint8(0)
		for _, b := range s.Bands {
			if b.Contains(z) {
				n++
				code = b.Code
			}
		}
		if n != 1 {
			t.Fatalf("z = %v is in %d bands", z, n)
		}
		if got := s.Classify(z); got != code {
			t.Fatalf("Classify(%v) = %d, band says %d", z, got, code)
		}
		if up := math.Nextafter(z, math.Inf(1)); s.Classify(up) < code {
			t.Fatalf("code falls from %d at %v to %d at %v", code, z, s.Classify(up), up)
		}
	}
}

func TestBandLookup(t *testing.T) {
	s := Default()
	for _, want := range defaultBands {
		b, ok := s.Band(want.code)
		if !ok || b.Key != want.key {
			t.Errorf("Band(%d) = %v,%v, want %s", want.code, b.Key, ok, want.key)
		}
	}
	for _, code := range []uint8{0, 10, 255} {
		if _, ok := s.Band(code); ok {
			t.Errorf("Band(%d) found", code)
		}
	}
}

func TestBandRGBA(t *testing.T) {
	cases := []struct {
		hex  string
		want color.RGBA
	}{
		{"#8c510a", color.RGBA{0x8c, 0x51, 0x0a, 255}},
		{"#01665e", color.RGBA{0x01, 0x66, 0x5e, 255}},
		{"#F5F5F5", color.RGBA{0xf5, 0xf5, 0xf5, 255}},
		{"#12345g", color.RGBA{128, 128, 128, 255}}, // not hex: mid grey
		{"# 12345", color.RGBA{128, 128, 128, 255}},
		{"8c510a", color.RGBA{128, 128, 128, 255}},
	}
	for _, c := range cases {
		if got := (Band{Color: c.hex}).RGBA(); got != c.want {
			t.Errorf("RGBA(%q) = %v, want %v", c.hex, got, c.want)
		}
	}
}

// Range must not round custom cut points away (legends print it).
func TestBandRangeCustomCuts(t *testing.T) {
	b := Band{Min: -1.25, Max: 0.75, MinInclusive: true}
	if got, want := b.Range(), "-1.25 <= z < 0.75"; got != want {
		t.Errorf("Range = %q, want %q", got, want)
	}
}

// The default bands in percentile terms: a 15th-percentile window is "dry"
// (z = -1.036, between -1.5 and -1.0), the 16th is "slightly-dry" (z = -0.994).
// Phi(-1) = 15.87 % (A&S Table 26.1, 1 - 0.841345); the 94th is "very-wet"
// (z = 1.555) and the 2nd "parched" (z = -2.054) (quantiles from memory of
// the normal tables).
func TestPercentileIntoBands(t *testing.T) {
	s := Default()
	for p, want := range map[float64]string{15: "dry", 16: "slightly-dry", 50: "normal", 2: "parched", 99.9: "soaked", 0: "parched", 94: "very-wet"} {
		b, _ := s.Band(s.Classify(spi.PercentileToZ(p)))
		if b.Key != want {
			t.Errorf("percentile %v -> z %.4f -> %s, want %s", p, spi.PercentileToZ(p), b.Key, want)
		}
	}
}

// TestRangeOpenBothEnds: a band open at both ends is described as any
// value, in every unit.
func TestRangeOpenBothEnds(t *testing.T) {
	b := Band{Min: math.Inf(-1), Max: math.Inf(1)}
	if got, want := b.Range(), "any z"; got != want {
		t.Errorf("Range: %q, want %q", got, want)
	}
	if got, want := b.RangeIn(UnitPercentile), "any p"; got != want {
		t.Errorf("RangeIn(percentile): %q, want %q", got, want)
	}
}
