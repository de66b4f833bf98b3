package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"drygrid/internal/reftest"
	"drygrid/interp"
)

// cvExec runs the command line in-process and returns stdout, stderr and
// the error.
func cvExec(args ...string) (string, string, error) {
	root := newRootCmd()
	root.SetArgs(args)
	var out, errb bytes.Buffer
	root.SetOut(&out)
	root.SetErr(&errb)
	err := root.Execute()
	return out.String(), errb.String(), err
}

// cvDefaultCuts are the default bands (bands.Default) as cuts for
// testdata/crossval_ref.py: band = 1 + the number of cuts passed, where
// z > c for the dry cut points (-2, -1.5, -1, -0.5: upper bounds inclusive)
// and z >= c for the wet ones (0.5, 1, 1.5, 2: lower bounds inclusive).
var cvDefaultCuts = []any{
	[]any{-2.0, "gt"}, []any{-1.5, "gt"}, []any{-1.0, "gt"}, []any{-0.5, "gt"},
	[]any{0.5, "ge"}, []any{1.0, "ge"}, []any{1.5, "ge"}, []any{2.0, "ge"},
}

// cvReadStations reads a station,latitude,longitude,spi CSV as
// [lon, lat, z] rows (independently of the station package).
func cvReadStations(t *testing.T, path string) [][]float64 {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var pts [][]float64
	for _, r := range recs[1:] {
		var v [3]float64
		for i, j := range []int{2, 1, 3} {
			if v[i], err = strconv.ParseFloat(r[j], 64); err != nil {
				t.Fatal(err)
			}
		}
		pts = append(pts, v[:])
	}
	return pts
}

// TestCrossvalJSONAgainstNumPy runs `drygrid crossval --json --residuals`
// on the example stations and checks the keys of the summary and every
// figure against testdata/crossval_ref.py (independent NumPy brute force:
// haversine on R = 6371.0088 km, Shepard 1968 weights, the spherical forward
// azimuth for sectors, the default bands' cut points):
// figures to 1e-12, band agreement and counts exactly, the residual file's
// predictions to its 6 decimals.
func TestCrossvalJSONAgainstNumPy(t *testing.T) {
	py := reftest.Python(t, "numpy")
	pts := cvReadStations(t, exampleSPI)
	for _, c := range []struct {
		name  string
		flags []string
		p     interp.Params
	}{
		{"defaults", nil, interp.DefaultParams()},
		{"sectors-4", []string{"--sectors", "4"}, interp.Params{Power: 2, Neighbors: 12, RadiusKm: 300, MinStations: 3, Sectors: 4}},
		{"p3-s8-80km", []string{"--power", "3", "--neighbors", "8", "--sectors", "8", "--radius-km", "80", "--min-stations", "2"},
			interp.Params{Power: 3, Neighbors: 8, RadiusKm: 80, MinStations: 2, Sectors: 8}},
	} {
		t.Run(c.name, func(t *testing.T) {
			resPath := filepath.Join(t.TempDir(), "loo.csv")
			args := append([]string{"crossval", "--stations", exampleSPI, "--json", "--residuals", resPath}, c.flags...)
			stdout, stderr, err := cvExec(args...)
			if err != nil {
				t.Fatalf("drygrid %s: %v\n%s", strings.Join(args, " "), err, stderr)
			}
			var got map[string]any
			if err := json.Unmarshal([]byte(stdout), &got); err != nil {
				t.Fatalf("output %q: %v", stdout, err)
			}
			for _, k := range []string{"n", "rmse", "mae", "bias", "band_agreement", "stations", "not_counted", "params"} {
				if _, ok := got[k]; !ok {
					t.Errorf("key %q missing from %s", k, stdout)
				}
			}
			job := map[string]any{"points": pts, "power": c.p.Power, "neighbors": c.p.Neighbors, "radius_km": c.p.RadiusKm,
				"min_stations": c.p.MinStations, "sectors": c.p.Sectors, "cuts": cvDefaultCuts}
			in, _ := json.Marshal(job)
			var ref struct {
				Pred          []*float64 `json:"pred"`
				Counted       []bool     `json:"counted"`
				N             int        `json:"n_counted"`
				RMSE          float64    `json:"rmse"`
				MAE           float64    `json:"mae"`
				Bias          float64    `json:"bias"`
				BandAgreement float64    `json:"band_agreement"`
			}
			if err := json.Unmarshal(reftest.RunPython(t, py, "../../testdata/crossval_ref.py", in), &ref); err != nil {
				t.Fatal(err)
			}
			if n := got["n"].(float64); int(n) != ref.N || int(got["stations"].(float64)) != len(pts) ||
				int(got["not_counted"].(float64)) != len(pts)-ref.N {
				t.Fatalf("n %v stations %v not_counted %v; reference n %d of %d", got["n"], got["stations"], got["not_counted"], ref.N, len(pts))
			}
			for _, f := range []struct {
				key  string
				want float64
			}{{"rmse", ref.RMSE}, {"mae", ref.MAE}, {"bias", ref.Bias}} {
				if g, ok := got[f.key].(float64); !ok || math.Abs(g-f.want) > 1e-12*max(1, math.Abs(f.want)) {
					t.Errorf("%s %v, reference %v", f.key, g, f.want)
				}
			}
			if g, ok := got["band_agreement"].(float64); !ok || g != ref.BandAgreement {
				t.Errorf("band_agreement %v, reference %v", g, ref.BandAgreement)
			}
			if p := got["params"].(map[string]any); p["sectors"].(float64) != float64(c.p.Sectors) || p["radius_km"].(float64) != c.p.RadiusKm {
				t.Errorf("params %v", p)
			}
			b, err := os.ReadFile(resPath)
			if err != nil {
				t.Fatal(err)
			}
			rows, err := csv.NewReader(bytes.NewReader(b)).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			if len(rows) != len(pts)+1 || strings.Join(rows[0], ",") !=
				"station,latitude,longitude,observed,predicted,residual,n_used,counted,observed_band,predicted_band" {
				t.Fatalf("residuals: %d rows, header %v", len(rows), rows[0])
			}
			for i, r := range rows[1:] {
				if (r[7] == "true") != ref.Counted[i] {
					t.Fatalf("row %d counted %s, reference %v", i+1, r[7], ref.Counted[i])
				}
				if !ref.Counted[i] {
					if r[4] != "" {
						t.Fatalf("row %d: not counted but predicted %q", i+1, r[4])
					}
					continue
				}
				v, err := strconv.ParseFloat(r[4], 64)
				if err != nil || math.Abs(v-*ref.Pred[i]) > 5e-7 {
					t.Fatalf("row %d predicted %q, reference %v", i+1, r[4], *ref.Pred[i])
				}
			}
			if c.name == "p3-s8-80km" && (ref.N == 0 || ref.N == len(pts)) {
				t.Fatalf("the 80 km case should leave some stations out (n %d)", ref.N)
			}
		})
	}
}

