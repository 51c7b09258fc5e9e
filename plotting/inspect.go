package plotting

import (
	"bytes"
	"encoding/xml"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"sort"

	"gonum.org/v1/plot/vg"
)

// MaxPNGBytes bounds a figure's PNG file: pages and folders keep many.
const MaxPNGBytes = 200 << 10

// Inspection is what a picture check sees of a figure drawn as PNG: the
// file, its decoded image, the size the figure asked for, and where the
// pixels of curve colours fell. Packages that draw figures check theirs
// with it (Problems), as this package's own tests do.
type Inspection struct {
	// PNG is the encoded file; Image the same decoded by image/png.
	PNG   []byte
	Image image.Image
	// WantWidth and WantHeight are the pixel size the layout asked for:
	// the figure's width and the canvas height at DPI pixels per inch.
	WantWidth, WantHeight float64
	// MinHeight is the least height its panels need (rows × panel
	// height), in pixels.
	MinHeight float64
	// Data are the panels' data areas in image pixels, column by column.
	Data []image.Rectangle
	// Ranges are the panels' X min, X max, Y min and Y max as drawn.
	Ranges [][4]float64
	// Stray counts pixels of a curve colour outside every data area,
	// legend, key and colour bar (data areas widened by a glyph's radius
	// and a pixel and a half of antialiasing); StrayAt holds the first
	// few.
	Stray   int
	StrayAt []image.Point
	// Inside counts the curve-colour pixels inside the data areas, by
	// palette style; Styles lists the styles the figure's lines and bars
	// are drawn in (heat maps aside).
	Inside map[int]int
	Styles []int
}

// MinStylePixels is the fewest pixels of each style a data area must
// hold: a curve that vanished (drawn off its axes, or not at all) has
// none.
const MinStylePixels = 40

// Inspect draws f as PNG and looks at the picture.
func Inspect(f *Figure) (*Inspection, error) {
	var buf bytes.Buffer
	d, err := f.render(&buf, PNG)
	if err != nil {
		return nil, err
	}
	img, err := png.Decode(bytes.NewReader(buf.Bytes()))
	if err != nil {
		return nil, fmt.Errorf("png.Decode: %w", err)
	}
	w, ph := f.Width, f.PanelHeight
	if w <= 0 {
		w = DefaultWidth
	}
	if ph <= 0 {
		ph = DefaultPanelHeight
	}
	rows := max(len(f.Panels), len(f.Beside))
	in := &Inspection{PNG: buf.Bytes(), Image: img, WantWidth: w / 2.54 * DPI, WantHeight: pxOf(d.size.Y),
		MinHeight: ph * float64(rows) / 2.54 * DPI, Ranges: d.ranges, Inside: map[int]int{}, Styles: usedStyles(f)}
	in.look(d)
	return in, nil
}

// pxOf converts a length in points to PNG pixels.
func pxOf(l vg.Length) float64 { return float64(l) / 72 * DPI }

type pxBox struct{ x0, y0, x1, y1 float64 }

func (in *Inspection) look(d *drawn) {
	hpx := pxOf(d.size.Y)
	slack := pxOf(vg.Points(glyphSize)) + 1.5
	toBox := func(r vg.Rectangle, pad float64) pxBox {
		return pxBox{pxOf(r.Min.X) - pad, hpx - pxOf(r.Max.Y) - pad, pxOf(r.Max.X) + pad, hpx - pxOf(r.Min.Y) + pad}
	}
	var data, allowed []pxBox
	for _, r := range d.data {
		data = append(data, toBox(r, slack))
		b := toBox(r, 0)
		in.Data = append(in.Data, image.Rect(int(math.Round(b.x0)), int(math.Round(b.y0)), int(math.Round(b.x1)), int(math.Round(b.y1))))
	}
	allowed = append(allowed, data...)
	for _, r := range append(append(d.legends, d.colorBars...), d.key) {
		allowed = append(allowed, toBox(r, 1.5))
	}
	inAny := func(bs []pxBox, x, y float64) bool {
		for _, b := range bs {
			if x >= b.x0 && x <= b.x1 && y >= b.y0 && y <= b.y1 {
				return true
			}
		}
		return false
	}
	bd := in.Image.Bounds()
	for y := bd.Min.Y; y < bd.Max.Y; y++ {
		for x := bd.Min.X; x < bd.Max.X; x++ {
			s := curveStyle(in.Image.At(x, y))
			if s < 0 {
				continue
			}
			cx, cy := float64(x)+0.5, float64(y)+0.5
			if !inAny(allowed, cx, cy) {
				if len(in.StrayAt) < 5 {
					in.StrayAt = append(in.StrayAt, image.Pt(x, y))
				}
				in.Stray++
			}
			if inAny(data, cx, cy) {
				in.Inside[s]++
			}
		}
	}
}

