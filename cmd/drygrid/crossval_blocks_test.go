package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"drygrid/internal/reftest"
)

// TestCrossvalBlocksAgainstNumPy runs `drygrid crossval --blocks 50 --json`
// on the example stations and checks its figures against
// testdata/blockcv_ref.py (independent NumPy brute force: the blocks from
// their definition, haversine on R = 6371.0088 km, Shepard 1968 weights):
// n, blocks exactly, RMSE, MAE and bias to 1e-9; then that --search ranks
// by the block figures (its row for the same parameters has the same RMSE).
func TestCrossvalBlocksAgainstNumPy(t *testing.T) {
	py := reftest.Python(t, "numpy")
	pts := cvReadStations(t, exampleSPI)
	stdout, stderr, err := cvExec("crossval", "--stations", exampleSPI, "--blocks", "50", "--json")
	if err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	var got map[string]any
	if err := json.Unmarshal([]byte(stdout), &got); err != nil {
		t.Fatal(err)
	}
	in, _ := json.Marshal(map[string]any{"points": pts, "power": 2, "neighbors": 12, "radius_km": 300,
		"min_stations": 3, "block_km": 50})
	var ref struct {
		N      int     `json:"n_counted"`
		Blocks int     `json:"blocks"`
		RMSE   float64 `json:"rmse"`
		MAE    float64 `json:"mae"`
		Bias   float64 `json:"bias"`
	}
	if err := json.Unmarshal(reftest.RunPython(t, py, "../../testdata/blockcv_ref.py", in), &ref); err != nil {
		t.Fatal(err)
	}
	if got["method"] != "blocks" || got["block_km"] != 50.0 || int(got["blocks"].(float64)) != ref.Blocks || int(got["n"].(float64)) != ref.N {
		t.Fatalf("got %s; reference n %d blocks %d", stdout, ref.N, ref.Blocks)
	}
	for _, f := range []struct {
		key  string
		want float64
	}{{"rmse", ref.RMSE}, {"mae", ref.MAE}, {"bias", ref.Bias}} {
		if g, ok := got[f.key].(float64); !ok || math.Abs(g-f.want) > 1e-9 {
			t.Errorf("%s %v, reference %v", f.key, got[f.key], f.want)
		}
	}
	stdout, stderr, err = cvExec("crossval", "--stations", exampleSPI, "--blocks", "50", "--json", "--search", "radius-km=100,300")
	if err != nil {
		t.Fatalf("%v\n%s", err, stderr)
	}
	var rows []map[string]any
	if err := json.Unmarshal([]byte(stdout), &rows); err != nil {
		t.Fatal(err)
	}
	found := false
	for _, r := range rows {
		if r["params"].(map[string]any)["radius_km"] == 300.0 {
			found = true
			if r["method"] != "blocks" || math.Abs(r["rmse"].(float64)-ref.RMSE) > 1e-9 {
				t.Errorf("search row %v, reference RMSE %v", r, ref.RMSE)
			}
		}
	}
	if !found {
		t.Fatalf("no row for radius 300 in %s", stdout)
	}
	stdout, _, err = cvExec("crossval", "--stations", exampleSPI, "--blocks", "50", "--search", "radius-km=100,300")
	if err != nil || !strings.Contains(stdout, "blocks of about 50 km") {
		t.Fatalf("text search output %q, %v", stdout, err)
	}
	stdout, _, err = cvExec("crossval", "--stations", exampleSPI, "--blocks", "50")
	if err != nil || !strings.Contains(stdout, "spatial blocks of about 50 km") {
		t.Fatalf("text output %q, %v", stdout, err)
	}
	for _, bad := range []string{"-1", "NaN", "+Inf"} {
		if code := run([]string{"crossval", "--stations", exampleSPI, "--blocks", bad}); code != exitUsage {
			t.Errorf("--blocks %s: exit %d, want %d", bad, code, exitUsage)
		}
	}
}