// TestCrossvalSearchRanking: four pairs of twin stations 0.01 degrees
// (1.1 km) apart, each pair with its own value (+2, -2, +1, -1) and the
// pairs 0.5 degrees (55 km and more) apart. Leaving a station out, its twin
// holds the right value, so the more the weight goes to the nearest
// station the smaller the error: w = d^-p puts a share of about
// 7 (1.1/55)^p on the other pairs, 12 % for p = 1, 0.3 % for p = 2, 0.006 %
// for p = 3 (Shepard 1968: IDW tends to the nearest neighbour as p grows),
// so power 3 wins, then 2, then 1. All stations lie within 100 km of each
// other, so radius 200 and 300 give identical figures, tied on RMSE and MAE:
// the order given decides. Radius 0.5 km holds no other station: nothing
// counted, ranked last in the order given.
func TestCrossvalSearchRanking(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "twins.csv")
	var b strings.Builder
	b.WriteString("station,latitude,longitude,spi\n")
	for i, c := range [][3]float64{{45, 10, 2}, {45, 10.5, -2}, {45.5, 10, 1}, {45.5, 10.5, -1}} {
		fmt.Fprintf(&b, "T%da,%g,%g,%g\nT%db,%g,%g,%g\n", i, c[0], c[1], c[2], i, c[0]+0.01, c[1], c[2])
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	args := []string{"crossval", "--stations", path, "--min-stations", "1", "--json",
		"--search", "power=1,2,3", "radius-km=0.5,200,300"}
	stdout, stderr, err := cvExec(args...)
	if err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	var got []map[string]any
	if err := json.Unmarshal([]byte(stdout), &got); err != nil {
		t.Fatalf("output %q: %v", stdout, err)
	}
	want := [][3]float64{ // power, radius, n
		{3, 200, 8}, {3, 300, 8}, {2, 200, 8}, {2, 300, 8}, {1, 200, 8}, {1, 300, 8}, {1, 0.5, 0}, {2, 0.5, 0}, {3, 0.5, 0},
	}
	if len(got) != len(want) {
		t.Fatalf("%d results, want %d", len(got), len(want))
	}
	for i, w := range want {
		p := got[i]["params"].(map[string]any)
		if p["power"].(float64) != w[0] || p["radius_km"].(float64) != w[1] || got[i]["n"].(float64) != w[2] ||
			got[i]["rank"].(float64) != float64(i+1) {
			t.Errorf("rank %d: %v, want power %g radius %g n %g", i+1, got[i], w[0], w[1], w[2])
		}
	}
	if got[0]["rmse"].(float64) != got[1]["rmse"].(float64) || got[6]["rmse"] != nil {
		t.Errorf("radius 200 and 300 should tie and 0.5 km have no rmse: %v %v %v", got[0]["rmse"], got[1]["rmse"], got[6]["rmse"])
	}
	// The table says the same.
	stdout, _, err = cvExec("crossval", "--stations", path, "--min-stations", "1", "--search", "power=1,2,3", "radius-km=0.5,200,300")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(stdout, "\n")
	if f := strings.Fields(lines[1]); len(f) < 4 || f[0] != "1" || f[1] != "3" || f[3] != "200" {
		t.Errorf("table's first row %q, want rank 1 power 3 radius 200", lines[1])
	}
}

