package engine

import (
	"context"
	"fmt"
	"math"

	"renderchain/dsp/wdf"
)

// Defaults of SineOptions.
const (
	DefaultSettleTolerance = 1e-5
	DefaultMaxSettle       = 3.0 // s
	DefaultMinRecord       = 0.1 // s
)

// Sine is the test sine of every measurement: amplitude A (in the
// channel's input units) at frequency f, sampled at fs, with a
// raised-cosine fade-in over its first Fade samples. A coherent sine is
// generated exactly periodic over its unit of UnitN samples holding UnitM
// cycles. Fill does not allocate.
type Sine struct {
	A, F, FS     float64
	Fade         int
	UnitN, UnitM int // 0: not coherent
	n            int // next sample index
}

// FadeLength is the fade-in of the one test sine: max(4 cycles, 10 ms),
// at most a quarter of maxSettle seconds, in samples at fs.
func FadeLength(freq, fs, maxSettle float64) int {
	return int(math.Ceil(math.Min(math.Max(4/freq, 0.01), maxSettle/4) * fs))
}

// Phase returns the source phase at sample k, radians in [0, 2π).
func (s *Sine) Phase(k int) float64 {
	if s.UnitN > 0 {
		return 2 * math.Pi * float64(s.UnitM) * float64(k%s.UnitN) / float64(s.UnitN)
	}
	return 2 * math.Pi * math.Mod(s.F*float64(k)/s.FS, 1)
}

// Frequency is the frequency generated: UnitM·fs/UnitN for a coherent
// sine (F to within 1e-7 cycle per unit), else F.
func (s *Sine) Frequency() float64 {
	if s.UnitN > 0 {
		return float64(s.UnitM) * s.FS / float64(s.UnitN)
	}
	return s.F
}

// Fill writes the next len(dst) samples.
func (s *Sine) Fill(dst []float64) {
	for i := range dst {
		k := s.n + i
		v := s.A * math.Sin(s.Phase(k))
		if k < s.Fade {
			v *= 0.5 * (1 - math.Cos(math.Pi*float64(k)/float64(s.Fade)))
		}
		dst[i] = v
	}
	s.n += len(dst)
}

// RecordGeometry picks the analysed record of a sine of f Hz at fs: the
// shortest whole number of cycles spanning a whole number of samples (to
// within 1e-7 cycle) and at least minN samples, searched up to one
// second's worth per coherent unit; failing that, about minN samples
// holding a whole number of cycles to the nearest sample (coherent false,
// unitN = unitM = 0).
func RecordGeometry(fs, f float64, minN int) (n int, coherent bool, unitN, unitM int) {
	limit := int(math.Max(fs, float64(4*minN)))
	for m := 1; ; m++ {
		nn := math.Round(float64(m) * fs / f)
		if nn > float64(limit) {
			break
		}
		if nn >= 1 && math.Abs(nn*f/fs-float64(m)) <= 1e-7 {
			unitN, unitM = int(nn), m
			k := (minN + unitN - 1) / unitN
			return k * unitN, true, unitN, unitM
		}
	}
	m := math.Ceil(float64(minN) * f / fs)
	return int(math.Round(m * fs / f)), false, 0, 0
}

// settleDetector compares consecutive record-length windows: their DC and
// the RMS about it. next does not allocate.
type settleDetector struct {
	tol              float64
	n                int
	prevRMS, prevDC  float64
	change, previous float64
}

// next takes one window and returns its relative change from the one
// before (+Inf for the first).
func (d *settleDetector) next(x []float64) float64 {
	var sum float64
	for _, v := range x {
		sum += v
	}
	dc := sum / float64(len(x))
	var ss float64
	for _, v := range x {
		ss += (v - dc) * (v - dc)
	}
	rms := math.Sqrt(ss / float64(len(x)))
	d.previous = d.change
	if d.n == 0 {
		d.change = math.Inf(1)
		d.previous = math.Inf(1)
	} else {
		den := math.Max(rms, 1e-12) // 1 pV: below it a node is silent
		d.change = math.Max(math.Abs(rms-d.prevRMS), math.Abs(dc-d.prevDC)) / den
	}
	d.prevRMS, d.prevDC = rms, dc
	d.n++
	return d.change
}

// settled holds after two consecutive changes within tolerance.
func (d *settleDetector) settled() bool {
	return d.n >= 3 && d.change <= d.tol && d.previous <= d.tol
}

