package synth

import (
	"errors"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"
	"time"
)

func renderOne(t *testing.T, s, fret int, dur float64, opt Options) []float64 {
	t.Helper()
	x, err := Render([]Note{{Start: 0, String: s, Fret: fret, Velocity: 0.8}}, dur, opt)
	if err != nil {
		t.Fatal(err)
	}
	return x
}

// TestStringFrequency checks standard tuning E2 A2 D3 G3 B3 E4 (common
// practice) against 12-TET with A4 = 440 Hz, f = 440·2^((m−69)/12), and the
// exact anchors A2 = 110 Hz, A3 = 220 Hz, A4 = 440 Hz. Tolerance 1e-12
// relative: both sides are the same closed form in double precision.
func TestStringFrequency(t *testing.T) {
	tests := []struct {
		s, fret, midi int
		exact         float64 // 0 when only the formula is known
	}{
		{0, 0, 40, 0}, {1, 0, 45, 110}, {2, 0, 50, 0}, {3, 0, 55, 0},
		{4, 0, 59, 0}, {5, 0, 64, 0}, {0, 5, 45, 110}, {3, 2, 57, 220},
		{5, 5, 69, 440}, {4, 10, 69, 440}, {5, 24, 88, 0},
	}
	for _, tc := range tests {
		got := StringFrequency(tc.s, tc.fret)
		want := tet(tc.midi)
		if tc.exact != 0 {
			want = tc.exact
		}
		if math.Abs(got-want) > 1e-12*want {
			t.Errorf("StringFrequency(%d, %d) = %.12g Hz, want %.12g Hz", tc.s, tc.fret, got, want)
		}
	}
	// From memory: the open low string is 82.41 Hz, the open high one 329.63 Hz.
	if f := StringFrequency(0, 0); math.Abs(f-82.41) > 0.005 {
		t.Errorf("low E = %.4f Hz, want 82.41", f)
	}
	if f := StringFrequency(5, 0); math.Abs(f-329.63) > 0.005 {
		t.Errorf("high E = %.4f Hz, want 329.63", f)
	}
	for _, bad := range [][2]int{{-1, 0}, {6, 0}, {0, -1}, {0, MaxFret + 1}} {
		if f := StringFrequency(bad[0], bad[1]); !math.IsNaN(f) {
			t.Errorf("StringFrequency(%d, %d) = %g, want NaN", bad[0], bad[1], f)
		}
	}
}

// TestTuning measures the fundamental of 1 s of a single rendered note
// (Hann window, FFT zero-padded to 2^18 points, Gaussian peak
// interpolation) and compares it with 12-TET, A4 = 440 Hz.
//
// Tolerance 1 cent. The loop delay is N + τd(ω0) + τc(ω0), and the
// allpass coefficient solves τc(ω0) = Δ exactly (the first-order design of
// Jaffe & Smith, c = (1−Δ)/(1+Δ), would already be within 0.3 cent up to
// fret 24 at 44.1 kHz); what remains is the pole-radius effect of the loss
// and the estimator's bias, both orders of magnitude below 0.01 cent.
// Without the fractional delay the error would reach 1200·0.5/(P·ln 2)
// cents for a period of P samples, 6 cents for the open high string at
// 48 kHz, so 1 cent catches a missing or mis-signed fractional part while
// staying well under the ≈5 cent pitch difference a trained ear notices
// (common practice).
func TestTuning(t *testing.T) {
	tests := []struct {
		fs            float64
		s, fret, midi int
		opt           Options
	}{
		{48000, 0, 0, 40, Options{}}, {48000, 1, 0, 45, Options{}},
		{48000, 2, 0, 50, Options{}}, {48000, 3, 0, 55, Options{}},
		{48000, 4, 0, 59, Options{}}, {48000, 5, 0, 64, Options{}},
		{48000, 0, 3, 43, Options{}}, {48000, 2, 7, 57, Options{}},
		{48000, 4, 12, 71, Options{}}, {48000, 5, 12, 76, Options{}},
		{48000, 5, 24, 88, Options{}},
		{44100, 0, 0, 40, Options{}}, {44100, 5, 17, 81, Options{}},
		// Non-linear-phase loss filter and both combs in place.
		{48000, 3, 5, 60, Options{Stretch: 0.2, PickupPosition: 0.1, PickPosition: 0.3}},
		{96000, 1, 9, 54, Options{Stretch: 0.8}},
	}
	for _, tc := range tests {
		tc.opt.SampleRate = tc.fs
		x := renderOne(t, tc.s, tc.fret, 1, tc.opt)
		want := tet(tc.midi)
		got, _ := peakIn(paddedSpectrum(x), tc.fs, want*0.9, want*1.1)
		e := cents(got, want)
		t.Logf("fs %g string %d fret %2d: %9.4f Hz, want %9.4f Hz, error %+.4f cent", tc.fs, tc.s, tc.fret, got, want, e)
		if math.Abs(e) > 1 {
			t.Errorf("fs %g string %d fret %d: fundamental %.4f Hz is %+.3f cent from %.4f Hz", tc.fs, tc.s, tc.fret, got, e, want)
		}
	}
}

