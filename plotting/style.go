package plotting

import (
	"fmt"
	"image/color"

	stdfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The one look of every figure: a colour-blind-safe palette whose entries
// also differ in dash pattern, glyph and bar hatching (so a grey print
// still tells them apart), one sans-serif face at sizes readable at the
// default figure size, and thin grey grid lines.

// palette is the qualitative palette of M. Okabe and K. Ito, "Color
// Universal Design (CUD): how to make figures and presentations that are
// friendly to colorblind people" (2002, revised 2008), with the sRGB
// values published by B. Wong, "Points of view: Color blindness", Nature
// Methods 8, 2011, p. 441. Its yellow (#F0E442) is left out: at a contrast
// ratio of 1.2:1 against white it does not show as a thin line. The order
// puts the pairs that differ most in lightness first (blue, orange,
// bluish green), since most figures hold two or three curves.
var palette = [...]color.RGBA{
	{0x00, 0x72, 0xB2, 0xFF}, // blue
	{0xE6, 0x9F, 0x00, 0xFF}, // orange
	{0x00, 0x9E, 0x73, 0xFF}, // bluish green
	{0xD5, 0x5E, 0x00, 0xFF}, // vermillion
	{0xCC, 0x79, 0xA7, 0xFF}, // reddish purple
	{0x56, 0xB4, 0xE9, 0xFF}, // sky blue
	{0x00, 0x00, 0x00, 0xFF}, // black
}

// PaletteSize is the number of distinct colours; style i takes colour
// i mod PaletteSize.
const PaletteSize = len(palette)

// Colour returns the colour of style i (i ≥ 0; colours repeat every
// PaletteSize styles, whose dash patterns then differ).
func Colour(i int) color.RGBA { return palette[mod(i, PaletteSize)] }

// Hex returns the colour of style i as a CSS hex string, "#0072b2", so
// that a web page can give its players the colours of the figures.
func Hex(i int) string {
	c := Colour(i)
	return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B)
}

// Palette returns the CSS hex strings of the first n styles.
func Palette(n int) []string {
	out := make([]string, n)
	for i := range out {
		out[i] = Hex(i)
	}
	return out
}

func mod(i, n int) int {
	i %= n
	if i < 0 {
		i += n
	}
	return i
}

// dashPatterns are the dash patterns of styles 0, 1, 2, … (repeating):
// solid, long dash, dots, dash-dot, dash-dot-dot. Lengths in points.
var dashPatterns = [...][]vg.Length{
	nil,
	{vg.Points(7), vg.Points(3)},
	{vg.Points(1.6), vg.Points(2)},
	{vg.Points(7), vg.Points(2.5), vg.Points(1.6), vg.Points(2.5)},
	{vg.Points(5), vg.Points(2), vg.Points(1.6), vg.Points(2), vg.Points(1.6), vg.Points(2)},
}

// StyleDash returns the dash-pattern index of style i (0 solid).
func StyleDash(i int) int { return mod(i, len(dashPatterns)) }

// dashes returns dash pattern k (Line.Dash): the patterns above, then
// longer composite ones.
func dashes(k int) []vg.Length {
	if k < len(dashPatterns) {
		return dashPatterns[max(k, 0)]
	}
	d := vg.Points(float64(2 + k))
	return []vg.Length{d, vg.Points(2), d / 2, vg.Points(2)}
}

// glyphs are the marker shapes of styles 0, 1, 2, … (repeating).
var glyphs = [...]draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.BoxGlyph{}, draw.PyramidGlyph{}, draw.RingGlyph{},
	draw.CrossGlyph{}, draw.SquareGlyph{}, draw.PlusGlyph{},
}

func glyph(i int) draw.GlyphDrawer { return glyphs[mod(i, len(glyphs))] }

// Hatch patterns of bar groups (by style): none, rising diagonals,
// falling diagonals, horizontals, verticals, crossed diagonals, grid.
type hatch int

const (
	hatchNone hatch = iota
	hatchRise
	hatchFall
	hatchHorizontal
	hatchVertical
	hatchCross
	hatchGrid
	hatchCount
)

func hatchOf(i int) hatch { return hatch(mod(i, int(hatchCount))) }

// Type sizes in points. At the default 18 cm width and 120 pixels per
// inch the smallest (9 pt) is 15 pixels high.
const (
	FigureTitleSize = 12
	TitleSize       = 11
	LabelSize       = 10
	TickSize        = 9
	LegendSize      = 9
)

// Line widths in points.
const (
	curveWidth = 1.6
	axisWidth  = 0.7
	gridWidth  = 0.5
	markWidth  = 1.0
	glyphSize  = 2.6 // glyph radius
)

var (
	sans     = font.Font{Typeface: "Liberation", Variant: "Sans"}
	gridGrey = color.RGBA{0xD9, 0xD9, 0xDE, 0xFF}
	markGrey = color.RGBA{0x55, 0x55, 0x5C, 0xFF}
	frameCol = color.RGBA{0x8C, 0x8C, 0x94, 0xFF}
)

// textStyle returns the figure's text style at size pt.
func textStyle(pt float64, bold bool) text.Style {
	f := sans
	if bold {
		f.Weight = stdfont.WeightBold
	}
	return text.Style{
		Color:   color.Black,
		Font:    font.From(f, vg.Points(pt)),
		Handler: plot.DefaultTextHandler,
	}
}
