package grid

import (
	"errors"
	"fmt"
	"math"
)

// Spec is a regular lat-lon grid in degrees (EPSG:4326), rows from north to
// south and columns from west to east. Cells are areas (GeoTIFF PixelIsArea):
// cell (col, row) spans [West+col*Res, West+(col+1)*Res] in longitude and
// [North-(row+1)*Res, North-row*Res] in latitude.
//
// A grid that crosses the antimeridian has West < 180 < East: its longitudes
// run east past 180 (RFC 7946 section 5.2 bboxes with west > east map to this).
type Spec struct {
	West  float64 // longitude of the western edge, in [-180, 180)
	North float64 // latitude of the northern edge, at most 90
	Res   float64 // cell size in degrees, the same in both axes
	Cols  int
	Rows  int
}

// snapTol absorbs floating-point noise when snapping edges to multiples of
// the resolution (0.3/0.1 is 2.9999999999999996, not 3).
const snapTol = 1e-9

// MaxCells is the largest grid NewSpec makes: 4e8 cells. A run that holds
// its rasters in memory needs 5 bytes a cell (a Float32 index and a UInt8
// band code), 2 GB at the limit; a global grid at 0.01 deg (6.5e8 cells)
// is over it, one at 0.02 deg (1.6e8) within. The limit also keeps an
// absurdly fine resolution an error, not an integer overflow or an
// allocation failure. It is the one limit on grid size in drygrid.
const MaxCells = 400_000_000

// MaxRes is the coarsest cell size NewSpec takes, in degrees: 10. Drought
// maps from station networks use cells of a few km to a few tens of km
// (0.01 to 0.5 deg); at 10 deg a cell is over 1000 km wide, more than
// three times the default search radius. It is the one limit on the
// resolution in drygrid.
const MaxRes = 10

// ErrTooLarge is the error (wrapped) of NewSpec for a grid of more than
// MaxCells cells.
var ErrTooLarge = errors.New("over the limit of grid.MaxCells")

// NewSpec builds a grid covering the bbox west, south, east, north at
// resolution res, with every edge snapped outward to a multiple of res.
// west > east means the bbox crosses the antimeridian. Latitudes are kept
// inside [-90, 90] and the width inside 360 degrees.
func NewSpec(west, south, east, north, res float64) (Spec, error) {
	for _, v := range []float64{west, south, east, north, res} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Spec{}, errors.New("grid: bbox and resolution must be finite numbers")
		}
	}
	if res <= 0 || res > MaxRes {
		return Spec{}, fmt.Errorf("grid: resolution %g deg must be in (0, %d]", res, MaxRes)
	}
	if south < -90 || north > 90 || south >= north {
		return Spec{}, fmt.Errorf("grid: south %g and north %g must satisfy -90 <= south < north <= 90", south, north)
	}
	if west < -180 || west > 360 || east < -180 || east > 360 {
		return Spec{}, fmt.Errorf("grid: west %g and east %g must lie in [-180, 360]", west, east)
	}
	if west == east {
		return Spec{}, fmt.Errorf("grid: west and east are both %g: the bbox has no width", west)
	}
	w0, e0 := west, east      // as given, for messages
	whole := east-west >= 360 // e.g. 0,360 or -180,180: all longitudes
	if west >= 180 {
		west -= 360
	}
	if east > 180 {
		east -= 360
	}
	switch {
	case whole:
		east = west + 360
	case west > east:
		east += 360 // crosses the antimeridian
	}
	w := multiple(math.Floor(west/res+snapTol), res)
	e := multiple(math.Ceil(east/res-snapTol), res)
	s := multiple(math.Floor(south/res+snapTol), res)
	n := multiple(math.Ceil(north/res-snapTol), res)
	// Keep inside the poles: the outermost whole multiples of res within +/-90.
	if n > 90 {
		n = multiple(math.Floor(90/res+snapTol), res)
	}
	if s < -90 {
		s = multiple(math.Ceil(-90/res-snapTol), res)
	}
	fc := min(math.Round((e-w)/res), math.Floor(360/res+snapTol))
	fr := math.Round((n - s) / res)
	if !(fc*fr <= MaxCells) { // also catches NaN from a subnormal res
		return Spec{}, fmt.Errorf("grid: bbox %g,%g,%g,%g at %g deg needs %.4g cells, %w (%d)", w0, south, e0, north, res, fc*fr, ErrTooLarge, MaxCells)
	}
	cols, rows := int(fc), int(fr)
	if cols < 1 || rows < 1 {
		return Spec{}, fmt.Errorf("grid: bbox %g,%g,%g,%g at %g deg holds no whole cell", w0, south, e0, north, res)
	}
	if w < -180 {
		w += 360
	}
	return Spec{West: w, North: n, Res: res, Cols: cols, Rows: rows}, nil
}

