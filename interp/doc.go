// Package interp grids station values by inverse-distance weighting on the
// sphere. It sits between the per-station values (an SPI, or a percentile
// as z, one per station: packages station and spi) and the bands and
// layers made from the raster (packages bands, region and export): New
// takes the stations (Point) and the settings (Params), Grid and Rows fill
// the cells of a grid.Spec, At estimates one point, Extent proposes the
// grid's bounds and CrossValidate scores the settings. The rules, the same
// for Grid, Rows, At and CrossValidate: distances are great-circle
// distances on a sphere of radius EarthRadiusKm = 6371.0088 km (the mean
// Earth radius R1 of the IUGG's GRS 1980); a cell uses the k = Neighbors
// nearest stations within RadiusKm, ties at the k-th distance broken by
// input order, weighted by d^-Power (Shepard 1968); a cell with fewer than
// MinStations stations within the radius is no data (grid.NoDataIndex), a
// rule applied first; otherwise a cell closer than 1 m to a station takes
// that station's value (the nearest, ties to the first in the input). With
// Sectors = 4 or 8 the directions around a cell are cut into that many
// equal azimuth sectors, clockwise from north, and each sector keeps its
// Neighbors/Sectors nearest stations (rounded down; a sector's unused quota
// goes to no other); the coverage rule is unchanged. Extent is the
// stations' extent widened by the radius (latitudes clipped at the poles,
// longitudes the smallest arc holding every station's search circle,
// across the antimeridian if need be), which grid.NewSpec snaps outward to
// the resolution. CrossValidate is leave-one-out cross-validation: each
// station is predicted from all the others exactly as Grid would at its
// place, and the residuals give RMSE, MAE, bias and band agreement;
// CrossValidateBlocks leaves out whole blocks of about a given size (Block)
// instead (spatial block cross-validation, Roberts et al. 2017). Support
// gives each cell's distance to its nearest station within the radius and
// the number of stations the weighting uses there. The
// output never depends on the number of cores (Params.Workers), nor on
// whether the lane kernel runs in assembly or in Go. At finds a point's
// stations through an R-tree
// (tidwall/rtree); Grid takes each row's stations from the stations sorted
// by latitude, and each cell scans only its span, the range of the row's
// stations in longitude order that its search circle can reach, four cells
// at a time in the lane kernel (package interp/internal/lanes) in the
// common case (power 2, a radius of up to 337 km, no sectors).
package interp
