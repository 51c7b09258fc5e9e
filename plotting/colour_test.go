package plotting

import (
	"fmt"
	"image/color"
	"math"
	"regexp"
	"testing"
)

var (
	white = color.RGBA{255, 255, 255, 255}
	black = color.RGBA{0, 0, 0, 255}
)

// sRGB to CIE L*a*b* (D65) against tabulated values: white is L* = 100,
// a* = b* = 0 by definition (CIE 15:2004); sRGB red #FF0000 is L* 53.24,
// a* 80.09, b* 67.20 (the usual tabulated value, e.g. B. Lindbloom's
// colour calculator; from memory). Tolerance 0.05: the IEC 61966-2-1
// matrix is published to four decimals.
func TestLab(t *testing.T) {
	for _, tc := range []struct {
		c    color.RGBA
		want Lab
	}{
		{white, Lab{100, 0, 0}},
		{black, Lab{0, 0, 0}},
		{color.RGBA{255, 0, 0, 255}, Lab{53.24, 80.09, 67.20}},
	} {
		got := LabOf(tc.c)
		if got.DeltaE(tc.want) > 0.05 {
			t.Errorf("LabOf(%v) = %+v, want %+v", tc.c, got, tc.want)
		}
	}
}

// WCAG 2.1 contrast ratios: white on black is 21:1 by the definition's
// formula; #777777 on white is 4.48:1 (the much-quoted borderline grey;
// from memory). Tolerance 0.005 (two decimals).
func TestContrastRatio(t *testing.T) {
	if r := ContrastRatio(white, black); math.Abs(r-21) > 1e-9 {
		t.Errorf("white/black %g, want 21", r)
	}
	if r := ContrastRatio(color.RGBA{0x77, 0x77, 0x77, 255}, white); math.Abs(r-4.48) > 0.005 {
		t.Errorf("#777777 on white %.4f, want 4.48", r)
	}
}

// The dichromat matrices of Machado et al. (2009) keep white white (each
// row sums to 1 to the table's six decimals, so within 2e-6), so greys
// stay grey; and they reproduce the confusion that names the
// deficiencies (a fact of colour vision): pure red and pure green fall
// to less than half their normal CIE 1976 distance for protanopes and
// deuteranopes, while tritanopes keep at least 80 % of it.
func TestSimulate(t *testing.T) {
	for d, m := range machado {
		for i, row := range m {
			if s := row[0] + row[1] + row[2]; math.Abs(s-1) > 2e-6 {
				t.Errorf("%v row %d sums to %.7f", Deficiency(d), i, s)
			}
		}
		for _, g := range []uint8{0, 60, 128, 255} {
			grey := color.RGBA{g, g, g, 255}
			if got := Simulate(grey, Deficiency(d)); got != grey {
				t.Errorf("%v of grey %d = %v", Deficiency(d), g, got)
			}
		}
	}
	red, green := color.RGBA{255, 0, 0, 255}, color.RGBA{0, 255, 0, 255}
	normal := LabOf(red).DeltaE(LabOf(green))
	for _, tc := range []struct {
		d        Deficiency
		min, max float64
	}{{Protanopia, 0, 0.5}, {Deuteranopia, 0, 0.5}, {Tritanopia, 0.8, 1}} {
		r := LabOf(Simulate(red, tc.d)).DeltaE(LabOf(Simulate(green, tc.d))) / normal
		if r < tc.min || r > tc.max {
			t.Errorf("%v: red–green distance %.2f of normal, want %.1f–%.1f", tc.d, r, tc.min, tc.max)
		}
	}
}

// Design margin of the palette: every pair of its colours stays at least
// ΔE*ab = 15 apart for normal vision and after each dichromat simulation.
// Why 15: about six times the ΔE*ab ≈ 2.3 just-noticeable difference
// (Mahy, Van Eycken & Oosterlinck, Color Res. Appl. 19(2), 1994; from
// memory), since a thin line shows less of its colour than a patch does.
const paletteMarginDE = 15

func TestPaletteSeparation(t *testing.T) {
	views := []struct {
		name string
		f    func(color.RGBA) color.RGBA
	}{
		{"normal vision", func(c color.RGBA) color.RGBA { return c }},
		{"protanopia", func(c color.RGBA) color.RGBA { return Simulate(c, Protanopia) }},
		{"deuteranopia", func(c color.RGBA) color.RGBA { return Simulate(c, Deuteranopia) }},
		{"tritanopia", func(c color.RGBA) color.RGBA { return Simulate(c, Tritanopia) }},
	}
	for _, v := range views {
		worst := math.Inf(1)
		for i := 0; i < PaletteSize; i++ {
			for j := i + 1; j < PaletteSize; j++ {
				d := LabOf(v.f(Colour(i))).DeltaE(LabOf(v.f(Colour(j))))
				worst = math.Min(worst, d)
				if d < paletteMarginDE {
					t.Errorf("%s: styles %d (%s) and %d (%s) only ΔE*ab %.1f apart", v.name, i, Hex(i), j, Hex(j), d)
				}
			}
		}
		t.Logf("%s: closest pair ΔE*ab %.1f", v.name, worst)
	}
}

