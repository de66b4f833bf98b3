package picture

import (
	"bytes"
	"drygrid/internal/layertest"
	"image/png"
	"os"
	"path/filepath"
	"testing"
)

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

// TestPictureLook writes the fixture pictures (islands, across the
// antimeridian, the globe) to $DRYGRID_PICTURE_OUT for a person to look at,
// or to a temporary directory, and checks each is a PNG of the default
// width.
func TestPictureLook(t *testing.T) {
	dir := layertest.LookDir(t, "DRYGRID_PICTURE_OUT")
	for name, f := range map[string]*picFixture{
		"islands.png":      picMakeFixture(t, 164, -48, 178, -34, 0.1),
		"antimeridian.png": picMakeFixture(t, 170, -25, -165, -10, 0.25),
		"global.png":       picMakeFixture(t, -180, -90, 180, 90, 1),
	} {
		path := filepath.Join(dir, name)
		if err := WriteFile(path, f.input(), Options{}); err != nil {
			t.Fatal(err)
		}
		lookPNG(t, path, 1400)
	}
}

// TestPictureLookShapes writes pictures of a tall and a wide grid (with a
// title long enough to wrap) to $DRYGRID_PICTURE_OUT (or a temporary
// directory) and checks their widths; and the islands with 20,000
// invented stations, a grid of named regions and a production line.
func TestPictureLookShapes(t *testing.T) {
	dir := layertest.LookDir(t, "DRYGRID_PICTURE_OUT")
	tall := picMakeFixture(t, -76, -56, -66, -17, 0.1)
	wide := picMakeFixture(t, 60, 5, 160, 15, 0.2)
	in := wide.input()
	isl := picMakeFixture(t, 164, -48, 178, -34, 0.1)
	dense := isl.input()
	dense.Stations, dense.Regions = picManyStations(isl, 20000), picManyRegions(isl, 6)
	dense.Produced = "made 2026-12-01 06:00 UTC · SPI, 30 days ending 2026-11-30 · data: Kelverin Met Service (fictitious)"
	in.Title = "A long title to check wrapping: " + in.Title + " with more words after it to force a second line"
	for name, c := range map[string]struct {
		in Input
		w  int
	}{"tall.png": {tall.input(), 1200}, "wide.png": {in, 1400}, "dense.png": {dense, 1400}} {
		path := filepath.Join(dir, name)
		if err := WriteFile(path, c.in, Options{Width: c.w}); err != nil {
			t.Fatal(err)
		}
		lookPNG(t, path, c.w)
	}
}
