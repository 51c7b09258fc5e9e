package engine

import (
	"fmt"
	"math"

	"renderchain/dsp/resample"
	"renderchain/dsp/wdf"
)

// Channel is one audio channel through the circuit at a base rate:
// upsampling, the wave digital solver at the internal rate, downsampling,
// with the filters' delay removed so output sample n lines up with input
// sample n. Input samples are digital full scale = Chain.InputPeak volts
// at the source; output samples are the watched node's voltage times
// 1/VoltsPerUnit.
type Channel struct {
	solver  *wdf.Solver
	tap     *peakTap
	align   *resample.Aligner
	latency int
	volts   float64
	factor  int
}

// NewChannel compiles a channel watching the chain's output, in digital
// units (Chain.FullScale volts = 1), at base rate fs.
func (p *Prepared) NewChannel(fs float64) (*Channel, error) { return p.Channel(fs, p.Circuit.Output) }

// Channel compiles a channel watching node (an index of p.Circuit, as
// Node returns) at base rate fs: the output in digital units, any other
// node in volts.
func (p *Prepared) Channel(fs float64, node int) (*Channel, error) {
	return p.channelAt(fs, node, p.Oversample)
}

// channelAt is Channel at the oversampling factor given (1…16) in place of
// p.Oversample.
func (p *Prepared) channelAt(fs float64, node, factor int) (*Channel, error) {
	if !(fs >= MinRate && fs <= MaxRate) {
		return nil, fmt.Errorf("base rate %g Hz is outside %d–%d Hz", fs, MinRate, MaxRate)
	}
	if node <= 0 || node >= len(p.Circuit.Nodes) {
		return nil, fmt.Errorf("node %d is not a node of the circuit", node)
	}
	probe, volts := node, 1.0
	if node == p.Circuit.Output {
		probe, volts = 0, p.Chain.FullScale // wdf: 0 selects the output
	}
	s, err := wdf.Compile(p.Circuit, p.DC, wdf.Options{SampleRate: fs * float64(factor), Probe: probe})
	if err != nil {
		return nil, err
	}
	s.InputGain = p.Chain.InputPeak
	s.OutputGain = 1 / volts
	tap := &peakTap{inner: s}
	os, err := resample.NewOversampler(factor, fs, tap, MaxBlock)
	if err != nil {
		return nil, err
	}
	al, err := resample.NewAligner(os, os.Latency(), MaxBlock)
	if err != nil {
		return nil, err
	}
	return &Channel{solver: s, tap: tap, align: al, latency: os.Latency(), volts: volts, factor: factor}, nil
}

// peakTap passes the solver's blocks through at the internal rate and,
// while on, keeps their extremes: the node as the solver computes it,
// before the rate converter band-limits it (a fast edge band-limited to
// the base rate's band overshoots by up to about 9 % of its step,
// Gibbs's phenomenon, where the circuit does not). Off, it costs one test
// per block.
type peakTap struct {
	inner  resample.Inner
	on     bool
	lo, hi float64
}

func (t *peakTap) Process(dst, src []float64) {
	t.inner.Process(dst, src)
	if !t.on {
		return
	}
	for _, v := range dst {
		t.lo, t.hi = min(t.lo, v), max(t.hi, v)
	}
}

// startPeaks clears and starts the extremes at the internal rate.
func (c *Channel) startPeaks() { c.tap.on, c.tap.lo, c.tap.hi = true, math.Inf(1), math.Inf(-1) }

// stopPeaks stops them and returns them in the channel's units.
func (c *Channel) stopPeaks() (lo, hi float64) {
	c.tap.on = false
	return c.tap.lo, c.tap.hi
}

// Process renders src into dst and returns how many output samples it
// wrote (fewer than len(src) while the filters' delay is being absorbed).
// len(dst) ≥ len(src) ≤ MaxBlock. It does not allocate.
func (c *Channel) Process(dst, src []float64) int { return c.align.Process(dst, src) }

// Flush writes the held-back tail into dst and returns its length; call
// until it returns 0. Over a stream, Process and Flush return exactly as
// many samples as were passed in.
func (c *Channel) Flush(dst []float64) int { return c.align.Flush(dst) }

// Latency is the resampling filters' delay in base-rate samples, removed
// by the Channel.
func (c *Channel) Latency() int { return c.latency }

// VoltsPerUnit converts output samples to volts: Chain.FullScale for the
// output, 1 for any other node.
func (c *Channel) VoltsPerUnit() float64 { return c.volts }

// Oversample is the channel's oversampling factor.
func (c *Channel) Oversample() int { return c.factor }

// Stats returns the solver's Newton statistics.
func (c *Channel) Stats() wdf.Stats { return c.solver.Stats() }

// States returns the compiled circuit's reactive states and nonlinear
// root ports.
func (c *Channel) States() (reactive, nonlinear int) { return c.solver.States() }
