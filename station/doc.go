// Package station reads the project's station tables and computes the index
// step. It holds the table reader, station value tables (the input of
// gridding: one SPI or percentile per station), window-total tables (one
// total per station and year) and ComputeIndex, which turns a station list
// and its window totals into each station's percentile and SPI for the
// target year with the statistics of package spi. In the data flow it comes
// before interpolation: it yields the per-station z that is gridded.
//
// Tables are CSV or TSV with a header row, the delimiter sniffed from the
// header line (tab, comma or semicolon), optionally gzip-compressed (known by
// its magic bytes, not its name), with a UTF-8 BOM and CRLF line ends
// accepted. Lines are counted from 1 as in the file, so errors name the
// file, line and column. Columns are found by name, case-insensitively,
// unless the caller names them:
//
//	station id   station, id, station_id, site     (IDAliases)
//	latitude     latitude, lat                      (LatAliases)
//	longitude    longitude, lon, long, lng          (LonAliases)
//	spi          spi                                (SPIAliases)
//	percentile   percentile, pct, percent           (PercentileAliases)
//	total        total, total_mm, precip, value     (TotalAliases)
//	year         year                               (YearAliases)
//
// Longitudes are normalised to [-180, 180). A value table's percentiles
// become z through spi.PercentileToZ; an SPI beyond +/-5 (SPILimit) is
// rejected as implausible. In the index step a station's reference sample is
// its non-missing totals in the reference period (by default every year it
// has, the target year included); it needs IndexOptions.MinYears of them
// (DefaultMinYears, 30) and a target-year total, else its SPI and percentile
// are empty with a reason.
// A station whose gamma fit Anderson-Darling rejects at 5 % takes the SPI
// of its empirical distribution instead (IndexOptions.PoorFit: empirical,
// keep or drop). An SPI beyond +/-5 is held there and noted. Results do not depend on the
// number of workers.
//
// See docs/design.md for the command line that uses these tables.
package station
