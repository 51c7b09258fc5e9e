package spectrum

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// SignalToAlias on synthesized records with known content. A sine of peak
// A has mean square A²/2, so with harmonic lines A_h and added tones B_j
// off the harmonic bins the closed forms are Harmonic = Σ A_h²/2, Other =
// Σ B_j²/2 (Parseval; the tones have whole cycles, so each sits on one
// bin). Tolerance 1e-9 relative: the FFT's rounding noise over the record
// is below 1e-28 in power, some twenty orders under the smallest power
// checked (1.25e-9).
func TestSignalToAliasClosedForm(t *testing.T) {
	const fs, f0, n = 48000.0, 1000.0, 48000 // 1000 cycles, bin 1000
	harm := []line{{1, 1, 0}, {2, 0.3, 0.4}, {3, 0.1, 1.1}, {5, 0.05, 2}, {23, 0.02, 0.3}}
	sumSq := func(ls []line) float64 {
		s := 0.0
		for _, l := range ls {
			s += l.amp * l.amp / 2
		}
		return s
	}
	// Tones given by their frequency as a multiple of f0 (an "order" that
	// is not an integer, so the line falls between harmonic bins).
	tones := func(dst []float64, amps map[float64]float64) {
		for i := range dst {
			tt := float64(i) / fs
			for f, a := range amps {
				dst[i] += a * math.Sin(2*math.Pi*f*tt+0.7)
			}
		}
	}
	cases := []struct {
		name      string
		dc        float64
		alias     map[float64]float64 // Hz → peak
		onHarm    map[float64]float64 // tones on harmonic bins: counted as signal
		wantOther float64
	}{
		{"one tone", 0, map[float64]float64{7321: 1e-3}, nil, 1e-3 * 1e-3 / 2},
		{"two tones and DC", 0.25, map[float64]float64{150: 5e-4, 19999: 2e-3}, nil, (5e-4*5e-4 + 2e-3*2e-3) / 2},
		{"tone on a harmonic", 0, map[float64]float64{4100: 5e-5}, map[float64]float64{4000: 1e-2}, 5e-5 * 5e-5 / 2},
	}
	for _, c := range cases {
		x := synth(n, fs, f0, c.dc, harm...)
		tones(x, c.alias)
		tones(x, c.onHarm)
		r, err := SignalToAlias(x, fs, f0)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		// A tone on the H4 bin (H4 is absent from harm, so the bin holds
		// only the tone) counts as signal.
		wantH := sumSq(harm)
		if a, ok := c.onHarm[4000]; ok {
			wantH += a * a / 2
		}
		if rel := math.Abs(r.Harmonic-wantH) / wantH; rel > 1e-9 {
			t.Errorf("%s: harmonic power %.12g, closed form %.12g", c.name, r.Harmonic, wantH)
		}
		if rel := math.Abs(r.Other-c.wantOther) / c.wantOther; rel > 1e-9 {
			t.Errorf("%s: other power %.12g, closed form %.12g", c.name, r.Other, c.wantOther)
		}
		wantDB := 10 * math.Log10(wantH/c.wantOther)
		if math.Abs(r.DB-wantDB) > 1e-8 {
			t.Errorf("%s: %.9f dB, closed form %.9f dB", c.name, r.DB, wantDB)
		}
		if r.Cycles != 1000 || r.Orders != 23 {
			t.Errorf("%s: cycles %d, orders %d; want 1000 and 23 (23 kHz is the last below 24 kHz)", c.name, r.Cycles, r.Orders)
		}
		// Parseval: the parts and DC add up to the record's mean square.
		ms := 0.0
		for _, v := range x {
			ms += v * v
		}
		ms /= n
		if got := r.Harmonic + r.Other + c.dc*c.dc; math.Abs(got-ms) > 1e-12*ms {
			t.Errorf("%s: harmonic + other + DC² = %.15g, mean square %.15g", c.name, got, ms)
		}
	}
}

// Harmonics alone: the other bins hold only the FFT's rounding, so the
// ratio is far above anything a circuit produces (above 200 dB: rounding
// of a unit sine over 48000 points leaves about 1e-28 of power).
func TestSignalToAliasClean(t *testing.T) {
	x := synth(48000, 48000, 1000, 0, line{1, 1, 0}, line{3, 0.2, 0.5})
	r, err := SignalToAlias(x, 48000, 1000)
	if err != nil {
		t.Fatal(err)
	}
	if r.DB < 200 {
		t.Errorf("clean harmonics: %.1f dB, want > 200 dB (rounding only)", r.DB)
	}
}

// The Nyquist bin (even N) is not a harmonic line: a component
// C·(−1)^n of mean square C² counts as other; an odd N has no such bin.
func TestSignalToAliasNyquist(t *testing.T) {
	const fs, c = 48000.0, 1e-3
	x := synth(4800, fs, 1000, 0, line{1, 1, 0})
	for i := range x {
		if i%2 == 1 {
			x[i] -= c
		} else {
			x[i] += c
		}
	}
	r, err := SignalToAlias(x, fs, 1000)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r.Other-c*c) > 1e-9*c*c {
		t.Errorf("Nyquist component: other power %.12g, want %.12g", r.Other, c*c)
	}
	// Odd length: 4801 samples at 48010 Hz hold 100 cycles of 1000 Hz.
	y := synth(4801, 48010, 1000, 0, line{1, 1, 0}, line{2, 0.1, 0})
	r, err = SignalToAlias(y, 48010, 1000)
	if err != nil {
		t.Fatal(err)
	}
	if want := 0.5 + 0.005; math.Abs(r.Harmonic-want) > 1e-9*want || r.Orders != 24 {
		t.Errorf("odd length: harmonic power %.12g (want %.12g), orders %d (want 24)", r.Harmonic, want, r.Orders)
	}
}

func TestSignalToAliasErrors(t *testing.T) {
	good := synth(4800, 48000, 1000, 0, line{1, 1, 0})
	nan := append([]float64(nil), good...)
	nan[17] = math.NaN()
	cases := []struct {
		name   string
		x      []float64
		fs, f0 float64
		want   error
		index  int
	}{
		{"not coherent", good, 48000, 1001.5, ErrNotCoherent, -1},
		{"NaN sample", nan, 48000, 1000, ErrNonFinite, 17},
		{"f0 at Nyquist", good, 48000, 24000, ErrInvalid, -1},
		{"negative rate", good, -48000, 1000, ErrInvalid, -1},
		{"short", good[:10], 48000, 1000, ErrShort, -1},
	}
	for _, c := range cases {
		_, err := SignalToAlias(c.x, c.fs, c.f0)
		if !errors.Is(err, c.want) {
			t.Errorf("%s: got %v, want %v", c.name, err, c.want)
			continue
		}
		var e *Error
		if !errors.As(err, &e) || e.Index != c.index || e.Op != "SignalToAlias" || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: error %q (%+v)", c.name, err, e)
		}
	}
}
