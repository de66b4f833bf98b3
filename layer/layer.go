package layer

import (
	"strconv"
	"strings"
)

// Caution is the caution that every human-facing output carries when the
// caller gives none: the maps are interpolated estimates, not official
// declarations, and the national service and local rules come first.
const Caution = "Caution: these bands are estimates interpolated from a network of " +
	"stations, not an official drought declaration. Before acting on them, consult the national " +
	"meteorological or hydrological service and follow local rules."

// NoDataLabel names the cells without an estimate in legends.
const NoDataLabel = "No data (too few stations)"

// NoDataMaskedLabel names them when a mask also empties cells.
const NoDataMaskedLabel = "No data (outside the mask, or too few stations)"

// FarLabel is the legend entry of the far-cell hatch of the picture and
// the page: "Nearest station over 150 km".
func FarLabel(km float64) string {
	return "Nearest station over " + strconv.FormatFloat(km, 'g', -1, 64) + " km"
}

// GroupThousands puts thousands separators (commas, as English text does)
// into a formatted number, in the whole part only: "1234567.5" gives
// "1,234,567.5", "-20000" gives "-20,000". The picture and the page write
// their counts and table figures with it.
func GroupThousands(s string) string {
	sign := ""
	if strings.HasPrefix(s, "-") {
		sign, s = "-", s[1:]
	}
	whole, frac := s, ""
	if i := strings.IndexByte(s, '.'); i >= 0 {
		whole, frac = s[:i], s[i:]
	}
	var b strings.Builder
	for i, c := range whole {
		if i > 0 && (len(whole)-i)%3 == 0 {
			b.WriteByte(',')
		}
		b.WriteRune(c)
	}
	return sign + b.String() + frac
}
