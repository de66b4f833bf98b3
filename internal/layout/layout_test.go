package layout

import (
	"bufio"
	"bytes"
	"os/exec"
	"strings"
	"testing"
)

// floor is each package's place in the data flow (docs/design.md,
// "Packages"): a package may import only packages on a lower floor. A new
// package must be given its floor here.
var floor = map[string]int{
	// Ground: imports nothing of ours.
	"grid": 0, "spi": 0, "scenario": 0, "publish": 0, "layer": 0,
	"internal/pool": 0, "internal/tomlpos": 0, "internal/reftest": 0, "interp/internal/lanes": 0,
	"internal/layout": 0, "internal/spitest": 1,
	// Schemes, tables, polygons, the provenance record.
	"bands": 1, "station": 1, "polygon": 1, "manifest": 1,
	// Regions, interpolation, the GeoTIFF codec; test fixtures.
	"region": 2, "interp": 2, "geotiff": 2, "internal/layertest": 2, "internal/rastertest": 2,
	// The layer encoders.
	"layer/geojson": 3, "layer/picture": 3, "layer/page": 3, "layer/regions": 3,
	// The history file (rows as in regions.csv) and its chart.
	"history": 4, "layer/chart": 5,
	// The run.
	"pipeline": 6,
	// Programs.
	"cmd/drygrid": 7, "bench/gen": 7, "bench/gendaily": 7, "bench/dailytotals": 7,
}

// TestNothingImportsUpward lists every package of the module with
// `go list` and checks each of its imports of the project against the
// floors: strictly lower, never the same floor or above.
func TestNothingImportsUpward(t *testing.T) {
	goCmd, err := exec.LookPath("go")
	if err != nil {
		t.Skip("no go command on PATH")
	}
	out, err := exec.Command(goCmd, "list", "-f", "{{.ImportPath}} {{join .Imports \" \"}}", "drygrid/...").Output()
	if err != nil {
		t.Fatalf("go list: %v", err)
	}
	sc := bufio.NewScanner(bytes.NewReader(out))
	seen := 0
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		pkg := strings.TrimPrefix(f[0], "drygrid/")
		from, ok := floor[pkg]
		if !ok {
			t.Errorf("package %s has no floor in layout_test.go", pkg)
			continue
		}
		seen++
		for _, imp := range f[1:] {
			if !strings.HasPrefix(imp, "drygrid/") {
				continue
			}
			dep := strings.TrimPrefix(imp, "drygrid/")
			to, ok := floor[dep]
			if !ok {
				t.Errorf("package %s has no floor in layout_test.go", dep)
				continue
			}
			if to >= from {
				t.Errorf("%s (floor %d) imports %s (floor %d): upward or sideways", pkg, from, dep, to)
			}
		}
	}
	if seen < 20 {
		t.Errorf("go list gave %d packages of ours, expected the whole module", seen)
	}
}

// TestCommandHoldsNoScience: cmd/drygrid wires flags to the pipeline; it
// imports none of the packages that compute on rasters, areas or
// polygons, nor the publishing code.
func TestCommandHoldsNoScience(t *testing.T) {
	goCmd, err := exec.LookPath("go")
	if err != nil {
		t.Skip("no go command on PATH")
	}
	out, err := exec.Command(goCmd, "list", "-f", "{{join .Imports \"\\n\"}}", "drygrid/cmd/drygrid").Output()
	if err != nil {
		t.Fatalf("go list: %v", err)
	}
	for _, imp := range strings.Fields(string(out)) {
		switch imp {
		case "drygrid/grid", "drygrid/region", "drygrid/polygon", "drygrid/geotiff", "drygrid/publish", "drygrid/spi":
			t.Errorf("cmd/drygrid imports %s", imp)
		}
	}
}
