package export

import (
	"bytes"
	"html"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"drygrid/bands"
)

// lookDir is $name when set (the files are kept there for a person, or a
// headless browser, to look at), else a temporary directory.
func lookDir(t *testing.T, name string) string {
	if dir := os.Getenv(name); dir != "" {
		return dir
	}
	return t.TempDir()
}

// lookPNG checks that path is a PNG (decoded by Go's image/png, a reader
// independent of the encoder's options) of the given width and a height
// between 300 px and twice the width.
func lookPNG(t *testing.T, path string, width int) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if b := img.Bounds(); b.Dx() != width || b.Dy() < 300 || b.Dy() > 2*width {
		t.Errorf("%s: %v, want %d px wide", path, b, width)
	}
}

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
	if !strings.Contains(page, html.EscapeString(MapCaution)) {
		t.Errorf("%s: no caution", path)
	}
}

// TestPictureLook writes the fixture pictures (islands, across the
// antimeridian, the globe) to $DRYGRID_PICTURE_OUT for a person to look at,
// or to a temporary directory, and checks each is a PNG of the default
// width.
func TestPictureLook(t *testing.T) {
	dir := lookDir(t, "DRYGRID_PICTURE_OUT")
	for name, f := range map[string]*picFixture{
		"islands.png":      picMakeFixture(t, 164, -48, 178, -34, 0.1),
		"antimeridian.png": picMakeFixture(t, 170, -25, -165, -10, 0.25),
		"global.png":       picMakeFixture(t, -180, -90, 180, 90, 1),
	} {
		path := filepath.Join(dir, name)
		if err := WritePicture(path, f.input(), PictureOptions{}); err != nil {
			t.Fatal(err)
		}
		lookPNG(t, path, 1400)
	}
}

// TestPageLook writes fixture pages to $DRYGRID_PAGE_OUT (or a temporary
// directory) and checks that each names every band and carries the
// caution.
func TestPageLook(t *testing.T) {
	dir := lookDir(t, "DRYGRID_PAGE_OUT")
	for name, f := range map[string]*picFixture{
		"islands.html":      picMakeFixture(t, 164, -48, 178, -34, 0.25),
		"antimeridian.html": picMakeFixture(t, 170, -25, -165, -10, 0.25),
	} {
		path := filepath.Join(dir, name)
		if err := WritePage(path, pageFixtureInput(t, f)); err != nil {
			t.Fatal(err)
		}
		lookPage(t, path)
	}
}

// TestPictureLookShapes writes pictures of a tall and a wide grid (with a
// title long enough to wrap) to $DRYGRID_PICTURE_OUT (or a temporary
// directory) and checks their widths.
func TestPictureLookShapes(t *testing.T) {
	dir := lookDir(t, "DRYGRID_PICTURE_OUT")
	tall := picMakeFixture(t, -76, -56, -66, -17, 0.1)
	wide := picMakeFixture(t, 60, 5, 160, 15, 0.2)
	in := wide.input()
	in.Title = "A long title to check wrapping: " + in.Title + " with more words after it to force a second line"
	for name, c := range map[string]struct {
		in PictureInput
		w  int
	}{"tall.png": {tall.input(), 1200}, "wide.png": {in, 1400}} {
		path := filepath.Join(dir, name)
		if err := WritePicture(path, c.in, PictureOptions{Width: c.w}); err != nil {
			t.Fatal(err)
		}
		lookPNG(t, path, c.w)
	}
}

// TestPageLookHover writes a page that hovers a region on load (the browser
// test's self-check) to $DRYGRID_PAGE_OUT (or a temporary directory), for a
// screenshot of a tooltip, and checks it as TestPageLook does.
func TestPageLookHover(t *testing.T) {
	path := filepath.Join(lookDir(t, "DRYGRID_PAGE_OUT"), "hover.html")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := pageEncode(f, pageFixtureInput(t, picMakeFixture(t, 164, -48, 178, -34, 0.25)), pageSelfCheckJS); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	lookPage(t, path)
}
