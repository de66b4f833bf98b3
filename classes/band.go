// Package classes holds band schemes: named severity bands over z (SPI
// units), classifying values into them, and the percentile <-> z conversion.
package classes

import (
	"fmt"
	"image/color"
	"math"
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

// Contains reports whether z falls in the band.
func (b Band) Contains(z float64) bool {
	if z < b.Min || (z == b.Min && !b.MinInclusive) {
		return false
	}
	if z > b.Max || (z == b.Max && !b.MaxInclusive) {
		return false
	}
	return true
}

// RGBA is the band colour as an opaque color.RGBA.
func (b Band) RGBA() color.RGBA {
	var r, g, bl uint8
	if _, err := fmt.Sscanf(b.Color, "#%02x%02x%02x", &r, &g, &bl); err != nil {
		return color.RGBA{128, 128, 128, 255}
	}
	return color.RGBA{r, g, bl, 255}
}

// Range describes the band's z interval, e.g. "-2.0 < z <= -1.5".
func (b Band) Range() string {
	lo, hi := "<", "<"
	if b.MinInclusive {
		lo = "<="
	}
	if b.MaxInclusive {
		hi = "<="
	}
	switch {
	case math.IsInf(b.Min, -1):
		return fmt.Sprintf("z %s %.1f", hi, b.Max)
	case math.IsInf(b.Max, 1):
		return fmt.Sprintf("z %s %.1f", map[string]string{"<": ">", "<=": ">="}[lo], b.Min)
	}
	return fmt.Sprintf("%.1f %s z %s %.1f", b.Min, lo, hi, b.Max)
}