// closedT60 is the 60 dB decay time of the fundamental f0 predicted by the
// loop's loss (Jaffe & Smith): each period multiplies the component at ω0
// by g = ρ·|Hd(e^{jω0})|, Hd(z) = (1−S) + S·z⁻¹, so the amplitude falls
// as g^(f0·t) and T60 = 3·ln 10 / (−f0·ln g). ρ follows from requiring
// T60 = Sustain for the open low string (f = 82.41 Hz). |Hd| is evaluated
// here with complex arithmetic, independently of the package code.
func closedT60(f0, fs, sustain, s float64) float64 {
	hd := func(f float64) float64 {
		return cmplx.Abs(complex(1-s, 0) + complex(s, 0)*cmplx.Exp(complex(0, -2*math.Pi*f/fs)))
	}
	fLow := 440 * math.Pow(2, float64(40-69)/12)
	lnRho := -3*math.Ln10/(sustain*fLow) - math.Log(hd(fLow))
	return 3 * math.Ln10 / (-f0 * (lnRho + math.Log(hd(f0))))
}

// measuredT60 fits a line to the log amplitude of the fundamental f0 in
// 100 ms Hann frames every 50 ms between t0 and t1 and returns the time for
// 60 dB of decay.
func measuredT60(x []float64, fs, f0, t0, t1 float64) float64 {
	frame := int(0.1 * fs)
	var st, sy, stt, sty, n float64
	for t := t0; t+0.1 <= t1; t += 0.05 {
		i := int(t * fs)
		a := math.Log(tone(x[i:i+frame], fs, f0))
		tc := t + 0.05
		st, sy, stt, sty, n = st+tc, sy+a, stt+tc*tc, sty+tc*a, n+1
	}
	slope := (n*sty - st*sy) / (n*stt - st*st) // nepers per second
	return -3 * math.Ln10 / slope
}