// multiple is k*res, computed as k/(1/res) when 1/res is a whole number so
// that decimal resolutions give the nearest float64 (3/10 is 0.3, 3*0.1 is
// 0.30000000000000004).
func multiple(k, res float64) float64 {
	if inv := math.Round(1 / res); math.Abs(1/res-inv) < snapTol*inv {
		return k / inv
	}
	return k * res
}

// Global is the whole-Earth grid at resolution res (res should divide 180).
func Global(res float64) (Spec, error) { return NewSpec(-180, -90, 180, 90, res) }

// Len is the number of cells.
func (s Spec) Len() int { return s.Cols * s.Rows }

// East is the longitude of the eastern edge; above 180 when the grid crosses
// the antimeridian.
func (s Spec) East() float64 { return s.edge(s.West, float64(s.Cols)) }

// South is the latitude of the southern edge.
func (s Spec) South() float64 { return s.edge(s.North, -float64(s.Rows)) }

// edge is from + n*Res; when from is a whole multiple of Res (as NewSpec
// makes it) the sum is formed as a multiple too, so that decimal
// resolutions give clean edges (-118.7, not -118.70000000000002).
func (s Spec) edge(from, n float64) float64 {
	k := from / s.Res
	if rk := math.Round(k); math.Abs(k-rk) < snapTol*max(1, math.Abs(k)) {
		return multiple(rk+n, s.Res)
	}
	return from + n*s.Res
}

// CrossesAntimeridian reports whether the grid runs east past 180.
func (s Spec) CrossesAntimeridian() bool { return s.East() > 180+snapTol*s.Res }

// Center is the centre of cell (col, row): longitude (possibly above 180 on
// a grid crossing the antimeridian) and latitude.
func (s Spec) Center(col, row int) (lon, lat float64) {
	return s.West + (float64(col)+0.5)*s.Res, s.North - (float64(row)+0.5)*s.Res
}

// RowLats gives the northern and southern edge latitudes of a row.
func (s Spec) RowLats(row int) (north, south float64) {
	return s.North - float64(row)*s.Res, s.North - float64(row+1)*s.Res
}

// Index is the offset of cell (col, row) in a row-major raster.
func (s Spec) Index(col, row int) int { return row*s.Cols + col }

// Cell finds the cell holding the point lon, lat (any longitude form); ok is
// false outside the grid. Points on an inner edge belong to the cell east or
// south of it; the grid's eastern and southern edges belong to the last cell.
func (s Spec) Cell(lon, lat float64) (col, row int, ok bool) {
	x := math.Mod(lon-s.West, 360)
	if x < 0 {
		x += 360
	}
	fc := x / s.Res
	fr := (s.North - lat) / s.Res
	// Compare as floats first: NaN, Inf or a huge value must not reach the
	// int conversion, whose result is then implementation-defined.
	if !(fc >= 0 && fc < float64(s.Cols)+1 && fr >= 0 && fr < float64(s.Rows)+1) {
		return 0, 0, false
	}
	col, row = int(math.Floor(fc)), int(math.Floor(fr))
	if col == s.Cols && fc-float64(s.Cols) < snapTol {
		col--
	}
	if row == s.Rows && fr-float64(s.Rows) < snapTol {
		row--
	}
	if fr < 0 || col < 0 || col >= s.Cols || row < 0 || row >= s.Rows {
		return 0, 0, false
	}
	return col, row, true
}

// GeoTransform is the GDAL affine transform of the grid:
// x = gt[0] + col*gt[1], y = gt[3] + row*gt[5] at cell corners.
func (s Spec) GeoTransform() [6]float64 {
	return [6]float64{s.West, s.Res, 0, s.North, 0, -s.Res}
}

// String is a one-line description for summaries and logs.
func (s Spec) String() string {
	return fmt.Sprintf("%d x %d cells of %g deg, west %g south %g east %g north %g",
		s.Cols, s.Rows, s.Res, s.West, s.South(), s.East(), s.North)
}