// TestCrossvalUsage: bad search terms and flag mixes are usage errors
// (exit 2), like the grid command's (docs/design.md, "Command line").
func TestCrossvalUsage(t *testing.T) {
	for _, args := range [][]string{
		{"crossval"},
		{"crossval", "--stations", exampleSPI, "--sectors", "3"},
		{"crossval", "--stations", exampleSPI, "--sectors", "8", "--neighbors", "6", "--min-stations", "2"},
		{"crossval", "--stations", exampleSPI, "stray"},
		{"crossval", "--stations", exampleSPI, "--search", "power=1,x"},
		{"crossval", "--stations", exampleSPI, "--search", "speed=1"},
		{"crossval", "--stations", exampleSPI, "--search", "power=1", "power=2"},
		{"crossval", "--stations", exampleSPI, "--search", "neighbors=2.5"},
		{"crossval", "--stations", exampleSPI, "--search", "neighbors=2,4", "--min-stations", "3"},
		{"crossval", "--stations", exampleSPI, "--search", "power=1,2", "--residuals", "x.csv"},
		{"grid", "--stations", exampleSPI, "--sectors", "5", "--out", t.TempDir()},
	} {
		if code := run(args); code != exitUsage {
			t.Errorf("drygrid %s: exit %d, want %d", strings.Join(args, " "), code, exitUsage)
		}
	}
}

