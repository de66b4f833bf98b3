// Package layer holds what every layer encoder shares: the caution that
// each human-facing output carries and the label of cells without an
// estimate. The encoders themselves are its subpackages: geojson (band
// polygons and station points, RFC 7946), picture (map.png), page (the
// self-contained map.html), chart (the area-in-drought history picture) and
// regions (regions.csv and regions.json). Each is a plain encoder,
// Encode(w io.Writer, in, opt) error, with a Write helper beside it.
package layer

// Caution is the caution that every human-facing output carries when the
// caller gives none: the maps are interpolated estimates, not official
// declarations, and the national service and local rules come first.
const Caution = "Caution: these bands are estimates interpolated from a network of " +
	"stations, not an official drought declaration. Before acting on them, consult the national " +
	"meteorological or hydrological service and follow local rules."

// NoDataLabel names the cells without an estimate in legends.
const NoDataLabel = "No data (too few stations)"
