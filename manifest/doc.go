// Package manifest writes the provenance record of a run, manifest.json in
// the output directory: what went in, what came out and how it was made. In
// the data flow (index raster -> band raster -> layers) it is written last,
// after every other layer, and lists them all, so that a reader can check
// that the files in a directory are the ones the run wrote and repeat the
// run.
//
// A Manifest holds: the format (Format, changed when a member changes
// meaning), the software and its version, the command, the caution (the
// outputs are interpolated estimates, not official drought declarations),
// the parameters used, the input files (Input: path, role, size and
// SHA-256), the output files (Outputs: every regular file of the directory
// but the manifest, with its path relative to the directory, size and
// SHA-256), counts (such as the stations read, used and rejected and the
// cells covered), the grid (CRS, extent, resolution, size), and timings in
// seconds; the caller fills the maps. SHA-256 is that of FIPS 180-4, in
// lower-case hex, as sha256sum prints it. Every member but the timings depends on the inputs
// and parameters alone, so two runs on the same inputs write the same
// manifest apart from the timings, whatever the number of cores.
//
// Encode(m) renders the record as indented JSON ([]byte, error), with
// inputs sorted by role then path and outputs by path; Write beside it
// writes dir/manifest.json through a temporary name renamed at the end.
// ParseOutputs reads the output paths back from a manifest, refusing any
// path that could name a file outside the directory, so that the files
// drygrid wrote can be told from a user's when an output directory is
// replaced.
package manifest
