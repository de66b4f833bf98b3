// Package chart draws the history chart, a PNG, from the history file. In
// the data flow (index raster -> band raster -> layers) it is a layer made
// from the layers of earlier runs: each run appends its per-region
// statistics to the history file (package history) and the chart reads that
// file back. Encode(w, h, opt) error writes the PNG to an io.Writer and
// WriteFile beside it writes the file through a temporary name renamed at
// the end. A date range is cut from the history before drawing
// (history.History.Between).
//
// Two views:
//
//   - All regions (Options.Region empty): the share of each region's covered
//     area in drought (percent, "in drought" as the band scheme defines it),
//     one line per region, at most Options.RegionsLimit of them (default 5,
//     those with the highest latest share; the caption says how many were
//     left out), each with its own colour and dash pattern so that lines
//     stay apart in grey and for common colour-vision deficiencies. Points
//     carry markers only when they are few and not daily.
//   - One region (Options.Region): its covered area's share in each band
//     stacked over time, an area chart in the scheme's colours and order,
//     driest at the bottom, with the share in drought (the history's
//     in_drought_pct) as a black line over it. StackRegion prepares the
//     stacked series from the history rows; it is the part the tests check
//     against the rows.
//
// Both have a title, axes labelled with their units, a legend beside the
// plot (each entry with its latest value), and a caption with the caution:
// these are interpolated estimates from a station network, not official
// drought declarations; the reader is to consult the national
// meteorological or hydrological service. A missing day is a gap, never
// zero. The chart is drawn with gonum/plot, its text in the Go fonts
// (regular and bold, from golang.org/x/image/font/gofont), the fonts
// map.png draws with, through a font cache of its own: gonum/plot's
// default font and its package-level state are not used.
package chart
