// Package region reads the regions that area-in-drought statistics are
// reported for (districts, basins, counties, from GeoJSON), finds exactly
// which share of each grid cell lies inside a region, and sums band rasters
// over regions (zonal statistics). It sits just above grid in the data flow:
// after the band raster is made, Zonal gives each region's area in each band,
// from which the regions layer and the history report the share in drought.
//
// Regions are Polygon or MultiPolygon features, normalised to exterior rings
// counter-clockwise and holes clockwise (RFC 7946 order; either winding is
// accepted on input). A region's name is the feature's "id" member or the
// property the caller names (by default "id", then "name"). Longitudes may
// run past 180 for a region drawn across the antimeridian.
//
// Coverage is exact, not sampled at cell centres: each ring is clipped to
// each cell, so a region smaller than one cell gets its true share, taken
// of the cell's area on the ellipsoid (not in degrees), so exact at any
// latitude. Areas
// are in km^2 on the WGS84 ellipsoid (grid's cell areas), each cell weighted
// by the share of it inside the region; shares in drought are percent of the
// covered (not no-data) area. Results do not depend on the number of cores.
//
// Zonal statistics come from rows as they come: ZonalRows takes the band
// and index rasters a block of whole rows at a time, in order from the
// northernmost row, and works out each region's shares row by row, so it
// holds the regions' polygons and a few rows per core, never a raster nor
// the cells of a region. Zonal is ZonalRows fed the whole raster at once,
// and gives the same sums bit for bit for any block size. Coverage, Mask
// and ZonalRows share one row-coverage core (rowcover.go).
//
// See docs/design.md for the regions.csv columns.
package region
