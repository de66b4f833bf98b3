package interp

import (
	"encoding/json"
	"math"
	"reflect"
	"strings"
	"testing"

	"drygrid/grid"
	"drygrid/internal/reftest"
)

// cvClassify is a three-band classifier for the tests: z <= -1, -1 < z < 1,
// z >= 1. testdata/crossval_ref.py gets the same cuts as [[-1, "gt"], [1, "ge"]].
func cvClassify(z float64) uint8 {
	switch {
	case z <= -1:
		return 1
	case z < 1:
		return 2
	}
	return 3
}

var cvCuts = []any{[]any{-1.0, "gt"}, []any{1.0, "ge"}}

// cvRef is the output of testdata/crossval_ref.py.
type cvRef struct {
	Pred          []*float64 `json:"pred"`
	N             []int      `json:"n"`
	Counted       []bool     `json:"counted"`
	Total         int        `json:"n_counted"`
	RMSE          float64    `json:"rmse"`
	MAE           float64    `json:"mae"`
	Bias          float64    `json:"bias"`
	BandAgreement float64    `json:"band_agreement"`
}

// runCVRef runs testdata/crossval_ref.py on the points and parameters, with
// cells (lon, lat pairs) when not nil.
func runCVRef(t *testing.T, py string, pts []Point, p Params, cells [][]float64) cvRef {
	t.Helper()
	var ps [][]float64
	for _, q := range pts {
		ps = append(ps, []float64{q.Lon, q.Lat, q.Z})
	}
	job := map[string]any{
		"points": ps, "power": p.Power, "neighbors": p.Neighbors, "radius_km": p.RadiusKm,
		"min_stations": p.MinStations, "sectors": p.Sectors, "cuts": cvCuts,
	}
	if cells != nil {
		job["cells"] = cells
	}
	in, err := json.Marshal(job)
	if err != nil {
		t.Fatal(err)
	}
	var ref cvRef
	if err := json.Unmarshal(reftest.RunPython(t, py, "../testdata/crossval_ref.py", in), &ref); err != nil {
		t.Fatal(err)
	}
	return ref
}

// relClose reports |a-b| <= tol * max(1, |b|).
func relClose(a, b, tol float64) bool { return math.Abs(a-b) <= tol*max(1, math.Abs(b)) }

// TestCrossValidateAgainstNumPy compares the leave-one-out results with
// testdata/crossval_ref.py, an independent NumPy brute force (haversine on
// R = 6371.0088 km, Shepard 1968 weights, the sector rule from the spherical
// forward azimuth): every prediction to 1e-9, the counts exactly, RMSE, MAE
// and bias to 1e-12, band agreement exactly. Fixtures: the invented
// antimeridian and polar station sets of testdata/interp, each with and
// without sectors, at parameters where some stations are not counted.
func TestCrossValidateAgainstNumPy(t *testing.T) {
	py := reftest.Python(t, "numpy")
	cases := []struct {
		name, fixture string
		p             Params
	}{
		{"antimeridian", "antimeridian.csv", Params{Power: 2, Neighbors: 8, RadiusKm: 250, MinStations: 3}},
		{"antimeridian-s4", "antimeridian.csv", Params{Power: 2, Neighbors: 8, RadiusKm: 250, MinStations: 3, Sectors: 4}},
		{"antimeridian-s8-p3", "antimeridian.csv", Params{Power: 3, Neighbors: 16, RadiusKm: 300, MinStations: 4, Sectors: 8}},
		{"polar", "polar.csv", Params{Power: 2, Neighbors: 12, RadiusKm: 300, MinStations: 3}},
		{"polar-s8", "polar.csv", Params{Power: 2, Neighbors: 12, RadiusKm: 300, MinStations: 3, Sectors: 8}},
		{"polar-s4-p1.5", "polar.csv", Params{Power: 1.5, Neighbors: 6, RadiusKm: 800, MinStations: 4, Sectors: 4}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			pts := readFixture(t, tc.fixture)
			got, err := CrossValidate(pts, tc.p, cvClassify)
			if err != nil {
				t.Fatal(err)
			}
			ref := runCVRef(t, py, pts, tc.p, nil)
			if len(ref.Pred) != len(pts) || len(got.Stations) != len(pts) {
				t.Fatalf("reference %d, Go %d results for %d stations", len(ref.Pred), len(got.Stations), len(pts))
			}
			for i, r := range got.Stations {
				if r.Counted != ref.Counted[i] || r.N != ref.N[i] {
					t.Fatalf("station %d: counted %v n %d, reference counted %v n %d", i, r.Counted, r.N, ref.Counted[i], ref.N[i])
				}
				if r.Counted && !relClose(r.Predicted, *ref.Pred[i], 1e-9) {
					t.Fatalf("station %d: predicted %v, reference %v", i, r.Predicted, *ref.Pred[i])
				}
			}
			if got.N != ref.Total || got.N == 0 || got.N == len(pts) {
				t.Fatalf("counted %d, reference %d, of %d (the case should leave some out)", got.N, ref.Total, len(pts))
			}
			for _, f := range []struct {
				name      string
				got, want float64
			}{{"rmse", got.RMSE, ref.RMSE}, {"mae", got.MAE, ref.MAE}, {"bias", got.Bias, ref.Bias}} {
				if !relClose(f.got, f.want, 1e-12) {
					t.Errorf("%s %v, reference %v", f.name, f.got, f.want)
				}
			}
			if got.BandAgreement != ref.BandAgreement {
				t.Errorf("band agreement %v, reference %v", got.BandAgreement, ref.BandAgreement)
			}
			t.Logf("n %d of %d, RMSE %.4f, MAE %.4f, bias %+.4f, bands %.3f", got.N, len(pts), got.RMSE, got.MAE, got.Bias, got.BandAgreement)
		})
	}
}

