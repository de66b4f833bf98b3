package page

import (
	"math"

	"drygrid/grid"
)

// ChooseStations marks the stations a page of the grid bbox (Input.BBox)
// carries of a station layer at positions (lons[i], lats[i]), in the
// layer's order, when it carries at most limit (0 gives
// DefaultMaxStations, as Input.MaxStations): every station when there are
// no more than limit, else the page's own choice when it thins a whole
// layer (one station per square cell of the map, the one nearest the
// cell's centre; a station at a NaN or infinite position is left out).
// Longitudes may lie past ±180: they are brought into [-180, 180] as
// geojson.EncodeStations writes them before anything else. lons and lats
// must be as long as each other.
//
// A caller holding the stations in memory chooses with it, writes the
// subset (geojson.EncodeStationsSubset) and gives the page that subset
// with Input.StationsTotal set to the number of stations, and the page is
// the one the whole layer would give, without the whole layer's text.
func ChooseStations(lons, lats []float64, limit int, bbox [4]float64) []bool {
	if len(lons) != len(lats) {
		panic("page.ChooseStations: lons and lats differ in length")
	}
	if limit == 0 {
		limit = DefaultMaxStations
	}
	if len(lons) <= limit {
		keep := make([]bool, len(lons))
		for i := range keep {
			keep[i] = true
		}
		return keep
	}
	pr := pageProjectionOf(bbox)
	xs, ys := make([]float64, len(lons)), make([]float64, len(lats))
	for i := range lons {
		xs[i], ys[i] = pr.xy(grid.WrapLon(lons[i]), lats[i])
	}
	return pageChoose(xs, ys, limit)
}

// pageProjection is how the thinning places a station on the map: x is
// the longitude (shifted by 360 east of the antimeridian on a grid
// crossing it) scaled by kx, the cosine of the grid's middle latitude
// (at least 0.25), and y the latitude.
type pageProjection struct {
	west, kx float64
	crossing bool
}

// pageProjectionOf is the projection for the grid bbox (W, S, E, N; E past
// 180 on a grid crossing the antimeridian).
func pageProjectionOf(b [4]float64) pageProjection {
	return pageProjection{west: b[0], kx: math.Max(math.Cos((b[1]+b[3])/2*math.Pi/180), 0.25), crossing: b[2] > 180+1e-9}
}

// xy places the position (lon, lat) as written in the layer.
func (p pageProjection) xy(lon, lat float64) (float64, float64) {
	if p.crossing && lon < p.west-1e-9 {
		lon += 360
	}
	return lon * p.kx, lat
}
