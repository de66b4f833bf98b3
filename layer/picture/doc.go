// Package picture draws map.png, the map picture of one run. In the data
// flow (index raster -> band raster -> layers) it is a layer made from the
// band raster: each cell in its band's colour (no data hatched light grey,
// clearly apart from the near-white "Near normal" band), the stations inside
// the grid as dots, the region outlines with their names where they fit, a
// graticule with degree labels, the legend of the bands with their z
// ranges, the title and subtitle (the date, the window, the index kind and
// the interpolation parameters, as the caller words them), and the caution.
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