// SineOptions set a sine run. Zero values take the defaults.
type SineOptions struct {
	Freq       float64 // Hz, below fs/2
	Amplitude  float64 // V peak at the chain's source, before any source impedance
	SampleRate float64 // base rate, Hz
	Node       int     // the node watched (0: the chain's output)
	Oversample int     // 1…16; 0: the prepared chain's factor
	// MinRecord is the shortest record in seconds (default 0.1 s);
	// MaxSettle bounds the wait in seconds (default 3 s); Tolerance is the
	// settle rule's relative change (default 1e-5).
	MinRecord, MaxSettle, Tolerance float64
	// NodePeaks asks for the node's extremes at the internal rate
	// (SineRecord.NodeMin, NodeMax), taken over one more record's length
	// after the record.
	NodePeaks bool
}

// SineRecord is the settled output of a sine run, in volts at the node.
type SineRecord struct {
	Samples  []float64 // the record: whole cycles of the output
	Sine     Sine      // the source (its Frequency is the one to analyse at)
	Coherent bool
	Settled  bool
	Start    int     // first sample of the record
	Change   float64 // last window-to-window relative change
	Volts    float64 // VoltsPerUnit of the channel (FullScale for the output)
	Stats    wdf.Stats
	// NodeMin and NodeMax are the node's extremes in volts as the solver
	// computes it at the internal rate, over one record's length past the
	// record (SineOptions.NodePeaks; NaN otherwise). The record itself is
	// band-limited to the base rate's band, and its extremes overshoot a
	// fast edge's (the Gibbs phenomenon: J. W. Gibbs, Nature 59, 1899,
	// from memory) where a scope on the circuit shows
	// none: peaks of a node are these.
	NodeMin, NodeMax float64
}

// Sine runs the one test sine through the prepared chain until the output
// at the watched node settles (see the package documentation) and returns
// the record. Memory does not grow with the wait.
func (p *Prepared) Sine(ctx context.Context, opt SineOptions) (*SineRecord, error) {
	if opt.MinRecord == 0 {
		opt.MinRecord = DefaultMinRecord
	}
	if opt.MaxSettle == 0 {
		opt.MaxSettle = DefaultMaxSettle
	}
	if opt.Tolerance == 0 {
		opt.Tolerance = DefaultSettleTolerance
	}
	fs := opt.SampleRate
	if !(opt.Freq > 0 && opt.Freq < fs/2) || !(opt.Amplitude > 0) || math.IsInf(opt.Amplitude, 0) {
		return nil, fmt.Errorf("test sine %g Hz, %g V at %g Hz: want 0 < f < fs/2 and an amplitude above 0 V", opt.Freq, opt.Amplitude, fs)
	}
	node := opt.Node
	if node == 0 {
		node = p.Circuit.Output
	}
	factor := opt.Oversample
	if factor == 0 {
		factor = p.Oversample
	}
	ch, err := p.channelAt(fs, node, factor)
	if err != nil {
		return nil, err
	}
	minN := int(math.Ceil(opt.MinRecord * fs))
	n, coherent, unitN, unitM := RecordGeometry(fs, opt.Freq, minN)
	maxN := int(math.Ceil(opt.MaxSettle * fs))
	rec := &SineRecord{Samples: make([]float64, n), Coherent: coherent, Change: math.Inf(1), Volts: ch.VoltsPerUnit(),
		Sine: Sine{A: opt.Amplitude / p.Chain.InputPeak, F: opt.Freq, FS: fs, Fade: FadeLength(opt.Freq, fs, opt.MaxSettle), UnitN: unitN, UnitM: unitM}}
	src := make([]float64, MaxBlock)
	out := make([]float64, MaxBlock)
	win := rec.Samples
	fill, windows := 0, 0
	sd := settleDetector{tol: opt.Tolerance}
	for done := false; !done; {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		rec.Sine.Fill(src)
		got := ch.Process(out, src)
		for _, v := range out[:got] {
			win[fill] = v * rec.Volts
			if fill++; fill < n {
				continue
			}
			fill = 0
			windows++
			wStart := (windows - 1) * n
			if wStart < rec.Sine.Fade {
				continue // the window overlaps the onset
			}
			rec.Change = sd.next(win)
			if sd.settled() {
				rec.Settled, rec.Start, done = true, wStart, true
			} else if wStart+n >= maxN {
				rec.Start, done = wStart, true
			}
			if done {
				break
			}
		}
	}
	rec.NodeMin, rec.NodeMax = math.NaN(), math.NaN()
	if opt.NodePeaks {
		ch.startPeaks()
		for left := n; left > 0; {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			k := min(left, MaxBlock)
			rec.Sine.Fill(src[:k])
			ch.Process(out, src[:k])
			left -= k
		}
		lo, hi := ch.stopPeaks()
		rec.NodeMin, rec.NodeMax = lo*rec.Volts, hi*rec.Volts
	}
	rec.Stats = ch.Stats()
	return rec, nil
}
