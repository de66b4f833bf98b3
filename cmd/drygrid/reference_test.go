package main

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"drygrid/internal/reftest"
)

// e2eCase is a station set the command has never seen: random stations in a
// region, written as SPI or percentiles.
type e2eCase struct {
	name        string
	lonC, latC  float64 // centre of the station cloud
	spreadLon   float64
	spreadLat   float64
	n           int
	kind        string
	bbox        string
	res         float64
	power       float64
	neighbors   int
	radiusKm    float64
	minStations int
}

// TestGridAgainstBruteForce runs `drygrid grid` end to end on fresh random
// station sets (a new seed each run, printed for replay) and checks every
// cell of index.tif, read back by GDAL (python3-gdal), against an
// independent NumPy brute-force great-circle IDW (testdata/idw_ref.py,
// Shepard 1968; haversine on R = 6371.0088 km), with percentiles turned into
// z by SciPy's norm.ppf. Float32 storage bounds the agreement to ~1e-6 for
// |z| <= 5; we ask 1e-5.
func TestGridAgainstBruteForce(t *testing.T) {
	py := reftest.Python(t, "numpy", "scipy.stats", "osgeo.gdal")
	seed := uint64(time.Now().UnixNano())
	if s := os.Getenv("DRYGRID_E2E_SEED"); s != "" {
		fmt.Sscan(s, &seed)
	}
	t.Logf("seed %d (replay with DRYGRID_E2E_SEED=%d)", seed, seed)
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	cases := []e2eCase{
		{name: "antimeridian spi", lonC: 180, latC: -20, spreadLon: 6, spreadLat: 4, n: 40, kind: "spi",
			bbox: "174,-25,-174,-15", res: 0.25, power: 2, neighbors: 8, radiusKm: 250, minStations: 3},
		{name: "near north pole percentile", lonC: 0, latC: 84, spreadLon: 180, spreadLat: 5, n: 60, kind: "percentile",
			bbox: "-180,78,180,90", res: 2, power: 2, neighbors: 12, radiusKm: 400, minStations: 3},
		{name: "default extent percentile power 3", lonC: 20, latC: 45, spreadLon: 3, spreadLat: 2, n: 30, kind: "percentile",
			res: 0.2, power: 3, neighbors: 6, radiusKm: 80, minStations: 2},
		// Percent of normal is interpolated as it is (not as z): the
		// reference takes the pct_of_median column's values unconverted.
		{name: "percent of normal", lonC: -60, latC: -30, spreadLon: 4, spreadLat: 3, n: 40, kind: "pct-of-normal",
			res: 0.2, power: 2, neighbors: 10, radiusKm: 200, minStations: 3},
		{name: "south polar cap spi", lonC: 90, latC: -80, spreadLon: 180, spreadLat: 8, n: 50, kind: "spi",
			bbox: "-180,-90,180,-70", res: 2.5, power: 1.5, neighbors: 10, radiusKm: 600, minStations: 4},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			stations := filepath.Join(dir, "stations.csv")
			var b strings.Builder
			column := c.kind
			if c.kind == "pct-of-normal" {
				column = "pct_of_median" // the index step's column
			}
			fmt.Fprintf(&b, "station,latitude,longitude,%s\n", column)
			for i := 0; i < c.n; i++ {
				lat := math.Max(-89.9, math.Min(89.9, c.latC+(rng.Float64()*2-1)*c.spreadLat))
				lon := c.lonC + (rng.Float64()*2-1)*c.spreadLon
				lon = math.Mod(lon+540, 360) - 180
				v := rng.NormFloat64() * 1.2
				if c.kind == "percentile" {
					v = rng.Float64() * 100
				} else if c.kind == "pct-of-normal" {
					v = rng.Float64() * 250 // 0 to 250 % of normal
				} else {
					v = math.Max(-4.9, math.Min(4.9, v))
				}
				fmt.Fprintf(&b, "S%03d,%.4f,%.4f,%.3f\n", i, lat, lon, v)
			}
			if err := os.WriteFile(stations, []byte(b.String()), 0o644); err != nil {
				t.Fatal(err)
			}
			out := filepath.Join(dir, "layers")
			args := []string{"grid", "--stations", stations, "--kind", c.kind, "--layers", "index",
				"--res", fmt.Sprint(c.res), "--power", fmt.Sprint(c.power), "--neighbors", fmt.Sprint(c.neighbors),
				"--radius-km", fmt.Sprint(c.radiusKm), "--min-stations", fmt.Sprint(c.minStations), "--out", out}
			if c.bbox != "" {
				args = append(args, "--bbox", c.bbox)
			}
			if code := run(args); code != exitOK {
				t.Fatalf("drygrid %s: exit %d", strings.Join(args, " "), code)
			}
			raw := reftest.RunPython(t, py, "../../testdata/grid_e2e_ref.py", nil,
				filepath.Join(out, "index.tif"), stations, c.kind, fmt.Sprint(c.power), fmt.Sprint(c.neighbors),
				fmt.Sprint(c.radiusKm), fmt.Sprint(c.minStations))
			var got struct {
				Cells          int     `json:"cells"`
				Covered        int     `json:"covered"`
				MaskedMismatch int     `json:"masked_mismatch"`
				MaxAbsDiff     float64 `json:"max_abs_diff"`
				FirstBad       any     `json:"first_bad"`
			}
			if err := json.Unmarshal(raw, &got); err != nil {
				t.Fatalf("reference output %q: %v", raw, err)
			}
			t.Logf("%s: %d cells, %d covered, max |diff| %.2g", c.name, got.Cells, got.Covered, got.MaxAbsDiff)
			if got.MaskedMismatch != 0 {
				t.Errorf("%d cells masked differently from the reference, first %v", got.MaskedMismatch, got.FirstBad)
			}
			// Float32 holds percent of normal (up to 250) to ~1.5e-5.
			if tol := map[bool]float64{false: 1e-5, true: 5e-5}[c.kind == "pct-of-normal"]; got.MaxAbsDiff > tol {
				t.Errorf("max |value - reference| = %g > %g", got.MaxAbsDiff, tol)
			}
			if got.Covered < got.Cells/10 {
				t.Errorf("only %d of %d cells covered: the case checks too little", got.Covered, got.Cells)
			}
		})
	}
}
