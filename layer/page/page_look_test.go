package page

import (
	"html"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/bands"
	"drygrid/internal/layertest"
	"drygrid/layer"
)

// lookPage checks that the page at path names every band and carries the
// caution (HTML-escaped as the page writes text).
func lookPage(t *testing.T, path string) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	page := string(data)
	for _, b := range bands.Default().Bands {
		if !strings.Contains(page, html.EscapeString(b.Label)) {
			t.Errorf("%s: no label %q", path, b.Label)
		}
	}
	if !strings.Contains(page, html.EscapeString(layer.Caution)) {
		t.Errorf("%s: no caution", path)
	}
}

// TestPageLook writes fixture pages to $DRYGRID_PAGE_OUT (or a temporary
// directory) and checks that each names every band and carries the
// caution.
func TestPageLook(t *testing.T) {
	dir := layertest.LookDir(t, "DRYGRID_PAGE_OUT")
	for name, f := range map[string]*layertest.Fixture{
		"islands.html":      layertest.NewFixture(t, 164, -48, 178, -34, 0.25),
		"antimeridian.html": layertest.NewFixture(t, 170, -25, -165, -10, 0.25),
	} {
		path := filepath.Join(dir, name)
		if err := WriteFile(path, pageFixtureInput(t, f)); err != nil {
			t.Fatal(err)
		}
		lookPage(t, path)
	}
}

// TestPageLookHover writes a page that hovers a region on load (the browser
// test's self-check) to $DRYGRID_PAGE_OUT (or a temporary directory), for a
// screenshot of a tooltip, and checks it as TestPageLook does.
func TestPageLookHover(t *testing.T) {
	path := filepath.Join(layertest.LookDir(t, "DRYGRID_PAGE_OUT"), "hover.html")
	pageWriteSelfCheck(t, path, pageFixtureInput(t, layertest.NewFixture(t, 164, -48, 178, -34, 0.25)))
	lookPage(t, path)
}
