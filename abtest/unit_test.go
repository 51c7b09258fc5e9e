package abtest

import (
	"encoding/json"
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestParseVariant(t *testing.T) {
	for _, tc := range []struct {
		spec string
		want Variant
		bad  string // part of the error message, "" for none
	}{
		{"as built:", Variant{Label: "as built", Settings: []string{}}, ""},
		{"  as built :   ", Variant{Label: "as built", Settings: []string{}}, ""},
		{"hotter Q2: fuzz.Q2.hfe=250", Variant{Label: "hotter Q2", Settings: []string{"fuzz.Q2.hfe=250"}}, ""},
		{"big cap: fuzz.C1=100n  supply=9.6V", Variant{Label: "big cap", Settings: []string{"fuzz.C1=100n", "supply=9.6V"}}, ""},
		{"ge: @germanium.toml", Variant{Label: "ge", ChainFile: "germanium.toml", Settings: []string{}}, ""},
		{"ge: @../x/g.toml fuzz.fuzz=1", Variant{Label: "ge", ChainFile: "../x/g.toml", Settings: []string{"fuzz.fuzz=1"}}, ""},
		{"comma, fine: fuzz.fuzz=0.5", Variant{Label: "comma, fine", Settings: []string{"fuzz.fuzz=0.5"}}, ""},
		{"no colon fuzz.fuzz=1", Variant{}, "colon"},
		{": fuzz.fuzz=1", Variant{}, "empty label"},
		{"x: fuzz.fuzz", Variant{}, "KEY=VALUE"},
		{"x: =1", Variant{}, "KEY=VALUE"},
		{"x: fuzz.fuzz=1 @late.toml", Variant{}, "must come first"},
		{"x: @", Variant{}, "empty chain file"},
		{"tab\there: ", Variant{}, "control character"},
	} {
		got, err := ParseVariant(tc.spec)
		if tc.bad != "" {
			var se *SpecError
			if !errors.As(err, &se) || !strings.Contains(err.Error(), tc.bad) {
				t.Errorf("ParseVariant(%q): %v, want a *SpecError about %q", tc.spec, err, tc.bad)
			}
			continue
		}
		if err != nil || got.Label != tc.want.Label || got.ChainFile != tc.want.ChainFile || !slices.Equal(got.Settings, tc.want.Settings) {
			t.Errorf("ParseVariant(%q) = %+v, %v; want %+v", tc.spec, got, err, tc.want)
		}
		// String is read back to the same variant.
		if again, err := ParseVariant(got.String()); err != nil || again.Label != got.Label || !slices.Equal(again.Settings, got.Settings) || again.ChainFile != got.ChainFile {
			t.Errorf("ParseVariant(%q.String() = %q) = %+v, %v", tc.spec, got.String(), again, err)
		}
	}
}

func contains(s, sub string) bool {
	return len(sub) == 0 || (len(s) >= len(sub) && indexOf(s, sub) >= 0)
}

func indexOf(s, sub string) int {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return i
		}
	}
	return -1
}

// TestMatch checks the gain rule against hand-worked cases: a gain moves
// integrated loudness and true peak by the same number of dB (both are
// homogeneous of degree 2 and 1 in amplitude, BS.1770-4 eqs. 1–2 and Annex 2),
// so each case can be worked on paper.
func TestMatch(t *testing.T) {
	for _, tc := range []struct {
		name            string
		in              []Measured
		target, ceiling float64
		common          float64
		gains           []float64
		limited         bool
	}{
		{"target reached", []Measured{{-10, -2}, {-24, -12}}, -18, -1, -18, []float64{-8, 6}, false},
		// Peak-to-loudness ratios 8 and 20 dB: the second can reach only
		// −1 − 20 = −21 LUFS (less the margin).
		{"ceiling decides", []Measured{{-10, -2}, {-30, -10}}, -18, -1, -21 - CeilingMargin, []float64{-11 - CeilingMargin, 9 - CeilingMargin}, true},
		{"exactly at the ceiling", []Measured{{-18, -1 + CeilingMargin}}, -18, -1 + 2*CeilingMargin, -18, []float64{0}, false},
		{"one clip", []Measured{{-5, 3}}, -23, -1, -23, []float64{-18}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			common, gains, limited := Match(tc.in, tc.target, tc.ceiling)
			if math.Abs(common-tc.common) > 1e-12 || limited != tc.limited {
				t.Errorf("common %.6f limited %v; want %.6f %v", common, limited, tc.common, tc.limited)
			}
			for i, g := range gains {
				if math.Abs(g-tc.gains[i]) > 1e-12 {
					t.Errorf("gain %d: %.6f, want %.6f", i, g, tc.gains[i])
				}
				if tp := tc.in[i].TruePeakDBTP + g; tp > tc.ceiling+1e-12 {
					t.Errorf("clip %d ends at %.4f dBTP, over the %.1f ceiling", i, tp, tc.ceiling)
				}
				if l := tc.in[i].LUFS + g; math.Abs(l-common) > 1e-12 {
					t.Errorf("clip %d ends at %.4f LUFS, not %.4f", i, l, common)
				}
			}
		})
	}
}

