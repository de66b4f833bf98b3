package bands

import (
	"image/color"
	"math"
	"strconv"
	"strings"
)

// Band is one severity band: the z values in (Min, Max), with each end
// included when its flag says so. Min may be -Inf and Max +Inf.
type Band struct {
	Code         uint8   // 1..255; 0 is no data in band rasters
	Key          string  // machine name, for columns and properties
	Label        string  // human name, for legends
	Min, Max     float64 // z range
	MinInclusive bool
	MaxInclusive bool
	Color        string // "#rrggbb"
	Drought      bool   // counts as "in drought"
}

// Contains reports whether z falls in the band. An infinite end is always
// closed, so the band z <= -2.0 (Min = -Inf) holds z = -Inf and the band
// z >= 2.0 (Max = +Inf) holds z = +Inf; NaN is in no band.
func (b Band) Contains(z float64) bool {
	if z < b.Min || (z == b.Min && !b.MinInclusive && !math.IsInf(z, 0)) {
		return false
	}
	if z > b.Max || (z == b.Max && !b.MaxInclusive && !math.IsInf(z, 0)) {
		return false
	}
	return !math.IsNaN(z)
}

// RGBA is the band colour as an opaque color.RGBA (mid grey when Color is
// not "#rrggbb").
func (b Band) RGBA() color.RGBA {
	c, ok := parseHexColor(b.Color)
	if !ok {
		return color.RGBA{128, 128, 128, 255}
	}
	return c
}

// parseHexColor reads exactly "#rrggbb" (hex digits, either case).
func parseHexColor(s string) (color.RGBA, bool) {
	if len(s) != 7 || s[0] != '#' {
		return color.RGBA{}, false
	}
	var v [3]uint8
	for i := range 6 {
		c := s[1+i]
		var d uint8
		switch {
		case c >= '0' && c <= '9':
			d = c - '0'
		case c >= 'a' && c <= 'f':
			d = c - 'a' + 10
		case c >= 'A' && c <= 'F':
			d = c - 'A' + 10
		default:
			return color.RGBA{}, false
		}
		v[i/2] = v[i/2]<<4 | d
	}
	return color.RGBA{v[0], v[1], v[2], 255}, true
}

// Range describes the band's z interval, e.g. "-2.0 < z <= -1.5" ("any z"
// for a band open at both ends).
func (b Band) Range() string { return rangeText(b, "z", cutText) }

// cutText prints a cut point with at least one decimal ("-2.0") and as many
// as it needs ("-1.25"), so a legend never rounds a custom cut away.
func cutText(v float64) string {
	s := strconv.FormatFloat(v, 'f', -1, 64)
	if !strings.ContainsAny(s, ".IN") {
		s += ".0"
	}
	return s
}