// Problems returns what is wrong with the picture, one sentence each, or
// nothing: the PNG must be the size the figure asks for (to a pixel) and
// at least its panels high, under MaxPNGBytes, with no curve-colour pixel
// outside the data areas, legends, key and colour bars, and at least
// MinStylePixels pixels of every style it draws in inside its data areas.
func (in *Inspection) Problems() []string {
	var out []string
	b := in.Image.Bounds()
	if math.Abs(float64(b.Dx())-in.WantWidth) > 1 || math.Abs(float64(b.Dy())-in.WantHeight) > 1 {
		out = append(out, fmt.Sprintf("PNG %d×%d px, want %.0f×%.0f", b.Dx(), b.Dy(), in.WantWidth, in.WantHeight))
	}
	if in.WantHeight < in.MinHeight-1 {
		out = append(out, fmt.Sprintf("canvas %.1f px high, less than its panels' %.1f px", in.WantHeight, in.MinHeight))
	}
	if len(in.PNG) > MaxPNGBytes {
		out = append(out, fmt.Sprintf("PNG is %d KiB, want under %d KiB", len(in.PNG)>>10, MaxPNGBytes>>10))
	}
	if in.Stray > 0 {
		out = append(out, fmt.Sprintf("%d curve pixels lie outside every data area (first at %v)", in.Stray, in.StrayAt))
	}
	for _, s := range in.Styles {
		if Colour(s) == (color.RGBA{0, 0, 0, 255}) {
			continue // black is the axes' and the text's colour too
		}
		if in.Inside[s] < MinStylePixels {
			out = append(out, fmt.Sprintf("style %d (%s): %d pixels inside the data areas, want ≥ %d", s, Hex(s), in.Inside[s], MinStylePixels))
		}
	}
	return out
}

// curveStyle returns the palette style a pixel's colour belongs to (its
// RGB distance to the style's colour at most 10 of 255), or −1. Black is
// left out: axes and text are black too.
func curveStyle(c color.Color) int {
	r, g, b, _ := c.RGBA()
	for i := 0; i < PaletteSize; i++ {
		p := Colour(i)
		if p == (color.RGBA{0, 0, 0, 255}) {
			continue
		}
		dr, dg, db := float64(r>>8)-float64(p.R), float64(g>>8)-float64(p.G), float64(b>>8)-float64(p.B)
		if math.Sqrt(dr*dr+dg*dg+db*db) <= 10 {
			return i
		}
	}
	return -1
}

// usedStyles lists the palette styles the figure's lines and bars draw
// with (not heat maps, whose colours are the heat scale's).
func usedStyles(f *Figure) []int {
	seen := map[int]bool{}
	for _, col := range [][]Panel{f.Panels, f.Beside} {
		for _, pn := range col {
			if pn.Heat != nil {
				continue
			}
			for i, ln := range pn.Lines {
				if ln.Colour != nil {
					for s := 0; s < PaletteSize; s++ {
						if ln.Colour == color.Color(Colour(s)) {
							seen[s] = true
						}
					}
					continue
				}
				_, _, _, _, idx := ln.style(i)
				seen[mod(idx, PaletteSize)] = true
			}
			for g, b := range pn.Bars {
				idx := g
				if b.Style > 0 {
					idx = b.Style - 1
				}
				seen[mod(idx, PaletteSize)] = true
			}
		}
	}
	var out []int
	for s := range seen {
		out = append(out, s)
	}
	sort.Ints(out)
	return out
}

// SVGProblems returns what is wrong with an SVG file the package wrote,
// one sentence each, or nothing: it must be well-formed XML with an svg
// root, its embedded images labelled PNG and stretched to their boxes,
// its text with a sans-serif fallback (see svgFixups).
func SVGProblems(b []byte) []string {
	var out []string
	dec := xml.NewDecoder(bytes.NewReader(b))
	root := ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			return append(out, fmt.Sprintf("SVG is not well-formed XML: %v", err))
		}
		if se, ok := tok.(xml.StartElement); ok && root == "" {
			root = se.Name.Local
		}
	}
	if root != "svg" {
		out = append(out, fmt.Sprintf("SVG root element %q, want svg", root))
	}
	if bytes.Contains(b, []byte("image/jpg")) ||
		bytes.Count(b, []byte("<image ")) != bytes.Count(b, []byte(`<image preserveAspectRatio="none" `)) {
		out = append(out, "an embedded image is mislabelled or keeps its aspect ratio")
	}
	if bytes.Contains(b, []byte("font-family:Liberation Sans;")) {
		out = append(out, "text without a sans-serif fallback")
	}
	return out
}