// TestFade checks the equal-power law: sin²θ + cos²θ = 1 at every frame
// (the Pythagorean identity, to 1e-15 for rounding), mirror symmetry of the
// two halves, 0 < gain < 1 inside the fade, and that Fade.Process applies
// FadeGain frame by frame to every channel and holds the end value after.
func TestFade(t *testing.T) {
	for _, n := range []int64{1, 2, 7, 480} {
		for j := int64(0); j < n; j++ {
			in, out := FadeGain(j, n, false), FadeGain(j, n, true)
			if math.Abs(in*in+out*out-1) > 1e-15 {
				t.Fatalf("F=%d j=%d: in² + out² = %.17g", n, j, in*in+out*out)
			}
			if math.Abs(in-FadeGain(n-1-j, n, true)) > 1e-15 {
				t.Fatalf("F=%d j=%d: in %.17g is not out(F−1−j) %.17g", n, j, in, FadeGain(n-1-j, n, true))
			}
			if in <= 0 || in >= 1 {
				t.Fatalf("F=%d j=%d: gain %g outside (0, 1)", n, j, in)
			}
		}
	}
	f, err := NewFade(3, 2, false)
	if err != nil {
		t.Fatal(err)
	}
	src := []float64{1, 2, 1, 2, 1, 2, 1, 2, 1, 2}
	dst := make([]float64, len(src))
	f.Process(dst[:4], src[:4])
	f.Process(dst[4:], src[4:])
	for i := range dst {
		j := int64(i / 2)
		g := 1.0
		if j < 3 {
			g = FadeGain(j, 3, false)
		}
		if dst[i] != g*src[i] {
			t.Errorf("sample %d: %g, want %g", i, dst[i], g*src[i])
		}
	}
	if _, err := NewFade(0, 1, true); err == nil {
		t.Error("NewFade(0) accepted")
	}
}

func TestFadeAllocs(t *testing.T) {
	f, _ := NewFade(1000, 2, true)
	buf := make([]float64, 512)
	g := Gain{Factor: 0.5, Bits: 24}
	if a := testing.AllocsPerRun(100, func() { f.Process(buf, buf); g.Process(buf, buf) }); a != 0 {
		t.Errorf("Fade.Process and Gain.Process allocate %.1f times per call", a)
	}
}

func BenchmarkFade(b *testing.B) {
	f, _ := NewFade(1<<30, 2, false)
	src := make([]float64, 8192)
	dst := make([]float64, len(src))
	b.SetBytes(int64(8 * len(src)))
	for i := 0; i < b.N; i++ {
		f.Process(dst, src)
	}
}

func BenchmarkGain24(b *testing.B) {
	g := Gain{Factor: 0.3, Bits: 24}
	src := make([]float64, 8192)
	for i := range src {
		src[i] = math.Sin(float64(i))
	}
	dst := make([]float64, len(src))
	b.SetBytes(int64(8 * len(src)))
	for i := 0; i < b.N; i++ {
		g.Process(dst, src)
	}
}

// TestGainRounding checks Gain's rounding against the PCM code grid: round
// half away from zero to k/2^(bits−1), clamped to [−1, 1 − 2^−(bits−1)]
// (two's-complement range, common practice for PCM WAV).
func TestGainRounding(t *testing.T) {
	for _, bits := range []int{16, 24} {
		q := lsb(bits)
		for _, tc := range []struct{ in, want float64 }{
			{0.5 * q, q}, {-0.5 * q, -q}, {0.49 * q, 0}, {1.2, 1 - q}, {-1.2, -1}, {3.3 * q, 3 * q},
		} {
			dst := []float64{0}
			Gain{Factor: 1, Bits: bits}.Process(dst, []float64{tc.in})
			if dst[0] != tc.want {
				t.Errorf("%d-bit: %g steps → %g steps, want %g", bits, tc.in/q, dst[0]/q, tc.want/q)
			}
		}
	}
	dst := []float64{0}
	Gain{Factor: 3, Bits: -32}.Process(dst, []float64{0.1})
	if x := 0.1; dst[0] != float64(float32(3*x)) {
		t.Errorf("float32 rounding: %.17g", dst[0])
	}
}

