package geojson

import (
	"testing"

	"drygrid/internal/rastertest"
	"drygrid/internal/reftest"
)

// TestSimplifyShapely: simplified layers stay valid for shapely 1.8
// (explain_validity), keep RFC 7946 orientations, never overlap, and for
// rasters without no data the union of the bands still covers exactly the
// grid: no gaps (shapely unary_union area vs cols x rows x res^2).
func TestSimplifyShapely(t *testing.T) {
	py := reftest.Python(t, "shapely", "shapely.validation")
	var cases []polyFC
	for _, sc := range rastertest.SimplifyCases() {
		if !hasValidCodes(sc.C.R) {
			continue
		}
		cases = append(cases, polyFCOf(t, sc.C.Name, sc.C.R, Options{SimplifyKm: sc.Km}))
	}
	polyRunShapely(t, py, cases, len(cases))
}
