package measure

import (
	"context"
	"math"

	"renderchain/engine"
)

// ScopeCycles is how many settled cycles of the test sine a Scope keeps
// (fewer when the analysed record is shorter).
const ScopeCycles = 3

// Scope is a few settled cycles of a sine measurement as a two-channel
// scope shows them: the source and the probed node, in volts, sample for
// sample at the analysis rate, for the scope view (plotting.ScopeFigure).
type Scope struct {
	SampleRate  float64 // Hz
	FrequencyHz float64 // the sine generated (engine.Sine.Frequency)
	// Internal tells that the cycles are the solver's own samples at the
	// internal rate, not the band-limited record at the analysis rate
	// (see scopeRun).
	Internal bool
	// Start is the time of the first sample, in seconds after the sine
	// started: the start of the analysed record, past the settle.
	Start float64
	// In is the source EMF, Out the probed node, in volts.
	In, Out []float64
}

// scopeOf keeps the first ScopeCycles cycles (and one sample, so that a
// whole cycle closes) of a settled record: the probed node's samples as
// they are, and the source EMF as generated, amplitude·sin(phase) at the
// same sample indices (past the fade-in). When the record holds fewer
// cycles than that, all of it is kept and closed by its first sample
// again: a settled record is periodic.
func scopeOf(rec *engine.SineRecord, fs, amplitude float64) *Scope {
	f := rec.Sine.Frequency()
	n := len(rec.Samples)
	keep := int(math.Round(ScopeCycles*fs/f)) + 1
	out := make([]float64, 0, keep)
	if keep <= n {
		out = append(out, rec.Samples[:keep]...)
	} else {
		out = append(append(out, rec.Samples...), rec.Samples[0])
		keep = n + 1
	}
	in := make([]float64, keep)
	for i := range in {
		in[i] = amplitude * math.Sin(rec.Sine.Phase(rec.Start+i))
	}
	return &Scope{SampleRate: fs, FrequencyHz: f, Start: float64(rec.Start) / fs, In: in, Out: out}
}

// scopeRun is the scope view of a measurement on p: the same sine run
// again with the base rate raised to the internal one and no
// oversampling (the solver sees the same rate, so the same circuit
// dynamics), so that the view shows the node as the solver computes it.
// The analysis record is band-limited to the base rate's band by the rate
// converter, and a fast edge drawn from it rings at the band's edge
// (Gibbs's phenomenon: about 9 % of the step) where a scope on the built
// unit shows none. When the internal rate passes engine.MaxRate, or with
// no oversampling, the record itself is used (Internal false).
func scopeRun(ctx context.Context, p *engine.Prepared, rec *engine.SineRecord, node int, freq, amplitude float64, opt Options) (*Scope, error) {
	rate := opt.SampleRate * float64(p.Oversample)
	if p.Oversample <= 1 || rate > engine.MaxRate {
		return scopeOf(rec, opt.SampleRate, amplitude), nil
	}
	in, err := p.Sine(ctx, engine.SineOptions{Freq: freq, Amplitude: amplitude, SampleRate: rate, Node: node, Oversample: 1,
		MinRecord: opt.MinRecord, MaxSettle: opt.MaxSettle, Tolerance: opt.SettleTolerance})
	if err != nil {
		return nil, err
	}
	sc := scopeOf(in, rate, amplitude)
	sc.Internal = true
	return sc, nil
}
