// Package pipeline holds the run: a Job describes everything one run needs
// (inputs, grid, interpolation, bands, regions, layers, output directory) and
// is validated once, by Validate, whether the command line's flags, a job file
// (ParseJobFile) or the demo (DemoJob) made it; Run takes it through the data
// flow in order: the index step when the job names window totals or daily
// records (the window's totals then computed in memory, ReadDaily,
// ComputeIndexDaily), reading the stations (package station), then one pass
// over the grid's rows (pass.go), a block of rows at a time: interpolating the
// index (interp), classifying it into band codes and tallying the band shares
// (bands), while each layer takes the block as it comes (the GeoTIFF encoders,
// the polygon tracer, the statistics of the regions, the preview raster the
// picture and the page are drawn from), so no raster is held whole; then the
// other layers (layer/...) and the manifest (manifest) written into a staging
// directory that package publish swaps in place of the output directory, then
// the history rows (history). Compute stops before the files, for callers that
// want the figures and both rasters in memory; Stats gives a band raster's
// statistics per region. A job made to run by itself every day goes through
// RunJob (or PlanDay, Run for each job, Finish): its date may be "today" or
// "yesterday" on the job's clock in its time zone, its daily records are read
// once for all windows, each window gets its own output directory (Out/30d,
// Out/90d), and with Archive each day its own (Out/YYYY-MM-DD) with Out/latest
// pointing at the newest. Every layer says what it shows (Job.Describe: the
// kind, window and date). pipeline sits above every library package and below
// cmd/drygrid, which only turns flags into a Job and prints.
package pipeline
