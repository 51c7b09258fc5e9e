package models_test

import (
	"math"
	"strings"
	"testing"

	"renderchain/models"
)

// TestTaperFacts checks the tapers against the facts of the trade they
// model. Tolerances: 1e-15 absolute for values the formulas give exactly
// (end points, the linear identity, the mirror relation: one or two
// roundings of numbers ≤ 1), 1e-14 for the audio mid-point (9 − 1)/80,
// where math.Pow(81, 0.5) is exact to an ulp.
func TestTaperFacts(t *testing.T) {
	cases := []struct {
		name  string
		taper models.Taper
		x     float64
		want  float64
		tol   float64
		src   string
	}{
		{"linear start", models.Linear, 0, 0, 1e-15, "definition"},
		{"linear mid", models.Linear, 0.5, 0.5, 1e-15, "linear taper: fraction equals rotation (common practice)"},
		{"linear 0.3", models.Linear, 0.3, 0.3, 1e-15, "linear taper identity"},
		{"linear end", models.Linear, 1, 1, 1e-15, "definition"},
		{"audio start", models.Audio, 0, 0, 1e-15, "track end: no resistance to the ccw lug"},
		{"audio mid", models.Audio, 0.5, 0.10, 1e-14, "A taper: 10 % at mid-rotation (common practice)"},
		{"audio end", models.Audio, 1, 1, 1e-15, "whole track at full rotation"},
		{"reverse-audio start", models.ReverseAudio, 0, 0, 1e-15, "track end"},
		{"reverse-audio mid", models.ReverseAudio, 0.5, 0.90, 1e-14, "reverse audio taper: 90 % at mid-rotation (common practice)"},
		{"reverse-audio end", models.ReverseAudio, 1, 1, 1e-15, "track end"},
		{"clamp below", models.Audio, -0.5, 0, 1e-15, "rotation clamps to [0, 1] (documented)"},
		{"clamp above", models.Linear, 1.5, 1, 1e-15, "rotation clamps to [0, 1] (documented)"},
	}
	for _, c := range cases {
		got := c.taper.Fraction(c.x)
		if math.Abs(got-c.want) > c.tol {
			t.Errorf("%s: %v.Fraction(%g) = %.17g, want %g ± %g (%s)", c.name, c.taper, c.x, got, c.want, c.tol, c.src)
		}
	}
}

// TestTaperShape: every taper rises strictly from 0 to 1 (a pot's wiper
// moves one way along the track: common practice), the audio taper lies
// below the linear one and the reverse taper above it, and reverse audio
// mirrors audio: tR(x) = 1 − tA(1 − x) (documented), to 1e-15.
func TestTaperShape(t *testing.T) {
	const n = 1000
	for _, tp := range []models.Taper{models.Linear, models.Audio, models.ReverseAudio} {
		prev := math.Inf(-1)
		for k := 0; k <= n; k++ {
			x := float64(k) / n
			f := tp.Fraction(x)
			if !(f > prev) {
				t.Fatalf("%v: Fraction(%g) = %g not above Fraction at the previous step %g", tp, x, f, prev)
			}
			prev = f
			if k > 0 && k < n {
				switch tp {
				case models.Audio:
					if !(f < x) {
						t.Errorf("audio Fraction(%g) = %g not below linear", x, f)
					}
				case models.ReverseAudio:
					if !(f > x) {
						t.Errorf("reverse-audio Fraction(%g) = %g not above linear", x, f)
					}
				}
			}
		}
	}
	worst := 0.0
	for k := 0; k <= n; k++ {
		x := float64(k) / n
		worst = math.Max(worst, math.Abs(models.ReverseAudio.Fraction(x)-(1-models.Audio.Fraction(1-x))))
	}
	if worst > 1e-15 {
		t.Errorf("reverse audio is not the mirror of audio: worst difference %g", worst)
	}
}

// TestParseTaper checks the taper names and that String round-trips.
func TestParseTaper(t *testing.T) {
	cases := []struct {
		in   string
		want models.Taper
	}{
		{"", models.Linear}, {"linear", models.Linear}, {"lin", models.Linear},
		{"audio", models.Audio}, {"log", models.Audio},
		{"reverse-audio", models.ReverseAudio}, {"reverse-log", models.ReverseAudio},
	}
	for _, c := range cases {
		got, err := models.ParseTaper(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseTaper(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
		if back, err := models.ParseTaper(got.String()); err != nil || back != got {
			t.Errorf("ParseTaper(%v.String()) = %v, %v", got, back, err)
		}
	}
	for _, bad := range []string{"Audio", "exp", "b", "linear "} {
		if _, err := models.ParseTaper(bad); err == nil {
			t.Errorf("ParseTaper(%q) accepted", bad)
		} else {
			oneLine(t, err)
		}
	}
	// A letter code alone is refused with what the letters mean where
	// (common practice), since the same letter marks different curves.
	for _, code := range []string{"A", "B", "c"} {
		if _, err := models.ParseTaper(code); err == nil || !strings.Contains(err.Error(), "different curves") {
			t.Errorf("ParseTaper(%q): %v, want the letter-code explanation", code, err)
		}
	}
}

// TestPotSections: the two sections of a pot add up to its track
// resistance wherever neither is at its end stop (a pot is a divider with
// the wiper splitting one track: common practice), and at an end stop the
// short section is PotEndResistance. Tolerance 1e-12 relative: one product
// and one subtraction of numbers of order r.
func TestPotSections(t *testing.T) {
	const r = 100e3
	for _, tp := range []models.Taper{models.Linear, models.Audio, models.ReverseAudio} {
		for k := 0; k <= 100; k++ {
			x := float64(k) / 100
			lo, hi := models.PotSections(r, tp, x)
			f := tp.Fraction(x)
			if r*f > models.PotEndResistance && r*(1-f) > models.PotEndResistance {
				if e := relErr(lo+hi, r); e > 1e-12 {
					t.Errorf("%v x=%g: sections %g + %g = %g, want %g", tp, x, lo, hi, lo+hi, r)
				}
				if e := relErr(lo, r*f); e > 1e-12 {
					t.Errorf("%v x=%g: lower section %g, want r·t(x) = %g", tp, x, lo, r*f)
				}
			}
			if lo < models.PotEndResistance || hi < models.PotEndResistance {
				t.Errorf("%v x=%g: section below the end resistance: %g, %g", tp, x, lo, hi)
			}
		}
		lo, hi := models.PotSections(r, tp, 0)
		if lo != models.PotEndResistance || hi != r {
			t.Errorf("%v fully ccw: sections %g, %g; want %g, %g", tp, lo, hi, models.PotEndResistance, r)
		}
		lo, hi = models.PotSections(r, tp, 1)
		if lo != r || hi != models.PotEndResistance {
			t.Errorf("%v fully cw: sections %g, %g; want %g, %g", tp, lo, hi, r, models.PotEndResistance)
		}
	}
}