// TestDecay checks (1) the envelope falls monotonically: the energy of
// each 100 ms frame is below the previous one over the first 2 s; and
// (2) the fundamental's measured T60 matches the closed form of closedT60,
// and so does the ratio of decay times between a low and a high note.
//
// Tolerance 2% on T60 and on the ratio: the fit spans 25–55 dB of decay,
// leakage from the second harmonic through the Hann sidelobes (≥ 8 bins
// away) is below −50 dB, and group and phase delay of the loop differ by
// far less than 0.1%; measured errors are a few tenths of a percent.
func TestDecay(t *testing.T) {
	tests := []struct {
		name     string
		s, fret  int
		sustain  float64
		stretch  float64
		fs       float64
		fit      float64 // end of the fitted span, s
		cmpS     int     // string of the note the ratio is taken against
		cmpFret  int
		cmpFit   float64
		minRatio float64 // sanity: the closed-form ratio is at least this
	}{
		{"E2 vs E4", 0, 0, DefaultSustain, 0.5, 48000, 3, 5, 0, 2, 3.5},
		{"A2 vs E5, S=0.2", 1, 0, 4, 0.2, 48000, 2, 5, 12, 1, 5},
		{"D3 vs B3, 44.1 kHz", 2, 0, 6, 0.5, 44100, 2.5, 4, 0, 1.5, 1.5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			opt := Options{SampleRate: tc.fs, Sustain: tc.sustain, Stretch: tc.stretch}
			var t60 [2]float64
			for j, n := range []struct {
				s, fret int
				fit     float64
			}{{tc.s, tc.fret, tc.fit}, {tc.cmpS, tc.cmpFret, tc.cmpFit}} {
				x := renderOne(t, n.s, n.fret, n.fit+0.1, opt)
				// (1) monotone decay in 100 ms frames.
				frame := int(0.1 * tc.fs)
				prev := math.Inf(1)
				for k := 0; (k+1)*frame <= len(x) && k < 20; k++ {
					e := energy(x[k*frame : (k+1)*frame])
					if e >= prev {
						t.Errorf("string %d fret %d: frame %d energy %.4g ≥ previous %.4g", n.s, n.fret, k, e, prev)
					}
					prev = e
				}
				// (2) decay time of the fundamental.
				f0 := StringFrequency(n.s, n.fret)
				t60[j] = measuredT60(x, tc.fs, f0, 0.1, n.fit)
				want := closedT60(f0, tc.fs, tc.sustain, tc.stretch)
				rel := t60[j]/want - 1
				t.Logf("string %d fret %2d: T60 %.4f s, closed form %.4f s, error %+.3f%%", n.s, n.fret, t60[j], want, 100*rel)
				if math.Abs(rel) > 0.02 {
					t.Errorf("string %d fret %d: T60 %.4f s, closed form %.4f s", n.s, n.fret, t60[j], want)
				}
			}
			want := closedT60(StringFrequency(tc.s, tc.fret), tc.fs, tc.sustain, tc.stretch) /
				closedT60(StringFrequency(tc.cmpS, tc.cmpFret), tc.fs, tc.sustain, tc.stretch)
			got := t60[0] / t60[1]
			t.Logf("decay-time ratio %.4f, closed form %.4f", got, want)
			if math.Abs(got/want-1) > 0.02 || want < tc.minRatio {
				t.Errorf("decay-time ratio %.4f, closed form %.4f (want ≥ %g)", got, want, tc.minRatio)
			}
		})
	}
}

// TestPickCombExcitation checks the pick-position comb against its closed
// form (Jaffe & Smith): H(e^{jω}) = 1 − e^{−jωβP}, so |H| = 2|sin(ωβP/2)|,
// zero at the harmonics that are multiples of 1/β. The ratio of the
// excitation's spectrum after and before the comb is compared at the first
// ten harmonics ω = 2πk/P. Tolerance ω²/8 + 1e-9: the fractional part of
// the delay uses linear interpolation, whose response differs from a pure
// delay by at most f(1−f)·ω²/2 ≤ ω²/8 in magnitude (Taylor expansion).
func TestPickCombExcitation(t *testing.T) {
	tests := []struct {
		f0, fs, beta float64
	}{
		{StringFrequency(0, 0), 48000, 0.5},
		{StringFrequency(0, 0), 48000, 0.25},
		{StringFrequency(3, 0), 48000, 1.0 / 3},
		{StringFrequency(5, 7), 44100, 0.15},
	}
	for _, tc := range tests {
		period := tc.fs / tc.f0
		x := make([]float64, int(period)+1)
		rng := rand.New(rand.NewPCG(1, 2))
		for i := range x {
			x[i] = 2*rng.Float64() - 1
		}
		e := pickComb(x, tc.beta*period)
		for k := 1; k <= 10; k++ {
			w := 2 * math.Pi * float64(k) / period
			got := cmplx.Abs(dtft(e, w)) / cmplx.Abs(dtft(x, w))
			want := 2 * math.Abs(math.Sin(w*tc.beta*period/2))
			if math.Abs(got-want) > w*w/8+1e-9 {
				t.Errorf("f0 %.2f β %.3f harmonic %d: |H| = %.6f, closed form %.6f", tc.f0, tc.beta, k, got, want)
			}
		}
	}
}

