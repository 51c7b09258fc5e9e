package plotting

import (
	"bytes"
	"flag"
	"image"
	stddraw "image/draw"
	"os"
	"path/filepath"
	"sort"
	"testing"
)

var figuresDir = flag.String("figures", "", "write every test figure as PNG and SVG into this folder, to look at")

// Every figure is checked as a picture (Inspect, Inspection.Problems):
//   - the PNG decodes (image/png, the standard library's decoder) at the
//     size the figure asks for, to a pixel, and stays under 200 KiB;
//   - no pixel of a curve colour lies outside the data areas, legends,
//     key and colour bars the figure reports, by more than a glyph's
//     radius and a pixel of antialiasing;
//   - every style the figure uses has curve pixels inside the data
//     areas (at least 40: a curve that vanished would fail);
//   - the SVG is well-formed XML with an svg root, its embedded images
//     labelled PNG and stretched to their boxes, its text with a
//     sans-serif fallback (SVGProblems).
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
			in, err := Inspect(fig)
			if err != nil {
				t.Fatal(err)
			}
			if *figuresDir != "" {
				writeFile(t, filepath.Join(*figuresDir, name+".png"), in.PNG)
			}
			for _, p := range in.Problems() {
				t.Error(p)
			}
			var svg bytes.Buffer
			if _, err := fig.render(&svg, SVG); err != nil {
				t.Fatal(err)
			}
			if *figuresDir != "" {
				writeFile(t, filepath.Join(*figuresDir, name+".svg"), svg.Bytes())
			}
			for _, p := range SVGProblems(svg.Bytes()) {
				t.Error(p)
			}
		})
	}
}

// TestInspectionFails: the picture checks see a curve drawn outside its
// axes and a curve that is not drawn at all (checks that cannot fail
// would prove nothing).
func TestInspectionFails(t *testing.T) {
	off := &Figure{Panels: []Panel{{X: Axis{Label: "x", Min: 0, Max: 1}, Y: Axis{Label: "y", Min: 0, Max: 1},
		Lines: []Line{{X: []float64{0, 1}, Y: []float64{0.5, 0.5}, Style: 1}, {X: []float64{0, 1}, Y: []float64{5, 6}, Style: 2}}}}}
	in, err := Inspect(off)
	if err != nil {
		t.Fatal(err)
	}
	if len(in.Problems()) == 0 {
		t.Errorf("a curve above its axes passed the picture checks (inside counts %v)", in.Inside)
	}
	// Stray pixels: a curve colour painted into the margin of a figure
	// that passes must be seen.
	good := &Figure{Panels: []Panel{{X: Axis{Label: "x"}, Y: Axis{Label: "y"},
		Lines: []Line{{X: []float64{0, 1}, Y: []float64{0, 1}, Style: 1}}}}}
	var buf bytes.Buffer
	d, err := good.render(&buf, PNG)
	if err != nil {
		t.Fatal(err)
	}
	in, err = Inspect(good)
	if err != nil {
		t.Fatal(err)
	}
	if p := in.Problems(); len(p) != 0 || in.Stray != 0 {
		t.Fatalf("a plain figure fails: %q", p)
	}
	img := image.NewRGBA(in.Image.Bounds())
	stddraw.Draw(img, img.Bounds(), in.Image, image.Point{}, stddraw.Src)
	for y := 2; y < 5; y++ {
		img.Set(2, y, Colour(0))
	}
	in.Image, in.Inside, in.Stray, in.StrayAt = img, map[int]int{}, 0, nil
	in.look(d)
	if in.Stray != 3 || len(in.Problems()) == 0 {
		t.Errorf("3 pixels painted in the corner: %d stray pixels seen, problems %q", in.Stray, in.Problems())
	}
}

func writeFile(t *testing.T, path string, b []byte) {
	t.Helper()
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
}
