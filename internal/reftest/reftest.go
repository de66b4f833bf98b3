package reftest

import (
	"os"
	"os/exec"
	"strings"
	"testing"
)

// Required reports whether missing references must fail the tests.
func Required() bool { return os.Getenv("DRYGRID_REQUIRE_REFS") == "1" }

func missing(t testing.TB, what string) {
	t.Helper()
	if Required() {
		t.Fatalf("reference %s is missing and DRYGRID_REQUIRE_REFS=1 (install: apt-get install -y gdal-bin python3-gdal python3-scipy python3-pyproj python3-shapely)", what)
	}
	t.Skipf("SKIP reference check: %s is missing (apt-get install -y gdal-bin python3-gdal python3-scipy python3-pyproj python3-shapely; set DRYGRID_REQUIRE_REFS=1 to fail instead)", what)
}

// Python returns a python3 interpreter that imports every module named
// (for example "numpy", "scipy.stats", "osgeo.gdal", "pyproj", "shapely").
// Debian's modules live under /usr/bin/python3, which may not be the first
// python3 on PATH, so that one is tried first.
func Python(t testing.TB, modules ...string) string {
	t.Helper()
	cands := []string{"/usr/bin/python3"}
	if p, err := exec.LookPath("python3"); err == nil {
		cands = append(cands, p)
	}
	code := "import " + strings.Join(append([]string{"sys"}, modules...), ", ")
	for _, c := range cands {
		if err := exec.Command(c, "-c", code).Run(); err == nil {
			return c
		}
	}
	missing(t, "python3 with "+strings.Join(modules, ", "))
	return ""
}

// Tool returns the path of a command-line reference tool such as gdalinfo.
func Tool(t testing.TB, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		missing(t, name)
		return ""
	}
	return p
}

// RunPython runs a script with the interpreter, feeding stdin, and returns
// its standard output; a failure ends the test with the script's stderr.
func RunPython(t testing.TB, python, script string, stdin []byte, args ...string) []byte {
	t.Helper()
	cmd := exec.Command(python, append([]string{script}, args...)...)
	if stdin != nil {
		cmd.Stdin = strings.NewReader(string(stdin))
	}
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("reference script %s failed: %v\n%s", script, err, stderr.String())
	}
	return out
}
