package layer

import "strconv"

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
