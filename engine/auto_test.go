package engine

import (
	"context"
	"math"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/internal/testchains"
)

// A circuit without devices gets the lowest factor whose frequency
// warping keeps its response within WarpTolerance of the peak. For the RC
// low-pass (10 kΩ, 22 nF) the warping is in closed form: the trapezoidal
// rule at rate F·fs puts the analog response at ω' = 2·F·fs·tan(ω/(2·F·fs))
// where the digital one is at ω (bilinear transform; Oppenheim & Schafer,
// Discrete-Time Signal Processing, 3rd ed., sec. 7.2, from memory), and
// |H(jω)| = 1/√(1 + (ωRC)²) with a peak of 1. On a dense grid (2000
// points, 20 Hz–20 kHz) that gives 0.20 dB at 1× and 0.045 dB at 2×, so 2×
// is the factor; the chooser's worst change at 2× must agree with the
// closed form to 0.002 dB (its grid is 48 points a decade: the worst
// point, at the band's top, is on both grids).
func TestAutoFactorLinear(t *testing.T) {
	p := engine(t, rcChain, 0)
	c, err := p.ChooseOversample(context.Background(), 48000, math.Inf(1))
	if err != nil {
		t.Fatal(err)
	}
	const rc = 10e3 * 22e-9
	h := func(f float64) float64 { w := 2 * math.Pi * f * rc; return 1 / math.Sqrt(1+w*w) }
	warp := func(factor int) float64 {
		r := 48000 * float64(factor)
		worst := 0.0
		for i := 0; i <= 2000; i++ {
			f := 20 * math.Pow(1000, float64(i)/2000)
			fw := r / math.Pi * math.Tan(math.Pi*f/r)
			worst = math.Max(worst, math.Abs(h(fw)-h(f)))
		}
		return 20 * math.Log10(1+worst)
	}
	want := 1
	for warp(want) > WarpTolerance {
		want++
	}
	t.Logf("closed form: %.3f dB at 1×, %.3f dB at 2×; chosen %d× (%.3f dB): %s", warp(1), warp(2), c.Factor, c.WarpDB, c.Reason)
	if c.Factor != want || c.From != FactorAuto || c.WarpFloor != want {
		t.Errorf("factor %d (floor %d, from %q), want %d from %q", c.Factor, c.WarpFloor, c.From, want, FactorAuto)
	}
	if d := math.Abs(c.WarpDB - warp(c.Factor)); !(d <= 0.002) {
		t.Errorf("warping at %d×: %.4f dB, closed form %.4f dB", c.Factor, c.WarpDB, warp(c.Factor))
	}
	if len(c.Trials) != 0 || !math.IsNaN(c.AliasDB) {
		t.Errorf("a linear circuit ran the alias probe: %+v", c.Trials)
	}
}

// A factor the caller or the chain names is kept as it is.
func TestAutoFactorKeepsAGivenOne(t *testing.T) {
	for _, tc := range []struct {
		request, chain int
		want           int
		from           string
	}{{6, 0, 6, FactorRequested}, {0, 3, 3, FactorChain}, {5, 3, 5, FactorRequested}} {
		ch, err := chains.Parse("t.toml", rcChain)
		if err != nil {
			t.Fatal(err)
		}
		ch.Oversample = tc.chain
		p, err := Prepare(ch, tc.request)
		if err != nil {
			t.Fatal(err)
		}
		c, err := p.ChooseOversample(context.Background(), 48000, math.Inf(1))
		if err != nil {
			t.Fatal(err)
		}
		if c.Factor != tc.want || c.From != tc.from {
			t.Errorf("request %d, chain %d: %d× from %q, want %d× from %q", tc.request, tc.chain, c.Factor, c.From, tc.want, tc.from)
		}
	}
}

