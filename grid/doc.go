// Package grid holds the regular latitude-longitude grid that drygrid maps
// onto: its spec (bounds, resolution, cell centres and edges), typed rasters
// (Float32 for the index, Uint8 for band codes) and cell areas on the WGS84
// ellipsoid. It is the ground floor of the data flow: interpolation writes
// index rasters on a grid, classification turns them into band rasters, and
// regions, polygons and the layer encoders read both; grid itself imports no
// other package of the project.
//
// The grid is in degrees on EPSG:4326, rows from north to south and columns
// from west to east, with square cells of Res degrees whose edges are
// multiples of Res (NewSpec snaps a bbox outward). Cells are areas, as
// GeoTIFF's PixelIsArea: cell (col, row) spans [West+col*Res,
// West+(col+1)*Res] in longitude and [North-(row+1)*Res, North-row*Res] in
// latitude. A bbox with west > east crosses the antimeridian (RFC 7946
// section 5.2); its grid keeps West in [-180, 180) and runs east past 180.
// Index rasters use NoDataIndex (-9999) for no data, band rasters code 0.
//
// Cell areas are exact on the WGS84 ellipsoid (a = 6378137 m,
// 1/f = 298.257223563): the area of a quadrangle is a^2/2 dlon |q(lat2) -
// q(lat1)|, with q Snyder's (1987) authalic function, so the whole globe
// sums to 510,065,621.7 km^2.
//
// See docs/design.md for the project's data flow and formats.
package grid
