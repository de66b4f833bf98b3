// Package pipeline holds the run: a Job describes everything one run needs
// (inputs, grid, interpolation, bands, regions, layers, output directory)
// and is validated once, by Validate, whether the command line's flags, a
// job file (ParseJobFile) or the demo (DemoJob) made it; Run takes it
// through the data flow in order: the index step when the job names window
// totals, reading the stations (package station), interpolating the index
// raster (interp), classifying it into the band raster and tallying the
// band shares (bands), the statistics of the regions (region), the layers
// (geotiff, layer/...) and the manifest (manifest) written into a staging
// directory that package publish swaps in place of the output directory,
// then the history rows (history). Compute stops before the files, for
// callers that want the figures in memory; Stats gives a band raster's
// statistics per region. pipeline sits above every library package and
// below cmd/drygrid, which only turns flags into a Job and prints.
package pipeline