// TestPickPositionOutput checks the comb in the rendered sound: plucked at
// the middle (β = 1/2) a string has no even harmonics. On the output from
// two periods in (past the excitation) to 0.5 s, the summed energy of
// harmonics 2, 4, 6, 8 must be at least 40 dB below that of 1, 3, 5, 7
// (the residue comes only from the decay within the window, estimated
// below −45 dB). Control: plucked at β = 0.3 the even harmonics are
// present (ratio above −15 dB), so the measurement can tell them apart.
func TestPickPositionOutput(t *testing.T) {
	const fs = 48000
	tests := []struct {
		beta       float64
		seed       int64
		below, max float64 // want ratio in dB below max (below) or above max (!below)
	}{
		{0.5, 1, 1, -40}, {0.5, 2, 1, -40}, {0.5, 3, 1, -40},
		{0.3, 1, 0, -15}, {0.3, 2, 0, -15},
	}
	for _, tc := range tests {
		f0 := StringFrequency(0, 0)
		x := renderOne(t, 0, 0, 0.5, Options{SampleRate: fs, Seed: tc.seed, PickPosition: tc.beta})
		mag := paddedSpectrum(x[int(2*fs/f0):])
		var even, odd float64
		for k := 1; k <= 8; k++ {
			fk := float64(k) * f0
			_, a := peakIn(mag, fs, fk*0.97, fk*1.03)
			if k%2 == 0 {
				even += a * a
			} else {
				odd += a * a
			}
		}
		db := 10 * math.Log10(even/odd)
		t.Logf("β %.2f seed %d: even/odd harmonic energy %.1f dB", tc.beta, tc.seed, db)
		if (tc.below == 1) != (db < tc.max) {
			t.Errorf("β %.2f seed %d: even/odd harmonic energy %.1f dB, limit %g dB", tc.beta, tc.seed, db, tc.max)
		}
	}
}

// TestStringsRingAndDamp checks the six-string behaviour: a note keeps
// ringing when another string is plucked, and is silenced when its own
// string is re-plucked or damped (Velocity 0). The low string's
// fundamental (82.41 Hz) is measured in a 0.4 s Hann window before the
// second event (at 0.5 s) and in one from 0.6 s on. Undisturbed, its drop
// must match the note alone within 0.5 dB; damped, it must fall more than
// 60 dB further (the damping contract: ≥ 60 dB within DampTime). The other
// note's nearest partial, 110 Hz, is 11 bins away, where the Hann
// sidelobes are near −70 dB (Harris 1978), so it cannot mask the drop.
func TestStringsRingAndDamp(t *testing.T) {
	const fs = 48000
	f0 := StringFrequency(0, 0)
	drop := func(x []float64) float64 {
		before := tone(x[int(0.05*fs):int(0.45*fs)], fs, f0)
		after := tone(x[int(0.6*fs):int(1.0*fs)], fs, f0)
		return 20 * math.Log10(after/before)
	}
	first := Note{Start: 0, String: 0, Fret: 0, Velocity: 0.8}
	alone, err := Render([]Note{first}, 1, Options{SampleRate: fs})
	if err != nil {
		t.Fatal(err)
	}
	ref := drop(alone)
	tests := []struct {
		name   string
		second Note
		damped bool
	}{
		{"other string", Note{Start: 0.5, String: 1, Fret: 0, Velocity: 0.8}, false},
		{"same string re-plucked", Note{Start: 0.5, String: 0, Fret: 5, Velocity: 0.8}, true},
		{"damped", Note{Start: 0.5, String: 0, Velocity: 0}, true},
	}
	for _, tc := range tests {
		x, err := Render([]Note{first, tc.second}, 1, Options{SampleRate: fs})
		if err != nil {
			t.Fatal(err)
		}
		d := drop(x) - ref
		t.Logf("%s: low-string fundamental %.1f dB relative to the undisturbed note", tc.name, d)
		if tc.damped && d > -60 || !tc.damped && math.Abs(d) > 0.5 {
			t.Errorf("%s: low-string fundamental changed by %.1f dB", tc.name, d)
		}
	}
}

