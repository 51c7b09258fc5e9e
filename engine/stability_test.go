package engine

import (
	"context"
	"math"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/internal/testchains"
	"renderchain/report"
)

// prepared prepares ch at the chain's own oversampling.
func prepared(t testing.TB, ch *chains.Chain) *Prepared { return preparedAt(t, ch, 0) }

func preparedAt(t testing.TB, ch *chains.Chain, oversample int) *Prepared {
	t.Helper()
	p, err := Prepare(ch, oversample)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// The pole warning fires for the cascade with overall feedback (three
// inverting stages whose three coupling capacitors turn the loop positive
// at low frequencies) and for the bistable pair, and for nothing else: not
// the same cascade without its feedback path, not the example chains.
func TestStabilityWarning(t *testing.T) {
	cases := []struct {
		name string
		ch   *chains.Chain
		want string // "" for no warning
	}{
		{"cascade with overall feedback", testchains.Cascade(t, true), "self-oscillates near "},
		{"the same cascade, open", testchains.Cascade(t, false), ""},
		{"bistable pair", parse(t, testchains.Latch), "latches: "},
	}
	for _, ex := range testchains.Examples(t) {
		cases = append(cases, struct {
			name string
			ch   *chains.Chain
			want string
		}{ex.Name, ex.Chain, ""})
	}
	for _, tc := range cases {
		p := prepared(t, tc.ch)
		got := strings.Join(p.Warnings, "\n")
		if tc.want == "" {
			if p.Unstable() || got != "" {
				t.Errorf("%s: unstable %v, warnings %q; want none (poles %v)", tc.name, p.Unstable(), got, p.Stability.Poles)
			}
			continue
		}
		if !p.Unstable() || !strings.HasPrefix(got, tc.want) {
			t.Errorf("%s: warnings %q; want one starting %q", tc.name, got, tc.want)
		}
	}
	// The motorboat is named with the pole's frequency, three figures.
	p := prepared(t, testchains.Cascade(t, true))
	f := mna.PoleHz(p.Stability.Unstable[0])
	if want := "self-oscillates near " + formatHz(f) + " (motorboating)"; !strings.HasPrefix(p.Warnings[0], want) || f >= Motorboating {
		t.Errorf("%q; want it to start %q", p.Warnings[0], want)
	}
}

// With the germanium preset's junction capacitances the same loop rings at
// a high frequency as well: the warning names both growing pairs, the
// fastest-growing first, each with its frequency from the pole analysis.
func TestStabilityWarningNamesEveryPair(t *testing.T) {
	ch, err := chains.Load("../chains/testdata/ge-cascade-loop-charged.toml")
	if err != nil {
		t.Fatal(err)
	}
	p := prepared(t, ch)
	if len(p.Stability.Unstable) != 2 {
		t.Fatalf("unstable poles %v; want two pairs", p.Stability.Unstable)
	}
	hf, lf := mna.PoleHz(p.Stability.Unstable[0]), mna.PoleHz(p.Stability.Unstable[1])
	want := "self-oscillates near " + formatHz(hf) + " (a tone with no signal in) and near " + formatHz(lf) + " (motorboating): "
	if hf < 20e3 || lf >= Motorboating || !strings.HasPrefix(p.Warnings[0], want) {
		t.Errorf("%q; want it to start %q (pairs at %g and %g Hz)", p.Warnings[0], want, hf, lf)
	}
}

func parse(t testing.TB, src string) *chains.Chain {
	t.Helper()
	ch, err := chains.Parse("t.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// The rendered circuit grows as the pole analysis says while it is still
// small: after a 1 nV kick, the cascade's output crosses zero upward every
// 1/f seconds and each positive peak is e^(σ/f) times the one before, f
// and σ the least damped pole's frequency and real part. Tolerance 1e-3
// on both (measured: about 1e-5). The trapezoidal rule at
// the 192 kHz internal rate moves a 24 Hz pole by (ωT)²/12 ≈ 5e-8, the
// stable poles' share of the response has fallen below 1e-3 of the
// growing one's after 80 ms, and below 10 mV at the output the stages
// are linear to about 1e-4 (their bases see well under a millivolt against
// Vt = 26 mV);
// what is left is locating crossings and peaks between samples (a peak
// sampled at 48 kHz sits within 1 − cos(π·24/48000) ≈ 1e-6 of the true
// one).
func TestRenderedGrowthFollowsThePole(t *testing.T) {
	p := prepared(t, testchains.Cascade(t, true))
	s := p.Stability.Unstable[0]
	f, sigma := mna.PoleHz(s), real(s)
	const fs = 48000.0
	kick := make([]float64, 48)
	for i := range kick {
		kick[i] = 1e-9 * 0.5 * (1 - math.Cos(2*math.Pi*float64(i)/47))
	}
	y, _, err := p.Render(context.Background(), fs, p.Circuit.Output, kick, int(0.4*fs))
	if err != nil {
		t.Fatal(err)
	}
	var crossings, peaks []float64
	for i := 1; i+1 < len(y); i++ {
		if math.Abs(y[i]) > 0.01 {
			break // no longer small
		}
		if float64(i)/fs < 0.08 {
			continue
		}
		if y[i-1] < 0 && y[i] >= 0 {
			crossings = append(crossings, (float64(i-1)+(-y[i-1])/(y[i]-y[i-1]))/fs)
		}
		if y[i] > 0 && y[i] > y[i-1] && y[i] >= y[i+1] {
			peaks = append(peaks, y[i])
		}
	}
	if len(crossings) < 3 || len(peaks) < 3 {
		t.Fatalf("%d crossings, %d peaks in the growth phase: the render did not grow like a pole pair", len(crossings), len(peaks))
	}
	worstF, worstG := 0.0, 0.0
	for i := 1; i < len(crossings); i++ {
		got := 1 / (crossings[i] - crossings[i-1])
		worstF = math.Max(worstF, math.Abs(got-f)/f)
		if math.Abs(got-f)/f > 1e-3 {
			t.Errorf("period %d: %.4f Hz; the pole is at %.4f Hz", i, got, f)
		}
	}
	want := math.Exp(sigma / f)
	for i := 1; i < len(peaks); i++ {
		got := peaks[i] / peaks[i-1]
		worstG = math.Max(worstG, math.Abs(got-want)/want)
		if math.Abs(got-want)/want > 1e-3 {
			t.Errorf("peak %d grew ×%.3f; the pole grows ×%.3f per period", i, got, want)
		}
	}
	t.Logf("pole %.4f Hz, ×%.3f per period; %d periods rendered, worst %.2g on the frequency, %.2g on the growth",
		f, want, len(crossings)-1, worstF, worstG)
}

// The rendered check agrees with the pole analysis: the unstable cascade's
// output oscillates with silence in, well above the floor, at a frequency
// it measures; the bistable pair moves away from its idle point (inside:
// its output is AC-coupled, so IdleWarning looks at the node the mode
// moves most); the open cascade and the example chains return to their
// idle points, far below the floor (the solver makes no noise: 1 µV is a
// hundred times under IdleFloor and far above what is left, ~1e-11 V).
func TestIdleCheck(t *testing.T) {
	ctx := context.Background()
	loop := prepared(t, testchains.Cascade(t, true))
	r, err := loop.Idle(ctx, IdleOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !r.Oscillates || !(r.RMS > 100*IdleFloor) || !report.Finite(r.FrequencyHz) {
		t.Errorf("loop: %+v; want a measured oscillation far above the floor", r)
	}
	w, err := loop.IdleWarning(ctx)
	if err != nil || !strings.HasPrefix(w, "rendered check (silence in for ") || !strings.Contains(w, "the output oscillates at ") {
		t.Errorf("loop: %q, %v", w, err)
	}
	latch := prepared(t, parse(t, testchains.Latch))
	if n := latch.NodeName(latch.ModeNode()); n != "ff.c1" && n != "ff.c2" {
		t.Errorf("the latch's mode moves %s most; want a collector", n)
	}
	w, err = latch.IdleWarning(ctx)
	if err != nil || !strings.Contains(w, "from its idle point and stays there") {
		t.Errorf("latch: %q, %v", w, err)
	}
	// Twice oversampled: the check's outcome does not hang on the rate, and
	// the four renders take half the time.
	stable := []*Prepared{preparedAt(t, testchains.Cascade(t, false), 2)}
	for _, ex := range testchains.Examples(t) {
		stable = append(stable, preparedAt(t, ex.Chain, 2))
	}
	for _, p := range stable {
		r, err := p.Idle(ctx, IdleOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if r.Oscillates || r.Latched || r.RMS > 1e-6 || math.Abs(r.Shift) > 1e-6 {
			t.Errorf("%s: %+v; want the idle point back", p.Chain.Name, r)
		}
		if w, err := p.IdleWarning(ctx); w != "" || err != nil {
			t.Errorf("%s: %q, %v; a stable chain renders no check", p.Chain.Name, w, err)
		}
	}
}

// A sine's rising crossings give its frequency. For 27.3 Hz over one
// second at 48 kHz, linear interpolation between samples is exact to third
// order at a crossing (a sine has no curvature there), so the frequency
// comes out to 1e-6 relative. With a 3 kHz ripple of 1 % on top, each
// crossing moves by at most 0.01/(2π·27.3) s = 58 µs, so the frequency by
// at most that over the ~1 s between the first and last crossing: 1e-4
// relative; the ripple's own crossings, smaller than the hysteresis, do
// not count. Fewer than three crossings (under two whole periods) give NaN.
func TestCrossingFrequency(t *testing.T) {
	const fs, f = 48000.0, 27.3
	x := make([]float64, 48000)
	for _, tc := range []struct {
		ripple, tol float64
	}{{0, 1e-6}, {0.01, 1e-4}} {
		for i := range x {
			x[i] = math.Sin(2*math.Pi*f*float64(i)/fs+0.3) + tc.ripple*math.Sin(2*math.Pi*3000*float64(i)/fs)
		}
		if got := crossingFrequency(x, 0, 0.3, fs); math.Abs(got-f)/f > tc.tol {
			t.Errorf("ripple %g: %.7f Hz, want %g", tc.ripple, got, f)
		}
	}
	if got := crossingFrequency(x[:2637], 0, 0.3, fs); !math.IsNaN(got) {
		t.Errorf("one and a half periods gave %g Hz, want NaN", got)
	}
}

// SlowestTimeConstant: an RC low-pass has the one time constant RC (10 kΩ
// × 22 nF = 220 µs, closed form; 1e-9 relative, the eigenvalue solve's
// accuracy on a one-pole network); a divider has none.
func TestSlowestTimeConstant(t *testing.T) {
	if got := engine(t, rcChain, 1).SlowestTimeConstant(); math.Abs(got-220e-6)/220e-6 > 1e-9 {
		t.Errorf("RC: %g s, want 220 µs", got)
	}
	if got := engine(t, dividerChain, 1).SlowestTimeConstant(); got != 0 {
		t.Errorf("divider: %g s, want 0", got)
	}
}
