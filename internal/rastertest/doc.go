// Package rastertest holds test support for the band polygons: band rasters
// of every kind the tracer must handle and the laws their polygons obey. In
// the data flow (index raster -> band raster -> layers) it stands in for the
// band raster in the tests of package polygon and of the GeoJSON band layer
// (layer/geojson), which share it. Only tests import it.
//
// The rasters (RandomCases, Smooth, SimplifyCases, AntimeridianCases,
// BenchRaster, BenchField, Raster) are deterministic: random sizes and noise,
// checkerboards, single cells, holes in holes, no-data islands, one-row and
// one-column grids, smooth fields, grids that cross the antimeridian, and
// the global 0.1 deg raster of the benchmarks. Check holds an exact layer to
// the laws of package polygon's documentation: closed rings that never
// visit a position twice and have no collinear vertex, exterior rings
// counter-clockwise and holes clockwise (RFC 7946 section 3.1.6), per band a
// planar area of cell count x res^2, every cell centre in the polygons of
// its own code, and one Polygon per 4-connected component of cells
// (Components counts them independently of the tracer). PlanarCheck holds a
// simplified layer to a planar arrangement: two segments are the same
// boundary walked both ways, share at most an end point, or do not meet
// (OGC Simple Features).
package rastertest
