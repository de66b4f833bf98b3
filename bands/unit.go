package bands

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"drygrid/spi"
)

// Unit is the unit of a scheme's cut points and of the ranges a legend
// gives: the unit of the values a run reads.
//
//   - UnitZ: z, SPI units (the default).
//   - UnitPercentile: percentiles 0-100. A percentile scheme's cuts are
//     turned into z by spi.PercentileToZ when the file is read, so its
//     bands classify z, and classifying a percentile's z equals
//     classifying the percentile itself: the cut and the value go through
//     the same conversion, which is increasing. (Exactly so on the cuts and
//     for values 1e-9 or more from a cut; a value one ulp from a cut may
//     round onto the cut's z in p / 100.) Cuts must lie strictly
//     inside (spi.MinPercentile, spi.MaxPercentile), where percentiles are
//     clamped before conversion, or two percentiles on either side of a cut
//     could share a z.
//   - UnitPctOfNormal: percent of normal (100 x the window's total / the
//     median of the reference totals). It is not a probability and has no
//     z: its bands classify percent of normal itself, and a run of this
//     kind interpolates the values themselves.
//
// Bands of z and percentile schemes hold z (Band.Min, Band.Max); bands of
// percent-of-normal schemes hold percent of normal (Domain).
type Unit string

// The units of schemes and legends.
const (
	UnitZ           Unit = "z"
	UnitPercentile  Unit = "percentile"
	UnitPctOfNormal Unit = "pct-of-normal"
)

// ParseUnit reads a unit as scheme files write it: "z", "percentile" or
// "pct-of-normal" ("percent-of-normal" is accepted).
func ParseUnit(s string) (Unit, error) {
	switch u := Unit(strings.ToLower(strings.TrimSpace(s))); u {
	case UnitZ, UnitPercentile, UnitPctOfNormal:
		return u, nil
	case "percent-of-normal":
		return UnitPctOfNormal, nil
	}
	return "", fmt.Errorf("unit %q: want \"z\", \"percentile\" or \"pct-of-normal\"", s)
}

// unitOr is u, or z for "" (a scheme made in code without a unit).
func unitOr(u Unit) Unit {
	if u == "" {
		return UnitZ
	}
	return u
}

// Domain is the quantity the bands of a scheme written in u hold and
// classify: z for z and percentile, percent of normal for percent of
// normal.
func (u Unit) Domain() Unit {
	if unitOr(u) == UnitPctOfNormal {
		return UnitPctOfNormal
	}
	return UnitZ
}

// Centre is "normal" in the unit: z = 0, the 50th percentile, 100 % of
// normal. The "outer" cut rule and the drought bands are taken from it.
func (u Unit) Centre() float64 {
	switch unitOr(u) {
	case UnitPercentile:
		return 50
	case UnitPctOfNormal:
		return 100
	}
	return 0
}

// Describe names the unit for readers and metadata: "z", "percentile",
// "% of normal".
func (u Unit) Describe() string {
	if unitOr(u) == UnitPctOfNormal {
		return "% of normal"
	}
	return string(unitOr(u))
}

// RangeIn describes the band's interval in unit u, with the variable of
// the unit: "z" (as Range), "p" for percentiles ("15.9 < p <= 30.9": the
// band's z cuts as 100 Phi(z)), "% of normal" for percent of normal
// ("70 < % of normal <= 85"). u must have the band's domain (Unit.Domain):
// a z band is described in z or percentile, a percent-of-normal band in
// percent of normal; in any other unit its own bounds are printed as z.
//
// A percentile is printed with the fewest decimals (one to four) that turn
// back into exactly the band's z by spi.PercentileToZ, so a percentile
// scheme's own cuts ("2.25") come back as written; a z cut, which no short
// decimal gives exactly, is printed with one decimal (z = -1.0 as 15.9).
func (b Band) RangeIn(u Unit) string {
	u = unitOr(u)
	switch u {
	case UnitPercentile:
		return rangeText(b, "p", percentileText)
	case UnitPctOfNormal:
		return rangeText(b, "% of normal", func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) })
	}
	return b.Range()
}

