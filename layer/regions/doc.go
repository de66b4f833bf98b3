// Package regions writes the per-region statistics: regions.csv and
// regions.json, how much of each region lies in each band and how much is
// in drought. In the data flow (index raster -> band raster -> layers) it is
// a layer made from the band raster and, for the mean z, the index raster,
// summed over each region by package region (region.Zonal gives one
// region.ZonalStats per region). WriteCSV(w, stats, s) and
// WriteJSON(w, stats, s, meta) write to an io.Writer and return an error;
// the caller writes the file. Header and Record give the CSV's header and
// rows, which the history file (package history) repeats after a date.
//
// regions.csv has one row per region, in the order given, with the columns
//
//	region,area_km2,covered_km2,covered_pct,<key>_pct...,in_drought_pct,mean_z
//
// one <key>_pct per band of the scheme, in scheme order. area_km2 is the
// part of the region inside the grid and covered_km2 the part of it with a
// band (not masked for too few stations), both in km^2; covered_pct is
// covered_km2 as percent of area_km2. The band shares and in_drought_pct
// (the bands the scheme flags as drought; by default codes 1-3, z <= -1.0)
// are percent of the covered area, not of the whole region; mean_z is the
// area-weighted mean index (SPI units). Each cell counts with the fraction
// of its area inside the region (the region clipped to the cell, planar in
// degrees within a cell) times its area on the WGS84 ellipsoid (a =
// 6378137 m, 1/f = 298.257223563). Numbers have 3 decimals; a share that is
// undefined (nothing covered) is empty.
//
// regions.json holds the same figures, plus each band's and the in-drought
// area in km^2, the scheme's bands (code, key, label, colour, drought flag,
// z range), the method in words and the caution (Caution): the shares are
// computed from interpolated estimates, not official drought declarations.
// See docs/design.md, "Formats written".
package regions
