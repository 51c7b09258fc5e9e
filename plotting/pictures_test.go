package plotting

import (
	"bytes"
	"encoding/xml"
	"flag"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"sort"
	"testing"

	"gonum.org/v1/plot/vg"
)

var figuresDir = flag.String("figures", "", "write every test figure as PNG and SVG into this folder, to look at")

// maxPNGBytes bounds a figure's file: pages and folders keep many.
const maxPNGBytes = 200 << 10

// Every figure is checked as a picture:
//   - the PNG decodes (image/png, the standard library's decoder) at the
//     size the figure asks for, to a pixel, and stays under 200 KiB;
//   - no pixel of a curve colour lies outside the data areas, legends,
//     key and colour bars the figure reports, by more than a glyph's
//     radius and a pixel of antialiasing;
//   - every style the figure uses has curve pixels inside the data
//     areas (at least 40: a curve that vanished would fail);
//   - the SVG is well-formed XML with an svg root, its embedded images
//     labelled PNG and stretched to their boxes, its text with a
//     sans-serif fallback.
func TestPictures(t *testing.T) {
	figs, err := allFigures()
	if err != nil {
		t.Fatal(err)
	}
	names := make([]string, 0, len(figs))
	for n := range figs {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, name := range names {
		fig := figs[name]
		t.Run(name, func(t *testing.T) {
			var buf bytes.Buffer
			d, err := fig.render(&buf, PNG)
			if err != nil {
				t.Fatal(err)
			}
			if *figuresDir != "" {
				writeFile(t, filepath.Join(*figuresDir, name+".png"), buf.Bytes())
			}
			if buf.Len() > maxPNGBytes {
				t.Errorf("PNG is %d KiB, want under %d KiB", buf.Len()>>10, maxPNGBytes>>10)
			}
			img, err := png.Decode(bytes.NewReader(buf.Bytes()))
			if err != nil {
				t.Fatalf("png.Decode: %v", err)
			}
			checkSize(t, fig, d, img)
			checkCurvesInside(t, fig, d, img)

			var svg bytes.Buffer
			if _, err := fig.render(&svg, SVG); err != nil {
				t.Fatal(err)
			}
			if *figuresDir != "" {
				writeFile(t, filepath.Join(*figuresDir, name+".svg"), svg.Bytes())
			}
			checkSVG(t, svg.Bytes())
		})
	}
}

func writeFile(t *testing.T, path string, b []byte) {
	t.Helper()
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
}

// px converts a length in points to PNG pixels.
func px(l vg.Length) float64 { return float64(l) / 72 * DPI }

// checkSize: the width is the figure's (default 18 cm), the height the
// canvas the layout computed; both at DPI pixels per inch, to a pixel.
func checkSize(t *testing.T, fig *Figure, d *drawn, img image.Image) {
	t.Helper()
	w := fig.Width
	if w == 0 {
		w = DefaultWidth
	}
	wantW := w / 2.54 * DPI
	wantH := px(d.size.Y)
	ph := fig.PanelHeight
	if ph == 0 {
		ph = DefaultPanelHeight
	}
	rows := max(len(fig.Panels), len(fig.Beside))
	if px(d.size.Y) < ph*float64(rows)/2.54*DPI-1 {
		t.Errorf("canvas %.1f px high, less than its %d panels of %g cm", px(d.size.Y), rows, ph)
	}
	b := img.Bounds()
	if math.Abs(float64(b.Dx())-wantW) > 1 || math.Abs(float64(b.Dy())-wantH) > 1 {
		t.Errorf("PNG %d×%d px, want %.0f×%.0f", b.Dx(), b.Dy(), wantW, wantH)
	}
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

func checkCurvesInside(t *testing.T, fig *Figure, d *drawn, img image.Image) {
	t.Helper()
	hpx := px(d.size.Y)
	slack := px(vg.Points(glyphSize)) + 1.5
	type box struct{ x0, y0, x1, y1 float64 }
	toBox := func(r vg.Rectangle, pad float64) box {
		return box{px(r.Min.X) - pad, hpx - px(r.Max.Y) - pad, px(r.Max.X) + pad, hpx - px(r.Min.Y) + pad}
	}
	var data, allowed []box
	for _, r := range d.data {
		data = append(data, toBox(r, slack))
	}
	allowed = append(allowed, data...)
	for _, r := range append(append(d.legends, d.colorBars...), d.key) {
		allowed = append(allowed, toBox(r, 1.5))
	}
	in := func(bs []box, x, y float64) bool {
		for _, b := range bs {
			if x >= b.x0 && x <= b.x1 && y >= b.y0 && y <= b.y1 {
				return true
			}
		}
		return false
	}
	inside := map[int]int{}
	outside := 0
	bd := img.Bounds()
	for y := bd.Min.Y; y < bd.Max.Y; y++ {
		for x := bd.Min.X; x < bd.Max.X; x++ {
			s := curveStyle(img.At(x, y))
			if s < 0 {
				continue
			}
			cx, cy := float64(x)+0.5, float64(y)+0.5
			if !in(allowed, cx, cy) {
				if outside < 5 {
					t.Errorf("pixel (%d, %d) of style %d lies outside every data area", x, y, s)
				}
				outside++
			}
			if in(data, cx, cy) {
				inside[s]++
			}
		}
	}
	if outside > 5 {
		t.Errorf("… %d curve pixels outside in all", outside)
	}
	for _, s := range usedStyles(fig) {
		if Colour(s) == (color.RGBA{0, 0, 0, 255}) {
			continue
		}
		if inside[s] < 40 {
			t.Errorf("style %d (%s): %d pixels inside the data areas, want ≥ 40", s, Hex(s), inside[s])
		}
	}
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

func checkSVG(t *testing.T, b []byte) {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(b))
	root := ""
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		if se, ok := tok.(xml.StartElement); ok && root == "" {
			root = se.Name.Local
		}
	}
	if root != "svg" {
		t.Errorf("SVG root element %q, want svg", root)
	}
	// Embedded rasters are declared as what they are, fill their boxes,
	// and text falls back to a sans-serif face (see svgFixups).
	if bytes.Contains(b, []byte("image/jpg")) ||
		bytes.Count(b, []byte("<image ")) != bytes.Count(b, []byte(`<image preserveAspectRatio="none" `)) {
		t.Error("an embedded image is mislabelled or keeps its aspect ratio")
	}
	if bytes.Contains(b, []byte("font-family:Liberation Sans;")) {
		t.Error("text without a sans-serif fallback")
	}
}
