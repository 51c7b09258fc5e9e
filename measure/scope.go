package measure

import (
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
