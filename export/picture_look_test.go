package export

import (
	"os"
	"path/filepath"
	"testing"
)

// TestPictureLook writes the fixture pictures to $DRYGRID_PICTURE_OUT for a
// person to look at; it skips when the variable is unset.
func TestPictureLook(t *testing.T) {
	dir := os.Getenv("DRYGRID_PICTURE_OUT")
	if dir == "" {
		t.Skip("set DRYGRID_PICTURE_OUT=DIR to write the pictures for viewing")
	}
	for name, f := range map[string]*picFixture{
		"islands.png":      picMakeFixture(t, 164, -48, 178, -34, 0.1),
		"antimeridian.png": picMakeFixture(t, 170, -25, -165, -10, 0.25),
		"global.png":       picMakeFixture(t, -180, -90, 180, 90, 1),
	} {
		if err := WritePicture(filepath.Join(dir, name), f.input(), PictureOptions{}); err != nil {
			t.Fatal(err)
		}
	}
}

// TestPageLook writes fixture pages to $DRYGRID_PAGE_OUT for a person (or a
// headless browser) to look at; it skips when the variable is unset.
func TestPageLook(t *testing.T) {
	dir := os.Getenv("DRYGRID_PAGE_OUT")
	if dir == "" {
		t.Skip("set DRYGRID_PAGE_OUT=DIR to write the pages for viewing")
	}
	for name, f := range map[string]*picFixture{
		"islands.html":      picMakeFixture(t, 164, -48, 178, -34, 0.25),
		"antimeridian.html": picMakeFixture(t, 170, -25, -165, -10, 0.25),
	} {
		if err := WritePage(filepath.Join(dir, name), pageFixtureInput(t, f)); err != nil {
			t.Fatal(err)
		}
	}
}

// TestPictureLookShapes writes pictures of a tall and a wide grid to
// $DRYGRID_PICTURE_OUT; it skips when the variable is unset.
func TestPictureLookShapes(t *testing.T) {
	dir := os.Getenv("DRYGRID_PICTURE_OUT")
	if dir == "" {
		t.Skip("set DRYGRID_PICTURE_OUT=DIR to write the pictures for viewing")
	}
	tall := picMakeFixture(t, -76, -56, -66, -17, 0.1)
	wide := picMakeFixture(t, 60, 5, 160, 15, 0.2)
	in := wide.input()
	in.Title = "A long title to check wrapping: " + in.Title + " with more words after it to force a second line"
	for name, c := range map[string]struct {
		in PictureInput
		w  int
	}{"tall.png": {tall.input(), 1200}, "wide.png": {in, 1400}} {
		if err := WritePicture(filepath.Join(dir, name), c.in, PictureOptions{Width: c.w}); err != nil {
			t.Fatal(err)
		}
	}
}

// TestPageLookHover writes a page that hovers a region on load (the browser
// test's self-check) to $DRYGRID_PAGE_OUT, for a screenshot of a tooltip.
func TestPageLookHover(t *testing.T) {
	dir := os.Getenv("DRYGRID_PAGE_OUT")
	if dir == "" {
		t.Skip("set DRYGRID_PAGE_OUT=DIR to write the pages for viewing")
	}
	f, err := os.Create(filepath.Join(dir, "hover.html"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := pageEncode(f, pageFixtureInput(t, picMakeFixture(t, 164, -48, 178, -34, 0.25)), pageSelfCheckJS); err != nil {
		t.Fatal(err)
	}
}
