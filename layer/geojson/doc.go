// Package geojson writes the two vector layers, bands.geojson and
// stations.geojson, as GeoJSON (RFC 7946). In the data flow (index raster ->
// band raster -> layers) the band layer is the band raster dissolved into
// polygons (package polygon), and the station layer is the station values
// that were gridded, each with its z and band. The encoders write to
// an io.Writer and return an error: EncodeBands(w, r, s, opt) and
// EncodeStations(w, pts, s, opt) (and EncodeStationsSubset, the part of the
// station layer a page carries); there is no file helper here, the caller
// writes the file. The station layer is written Feature by Feature with
// nothing held per station, however many stations there are. Options controls both. The same input gives the same
// bytes, whatever the number of cores.
//
// A caller that streams the band rows instead of holding the raster feeds
// them, in order, to a BandAreas (each band's cell count and area, and the
// bbox) and a polygon.Tracer, and writes the layer with
// EncodeBandPolygons: the same bytes as EncodeBands on the whole raster,
// which is itself that path fed all rows at once.
//
// The layers follow these definitions:
//
//   - RFC 7946: a FeatureCollection with a bbox (section 5), no crs member
//     (section 4), [lon, lat] positions in degrees on WGS 84 with longitudes
//     in [-180, 180] (a grid crossing the antimeridian is split at 180,
//     section 3.1.9), exterior rings counter-clockwise and holes clockwise
//     (section 3.1.6). A top-level foreign member (section 6.1), "drygrid",
//     carries the caution (Caution: interpolated estimates, not official
//     drought declarations), the software and the parameters used.
//   - The band layer: one Feature per band present in the raster, in scheme
//     order, whose geometry is the band's dissolved MultiPolygon with rings
//     along cell edges (simplified only when Options.SimplifyKm asks), and
//     whose properties are code, key, label, color, drought (whether the
//     band counts as in drought) and area_km2 (the band's cells' area on the
//     WGS84 ellipsoid, to 0.01 km^2). Coordinates have the fewest decimals
//     that hold every cell edge exactly (polygon.GeoJSONDecimals).
//   - The station layer (Station): one Point Feature per station, in the
//     order given, with properties id, value (the input SPI or percentile),
//     z, code and key of its band (null when it has none) and in_grid
//     (whether it lies inside the grid).
//
// See docs/design.md, "Formats written".
package geojson