// TestCrossValidateDeterministic: the result is the same for any number of
// workers (the output never depends on the core count).
func TestCrossValidateDeterministic(t *testing.T) {
	pts := uniformSphere(3000, 7)
	var first CrossValResult
	for i, w := range []int{1, 2, 5} {
		p := DefaultParams()
		p.Sectors, p.Workers = 4, w
		got, err := CrossValidate(pts, p, cvClassify)
		if err != nil {
			t.Fatal(err)
		}
		got.Params.Workers = 0
		if i == 0 {
			first = got
			continue
		}
		if !reflect.DeepEqual(stripNaN(got), stripNaN(first)) {
			t.Fatalf("workers %d: result differs from workers 1", w)
		}
	}
}

// stripNaN replaces NaN predictions by a sentinel so that DeepEqual can
// compare results.
func stripNaN(r CrossValResult) CrossValResult {
	s := make([]Residual, len(r.Stations))
	for i, x := range r.Stations {
		if math.IsNaN(x.Predicted) {
			x.Predicted = -1e300
		}
		s[i] = x
	}
	r.Stations = s
	return r
}

// TestCrossValidateConstantField: a weighted mean of equal values is that
// value (Shepard 1968; a law of any convex combination), so every counted
// residual, RMSE, MAE and bias are 0 and every band agrees.
func TestCrossValidateConstantField(t *testing.T) {
	pts := uniformSphere(2000, 3)
	for i := range pts {
		pts[i].Z = -1.25
	}
	for _, s := range []int{0, 4, 8} {
		p := DefaultParams()
		p.Sectors = s
		got, err := CrossValidate(pts, p, cvClassify)
		if err != nil {
			t.Fatal(err)
		}
		if got.N == 0 || got.RMSE != 0 || got.MAE != 0 || got.Bias != 0 || got.BandAgreement != 1 {
			t.Fatalf("sectors %d: n %d, RMSE %v, MAE %v, bias %v, bands %v; want zero error", s, got.N, got.RMSE, got.MAE, got.Bias, got.BandAgreement)
		}
	}
}