// TestDampTime checks the damping contract on the signal itself: in the
// last quarter of DampTime after a damp the level is at least 60 dB below
// the last 20 ms before it.
func TestDampTime(t *testing.T) {
	const fs = 48000
	for _, dt := range []float64{0.01, DefaultDampTime, 0.2} {
		for _, s := range []int{0, 5} {
			x, err := Render([]Note{{0, s, 0, 1}, {0.5, s, 0, 0}}, 1, Options{SampleRate: fs, DampTime: dt})
			if err != nil {
				t.Fatal(err)
			}
			n := int(0.5 * fs)
			pre := energy(x[n-int(0.02*fs):n]) / (0.02 * fs)
			lo, hi := n+int(0.75*dt*fs), n+int(dt*fs)
			post := energy(x[lo:hi]) / float64(hi-lo)
			db := 10 * math.Log10(post/pre)
			t.Logf("DampTime %g s, string %d: %.0f dB", dt, s, db)
			if !(db < -60) {
				t.Errorf("DampTime %g s, string %d: level %.1f dB after damping, want < −60 dB", dt, s, db)
			}
		}
	}
}

// TestPickDirections checks stroke grouping: alternate picking for single
// notes (down, up, down…, common practice) and strum direction from string
// order (a downstroke crosses the strings from low to high, common practice).
func TestPickDirections(t *testing.T) {
	notes := []Note{
		{0.000, 0, 0, 1}, {0.008, 1, 2, 1}, {0.016, 2, 2, 1}, // down strum
		{0.250, 2, 2, 1}, {0.256, 1, 2, 1}, {0.262, 0, 0, 1}, // up strum
		{0.500, 3, 0, 1}, // single: down (after an up)
		{0.600, 3, 2, 1}, // single: up
		{0.650, 2, 0, 0}, // damp: not a stroke
		{0.700, 3, 4, 1}, // single: down
	}
	want := []bool{false, false, false, true, true, true, false, true, false, false}
	order := make([]int, len(notes))
	for i := range order {
		order[i] = i
	}
	got := pickDirections(notes, order)
	for i := range want {
		if notes[i].Velocity > 0 && got[i] != want[i] {
			t.Errorf("note %d at %.3f s: up = %v, want %v", i, notes[i].Start, got[i], want[i])
		}
	}
}

func TestDeterminism(t *testing.T) {
	a, err := DemoPhrase(22050, 7)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := DemoPhrase(22050, 7)
	c, _ := DemoPhrase(22050, 8)
	same, diff := true, false
	for i := range a {
		same = same && a[i] == b[i]
		diff = diff || a[i] != c[i]
	}
	if !same {
		t.Error("same seed gave different samples")
	}
	if !diff {
		t.Error("different seeds gave identical samples")
	}
}

// TestDemoPhrase: 10 s ± 0.5 s at 48 kHz, peak 0.9 (to 1e-12, rounding of
// one scale), every sample finite, and rendered in well under 1 s (the
// budget; it takes a few tens of milliseconds).
func TestDemoPhrase(t *testing.T) {
	const fs = 48000
	start := time.Now()
	x, err := DemoPhrase(fs, 1)
	el := time.Since(start)
	if err != nil {
		t.Fatal(err)
	}
	if d := float64(len(x)) / fs; math.Abs(d-10) > 0.5 {
		t.Errorf("length %.3f s, want 10 ± 0.5 s", d)
	}
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("sample %d = %g", i, v)
		}
	}
	if p := peakAbs(x); math.Abs(p-0.9) > 1e-12 {
		t.Errorf("peak %.15f, want 0.9", p)
	}
	// The held note at the end is still sounding: level of the last 0.5 s
	// within 60 dB of the whole (it is meant to be heard decaying).
	tail := energy(x[len(x)-fs/2:]) / (fs / 2)
	all := energy(x) / float64(len(x))
	t.Logf("render time %v; tail level %.1f dB re whole", el, 10*math.Log10(tail/all))
	if !(tail > all*1e-6) {
		t.Errorf("tail level %.1f dB re whole, want > −60 dB", 10*math.Log10(tail/all))
	}
	if el > time.Second {
		t.Errorf("render took %v, want < 1 s", el)
	}
}

