package picture

import (
	"bufio"
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"

	"drygrid/bands"
	"drygrid/grid"
	"drygrid/publish"

	"github.com/paulmach/orb"
)

// Point is a station location in degrees (any longitude form).
type Point struct{ Lon, Lat float64 }

// Region is a region outline drawn over the bands, with an optional
// name written at its centre when there is room.
type Region struct {
	Name string
	Geom orb.MultiPolygon
}

// Input is what map.png shows.
type Input struct {
	Bands    *grid.Uint8   // band codes; Bands.NoData (usually 0) is drawn as no data
	Scheme   *bands.Scheme // labels and colours of the codes
	Stations []Point
	Regions  []Region
	Title    string // e.g. "Kelverin Islands (fictitious) - SPI, 30 days ending 30 November 2025"
	Subtitle string // e.g. "IDW power 2, 12 neighbours, 300 km; 214 stations"
	Caution  string // the caution line; empty gives drygrid's standard caution
	// NoDataLabel labels the no-data swatch; empty gives layer.NoDataLabel.
	NoDataLabel string
	// Produced is the production line drawn under the caution, e.g.
	// "made 2026-12-01 06:00 UTC · SPI, 30 days ending 2026-11-30 · data:
	// Kelverin Met Service (fictitious)"; empty leaves it out.
	Produced string
	// Far, when set, marks (nonzero) the cells of Bands whose nearest
	// station is farther than FarKm km; those holding a value are overdrawn
	// with a thin dark-grey diagonal hatch and the legend gets the entry
	// "Nearest station over FarKm km". It has Bands' grid. Nil leaves the
	// picture as it was.
	Far   *grid.Uint8
	FarKm float64
}

// Options tunes the picture.
type Options struct {
	Width int // pixels; 0 gives 1400; 600..4000 accepted
	// Stations says which station markers are drawn: MarksAuto ("" too)
	// thins and shrinks them on a dense network (at most MaxMarkers),
	// MarksAll draws every one, MarksNone none.
	Stations StationMarks
}

// WriteFile writes map.png to path atomically (an earlier file survives a
// failed write).
func WriteFile(path string, in Input, opt Options) error {
	return publish.WriteFile(path, func(w *bufio.Writer) error { return Encode(w, in, opt) })
}

// Encode draws the bands, stations, region outlines, graticule,
// legend, title and caution as a PNG. The same input gives the same bytes.
func Encode(w io.Writer, in Input, opt Options) error {
	img, err := picRender(in, opt)
	if err != nil {
		return err
	}
	if err := png.Encode(w, img); err != nil {
		return fmt.Errorf("picture: encode PNG: %w", err)
	}
	return nil
}

// Colours of the picture (ours). No data is a hatched light grey, clearly
// apart from the near-white "Near normal" band.
var (
	picWhite      = color.RGBA{255, 255, 255, 255}
	picInk        = color.RGBA{26, 26, 26, 255}
	picMuted      = color.RGBA{70, 70, 70, 255}
	picFrame      = color.RGBA{51, 51, 51, 255}
	picNoData     = color.RGBA{0xd9, 0xd9, 0xd9, 255}
	picNoDataLine = color.RGBA{0xb0, 0xb0, 0xb0, 255}
	picGrat       = color.NRGBA{20, 20, 20, 64}
	picCautionBg  = color.RGBA{0xee, 0xee, 0xee, 255}
	picCautionBar = color.RGBA{0x33, 0x33, 0x33, 255}
	picFarLine    = color.RGBA{0x4d, 0x4d, 0x4d, 255} // the far-cell hatch: thin dark-grey lines
)

// layer.NoDataLabel labels the no-data swatch.

// picLayout places the map: its pixel rectangle and the lon/lat extent it
// shows (the grid's, longitudes running east past 180 on antimeridian grids).
type picLayout struct {
	mapR             image.Rectangle
	west, north      float64
	lonSpan, latSpan float64
	crossing         bool
}

// x and y give the pixel position of a longitude and latitude; longitudes
// west of a grid crossing the antimeridian are moved past 180 first.
func (l *picLayout) x(lon float64) float64 {
	if l.crossing && lon < l.west-1e-9 {
		lon += 360
	}
	return float64(l.mapR.Min.X) + (lon-l.west)/l.lonSpan*float64(l.mapR.Dx())
}

func (l *picLayout) y(lat float64) float64 {
	return float64(l.mapR.Min.Y) + (l.north-lat)/l.latSpan*float64(l.mapR.Dy())
}

func picCheck(in Input, opt *Options) error {
	if in.Bands == nil {
		return errors.New("picture: no band raster")
	}
	if in.Scheme == nil || len(in.Scheme.Bands) == 0 {
		return errors.New("picture: no band scheme")
	}
	s := in.Bands.Spec
	if s.Cols < 1 || s.Rows < 1 || !(s.Res > 0) || math.IsInf(s.Res, 0) || math.IsNaN(s.West) || math.IsNaN(s.North) ||
		math.IsInf(s.West, 0) || math.IsInf(s.North, 0) {
		return fmt.Errorf("picture: grid %v is empty or not finite", s)
	}
	if len(in.Bands.Data) != s.Len() {
		return fmt.Errorf("picture: band raster holds %d cells, grid %d x %d needs %d", len(in.Bands.Data), s.Cols, s.Rows, s.Len())
	}
	if in.Far != nil && (in.Far.Spec != s || len(in.Far.Data) != len(in.Bands.Data)) {
		return fmt.Errorf("picture: far-cell raster grid %v is not the bands' %v", in.Far.Spec, s)
	}
	if in.Far != nil && (!(in.FarKm > 0) || math.IsInf(in.FarKm, 0)) {
		return fmt.Errorf("picture: far-cell distance %g km must be above 0", in.FarKm)
	}
	if opt.Width == 0 {
		opt.Width = 1400
	}
	if opt.Width < 600 || opt.Width > 4000 {
		return fmt.Errorf("picture: width %d px must be in 600..4000", opt.Width)
	}
	m, err := ParseStationMarks(string(opt.Stations))
	if err != nil {
		return fmt.Errorf("picture: %w", err)
	}
	opt.Stations = m
	return nil
}

// picRender lays out and draws the whole picture.
func picRender(in Input, opt Options) (*image.RGBA, error) {
	p, err := picPaint(in, opt)
	if err != nil {
		return nil, err
	}
	return p.img, nil
}

// picPaint draws the picture and keeps the layout (the tests read it).
func picPaint(in Input, opt Options) (*picPainter, error) {
	if err := picCheck(in, &opt); err != nil {
		return nil, err
	}
	faces, err := picNewFaces()
	if err != nil {
		return nil, err
	}
	p := &picPainter{in: in, faces: faces, marksMode: opt.Stations}
	p.layout(opt.Width)
	p.img = image.NewRGBA(image.Rect(0, 0, opt.Width, p.height))
	p.draw()
	return p, nil
}
