package grid

import (
	"math"
	"testing"
)

// The expected grids below are worked by hand from the rule of NewSpec
// (docs/design.md, gridding): every edge snapped OUTWARD to a multiple of the resolution,
// west > east crossing the antimeridian (RFC 7946 section 5.2), 0-360
// longitudes accepted, latitudes kept within the poles.
func TestNewSpecTable(t *testing.T) {
	cases := []struct {
		name                string
		w, s, e, n, res     float64
		west, north         float64
		cols, rows          int
		east, south         float64
		crossesAntimeridian bool
	}{
		{"exact bbox", -10, 30, 10, 50, 0.5, -10, 50, 40, 40, 10, 30, false},
		{"unaligned bbox", -10.03, 30.01, 9.98, 49.99, 0.1, -10.1, 50, 201, 200, 10, 30, false},
		{"negative coords", -75.2, -40.7, -60.1, -20.05, 0.25, -75.25, -20, 61, 83, -60, -40.75, false},
		{"decimal noise 0.3/0.1", -0.3, 0, 0.3, 0.3, 0.1, -0.3, 0.3, 6, 3, 0.3, 0, false},
		{"antimeridian west>east", 170, -20, -170, 0, 1, 170, 0, 20, 20, 190, -20, true},
		{"antimeridian unaligned", 179.55, -1, -179.45, 1, 0.1, 179.5, 1, 11, 20, 180.6, -1, true},
		{"east given as 0-360", 170, -20, 190, 0, 1, 170, 0, 20, 20, 190, -20, true},
		{"west given as 0-360", 190, 10, 200, 20, 1, -170, 20, 10, 10, -160, 10, false},
		{"west 0-360 east -180..180", 350, 0, 10, 5, 1, -10, 5, 20, 5, 10, 0, false},
		{"global -180..180", -180, -90, 180, 90, 1, -180, 90, 360, 180, 180, -90, false},
		{"global 0..360", 0, -90, 360, 90, 1, 0, 90, 360, 180, 360, -90, true},
		{"global unaligned start", -10.5, -10, 350.5, 10, 1, -11, 10, 360, 20, 349, -10, true},
		{"poles clamp at res dividing 90", 0, -89.95, 1, 89.95, 0.1, 0, 90, 10, 1800, 1, -90, false},
		// 0.7 does not divide 90: the outermost multiples within the poles
		// are +/-128*0.7 = +/-89.6.
		{"poles clamp at res not dividing 90", 0, -90, 0.7, 90, 0.7, 0, 89.6, 1, 256, 0.7, -89.6, false},
		{"tiny bbox inside one cell", 10.01, 20.01, 10.02, 20.02, 1, 10, 21, 1, 1, 11, 20, false},
		{"west -180 exactly, east 180 exactly, res 5", -180, -60, 180, 60, 5, -180, 60, 72, 24, 180, -60, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := NewSpec(c.w, c.s, c.e, c.n, c.res)
			if err != nil {
				t.Fatal(err)
			}
			if !specClose(s.West, c.west) || !specClose(s.North, c.north) || s.Cols != c.cols || s.Rows != c.rows || s.Res != c.res {
				t.Fatalf("got %+v, want West %g North %g Cols %d Rows %d", s, c.west, c.north, c.cols, c.rows)
			}
			if !specClose(s.East(), c.east) || !specClose(s.South(), c.south) {
				t.Errorf("East %g South %g, want %g %g", s.East(), s.South(), c.east, c.south)
			}
			if s.CrossesAntimeridian() != c.crossesAntimeridian {
				t.Errorf("CrossesAntimeridian = %v, want %v", s.CrossesAntimeridian(), c.crossesAntimeridian)
			}
			if s.Len() != c.cols*c.rows {
				t.Errorf("Len %d, want %d", s.Len(), c.cols*c.rows)
			}
		})
	}
}

// Snapping must give the float64 nearest the decimal edge, not k*0.1 with
// its rounding noise (0.30000000000000004), so that GeoTIFF georeferencing
// and printed bboxes read as the user wrote them.
func TestNewSpecExactDecimalEdges(t *testing.T) {
	s, err := NewSpec(-0.3, 0.7, 0.3, 1.3, 0.1)
	if err != nil {
		t.Fatal(err)
	}
	if s.West != -0.3 || s.North != 1.3 {
		t.Errorf("West %v North %v, want exactly -0.3 and 1.3", s.West, s.North)
	}
}

