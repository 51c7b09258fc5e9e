package engine

import (
	"context"
	"math"
	"testing"
)

// A node's peaks are the solver's, not the band-limited record's. The
// demo's second collector, driven into a square wave (220 Hz, 100 mV),
// switches within microseconds; the record at 48 kHz holds that edge
// band-limited to 20 kHz and overshoots it (Gibbs's phenomenon, up to
// about 9 % of the step: any Fourier text), above the 9 V rail its load
// resistor hangs from, which the collector of a resistively loaded stage
// cannot pass at idle or in switching (Kirchhoff: with the transistor off
// it charges towards the rail through the resistor). NodeMax stays under
// the rail, and agrees within 1 mV (the upsampled source's 0.01 dB ripple
// on a 100 mV sine moves the edges by less) with the maximum of the same
// node run at the internal rate with no rate converter at all.
func TestNodePeaksAreTheSolvers(t *testing.T) {
	p := preparedFile(t, "../chains/demo.toml", 4)
	n, err := p.Node("fuzz.c2")
	if err != nil {
		t.Fatal(err)
	}
	rec, err := p.Sine(context.Background(), SineOptions{Freq: 220, Amplitude: 0.1, SampleRate: 48000, Node: n, NodePeaks: true})
	if err != nil {
		t.Fatal(err)
	}
	recMax := math.Inf(-1)
	for _, v := range rec.Samples {
		recMax = math.Max(recMax, v)
	}
	raw, err := p.Sine(context.Background(), SineOptions{Freq: 220, Amplitude: 0.1, SampleRate: 192000, Oversample: 1, Node: n})
	if err != nil {
		t.Fatal(err)
	}
	rawMax := math.Inf(-1)
	for _, v := range raw.Samples {
		rawMax = math.Max(rawMax, v)
	}
	t.Logf("record max %.4f V, node max %.4f V, internal-rate run %.4f V, node min %.4f V", recMax, rec.NodeMax, rawMax, rec.NodeMin)
	if !(recMax > 9) {
		t.Errorf("the band-limited record peaks at %.4f V: no overshoot for the test to tell apart", recMax)
	}
	if !(rec.NodeMax < 9) || math.Abs(rec.NodeMax-rawMax) > 1e-3 {
		t.Errorf("node max %.4f V; want under the 9 V rail and within 1 mV of the internal-rate run's %.4f V", rec.NodeMax, rawMax)
	}
	plain, err := p.Sine(context.Background(), SineOptions{Freq: 220, Amplitude: 0.1, SampleRate: 48000, Node: n})
	if err != nil || !math.IsNaN(plain.NodeMax) || !math.IsNaN(plain.NodeMin) {
		t.Errorf("without NodePeaks: %g, %g (%v); want NaN", plain.NodeMin, plain.NodeMax, err)
	}
}
