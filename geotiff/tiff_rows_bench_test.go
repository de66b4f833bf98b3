package geotiff

import (
	"testing"

	"drygrid/bands"
)

// BenchmarkEncodeIndexBandsTIFFRowsGlobal streams the global 0.1 deg
// benchmark field (tiffGlobalField) into the index and band COGs through
// the row encoder, rows copied from memory; "whole" is the same work
// through EncodeIndex, the classification and EncodeBands.
func BenchmarkEncodeIndexBandsTIFFRowsGlobal(b *testing.B) {
	r := tiffGlobalField(b)
	s := bands.Default()
	opt := DefaultOptions()
	cols := r.Spec.Cols
	c := bands.NewClassifier(s)
	produce := func(row0, n int, dst []float32, codes []uint8) error {
		copy(dst, r.Data[row0*cols:(row0+n)*cols])
		c.Row(codes, dst, r.NoData)
		return nil
	}
	b.Run("rows", func(b *testing.B) {
		var ci, cb tiffCounter
		cpu := tiffCPUSeconds()
		for b.Loop() {
			ci.n, cb.n = 0, 0
			if err := EncodeIndexBandsRows(&ci, &cb, r.Spec, r.NoData, s, produce, opt); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric((tiffCPUSeconds()-cpu)/float64(b.N), "cpu-s/op")
		b.ReportMetric(float64(ci.n+cb.n), "file-bytes")
	})
	b.Run("whole", func(b *testing.B) {
		var ci, cb tiffCounter
		cpu := tiffCPUSeconds()
		for b.Loop() {
			ci.n, cb.n = 0, 0
			if err := EncodeIndex(&ci, r, opt); err != nil {
				b.Fatal(err)
			}
			if err := EncodeBands(&cb, tiffTestBands(r, s), s, opt); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric((tiffCPUSeconds()-cpu)/float64(b.N), "cpu-s/op")
		b.ReportMetric(float64(ci.n+cb.n), "file-bytes")
	})
}
