package render

import (
	"fmt"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/dsp/resample"
	"renderchain/dsp/wdf"
	"renderchain/models"
)

// DefaultOversample is the oversampling factor when neither the command
// line nor the chain file names one.
const DefaultOversample = 4

// Engine is a chain prepared for rendering: flattened to one circuit and
// solved for its DC operating point.
type Engine struct {
	Chain      *chains.Chain
	Circuit    *models.Circuit
	DC         *mna.OperatingPoint
	Oversample int
}

// Prepare flattens the chain and solves its operating point. oversample 0
// takes the chain's own setting or DefaultOversample.
func Prepare(ch *chains.Chain, oversample int) (*Engine, error) {
	if oversample == 0 {
		oversample = ch.Oversample
	}
	if oversample == 0 {
		oversample = DefaultOversample
	}
	if oversample < 1 || oversample > resample.MaxFactor {
		return nil, fmt.Errorf("oversample %d is outside 1…%d", oversample, resample.MaxFactor)
	}
	c, err := ch.Build()
	if err != nil {
		return nil, err
	}
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", ch.File, err)
	}
	return &Engine{Chain: ch, Circuit: c, DC: op, Oversample: oversample}, nil
}

// Channel is one audio channel through the circuit: upsampling, the wave
// digital solver at the internal rate, downsampling, with the filters'
// delay removed so output sample n lines up with input sample n. Input
// samples are digital full scale = Chain.InputPeak volts at the source;
// output samples are volts at the output over Chain.FullScale.
type Channel struct {
	Solver  *wdf.Solver
	align   *resample.Aligner
	latency int
}

// MaxBlock is the largest block a Channel accepts per call.
const MaxBlock = 4096

// NewChannel compiles one channel for base sample rate fs.
func (e *Engine) NewChannel(fs float64) (*Channel, error) {
	s, err := wdf.Compile(e.Circuit, e.DC, wdf.Options{SampleRate: fs * float64(e.Oversample)})
	if err != nil {
		return nil, err
	}
	s.InputGain = e.Chain.InputPeak
	s.OutputGain = 1 / e.Chain.FullScale
	return newChannel(s, e.Oversample, fs)
}

// NewProbeChannel is NewChannel watching another node: its output samples
// are that node's voltage in volts (not scaled by the full scale).
func (e *Engine) NewProbeChannel(fs float64, node int) (*Channel, error) {
	s, err := wdf.Compile(e.Circuit, e.DC, wdf.Options{SampleRate: fs * float64(e.Oversample), Probe: node})
	if err != nil {
		return nil, err
	}
	s.InputGain = e.Chain.InputPeak
	return newChannel(s, e.Oversample, fs)
}

func newChannel(s *wdf.Solver, factor int, fs float64) (*Channel, error) {
	os, err := resample.NewOversampler(factor, fs, s, MaxBlock)
	if err != nil {
		return nil, err
	}
	al, err := resample.NewAligner(os, os.Latency(), MaxBlock)
	if err != nil {
		return nil, err
	}
	return &Channel{Solver: s, align: al, latency: os.Latency()}, nil
}

// Process renders src into dst and returns how many output samples it
// wrote (fewer than len(src) while the filters' delay is being absorbed).
// len(dst) ≥ len(src) ≤ MaxBlock.
func (c *Channel) Process(dst, src []float64) int { return c.align.Process(dst, src) }

// Flush writes the held-back tail into dst and returns its length; call
// until it returns 0. Over a stream, Process and Flush return exactly as
// many samples as were passed in.
func (c *Channel) Flush(dst []float64) int { return c.align.Flush(dst) }

// Latency is the resampling filters' delay in base-rate samples, removed
// by the Channel.
func (c *Channel) Latency() int { return c.latency }

// Stats returns the solver's Newton statistics.
func (c *Channel) Stats() wdf.Stats { return c.Solver.Stats() }
