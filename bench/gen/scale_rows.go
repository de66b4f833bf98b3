package main

import (
	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/interp"
)

// rowsOf produces the rows of spec with interp's row-block API: the same
// values as ip.Grid(spec) gives for those rows.
func rowsOf(ip *interp.Interpolator, spec grid.Spec) geotiff.RowFunc {
	return func(row0, n int, dst []float32) error { return ip.Rows(spec, row0, n, dst) }
}
