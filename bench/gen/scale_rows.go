package main

import (
	"drygrid/bands"
	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/interp"
)

// rowsOf produces the rows of spec with interp's row-block API (the same
// values as ip.Grid(spec) gives for those rows) and their codes in s.
func rowsOf(ip *interp.Interpolator, spec grid.Spec, s *bands.Scheme) geotiff.RowFunc {
	c := bands.NewClassifier(s)
	return func(row0, n int, dst []float32, codes []uint8) error {
		if err := ip.Rows(spec, row0, n, dst); err != nil {
			return err
		}
		if codes != nil {
			c.Row(codes, dst, grid.NoDataIndex)
		}
		return nil
	}
}