func TestNewSpecErrors(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name            string
		w, s, e, n, res float64
	}{
		{"NaN west", nan, 0, 1, 1, 0.1},
		{"Inf north", 0, 0, 1, inf, 0.1},
		{"NaN res", 0, 0, 1, 1, nan},
		{"Inf res", 0, 0, 1, 1, inf},
		{"zero res", 0, 0, 1, 1, 0},
		{"negative res", 0, 0, 1, 1, -0.1},
		{"res above 90", 0, 0, 1, 1, 91},
		{"south equals north", 0, 5, 1, 5, 0.1},
		{"south above north", 0, 6, 1, 5, 0.1},
		{"south below -90", 0, -91, 1, 5, 0.1},
		{"north above 90", 0, 0, 1, 90.5, 0.1},
		{"west below -180", -181, 0, 1, 1, 0.1},
		{"east above 360", 0, 0, 361, 1, 0.1},
		{"zero width", 10, 0, 10, 1, 0.1},
		{"zero width in mixed forms", 190, 0, -170, 1, 0.1},
		{"too many cells", -180, -90, 180, 90, 1e-5},
		{"subnormal res", -180, -90, 180, 90, 5e-324},
		{"res over MaxRes", 0, 80, 10, 90, 50},
		// res 7 near the pole: the multiples around are 77, 84 and 91, and
		// 91 is past the pole, so the bbox 85..90 holds no whole cell.
		{"no whole cell below the pole", 0, 85, 10, 90, 7},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if s, err := NewSpec(c.w, c.s, c.e, c.n, c.res); err == nil {
				t.Fatalf("NewSpec(%g,%g,%g,%g,%g) = %+v, want an error", c.w, c.s, c.e, c.n, c.res, s)
			}
		})
	}
}

func TestGlobal(t *testing.T) {
	s, err := Global(0.1)
	if err != nil {
		t.Fatal(err)
	}
	// 360/0.1 by 180/0.1 cells: 6.48 M (the grid of the performance targets, docs/design.md).
	if s.Cols != 3600 || s.Rows != 1800 || s.West != -180 || s.North != 90 || s.Len() != 6_480_000 {
		t.Fatalf("Global(0.1) = %+v", s)
	}
	if s.CrossesAntimeridian() {
		t.Error("a -180..180 grid does not cross the antimeridian")
	}
}

// Cell(Center(c, r)) is (c, r) for every cell, in every longitude form.
func TestCenterCellRoundTrip(t *testing.T) {
	specs := []Spec{
		specMust(t, -10.03, 30.01, 9.98, 49.99, 0.1),
		specMust(t, 170, -20, -170, 0, 0.25), // crosses the antimeridian
		specMust(t, -180, -90, 180, 90, 2),
		specMust(t, 0, 60, 0.7, 89.9, 0.7),
	}
	for _, s := range specs {
		for r := 0; r < s.Rows; r++ {
			for c := 0; c < s.Cols; c++ {
				lon, lat := s.Center(c, r)
				if lon <= s.West || lon >= s.East() || lat <= s.South() || lat >= s.North {
					t.Fatalf("%v: centre of %d,%d = %g,%g outside the grid", s, c, r, lon, lat)
				}
				for _, l := range []float64{lon, lon - 360, lon + 360} {
					gc, gr, ok := s.Cell(l, lat)
					if !ok || gc != c || gr != r {
						t.Fatalf("%v: Cell(%g,%g) = %d,%d,%v, want %d,%d", s, l, lat, gc, gr, ok, c, r)
					}
				}
				if i := s.Index(c, r); i != r*s.Cols+c {
					t.Fatalf("Index(%d,%d) = %d", c, r, i)
				}
			}
		}
	}
}

func TestCenterValues(t *testing.T) {
	s := specMust(t, 170, -20, -170, 0, 1)
	// Hand-worked: the first cell spans 170..171 E, 0..1 S.
	if lon, lat := s.Center(0, 0); lon != 170.5 || lat != -0.5 {
		t.Errorf("Center(0,0) = %g,%g", lon, lat)
	}
	// The last column spans 189..190, i.e. 171..170 W, written past 180.
	if lon, lat := s.Center(19, 19); lon != 189.5 || lat != -19.5 {
		t.Errorf("Center(19,19) = %g,%g", lon, lat)
	}
	if n, so := s.RowLats(3); n != -3 || so != -4 {
		t.Errorf("RowLats(3) = %g,%g", n, so)
	}
}

