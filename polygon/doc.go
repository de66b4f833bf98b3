// Package polygon turns a band raster into dissolved band polygons: for each
// band code, one MultiPolygon covering exactly the cells of that code. It
// sits between the band raster and the layers in the data flow (index
// raster -> band raster -> layers): the GeoJSON band layer (layer/geojson)
// writes its polygons, and the picture and the page draw them. Polygonize
// traces the rings in the grid's own coordinates, PolygonizeRFC7946 splits
// them at the antimeridian, and PolygonizeSimplified also simplifies them;
// GeoJSONDecimals and Round give the decimals the coordinates are written
// with.
//
// The tracer: all of them feed the whole raster to a Tracer (NewTracer,
// Rows, Finish), which a caller can also feed row block by row block, in
// order, without ever holding the raster. It is a scanline sweep over the
// vertex rows, north to south, holding only the two cell rows beside the
// current vertex row (tracer_sweep.go):
//
//   - at each vertex the four cells around it give the directed boundary
//     edges of each code (walked with the code on the left) and how they
//     pair: straight on, or turning, where at a saddle each cell of the
//     code is wrapped on its own (the corner rule below);
//   - the edges are linked into open chains whose ends wait on the current
//     vertex row (per vertex column); a chain joined to itself is a closed
//     ring, which is then cut at the vertices it visits twice, and each
//     loop is a shell or a hole by its signed area;
//   - a union-find over component ids (one new id per run of a code that
//     starts with no equal cell above, so per ring vertex, not per cell)
//     tells each hole its shell;
//   - for the simplification the sweep records the nodes as it passes, and
//     the simplifier works on the closed rings and that node set.
//
// Memory is O(columns + boundary vertices + components), never a number
// per cell: about 22 MB allocated in all for a smooth field on the global
// 0.025 deg grid (104 M cells, BenchmarkTracerStream0025).
//
// Order: the output is the same whatever the block sizes. Each ring starts
// at its north-most, then west-most vertex, keeping its orientation; the
// polygons of a code are ordered by their shell's start vertex (north to
// south, then west to east), and the holes of a polygon likewise; on a
// grid split at 180 the polygons of the western part come first, then
// those of the eastern part (ties, possible only after simplification, go
// by the order the rings closed in during the sweep).
//
// The polygons follow these definitions:
//
//   - Dissolved along cell edges: every ring runs along cell edges, with
//     collinear vertices dropped, so the polygons of one band cover exactly
//     its cells and two bands share their boundaries exactly. Cells with the
//     raster's no-data code belong to no polygon.
//   - Connectivity and the corner (saddle) rule: cells of one code join
//     across shared edges only (4-connectivity), never across a corner
//     alone; each Polygon is one 4-connected set of cells. Where two cells
//     of a code touch only at a corner (a saddle vertex) the tracer pairs
//     the ring edges there so that no ring visits a vertex twice: diagonal
//     neighbours become separate polygons touching at a point, and a hole
//     touching its shell (or another hole) at a corner touches it at a
//     point. All of these are valid in the OGC Simple Features sense.
//   - Orientation (RFC 7946 section 3.1.6): exterior rings
//     counter-clockwise, holes clockwise.
//   - Antimeridian (RFC 7946 section 3.1.9): on a grid that crosses 180 the
//     traced coordinates run east past 180; PolygonizeRFC7946 cuts the
//     raster at 180 and shifts the eastern part by -360, so every longitude
//     lies in [-180, 180].
//   - Coordinates: degrees, rounded to the fewest decimals that hold every
//     cell edge exactly (GeoJSONDecimals, at most 9).
//   - Simplification (only when asked, PolygonizeSimplified with a
//     tolerance in km): the shared boundaries are cut into arcs at nodes
//     (where three or more regions meet, saddles, grid corners and changes
//     along the border), each arc is simplified once by Douglas-Peucker
//     (Douglas and Peucker 1973) in a local equirectangular frame, and both
//     bands beside it use the same result, so no gap or overlap opens; a
//     chord that would touch another segment or sweep over another vertex
//     is refused and its run split, down to the exact cell edges. Kept
//     vertices are a subset of the exact ones.
//
// The laws the polygons obey are checked in the tests (internal/rastertest)
// and against shapely and GDAL's polygonizer (layer/geojson's tests); see
// docs/design.md, "Formats written".
package polygon