// cvRandomStations writes n random SPI stations around lonC, latC.
func cvRandomStations(t *testing.T, path string, seed uint64, n int, lonC, latC, spreadLon, spreadLat float64) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 9))
	var b strings.Builder
	b.WriteString("station,latitude,longitude,spi\n")
	for i := range n {
		lat := math.Max(-89.9, math.Min(89.9, latC+(rng.Float64()*2-1)*spreadLat))
		lon := math.Mod(lonC+(rng.Float64()*2-1)*spreadLon+540, 360) - 180
		fmt.Fprintf(&b, "S%03d,%.4f,%.4f,%.3f\n", i, lat, lon, math.Max(-4.9, math.Min(4.9, rng.NormFloat64()*1.2)))
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestGridSectorsAgainstNumPy runs `drygrid grid --sectors` end to end and
// checks every cell of index.tif, read back by GDAL (python3-gdal), against
// the independent NumPy sector rule (testdata/sectors_grid_ref.py on
// crossval_ref.py: haversine on R = 6371.0088 km, spherical forward azimuth,
// Shepard 1968 weights), to 1e-5 (Float32 storage), masks exactly; across
// the antimeridian and around the north pole. It also checks that
// --crossval prints the figures of `drygrid crossval` with the same flags.
func TestGridSectorsAgainstNumPy(t *testing.T) {
	py := reftest.Python(t, "numpy", "osgeo.gdal")
	cases := []struct {
		name                                   string
		lonC, latC, spreadLon, spreadLat       float64
		n                                      int
		bbox, res, power, k, radius, min, secs string
	}{
		{"antimeridian s4", 180, -20, 6, 4, 50, "174,-25,-174,-15", "0.25", "2", "8", "250", "3", "4"},
		{"north pole s8", 0, 84, 180, 5, 70, "-180,78,180,90", "2", "2", "16", "400", "3", "8"},
	}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			st := filepath.Join(dir, "stations.csv")
			cvRandomStations(t, st, uint64(100+i), c.n, c.lonC, c.latC, c.spreadLon, c.spreadLat)
			out := filepath.Join(dir, "layers")
			flags := []string{"--power", c.power, "--neighbors", c.k, "--radius-km", c.radius, "--min-stations", c.min, "--sectors", c.secs}
			args := append([]string{"grid", "--stations", st, "--layers", "index", "--res", c.res, "--bbox", c.bbox,
				"--crossval", "--out", out}, flags...)
			_, stderr, err := cvExec(args...)
			if err != nil {
				t.Fatalf("drygrid %s: %v\n%s", strings.Join(args, " "), err, stderr)
			}
			raw := reftest.RunPython(t, py, "../../testdata/sectors_grid_ref.py", nil,
				filepath.Join(out, "index.tif"), st, c.power, c.k, c.radius, c.min, c.secs)
			var got struct {
				Cells          int     `json:"cells"`
				Covered        int     `json:"covered"`
				Short          int     `json:"short"`
				MaskedMismatch int     `json:"masked_mismatch"`
				MaxAbsDiff     float64 `json:"max_abs_diff"`
				FirstBad       any     `json:"first_bad"`
			}
			if err := json.Unmarshal(raw, &got); err != nil {
				t.Fatalf("reference output %q: %v", raw, err)
			}
			t.Logf("%d cells, %d covered, %d with fewer than k, max |diff| %.2g", got.Cells, got.Covered, got.Short, got.MaxAbsDiff)
			if got.MaskedMismatch != 0 || got.MaxAbsDiff > 1e-5 {
				t.Errorf("%d masked differently (first %v), max |diff| %g", got.MaskedMismatch, got.FirstBad, got.MaxAbsDiff)
			}
			if got.Covered < got.Cells/10 || got.Short == 0 {
				t.Errorf("%d of %d covered, %d short of k: the case checks too little", got.Covered, got.Cells, got.Short)
			}
			cv, _, err := cvExec(append([]string{"crossval", "--stations", st}, flags...)...)
			if err != nil {
				t.Fatal(err)
			}
			fig := strings.SplitN(cv, "\n", 5)[3] // the RMSE line
			if !strings.Contains(fig, "RMSE") || !strings.Contains(stderr, fig) {
				t.Errorf("grid --crossval output lacks %q:\n%s", fig, stderr)
			}
		})
	}
}

// TestGridCrossvalFigures: the manifest figures of a grid run are those of
// `drygrid crossval --json` with the same stations and parameters, and
// carry the keys n, rmse, mae, bias and band_agreement.
func TestGridCrossvalFigures(t *testing.T) {
	out := filepath.Join(t.TempDir(), "layers")
	f := gridFlags{inputFlags: inputFlags{stations: exampleSPI, kind: "spi"}, res: 0.1,
		interpFlags: interpFlags{power: 2, neighbors: 12, radiusKm: 300, minStations: 3, sectors: 4}, layers: "index", out: out,
		crossval: true}
	job, err := f.job()
	if err != nil {
		t.Fatal(err)
	}
	res, err := runJob(job, &bytes.Buffer{})
	if err != nil {
		t.Fatal(err)
	}
	if res.CrossVal == nil {
		t.Fatal("grid --crossval: no cross-validation in the result")
	}
	// The figures as the manifest records them.
	mb, err := os.ReadFile(filepath.Join(out, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	var man struct {
		Counts struct {
			CrossVal json.RawMessage `json:"crossval"`
		} `json:"counts"`
	}
	if err := json.Unmarshal(mb, &man); err != nil {
		t.Fatal(err)
	}
	b := []byte(man.Counts.CrossVal)
	stdout, _, err := cvExec("crossval", "--stations", exampleSPI, "--sectors", "4", "--json")
	if err != nil {
		t.Fatal(err)
	}
	var a, c map[string]any
	if err := json.Unmarshal(b, &a); err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal([]byte(stdout), &c); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"n", "rmse", "mae", "bias", "band_agreement"} {
		if a[k] == nil || fmt.Sprint(a[k]) != fmt.Sprint(c[k]) {
			t.Errorf("%s: grid %v, crossval %v", k, a[k], c[k])
		}
	}
}
