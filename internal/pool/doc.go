// Package pool is the project's one worker pool: it spreads the indices
// 0..n-1 over a few goroutines in chunks taken from a shared counter, and
// tells each call which worker runs it, so that a caller can keep scratch
// space per worker. In the data flow (index raster -> band raster -> layers)
// it serves every step that spreads work over the cores: the index step
// (station), the interpolation onto the index raster (interp), the zonal
// statistics (region) and the GeoTIFF encoder's tile compression and
// overviews (geotiff).
//
// Run(n, workers, chunk, fn) calls fn(w, lo, hi) for consecutive chunks
// [lo, hi) that together cover [0, n) once; w names the worker, in [0,
// Count(n, workers, chunk)), and no two calls with the same w run at once.
// Workers gives the number of workers for a request (0 means
// runtime.GOMAXPROCS(0)). Callers put results into slots by index, so what
// they compute does not depend on the number of workers or on the order in
// which chunks are taken: drygrid's output never depends on the number of
// cores (docs/design.md, "Command line").
package pool
