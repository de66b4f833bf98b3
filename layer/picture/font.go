package picture

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"strings"
	"sync"

	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/math/fixed"
)

// picFonts parses the embedded Go fonts (regular, bold) once; no system
// fonts are read, so pictures look the same on every machine.
var picFonts = sync.OnceValues(func() ([2]*opentype.Font, error) {
	var fs [2]*opentype.Font
	for i, ttf := range [][]byte{goregular.TTF, gobold.TTF} {
		f, err := opentype.Parse(ttf)
		if err != nil {
			return fs, fmt.Errorf("picture: parse embedded Go font: %w", err)
		}
		fs[i] = f
	}
	return fs, nil
})

// picFaces makes font faces at pixel sizes; faces hold glyph caches and are
// not safe for concurrent use, so each picture gets its own.
type picFaces struct {
	fonts [2]*opentype.Font
	cache map[[2]int]font.Face
}

func picNewFaces() (*picFaces, error) {
	fs, err := picFonts()
	if err != nil {
		return nil, err
	}
	return &picFaces{fonts: fs, cache: map[[2]int]font.Face{}}, nil
}

// face gives the regular (bold false) or bold face at size px (72 dpi, so
// points are pixels).
func (p *picFaces) face(size float64, bold bool) font.Face {
	b := 0
	if bold {
		b = 1
	}
	k := [2]int{int(size*64 + 0.5), b}
	if f, ok := p.cache[k]; ok {
		return f
	}
	f, err := opentype.NewFace(p.fonts[b], &opentype.FaceOptions{Size: float64(k[0]) / 64, DPI: 72, Hinting: font.HintingFull})
	if err != nil {
		// Only a zero or negative size fails; fall back to a size that works.
		f, _ = opentype.NewFace(p.fonts[b], &opentype.FaceOptions{Size: 12, DPI: 72, Hinting: font.HintingFull})
	}
	p.cache[k] = f
	return f
}

// picTextWidth is the advance width of s in pixels.
func picTextWidth(f font.Face, s string) int { return font.MeasureString(f, s).Ceil() }

// picLineHeight is the distance between baselines for the face.
func picLineHeight(f font.Face) int {
	m := f.Metrics()
	return (m.Ascent + m.Descent).Ceil() + m.Height.Ceil()/6
}

// picAscent is the height of the face above its baseline.
func picAscent(f font.Face) int { return f.Metrics().Ascent.Ceil() }

// picDrawText draws s with its baseline at (x, y).
func picDrawText(dst draw.Image, f font.Face, x, y int, c color.Color, s string) {
	d := font.Drawer{Dst: dst, Src: image.NewUniform(c), Face: f, Dot: fixed.P(x, y)}
	d.DrawString(s)
}

// picDrawHalo draws s with a light halo around it, for text over the map.
func picDrawHalo(dst draw.Image, f font.Face, x, y int, fg, halo color.Color, s string) {
	for _, o := range [][2]int{{-1, -1}, {0, -1}, {1, -1}, {-1, 0}, {1, 0}, {-1, 1}, {0, 1}, {1, 1}, {-2, 0}, {2, 0}, {0, -2}, {0, 2}} {
		picDrawText(dst, f, x+o[0], y+o[1], halo, s)
	}
	picDrawText(dst, f, x, y, fg, s)
}

// picWrap breaks s into lines no wider than width pixels, at spaces; a word
// wider than the line stands alone on its line.
func picWrap(f font.Face, s string, width int) []string {
	var lines []string
	for _, para := range strings.Split(s, "\n") {
		words := strings.Fields(para)
		cur := ""
		for _, w := range words {
			try := w
			if cur != "" {
				try = cur + " " + w
			}
			if cur != "" && picTextWidth(f, try) > width {
				lines = append(lines, cur)
				cur = w
				continue
			}
			cur = try
		}
		if cur != "" || len(words) == 0 {
			lines = append(lines, cur)
		}
	}
	return lines
}

// picHasGlyphs reports whether the face draws every rune of s (Go fonts
// cover WGL4, which holds the degree sign and the <= and >= signs).
func picHasGlyphs(f font.Face, s string) bool {
	for _, r := range s {
		if _, ok := f.GlyphAdvance(r); !ok {
			return false
		}
	}
	return true
}
