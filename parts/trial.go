package parts

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"slices"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/dsp/spectrum"
	"renderchain/engine"
	"renderchain/report"
)

// GainAt returns the small-signal gain, dB, from the chain's source to its
// output at freq Hz, linearised at the operating point (mna.AC).
func GainAt(p *engine.Prepared, freq float64) (float64, error) {
	h, err := mna.AC(p.Circuit, p.DC, []float64{freq}, []int{p.Circuit.Output})
	if err != nil {
		return math.NaN(), err
	}
	return report.DB(cmplx.Abs(h[0][0])), nil
}

// The THD measurement of a trial: the engine's test sine at the base rate
// thdRate, its settle rule held to thdTolerance within thdMaxSettle, a
// record of at least thdRecord.
const (
	thdRate      = 48000.0
	thdTolerance = 1e-4
	thdMaxSettle = 1.0  // s
	thdRecord    = 0.05 // s
)

// THDAt runs the engine's test sine of amp volts peak at the source and
// freq Hz through the prepared chain until its output settles, and
// returns THD_F of the record (spectrum.Analyze), a fraction.
func THDAt(ctx context.Context, p *engine.Prepared, freq, amp float64) (float64, error) {
	rec, err := p.Sine(ctx, engine.SineOptions{Freq: freq, Amplitude: amp, SampleRate: thdRate,
		MinRecord: thdRecord, MaxSettle: thdMaxSettle, Tolerance: thdTolerance})
	if err != nil {
		return math.NaN(), err
	}
	an, err := spectrum.Analyze(rec.Samples, thdRate, rec.Sine.Frequency(), nil)
	if err != nil {
		return math.NaN(), err
	}
	return an.THDF, nil
}

// trialMeasure is what one trial measured.
type trialMeasure struct {
	names, units []string
	values       []float64
	trimmed      bool
}

func (m *trialMeasure) add(name, unit string, v float64) {
	m.names = append(m.names, name)
	m.units = append(m.units, unit)
	m.values = append(m.values, v)
}

// measureTrial solves and measures one (already drawn) chain: re-trimmed
// first when asked, then every transistor's Vce, Ic and Vc, the gain, the
// THD, the trimmer's rotation and the specs' own quantities. names, when
// given, fixes the column order (that of the nominal run).
func measureTrial(ctx context.Context, ch *chains.Chain, opt *SpreadOptions, names []string) (*trialMeasure, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	m := &trialMeasure{trimmed: true}
	var b *bias.Bias
	rotation := math.NaN()
	if opt.Retrim != nil {
		tr, err := bias.SolveTargetContext(ctx, ch, opt.Retrim, opt.RetrimAdjust)
		if err != nil {
			return nil, err
		}
		ch.Stage(opt.RetrimAdjust.Stage).Knobs[opt.RetrimAdjust.Knob] = tr.Rotation
		b, m.trimmed, rotation = tr.Bias, tr.Reached, tr.Rotation
	} else {
		var err error
		if b, err = bias.SolveContext(ctx, ch); err != nil {
			return nil, err
		}
	}
	for _, t := range b.Transistors {
		m.add(t.Ref+".vce", "V", t.Vce)
		m.add(t.Ref+".ic", "A", t.Ic)
		m.add(t.Ref+".vc", "V", t.Vc)
	}
	for _, f := range b.FETs {
		m.add(f.Ref+".vds", "V", f.Vds)
		m.add(f.Ref+".id", "A", f.Id)
		m.add(f.Ref+".vd", "V", f.Vd)
	}
	g, err := GainAt(b.Prepared, opt.Freq)
	if err != nil {
		return nil, err
	}
	m.add("gain_db", "dB", g)
	if !opt.NoTHD {
		thd, err := THDAt(ctx, b.Prepared, opt.Freq, opt.Amplitude)
		if err != nil {
			return nil, err
		}
		m.add("thd_percent", "%", 100*thd)
	}
	if opt.Retrim != nil {
		m.add(opt.RetrimAdjust.Key(), "", rotation)
	}
	for _, sp := range opt.Specs {
		if sp.Probe != nil && indexOf(m.names, sp.Metric) < 0 {
			v, err := sp.Probe.Read(b)
			if err != nil {
				return nil, err
			}
			m.add(sp.Metric, sp.Probe.Unit(), v)
		}
	}
	if names != nil && !slices.Equal(names, m.names) {
		return nil, errors.New("trial measured different quantities from the nominal run")
	}
	return m, nil
}
