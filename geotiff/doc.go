// Package geotiff writes the index and band rasters as GeoTIFF and Cloud
// Optimized GeoTIFF files, and reads such files back. It sits at the end of
// the data flow (index raster -> band raster -> layers): the index raster
// (Float32 z) becomes index.tif and the band raster (UInt8 band codes)
// becomes bands.tif, either from whole rasters held in memory (EncodeIndex,
// EncodeBands) or from rows streamed by the caller, so that a large grid is
// never held whole (EncodeIndexRows, EncodeIndexBandsRows, with a RowFunc).
// The encoders write to an io.Writer, as EncodeIndex(w, r, opt) error;
// WriteIndex, WriteBands and the Write...Rows functions beside them write a
// file through a temporary name renamed at the end (publish.WriteFile), so a
// failure leaves an earlier file untouched. Options controls the writer and
// DefaultOptions is drygrid's configuration. The output bytes never depend
// on the number of workers.
//
// The files follow these definitions:
//
//   - Georeferencing: the keys of OGC GeoTIFF 1.1 (OGC 19-008r4) for
//     EPSG:4326, WGS 84 in degrees, with the same keys and values GDAL
//     writes; cells are areas (GTRasterTypeGeoKey = PixelIsArea), the
//     tiepoint is the north-west corner of the grid and the pixel scale its
//     resolution.
//   - Layout and compression: square tiles (256 px by default), DEFLATE in
//     zlib streams (RFC 1950, RFC 1951). Float32 index samples use the
//     floating-point predictor (predictor 3, TIFF Technical Note 3, Adobe
//     2005); UInt8 band codes use horizontal differencing (predictor 2,
//     TIFF 6.0 section 14) and carry a colour table with each band's colour
//     at its code, and a GDAL PAM sidecar (bands.tif.aux.xml, CategoryAux)
//     names the codes.
//   - No data: the GDAL_NODATA tag (42113) holds the no-data value, -9999
//     for the index (NaN cells are written as it) and 0 for the bands. The
//     GDAL_METADATA tag (42112) carries Options.Metadata, by default the
//     caution (Caution) that these are interpolated estimates, not official
//     drought declarations.
//   - Cloud Optimized layout (OGC 21-026, as GDAL's COG driver writes it,
//     with its "ghost" header): the IFDs first, then the tiles, smallest
//     overview first. Overviews halve the image, sizes rounding up, until
//     both sides are at most 512 px. An index overview pixel is the mean of
//     the valid (not no-data, not NaN) full-resolution cells it covers, no
//     data when none is; a band overview pixel is the most frequent code
//     among the cells it covers, no data ignored unless every cell is no
//     data, ties going to the lowest code.
//   - BigTIFF (LONG8 offsets, the BigTIFF proposal adopted by libtiff 4)
//     only when a classic TIFF would pass 4 GiB, unless Options.BigTIFF
//     says otherwise.
//
// The reader (ReadIndex, ReadBands, DecodeIndex, DecodeBands) exists so that
// drygrid can compute statistics from rasters already written, by drygrid
// or by GDAL (the stats command reads bands.tif and index.tif). It is
// minimal: classic TIFF, the first IFD only (overviews are ignored), one
// sample per pixel, stripped or tiled, uncompressed or DEFLATE, predictors
// 1 to 3, on EPSG:4326 with square cells; anything else is refused with an
// error naming the file.
//
// GDAL is the independent reader the tests check the files with (gdalinfo,
// the COG validator, pixel readback); see docs/design.md, "Formats written".
package geotiff
