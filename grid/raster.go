package grid

import "math"

// NoDataIndex is the no-data value of index rasters (index.tif: -9999).
const NoDataIndex float32 = -9999

// Float32 is a row-major raster of float32 values on a grid; cells equal to
// NoData hold no value.
type Float32 struct {
	Spec   Spec
	Data   []float32
	NoData float32
}

// NewFloat32 makes a raster filled with nodata.
func NewFloat32(s Spec, nodata float32) *Float32 {
	d := make([]float32, s.Len())
	for i := range d {
		d[i] = nodata
	}
	return &Float32{Spec: s, Data: d, NoData: nodata}
}

// At gives the value of cell (col, row) and whether it holds data.
func (r *Float32) At(col, row int) (float32, bool) {
	v := r.Data[r.Spec.Index(col, row)]
	return v, v != r.NoData && !math.IsNaN(float64(v))
}

// Uint8 is a row-major raster of small codes on a grid; NoData (usually 0)
// marks cells without a value.
type Uint8 struct {
	Spec   Spec
	Data   []uint8
	NoData uint8
}

// NewUint8 makes a raster filled with nodata.
func NewUint8(s Spec, nodata uint8) *Uint8 {
	d := make([]uint8, s.Len())
	if nodata != 0 {
		for i := range d {
			d[i] = nodata
		}
	}
	return &Uint8{Spec: s, Data: d, NoData: nodata}
}

// At gives the code of cell (col, row) and whether it holds data.
func (r *Uint8) At(col, row int) (uint8, bool) {
	v := r.Data[r.Spec.Index(col, row)]
	return v, v != r.NoData
}
