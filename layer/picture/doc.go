// Package picture draws map.png, the map picture of one run. In the data
// flow (index raster -> band raster -> layers) it is a layer made from the
// band raster: each cell in its band's colour (no data hatched light grey,
// clearly apart from the near-white "Near normal" band), the stations inside
// the grid as dots, the region outlines with their names where they fit, a
// graticule with degree labels, the legend of the bands with their z
// ranges, a scale bar true along the centre parallel (WGS84), the title and
// subtitle (the date, the window, the index kind and the interpolation
// parameters, as the caller words them), the caution and the production
// line (Input.Produced: when made, what it shows, the data's source).
// With Input.Far the cells holding a value whose nearest station is farther
// than Input.FarKm are overdrawn with thin dark-grey diagonal lines (falling
// to the right, where the no-data hatch rises), only inside those cells,
// and the legend says "Nearest station over FarKm km".
//
// Station markers (Options.Stations): in auto mode up to FewStations (500)
// inside the map are all drawn at full size; beyond that the markers shrink
// (to half size at most) and thin to one per square cell of the map, the
// station nearest the cell's centre, the cell growing until at most
// MaxMarkers (2,000) are drawn; the legend then says how many of how many
// are shown. "all" draws every station, "none" none. Region names never
// overlap each other or a marker: each tries positions around its
// polygon's centroid and is dropped when none is free (over thinned
// markers, which are a sample already, the markers under a name give way
// instead).
// Encode(w, in, opt) error writes the PNG to an io.Writer and WriteFile
// beside it writes the file through a temporary name renamed at the end.
//
// The picture is equirectangular, at true scale along the middle latitude
// of the grid; a grid crossing the antimeridian is drawn in one piece, its
// longitudes past 180 labelled as west. The colours of the bands are the
// scheme's (by default ColorBrewer's 9-class brown/blue-green diverging
// scheme, colour-blind safe). Fonts are the embedded Go fonts, so the same
// input gives the same bytes on every machine and for any number of cores.
//
// The caution is part of every picture: the bands are interpolated
// estimates from a station network, not official drought declarations;
// before acting on them the reader is to consult the national
// meteorological or hydrological service and follow local rules
// (layer.Caution, unless Input.Caution words it otherwise). See
// docs/design.md, "The job" and "Default bands".
package picture