// In grey (print or a monochrome screen) the palette alone cannot keep
// seven colours apart, so: (a) the first three styles, the commonest
// case, differ in CIE L* by at least 10; (b) the first nine styles (the
// listening page's keys 1–9) differ pairwise in dash pattern or glyph,
// and in bar hatching for the first seven; (c) every colour shows on
// white: contrast at least 2.2:1, and at least 3:1 (WCAG 2.1 success
// criterion 1.4.11, non-text contrast) for the first style and for all
// but the palette's orange and sky blue.
func TestPaletteInGrey(t *testing.T) {
	for i := 0; i < 3; i++ {
		for j := i + 1; j < 3; j++ {
			if d := math.Abs(LabOf(Colour(i)).L - LabOf(Colour(j)).L); d < 10 {
				t.Errorf("styles %d and %d: L* %.1f apart, want ≥ 10", i, j, d)
			}
		}
	}
	seen := map[string]int{}
	for i := 0; i < 9; i++ {
		k := fmt.Sprintf("%d/%T", StyleDash(i), glyph(i))
		if j, ok := seen[k]; ok {
			t.Errorf("styles %d and %d share dash and glyph (%s)", j, i, k)
		}
		seen[k] = i
	}
	hatches := map[hatch]int{}
	for i := 0; i < int(hatchCount); i++ {
		if j, ok := hatches[hatchOf(i)]; ok {
			t.Errorf("styles %d and %d share a hatching", j, i)
		}
		hatches[hatchOf(i)] = i
	}
	for i := 0; i < PaletteSize; i++ {
		r := ContrastRatio(Colour(i), white)
		low := Hex(i) == "#e69f00" || Hex(i) == "#56b4e9"
		if r < 2.2 || (!low && r < 3) || (i == 0 && r < 3) {
			t.Errorf("style %d (%s): contrast %.2f on white", i, Hex(i), r)
		}
	}
}

// The palette is the published Okabe–Ito set (Wong 2011) less its
// yellow, as CSS hex strings for the listening page.
func TestPaletteHex(t *testing.T) {
	want := []string{"#0072b2", "#e69f00", "#009e73", "#d55e00", "#cc79a7", "#56b4e9", "#000000"}
	got := Palette(PaletteSize + 1)
	css := regexp.MustCompile(`^#[0-9a-f]{6}$`)
	for i, h := range got {
		if !css.MatchString(h) {
			t.Errorf("Hex(%d) = %q is not a CSS hex colour", i, h)
		}
		if h != want[i%len(want)] {
			t.Errorf("Hex(%d) = %q, want %q", i, h, want[i%len(want)])
		}
	}
	if Hex(-1) != want[len(want)-1] {
		t.Errorf("Hex(-1) = %q, want the last colour", Hex(-1))
	}
}

// Green's cubehelix (2011, eq. 2): the two direction vectors carry no grey
// (0.30, 0.59, 0.11 weights, his eq. 1), so the grey level of the colour
// at λ is λ itself, to the 1/255 of 8-bit rounding, wherever no
// component clips (none does over the heat scale). Perceptually the scale
// must run dark to light: CIE L* never falls by more than 0.05 (8-bit
// rounding) from one of 256 steps to the next and rises by at least 85
// over the scale.
func TestHeatColours(t *testing.T) {
	prev := -1.0
	for i := 0; i <= 255; i++ {
		v := float64(i) / 255
		c := HeatColour(v)
		lam := heatLow + (heatHigh-heatLow)*v
		grey := (0.30*float64(c.R) + 0.59*float64(c.G) + 0.11*float64(c.B)) / 255
		if math.Abs(grey-lam) > 1.0/255 {
			t.Errorf("λ = %.4f: grey level %.4f", lam, grey)
		}
		l := LabOf(c).L
		if l < prev-0.05 {
			t.Errorf("step %d: L* falls from %.3f to %.3f", i, prev, l)
		}
		prev = l
	}
	if rise := LabOf(HeatColour(1)).L - LabOf(HeatColour(0)).L; rise < 85 {
		t.Errorf("L* rises by %.1f over the scale, want ≥ 85", rise)
	}
	if HeatColour(-1) != HeatColour(0) || HeatColour(2) != HeatColour(1) {
		t.Error("values outside [0, 1] are not clipped to the ends")
	}
}
