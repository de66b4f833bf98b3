package picture

import (
	"image"
	"testing"

	"drygrid/grid"
	"drygrid/layer"
)

// TestFarHatchOnlyInFarCells draws the invented islands with and without a
// far-cell raster (a checkerboard of 7 x 5 cell blocks) and compares the two
// pictures pixel by pixel: they differ only at map pixels whose cell (the
// cell under the pixel's centre, as the picture samples the bands) is far
// and holds a value, and in the legend box; far cells show the hatch (some
// pixels change), no-data cells and near cells not at all. The legend lists
// the entry.
func TestFarHatchOnlyInFarCells(t *testing.T) {
	f := picMakeFixture(t, 164, -48, 178, -34, 0.1)
	in := f.input()
	plain, err := picPaint(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	spec := f.spec
	far := grid.NewUint8(spec, 0)
	for r := range spec.Rows {
		for c := range spec.Cols {
			if (c/7+r/5)%2 == 0 {
				far.Data[spec.Index(c, r)] = 1
			}
		}
	}
	in.Far, in.FarKm = far, 150
	hatched, err := picPaint(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if plain.img.Bounds() != hatched.img.Bounds() || plain.l.mapR != hatched.l.mapR {
		t.Fatalf("layout moved: %v / %v, map %v / %v", plain.img.Bounds(), hatched.img.Bounds(), plain.l.mapR, hatched.l.mapR)
	}
	found := false
	for _, it := range hatched.legendItems() {
		found = found || it.label == layer.FarLabel(150)
	}
	if !found || layer.FarLabel(150) != "Nearest station over 150 km" {
		t.Errorf("legend lacks %q", layer.FarLabel(150))
	}
	legend := image.Rect(hatched.legendX, hatched.legendY, hatched.legendX+hatched.legendW,
		hatched.legendY+hatched.legend(nil, 0, 0, hatched.legendW, hatched.legendCols))
	r := hatched.l.mapR
	farCell := func(x, y int) (isFar, hasValue bool) {
		if !(image.Point{x, y}.In(r)) {
			return false, false
		}
		col := min(int((float64(x-r.Min.X)+0.5)/float64(r.Dx())*float64(spec.Cols)), spec.Cols-1)
		row := min(int((float64(y-r.Min.Y)+0.5)/float64(r.Dy())*float64(spec.Rows)), spec.Rows-1)
		i := spec.Index(col, row)
		return far.Data[i] != 0, f.bands.Data[i] != f.bands.NoData
	}
	inFar, outside := 0, 0
	b := plain.img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			o := plain.img.PixOffset(x, y)
			same := string(plain.img.Pix[o:o+4]) == string(hatched.img.Pix[o:o+4])
			if same {
				continue
			}
			if isFar, has := farCell(x, y); isFar && has {
				inFar++
				continue
			}
			if (image.Point{x, y}).In(legend) {
				continue
			}
			outside++
			if outside < 5 {
				t.Errorf("pixel (%d, %d) changed outside the far cells and the legend", x, y)
			}
		}
	}
	if outside > 0 {
		t.Errorf("%d pixels changed outside the far cells and the legend", outside)
	}
	if inFar == 0 {
		t.Error("no pixel of a far cell is hatched")
	}
	// Hatch lines are thin: about one pixel in six of a far cell's area.
	total := 0
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			if isFar, has := farCell(x, y); isFar && has {
				total++
			}
		}
	}
	if share := float64(inFar) / float64(total); share < 0.08 || share > 0.25 {
		t.Errorf("hatch covers %.3f of the far cells' pixels, want about 1/6", share)
	}
}