// rangeText writes the band's interval with the variable name and the
// bound printer cut.
func rangeText(b Band, name string, cut func(float64) string) string {
	lo, hi := "<", "<"
	if b.MinInclusive {
		lo = "<="
	}
	if b.MaxInclusive {
		hi = "<="
	}
	switch {
	case math.IsInf(b.Min, -1) && math.IsInf(b.Max, 1):
		return "any " + name
	case math.IsInf(b.Min, -1):
		return fmt.Sprintf("%s %s %s", name, hi, cut(b.Max))
	case math.IsInf(b.Max, 1):
		return fmt.Sprintf("%s %s %s", name, map[string]string{"<": ">", "<=": ">="}[lo], cut(b.Min))
	}
	return fmt.Sprintf("%s %s %s %s %s", cut(b.Min), lo, name, hi, cut(b.Max))
}

// percentileText prints z as a percentile, 100 Phi(z) (see Band.RangeIn).
func percentileText(z float64) string {
	p := spi.ZToPercentile(z)
	for d := 1; d <= 4; d++ {
		s := strconv.FormatFloat(p, 'f', d, 64)
		if v, err := strconv.ParseFloat(s, 64); err == nil && spi.PercentileToZ(v) == z {
			return s
		}
	}
	return strconv.FormatFloat(p, 'f', 1, 64)
}

// RangeOf is the band's interval as the scheme's legends give it: in
// Legend, or in the scheme's own Unit when Legend is "" (z for the default
// scheme).
func (s *Scheme) RangeOf(b Band) string { return b.RangeIn(s.legendUnit()) }

// legendUnit is Legend, or Unit when Legend is "" or of another domain.
func (s *Scheme) legendUnit() Unit {
	if s.Legend == "" || unitOr(s.Legend).Domain() != unitOr(s.Unit).Domain() {
		return s.Unit
	}
	return s.Legend
}

// For is the scheme as a run whose values are in unit u uses it: a copy
// whose legends (RangeOf) are in u. It refuses a scheme whose cuts are in
// another unit: an SPI run (z) takes z schemes; a percentile run takes
// percentile schemes and z schemes (its values become z, and the default
// scheme is one); a percent-of-normal run takes percent-of-normal schemes
// only.
func (s *Scheme) For(u Unit) (*Scheme, error) {
	u, own := unitOr(u), unitOr(s.Unit)
	ok := own == u || (u == UnitPercentile && own == UnitZ)
	if !ok {
		return nil, fmt.Errorf("scheme %q has its cuts in %s (unit = %q), but the values are in %s: give a scheme with unit = %q",
			s.Name, own.Describe(), string(own), u.Describe(), string(u))
	}
	c := *s
	c.Bands = append([]Band(nil), s.Bands...)
	c.Legend = u
	return &c, nil
}

// DefaultFor is the default scheme of values in unit u: Default for z and
// percentile (its z cuts, legends in u), DefaultPctOfNormal for percent of
// normal.
func DefaultFor(u Unit) *Scheme {
	if unitOr(u) == UnitPctOfNormal {
		return DefaultPctOfNormal()
	}
	s := Default()
	s.Legend = unitOr(u)
	return s
}

// DefaultPctOfNormal is drygrid's own scheme for percent of normal: the
// nine bands, keys, labels and colours of Default, with cut points of our
// own choosing (no standard sets them; they are not equivalents of the z
// cuts, which percent of normal, skewed and bounded below by 0, has none
// of): 40, 55, 70, 85 below normal and 115, 130, 150, 200 above, each
// cut in the band farther from 100. "In drought" is 70 % of normal or
// less (codes 1-3).
func DefaultPctOfNormal() *Scheme {
	s := Default()
	s.Name, s.Unit = "drygrid-pct-of-normal", UnitPctOfNormal
	cuts := []float64{40, 55, 70, 85, 115, 130, 150, 200}
	for i := range s.Bands {
		if i > 0 {
			s.Bands[i].Min = cuts[i-1]
		}
		if i < len(cuts) {
			s.Bands[i].Max = cuts[i]
		}
	}
	return s
}

// LegendNote says under a legend's heading what its ranges are in: the
// unit of RangeOf.
func (s *Scheme) LegendNote() string {
	switch unitOr(s.legendUnit()) {
	case UnitPercentile:
		return "p: percentile (p = 100 Phi(z))"
	case UnitPctOfNormal:
		return "percent of normal (of the median reference total)"
	}
	return "z in standard deviations (SPI units)"
}