// TestPeakAndSilence: Peak sets the output's absolute peak exactly (to
// 1e-12, one rounding of the final scale); a render in which nothing sounds
// (notes past the end, even absurdly far, or only damps) is all zeros.
func TestPeakAndSilence(t *testing.T) {
	for _, pk := range []float64{0.25, 0.5, 1} {
		x := renderOne(t, 2, 3, 0.5, Options{Peak: pk})
		if p := peakAbs(x); math.Abs(p-pk) > 1e-12 {
			t.Errorf("Peak %g: got %.15f", pk, p)
		}
	}
	x, err := Render([]Note{{Start: 2, String: 0, Velocity: 1}, {Start: 1e300, String: 2, Velocity: 1}, {Start: 0.1, String: 1, Velocity: 0}}, 1, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(x) != 48000 || peakAbs(x) != 0 {
		t.Errorf("silent render: %d samples, peak %g; want 48000 zeros", len(x), peakAbs(x))
	}
}

func TestErrors(t *testing.T) {
	ok := []Note{{0, 0, 0, 1}}
	tests := []struct {
		param string
		notes []Note
		dur   float64
		opt   Options
	}{
		{"duration", ok, math.NaN(), Options{}},
		{"duration", ok, -1, Options{}},
		{"duration", ok, 0, Options{}},
		{"duration", ok, MaxDuration + 1, Options{}},
		{"duration", ok, MaxDuration, Options{SampleRate: MaxSampleRate}},
		{"Options.SampleRate", ok, 1, Options{SampleRate: 1000}},
		{"Options.SampleRate", ok, 1, Options{SampleRate: math.Inf(1)}},
		{"Options.PickPosition", ok, 1, Options{PickPosition: 1}},
		{"Options.PickPosition", ok, 1, Options{PickPosition: -0.1}},
		{"Options.PickupPosition", ok, 1, Options{PickupPosition: 1.2}},
		{"Options.Sustain", ok, 1, Options{Sustain: 100}},
		{"Options.Stretch", ok, 1, Options{Stretch: 1}},
		{"Options.DampTime", ok, 1, Options{DampTime: math.NaN()}},
		{"Options.Peak", ok, 1, Options{Peak: 1.5}},
		{"notes[1].Start", []Note{ok[0], {Start: -1}}, 1, Options{}},
		{"notes[0].Start", []Note{{Start: math.NaN()}}, 1, Options{}},
		{"notes[0].String", []Note{{String: 6}}, 1, Options{}},
		{"notes[0].Fret", []Note{{Fret: MaxFret + 1}}, 1, Options{}},
		{"notes[0].Velocity", []Note{{Velocity: 1.01}}, 1, Options{}},
	}
	for _, tc := range tests {
		_, err := Render(tc.notes, tc.dur, tc.opt)
		var pe *ParamError
		if !errors.As(err, &pe) {
			t.Errorf("%s: got error %v, want *ParamError", tc.param, err)
			continue
		}
		if pe.Param != tc.param || !strings.Contains(err.Error(), tc.param) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: got %q (Param %q)", tc.param, err, pe.Param)
		}
	}
	if _, err := DemoPhrase(100, 1); err == nil {
		t.Error("DemoPhrase(100 Hz): no error")
	}
}

func BenchmarkDemoPhrase(b *testing.B) {
	for b.Loop() {
		if _, err := DemoPhrase(48000, 1); err != nil {
			b.Fatal(err)
		}
	}
}

// TestExtremes renders the lowest and highest notes at the sample-rate
// limits, with and without both combs at their extreme positions: the output
// must be finite with peak Peak (1e-12: one rounding of the final scale).
func TestExtremes(t *testing.T) {
	for _, fs := range []float64{MinSampleRate, MaxSampleRate} {
		for _, opt := range []Options{{}, {PickPosition: 0.999, PickupPosition: 0.999, Stretch: 0.01}, {PickPosition: 0.001, PickupPosition: 0.001, Stretch: 0.99}} {
			opt.SampleRate = fs
			var notes []Note
			for s := range Strings {
				notes = append(notes, Note{Start: 0.01 * float64(s), String: s, Fret: 0, Velocity: 1},
					Note{Start: 0.1 + 0.01*float64(s), String: s, Fret: MaxFret, Velocity: 0.01})
			}
			x, err := Render(notes, 0.3, opt)
			if err != nil {
				t.Fatal(err)
			}
			for i, v := range x {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("fs %g %+v: sample %d = %g", fs, opt, i, v)
				}
			}
			if p := peakAbs(x); math.Abs(p-DefaultPeak) > 1e-12 {
				t.Errorf("fs %g %+v: peak %.15f", fs, opt, p)
			}
		}
	}
}
