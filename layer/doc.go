// Package layer holds what every layer encoder shares: the caution that each
// human-facing output carries (Caution), the label of cells without an
// estimate (NoDataLabel) and the thousands separators of the figures they
// write (GroupThousands). The layers are the last step of the data flow
// (index raster -> band raster -> layers): they turn the band raster, its
// polygons, the stations and the per-region statistics into the files a user
// reads. The encoders are the subpackages: geojson (the band and station
// layers, RFC 7946), picture (map.png), page (the self-contained map.html),
// chart (the area-in-drought history picture) and regions (regions.csv and
// regions.json). The GeoTIFF layers are written by package geotiff.
//
// The encoders are plain functions that write to an io.Writer and return an
// error. picture, page and chart have Encode(w, in, ...) error with a
// WriteFile(path, in, ...) helper beside it that writes the file through a
// temporary name renamed at the end (publish.WriteFile); geojson has
// EncodeBands and EncodeStations, and regions WriteCSV and WriteJSON, which
// write to an io.Writer only and leave the file to the caller.
//
// The caution: the maps are interpolated estimates from a station network,
// not official drought declarations, and the reader is pointed to the
// national meteorological or hydrological service and to local rules
// (docs/design.md, "The job").
package layer