// The edge rule of Spec.Cell: inner edges belong to the cell east or south
// of them, the grid's own east and south edges to the last cell.
func TestCellEdges(t *testing.T) {
	s := specMust(t, 10, 20, 14, 23, 1) // 4 x 3 cells
	cases := []struct {
		lon, lat float64
		col, row int
		ok       bool
	}{
		{10, 23, 0, 0, true},   // north-west corner
		{11, 23, 1, 0, true},   // inner meridian: cell to the east
		{10.5, 22, 0, 1, true}, // inner parallel: cell to the south
		{14, 22.5, 3, 0, true}, // east edge: last column
		{12.5, 20, 2, 2, true}, // south edge: last row
		{14, 20, 3, 2, true},   // south-east corner
		{370, 21.5, 0, 1, true},
		{-350, 21.5, 0, 1, true},
		{9.999, 21, 0, 0, false},
		{14.001, 21, 0, 0, false},
		{12, 23.001, 0, 0, false},
		{12, 19.999, 0, 0, false},
		{math.NaN(), 21, 0, 0, false},
		{12, math.NaN(), 0, 0, false},
		{math.Inf(1), 21, 0, 0, false},
		{12, math.Inf(-1), 0, 0, false},
		{12, -1e300, 0, 0, false},
	}
	for _, c := range cases {
		col, row, ok := s.Cell(c.lon, c.lat)
		if ok != c.ok || (ok && (col != c.col || row != c.row)) {
			t.Errorf("Cell(%g,%g) = %d,%d,%v, want %d,%d,%v", c.lon, c.lat, col, row, ok, c.col, c.row, c.ok)
		}
	}
}

// On a grid across the antimeridian, a point at 175 W is found whether it
// is written -175 or 185.
func TestCellAntimeridian(t *testing.T) {
	s := specMust(t, 170, -20, -170, 0, 1)
	if s.East() <= 180 {
		t.Fatalf("East %g should run past 180", s.East())
	}
	for _, lon := range []float64{-175.5, 184.5} {
		c, r, ok := s.Cell(lon, -10.5)
		if !ok || c != 14 || r != 10 {
			t.Errorf("Cell(%g,-10.5) = %d,%d,%v, want 14,10", lon, c, r, ok)
		}
	}
	// 180 itself is an inner meridian here: the cell east of it (column 10).
	for _, lon := range []float64{180, -180} {
		if c, _, ok := s.Cell(lon, -10.5); !ok || c != 10 {
			t.Errorf("Cell(%g) column %d,%v, want 10", lon, c, ok)
		}
	}
	if _, _, ok := s.Cell(0, -10); ok {
		t.Error("0 E is outside a 170 E..170 W grid")
	}
}

// GDAL's affine geotransform (GDAL Raster Data Model): Xgeo = GT0 + col*GT1
// + row*GT2, Ygeo = GT3 + col*GT4 + row*GT5, at the top-left corner of a
// pixel; north-up means GT2 = GT4 = 0 and GT5 < 0.
func TestGeoTransform(t *testing.T) {
	s := specMust(t, 170, -20, -170, 0, 0.5)
	gt := s.GeoTransform()
	if gt != [6]float64{170, 0.5, 0, 0, 0, -0.5} {
		t.Fatalf("GeoTransform = %v", gt)
	}
	for _, cr := range [][2]int{{0, 0}, {3, 7}, {s.Cols - 1, s.Rows - 1}} {
		c, r := float64(cr[0]), float64(cr[1])
		x := gt[0] + (c+0.5)*gt[1] + (r+0.5)*gt[2]
		y := gt[3] + (c+0.5)*gt[4] + (r+0.5)*gt[5]
		lon, lat := s.Center(cr[0], cr[1])
		if !specClose(x, lon) || !specClose(y, lat) {
			t.Errorf("cell %v: geotransform centre %g,%g, Center %g,%g", cr, x, y, lon, lat)
		}
	}
}

func TestSpecString(t *testing.T) {
	s := specMust(t, -10, 30, 10, 50, 0.5)
	want := "40 x 40 cells of 0.5 deg, west -10 south 30 east 10 north 50"
	if got := s.String(); got != want {
		t.Errorf("String = %q, want %q", got, want)
	}
}

func specMust(t testing.TB, w, s, e, n, res float64) Spec {
	t.Helper()
	sp, err := NewSpec(w, s, e, n, res)
	if err != nil {
		t.Fatal(err)
	}
	return sp
}

func specClose(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Max(1, math.Abs(b)) }
