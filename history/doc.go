// Package history keeps the area-in-drought history file: a CSV with one row
// per date and region, so that the share of each region in drought can be
// followed from day to day. In the data flow (index raster -> band raster ->
// layers) it sits after the per-region statistics: each run with a date
// appends that day's rows (Append) made from the same statistics as
// regions.csv, and the history chart (layer/chart) reads the file back
// (Read, Parse) into a History.
//
// The file's columns are date (YYYY-MM-DD) followed by the columns of
// regions.csv (Header; see package layer/regions):
//
//	date,region,area_km2,covered_km2,covered_pct,<key>_pct...,in_drought_pct,mean_z
//
// with the same meanings: shares in percent of the covered area, cells
// weighted by the fraction inside the region and by their area on the WGS84
// ellipsoid. Rows are keyed by (date, region): appending a date again
// replaces that date's rows instead of adding to them, and rows stay in
// date order. The header fixes the band scheme: a file written with another
// scheme is refused and left untouched. The file is rewritten through a
// temporary name renamed at the end, so a failure leaves the earlier file
// whole, and Append holds a lock beside the file (.NAME.drygrid-lock,
// removed when done) from its read to its rename, so two runs appending to
// one history at once both keep their rows. Reading finds the date, region
// and in_drought_pct columns by name, whatever the scheme, and the band
// shares (History.Bands, History.BandPct) in the <key>_pct columns, in the
// file's order; History.Between cuts a date range.
package history
