// Package chart draws the history chart: a PNG line chart of the share of
// each region's covered area in drought (percent, "in drought" as the band
// scheme defines it) over the dates of the history file. In the data flow
// (index raster -> band raster -> layers) it is a layer made from the layers
// of earlier runs: each run appends its per-region statistics to the
// history file (package history) and the chart reads that file back.
// Encode(w, h, opt) error writes the PNG to an io.Writer and WriteFile
// beside it writes the file through a temporary name renamed at the end.
//
// The chart has a title, axes labelled with their units, one line per
// region (at most Options.RegionsLimit, those with the highest latest share
// in drought; the caption says how many were left out), each with its own
// colour and dash pattern so that lines stay apart in grey and for common
// colour-vision deficiencies, a legend beside the plot, and a caption with
// the caution: these are interpolated estimates from a station network,
// not official drought declarations; the reader is to consult the national
// meteorological or hydrological service. It is drawn with gonum/plot.
package chart