// TestNeutralLabel checks spreadsheet-column naming (bijective base 26,
// common practice).
func TestNeutralLabel(t *testing.T) {
	for i, want := range map[int]string{0: "A", 1: "B", 25: "Z", 26: "AA", 27: "AB", 51: "AZ", 52: "BA", 701: "ZZ", 702: "AAA"} {
		if got := NeutralLabel(i); got != want {
			t.Errorf("NeutralLabel(%d) = %q, want %q", i, got, want)
		}
	}
}

func TestShuffle(t *testing.T) {
	for _, n := range []int{1, 2, 5, 9} {
		p := Shuffle(n, 42)
		s := slices.Clone(p)
		slices.Sort(s)
		for i := range s {
			if s[i] != i {
				t.Fatalf("Shuffle(%d) = %v is not a permutation", n, p)
			}
		}
		if !slices.Equal(p, Shuffle(n, 42)) {
			t.Errorf("Shuffle(%d, 42) differs between calls", n)
		}
	}
	// Of 20 seeds, a 5-clip shuffle must take several different orders
	// (120 are possible); all equal would mean the seed is ignored.
	orders := map[string]bool{}
	for seed := int64(0); seed < 20; seed++ {
		b, _ := json.Marshal(Shuffle(5, seed))
		orders[string(b)] = true
	}
	if len(orders) < 10 {
		t.Errorf("20 seeds gave only %d orders of 5 clips", len(orders))
	}
}

func TestSlug(t *testing.T) {
	for in, want := range map[string]string{
		"as built": "as-built", "Hotter Q2!": "hotter-q2", "  -- ": "clip", "100n input cap": "100n-input-cap",
		"Ünïcode ok": "n-code-ok", "a/b\\c": "a-b-c",
	} {
		if got := Slug(in); got != want {
			t.Errorf("Slug(%q) = %q, want %q", in, got, want)
		}
	}
}

// GainOverOthers compares each variant with the median of the other
// variants (the bypass only for a lone variant); medians by hand.
func TestGainOverOthers(t *testing.T) {
	nan := math.NaN()
	for _, tc := range []struct {
		gains  []float64
		bypass []bool
		want   []float64
	}{
		// Others of 29: {0, 1}, median 0.5; of 0: {1, 29}, median 15; of 1: {0, 29}, median 14.5.
		{[]float64{0, 1, 29}, []bool{false, false, false}, []float64{-15, -13.5, 28.5}},
		// The bypass (5) is left out while there are other variants.
		{[]float64{-20, 5, 3}, []bool{false, true, false}, []float64{-23, nan, 23}},
		// A lone variant is compared with the bypass.
		{[]float64{2, -12}, []bool{false, true}, []float64{14, nan}},
		// Nothing to compare with.
		{[]float64{4}, []bool{false}, []float64{nan}},
		// Odd counts: the others of 13 are {-1, 0, 7}, median 0; of 0, {-1, 7, 13}, median 7.
		{[]float64{13, -1, 0, 7}, []bool{false, false, false, false}, []float64{13, -8, -7, 7}},
	} {
		got := GainOverOthers(tc.gains, tc.bypass)
		for i := range got {
			if !(got[i] == tc.want[i] || math.IsNaN(got[i]) && math.IsNaN(tc.want[i])) {
				t.Errorf("%v %v: %v, want %v", tc.gains, tc.bypass, got, tc.want)
				break
			}
		}
	}
}

// The page shows a clip's flag beside its label, in a blind set too (by the
// neutral label: the flag is about the audio, not the build).
func TestPageShowsFlag(t *testing.T) {
	for _, blind := range []bool{false, true} {
		s := &Set{Chain: "c", Blind: blind, Variants: []Clip{{Label: "dead", BlindLabel: map[bool]string{true: "A"}[blind], Flag: MuchQuieter}, {Label: "ok"}},
			Warnings: []string{"A: " + MuchQuieter}}
		b, err := Page(s)
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(b), `"flag":"`+MuchQuieter+`"`) || !strings.Contains(string(b), `"warnings":["A: `+MuchQuieter) {
			t.Errorf("blind %v: the page's data lacks the flag or the warning", blind)
		}
	}
}
