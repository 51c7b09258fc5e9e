package plotting

import (
	"bytes"
	"encoding/xml"
	"errors"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func testFigure() *Figure {
	f := []float64{20, 50, 100, 200, 500, 1000, 2000, 5000, 10000, 20000}
	db := make([]float64, len(f))
	for i, x := range f {
		// First-order low-pass at 1 kHz, with a gap where the data are missing.
		db[i] = -10 * math.Log10(1+(x/1000)*(x/1000))
	}
	db[4] = math.Inf(-1)
	return &Figure{Panels: []Panel{
		{Title: "response", X: Axis{Label: "frequency (Hz)", Log: true}, Y: Axis{Label: "gain (dB)"},
			Lines: []Line{{Label: "tone.tone=0", X: f, Y: db}, {Label: "tone.tone=1", X: f, Y: db, Dash: 1, Markers: true}}},
		{Title: "harmonics", Y: Axis{Label: "level (dBc)"}, Categories: []string{"H2", "H3", "H4"}, Floor: -120,
			Bars: []BarGroup{{Label: "9 V", Values: []float64{-30, -12, math.Inf(-1)}}, {Label: "7 V", Values: []float64{-25, -10, -140}}}},
	}}
}

// The written files must be what their names say: a PNG that image/png
// (the standard library's decoder, an outside reference for the format)
// decodes at the requested size, and well-formed SVG XML.
func TestRenderFormats(t *testing.T) {
	tests := []struct {
		format string
		check  func(t *testing.T, b []byte)
	}{
		{PNG, func(t *testing.T, b []byte) {
			img, err := png.Decode(bytes.NewReader(b))
			if err != nil {
				t.Fatalf("png.Decode: %v", err)
			}
			// 18 cm at 120 dpi = 850.4 px; two 9 cm panels = 850.4 px.
			// Tolerance: one pixel of rounding.
			w, h := img.Bounds().Dx(), img.Bounds().Dy()
			if math.Abs(float64(w)-18/2.54*120) > 1 || math.Abs(float64(h)-18/2.54*120) > 1 {
				t.Errorf("PNG size %d×%d px, want 850×850", w, h)
			}
		}},
		{SVG, func(t *testing.T, b []byte) {
			d := xml.NewDecoder(bytes.NewReader(b))
			root := ""
			for {
				tok, err := d.Token()
				if err != nil {
					if err.Error() != "EOF" {
						t.Fatalf("SVG is not well-formed XML: %v", err)
					}
					break
				}
				if se, ok := tok.(xml.StartElement); ok && root == "" {
					root = se.Name.Local
				}
			}
			if root != "svg" {
				t.Errorf("root element %q, want svg", root)
			}
			for _, want := range []string{"tone.tone=0", "frequency (Hz)", "H3", "20k"} {
				if !bytes.Contains(b, []byte(want)) {
					t.Errorf("SVG lacks the text %q", want)
				}
			}
		}},
	}
	for _, tc := range tests {
		t.Run(tc.format, func(t *testing.T) {
			var buf bytes.Buffer
			if err := testFigure().Render(&buf, tc.format); err != nil {
				t.Fatal(err)
			}
			tc.check(t, buf.Bytes())
		})
	}
}

func TestSaveAtomicAndFormat(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"a.png", "b.SVG"} {
		if err := Save(filepath.Join(dir, name), testFigure()); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
	}
	err := Save(filepath.Join(dir, "c.pdf"), testFigure())
	if !errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), "c.pdf") {
		t.Errorf("Save(c.pdf) = %v, want ErrFormat naming the file", err)
	}
	// A failed save leaves no file and no temporary behind.
	err = Save(filepath.Join(dir, "d.png"), &Figure{})
	if err == nil {
		t.Error("empty figure: want an error")
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 2 {
		var names []string
		for _, e := range ents {
			names = append(names, e.Name())
		}
		t.Errorf("directory holds %v, want only a.png and b.SVG", names)
	}
}

func TestPieces(t *testing.T) {
	ln := Line{X: []float64{-1, 1, 2, 3, 4, 5}, Y: []float64{1, 1, math.NaN(), 3, 4, math.Inf(1)}}
	got := pieces(ln, true, false)
	if len(got) != 2 || len(got[0]) != 1 || len(got[1]) != 2 {
		t.Errorf("pieces = %v, want [[1 1]] [[3 3] [4 4]]", got)
	}
}

func TestBarsRejectLogY(t *testing.T) {
	f := &Figure{Panels: []Panel{{Categories: []string{"a"}, Bars: []BarGroup{{Values: []float64{1}}}, Y: Axis{Log: true}}}}
	if err := f.Render(&bytes.Buffer{}, SVG); err == nil {
		t.Error("log Y bar chart: want an error")
	}
}
