package bands

import (
	"fmt"
	"math"
)

// Scheme is an ordered set of bands, driest first, that together cover every
// z exactly once.
type Scheme struct {
	Name string
	// Unit is the unit the scheme's cuts were written in (UnitZ, and ""
	// reads as z; UnitPercentile; UnitPctOfNormal): its bands hold z for z
	// and percentile schemes, percent of normal for percent-of-normal ones
	// (Unit.Domain).
	Unit Unit
	// Legend is the unit of the ranges legends give (RangeOf); "" is Unit.
	// Scheme.For sets it to the unit of a run's values.
	Legend Unit
	Bands  []Band
}

// Default is drygrid's nine-band scheme (the table in the package doc). The
// +/-1.0, 1.5 and 2.0 cut points follow McKee et al. (1993) and WMO-No. 1090
// (2012); +/-0.5 is ours. Dry bands include their upper bound, wet bands
// their lower bound. Colours: ColorBrewer's 9-class BrBG (Brewer, Penn State;
// Apache-2.0), colour-blind safe.
func Default() *Scheme {
	inf := math.Inf(1)
	return &Scheme{Name: "drygrid-default", Unit: UnitZ, Bands: []Band{
		{1, "parched", "Parched", -inf, -2.0, false, true, "#8c510a", true},
		{2, "very-dry", "Very dry", -2.0, -1.5, false, true, "#bf812d", true},
		{3, "dry", "Dry", -1.5, -1.0, false, true, "#dfc27d", true},
		{4, "slightly-dry", "Slightly dry", -1.0, -0.5, false, true, "#f6e8c3", false},
		{5, "normal", "Near normal", -0.5, 0.5, false, false, "#f5f5f5", false},
		{6, "slightly-wet", "Slightly wet", 0.5, 1.0, true, false, "#c7eae5", false},
		{7, "wet", "Wet", 1.0, 1.5, true, false, "#80cdc1", false},
		{8, "very-wet", "Very wet", 1.5, 2.0, true, false, "#35978f", false},
		{9, "soaked", "Soaked", 2.0, inf, true, false, "#01665e", false},
	}}
}

// Classify gives the code of the band holding z, or 0 for NaN or a z that
// no band holds.
func (s *Scheme) Classify(z float64) uint8 {
	if math.IsNaN(z) {
		return 0
	}
	for i := range s.Bands { // by index: a Band is too large to copy per cell
		if s.Bands[i].Contains(z) {
			return s.Bands[i].Code
		}
	}
	return 0
}

// Band gives the band with the code.
func (s *Scheme) Band(code uint8) (Band, bool) {
	for _, b := range s.Bands {
		if b.Code == code {
			return b, true
		}
	}
	return Band{}, false
}

// MaxCode is the largest band code, for sizing per-code tables.
func (s *Scheme) MaxCode() uint8 {
	var m uint8
	for _, b := range s.Bands {
		m = max(m, b.Code)
	}
	return m
}

// Validate checks that codes are unique and non-zero, keys are unique and
// non-empty, colours are exactly "#rrggbb", and the bands, in order, tile the
// whole real line with no gap or overlap, meeting at finite cut points.
func (s *Scheme) Validate() error {
	if len(s.Bands) == 0 {
		return fmt.Errorf("scheme %q: no bands", s.Name)
	}
	codes, keys := map[uint8]bool{}, map[string]bool{}
	for i, b := range s.Bands {
		if b.Code == 0 {
			return fmt.Errorf("scheme %q band %d (%s): code 0 is reserved for no data", s.Name, i+1, b.Key)
		}
		if codes[b.Code] {
			return fmt.Errorf("scheme %q band %d (%s): code %d used twice", s.Name, i+1, b.Key, b.Code)
		}
		if b.Key == "" || keys[b.Key] {
			return fmt.Errorf("scheme %q band %d: key %q is empty or used twice", s.Name, i+1, b.Key)
		}
		if _, ok := parseHexColor(b.Color); !ok {
			return fmt.Errorf("scheme %q band %s: colour %q is not #rrggbb", s.Name, b.Key, b.Color)
		}
		if math.IsNaN(b.Min) || math.IsNaN(b.Max) {
			return fmt.Errorf("scheme %q band %s: bound is NaN", s.Name, b.Key)
		}
		codes[b.Code], keys[b.Key] = true, true
		if i == 0 && !math.IsInf(b.Min, -1) {
			return fmt.Errorf("scheme %q: first band %s must start at -inf", s.Name, b.Key)
		}
		if i == len(s.Bands)-1 && !math.IsInf(b.Max, 1) {
			return fmt.Errorf("scheme %q: last band %s must end at +inf", s.Name, b.Key)
		}
		if b.Min > b.Max || (b.Min == b.Max && !(b.MinInclusive && b.MaxInclusive)) {
			return fmt.Errorf("scheme %q band %s: empty range %s", s.Name, b.Key, b.RangeIn(s.Unit))
		}
		if i > 0 {
			p := s.Bands[i-1]
			if math.IsInf(b.Min, 0) {
				return fmt.Errorf("scheme %q: bands %s and %s meet at %g; inner cut points must be finite", s.Name, p.Key, b.Key, b.Min)
			}
			if p.Max != b.Min || p.MaxInclusive == b.MinInclusive {
				return fmt.Errorf("scheme %q: bands %s and %s must meet at one cut point, included in exactly one of them", s.Name, p.Key, b.Key)
			}
		}
	}
	return nil
}