// TestCrossValidateCoverage: a station with fewer than MinStations OTHER
// stations within the radius is not counted (the coverage rule, applied to
// the others), and the figures are over the counted ones. Worked by hand: three stations 0.5 deg apart on the
// equator (55.6 km) and one 20 deg away; radius 100 km, min-stations 1.
// The middle one (z = 0) is predicted from its two neighbours at equal
// distance: (1 + 3) / 2 = 2, residual +2. Each end one is predicted from
// the middle (55.6 km, w = 1/55.6^2) and the other end (111.2 km is beyond
// 100 km): 0, residuals -1 and -3. The far one is not counted.
// RMSE = sqrt((4 + 1 + 9) / 3), MAE = 2, bias = (2 - 1 - 3) / 3.
func TestCrossValidateCoverage(t *testing.T) {
	pts := []Point{{0, 0, 1}, {0.5, 0, 0}, {1, 0, 3}, {20, 0, 0}}
	p := Params{Power: 2, Neighbors: 4, RadiusKm: 100, MinStations: 1}
	got, err := CrossValidate(pts, p, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := []Residual{
		{Predicted: 0, Observed: 1, N: 1, Counted: true},
		{Predicted: 2, Observed: 0, N: 2, Counted: true},
		{Predicted: 0, Observed: 3, N: 1, Counted: true},
		{Predicted: math.NaN(), Observed: 0, N: 0, Counted: false},
	}
	for i, w := range want {
		g := got.Stations[i]
		if g.Counted != w.Counted || g.N != w.N || g.Observed != w.Observed ||
			(w.Counted && math.Abs(g.Predicted-w.Predicted) > 1e-12) || (!w.Counted && !math.IsNaN(g.Predicted)) {
			t.Errorf("station %d: %+v, want %+v", i, g, w)
		}
	}
	if got.N != 3 || math.Abs(got.RMSE-math.Sqrt(14.0/3)) > 1e-12 || math.Abs(got.MAE-2) > 1e-12 ||
		math.Abs(got.Bias-(-2.0/3)) > 1e-12 || !math.IsNaN(got.BandAgreement) {
		t.Errorf("summary n %d RMSE %v MAE %v bias %v bands %v", got.N, got.RMSE, got.MAE, got.Bias, got.BandAgreement)
	}
	// Raised to 2, the ends (one other within 100 km) drop out too.
	p.MinStations = 2
	got, _ = CrossValidate(pts, p, nil)
	if got.N != 1 || got.Stations[0].Counted || !got.Stations[1].Counted {
		t.Errorf("min-stations 2: n %d, want only the middle station", got.N)
	}
	if _, err := CrossValidate(pts, Params{Power: 2, Neighbors: 2, RadiusKm: 100, MinStations: 1, Sectors: 4}, nil); err == nil ||
		!strings.Contains(err.Error(), "neighbors 2 must be at least sectors (4)") {
		t.Errorf("bad params: error %v", err)
	}
}

// TestSectorsGridAgainstNumPy compares Grid with sectors against the NumPy
// sector reference (testdata/crossval_ref.py, cells mode) on small grids
// across the antimeridian and up to the pole, to 1e-5 (float32 output) with
// masks matching exactly, and At at the same cells to 1e-9 with the number
// of stations used.
func TestSectorsGridAgainstNumPy(t *testing.T) {
	py := reftest.Python(t, "numpy")
	cases := []struct {
		name, fixture string
		bbox          [4]float64
		res           float64
		p             Params
	}{
		{"antimeridian-s4", "antimeridian.csv", [4]float64{170, -25, -170, -15}, 0.5,
			Params{Power: 2, Neighbors: 8, RadiusKm: 250, MinStations: 3, Sectors: 4}},
		{"antimeridian-s8", "antimeridian.csv", [4]float64{170, -25, -170, -15}, 0.5,
			Params{Power: 3, Neighbors: 9, RadiusKm: 400, MinStations: 2, Sectors: 8}},
		{"polar-s8", "polar.csv", [4]float64{-180, 70, 180, 90}, 1,
			Params{Power: 2, Neighbors: 12, RadiusKm: 300, MinStations: 3, Sectors: 8}},
		{"polar-s4-wide", "polar.csv", [4]float64{-180, 70, 180, 90}, 1,
			Params{Power: 1.5, Neighbors: 6, RadiusKm: 800, MinStations: 4, Sectors: 4}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			pts := readFixture(t, tc.fixture)
			spec, err := grid.NewSpec(tc.bbox[0], tc.bbox[1], tc.bbox[2], tc.bbox[3], tc.res)
			if err != nil {
				t.Fatal(err)
			}
			ip, err := New(pts, tc.p)
			if err != nil {
				t.Fatal(err)
			}
			out := ip.Grid(spec, nil)
			var cells [][]float64
			for row := range spec.Rows {
				for col := range spec.Cols {
					lon, lat := spec.Center(col, row)
					cells = append(cells, []float64{lon, lat})
				}
			}
			ref := runCVRef(t, py, pts, tc.p, cells)
			masked, fewer := 0, 0
			for i, c := range cells {
				got := out.Data[i]
				z, n, ok := ip.At(c[0], c[1])
				if ref.Pred[i] == nil {
					masked++
					if got != grid.NoDataIndex || ok {
						t.Fatalf("cell %d %v: reference masks it, Grid %v, At %v %v", i, c, got, z, ok)
					}
					continue
				}
				want := *ref.Pred[i]
				if got == grid.NoDataIndex || math.Abs(float64(got)-want) > 1e-5 {
					t.Fatalf("cell %d %v: Grid %v, reference %v", i, c, got, want)
				}
				if !ok || n != ref.N[i] || !relClose(z, want, 1e-9) {
					t.Fatalf("cell %d %v: At %v n %d, reference %v n %d", i, c, z, n, want, ref.N[i])
				}
				if n < tc.p.Neighbors {
					fewer++
				}
			}
			if masked == 0 || masked == spec.Len() || fewer == 0 {
				t.Fatalf("%d of %d masked, %d short of neighbours: the case should have all kinds", masked, spec.Len(), fewer)
			}
		})
	}
}

// BenchmarkCrossValidate is leave-one-out over 20,000 stations spread over
// the sphere with the command-line defaults (k = 12, 300 km), without and
// with 8 sectors.
func BenchmarkCrossValidate(b *testing.B) {
	pts := uniformSphere(20000, 1)
	for _, s := range []int{0, 8} {
		p := DefaultParams()
		p.Sectors = s
		b.Run(map[int]string{0: "plain", 8: "sectors8"}[s], func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := CrossValidate(pts, p, cvClassify); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(pts))*float64(b.N)/b.Elapsed().Seconds(), "stations/s")
		})
	}
}
