package main

import (
	"os"
	"strings"

	"drygrid/bands"
	"drygrid/geotiff"
	"drygrid/grid"
	"drygrid/interp"
)

// scaleWrite streams the rows of spec from the interpolator into the index
// and band COGs (geotiff.WriteIndexBandsRows): only a few blocks of rows
// and the compressed tiles are held. DRYGRID_BENCH_WHOLE=1 grids the whole
// raster first and writes it with WriteIndexTIFF/WriteBandsTIFF instead,
// for comparison.
// It returns the number of cells with a value.
func scaleWrite(ip *interp.Interpolator, spec grid.Spec, out string) (valid int, err error) {
	s := bands.Default()
	opt := geotiff.DefaultOptions()
	bandsPath := strings.TrimSuffix(out, ".tif") + ".bands.tif"
	if os.Getenv("DRYGRID_BENCH_WHOLE") == "1" {
		idx := ip.Grid(spec, nil)
		codes := bands.NewClassifier(s).Raster(idx)
		for _, v := range idx.Data {
			if v != idx.NoData {
				valid++
			}
		}
		if err := geotiff.WriteIndex(out, idx, opt); err != nil {
			return 0, err
		}
		return valid, geotiff.WriteBands(bandsPath, codes, s, opt)
	}
	rows := rowsOf(ip, spec, s)
	count := func(row0, n int, dst []float32, codes []uint8) error {
		if err := rows(row0, n, dst, codes); err != nil {
			return err
		}
		for _, v := range dst {
			if v != grid.NoDataIndex {
				valid++
			}
		}
		return nil
	}
	return valid, geotiff.WriteIndexBandsRows(out, bandsPath, spec, grid.NoDataIndex, s, count, opt)
}