// The bar of issue 12: at the automatic factor the demo chain at full fuzz
// keeps the aliases of a 1319 Hz sine at 0.3 of full scale at least 50 dB
// under it (signal-to-alias ratio of a coherent 1 s record after a 1 s
// warm-up; 1319 Hz is prime, so at 48 kHz no folded line lands on a
// harmonic's bin). The probe tones differ from 1319 Hz, so this checks the
// probe stands for the issue's case. And it is the lowest factor the
// search tried that passed: the factor below it was tried and failed.
func TestAutoFactorDemoMeetsTheBar(t *testing.T) {
	if testing.Short() {
		t.Skip("renders about 10 s of audio")
	}
	p := preparedFile(t, "../chains/demo.toml", 0, "fuzz.fuzz=1")
	c, err := p.ChooseOversample(context.Background(), 48000, math.Inf(1))
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%d×: %s", c.Factor, c.Reason)
	below := false
	for _, tr := range c.Trials {
		below = below || (tr.Factor == c.Factor-1 && !tr.Pass)
	}
	if !below || c.Warning != "" {
		t.Errorf("the factor below %d× was not tried and failed (trials %+v; warning %q)", c.Factor, c.Trials, c.Warning)
	}
	a := issueAlias(t, p, c.Factor)
	t.Logf("1319 Hz, 0.3 FS at %d×: %.1f dB", c.Factor, a)
	if !(a >= AliasTarget) {
		t.Errorf("signal-to-alias %.1f dB at %d×, want ≥ %g dB", a, c.Factor, AliasTarget)
	}
}

// issueAlias is the signal-to-alias ratio of issue 12's case at a factor.
func issueAlias(t testing.TB, p *Prepared, factor int) float64 {
	t.Helper()
	const fs, f = 48000.0, 1319.0
	ch, err := p.channelAt(fs, p.Circuit.Output, factor)
	if err != nil {
		t.Fatal(err)
	}
	x := make([]float64, 2*int(fs))
	for i := range x {
		x[i] = 0.3 * math.Sin(2*math.Pi*f*float64(i)/fs)
	}
	y := make([]float64, len(x))
	got := 0
	for k := 0; k < len(x); k += MaxBlock {
		got += ch.Process(y[got:], x[k:min(k+MaxBlock, len(x))])
	}
	for got < len(y) {
		got += ch.Flush(y[got:])
	}
	a, err := spectrum.SignalToAlias(y[int(fs):], fs, f)
	if err != nil {
		t.Fatal(err)
	}
	return a.DB
}

// A circuit that runs away from its operating point by itself (the
// bistable pair: a growing real pole) makes output no factor cleans up,
// so the probe does not run: the default factor, with a warning.
func TestAutoFactorUnstable(t *testing.T) {
	p := engine(t, testchains.Latch, 0)
	if !p.Unstable() {
		t.Fatal("the bistable pair is not unstable")
	}
	c, err := p.ChooseOversample(context.Background(), 48000, math.Inf(1))
	if err != nil {
		t.Fatal(err)
	}
	if c.Factor != max(c.WarpFloor, DefaultOversample) || len(c.Trials) != 0 || c.Warning == "" {
		t.Errorf("%d× (floor %d), trials %v, warning %q", c.Factor, c.WarpFloor, c.Trials, c.Warning)
	}
}

// A balanced centre-tapped full-wave rectifier idles with both diodes off
// and their small-signal currents equal and opposite at the output, so its
// small-signal gain is zero by symmetry (any rectifier text: the two
// half-windings drive the diodes in antiphase); what the AC solve returns
// is rounding, under WarpMinGain. The warping check then has nothing to
// measure: the chooser must not read a floor from that rounding (it read
// 16× before), and starts its search at the analyses' DefaultOversample.
func TestAutoFactorSilentAtIdle(t *testing.T) {
	ch, err := chains.Load("../chains/examples/octave-transformer.toml")
	if err != nil {
		t.Fatal(err)
	}
	p, err := Prepare(ch, 0)
	if err != nil {
		t.Fatal(err)
	}
	if _, peak, err := p.warpAt(48000, 4); err != nil || peak >= WarpMinGain {
		t.Fatalf("idle small-signal gain %g (err %v), want under %g", peak, err, WarpMinGain)
	}
	c, err := p.ChooseOversample(context.Background(), 48000, math.Inf(1))
	if err != nil {
		t.Fatal(err)
	}
	if c.WarpFloor != 0 || c.WarpDB != 0 || c.Trials[0].Factor != DefaultOversample || !c.Trials[len(c.Trials)-1].Pass || c.Factor < DefaultOversample {
		t.Errorf("factor %d, warp floor %d (%g dB), trials %+v; want no warp figures and a search from %d×", c.Factor, c.WarpFloor, c.WarpDB, c.Trials, DefaultOversample)
	}
	t.Logf("%s", c.Reason)
}
