package loudness

import (
	"fmt"
	"math"
	"slices"
)

// Accepted range of sample rates, in hertz. Below 8 kHz the pre-filter's
// 1.68 kHz shelf is too close to the Nyquist frequency for the bilinear
// transform to keep its shape; the upper limit only guards against
// nonsense values.
const (
	MinSampleRate = 8000
	MaxSampleRate = 768000
)

// MaxChannels bounds the channel count accepted by NewMeterWeights.
const MaxChannels = 32

const (
	offsetLU       = -0.691 // BS.1770-4 Annex 1: cancels the K-weighting gain at 997 Hz
	absoluteGate   = -70.0  // LUFS, BS.1770-4 Annex 1 and EBU Tech 3342
	relativeGateI  = -10.0  // LU below the absolute-gated level, integrated loudness
	relativeGateLR = -20.0  // LU below the absolute-gated level, loudness range
	lraLow, lraHi  = 0.10, 0.95

	subPerSecond  = 10 // 100 ms sub-blocks: the 75 % overlap step of 400 ms blocks
	momentarySubs = 4  // 400 ms
	shortSubs     = 30 // 3 s

	initialSubs = 10 * 60 * subPerSecond // capacity reserved by the constructors: 10 min
)

// ParamError reports an invalid argument to a constructor.
type ParamError struct {
	Func  string  // constructor, e.g. "NewMeter"
	Param string  // argument, e.g. "fs" or "weights[2]"
	Value float64 // the offending value
	Want  string  // what is accepted
}

func (e *ParamError) Error() string {
	return fmt.Sprintf("loudness.%s: %s = %g, want %s", e.Func, e.Param, e.Value, e.Want)
}

// SampleError reports the first non-finite input sample seen by a Meter.
// The sample is measured as 0; measurement continues.
type SampleError struct {
	Frame   int64   // 0-based frame index from the start of the stream
	Channel int     // 0-based channel index within the frame
	Value   float64 // NaN, +Inf or -Inf
}

func (e *SampleError) Error() string {
	return fmt.Sprintf("loudness: non-finite sample %g at frame %d, channel %d (measured as 0)",
		e.Value, e.Frame, e.Channel)
}

// channel is the per-channel filter and true-peak state.
type channel struct {
	weight         float64 // BS.1770-4 G_i
	p1, p2, r1, r2 float64 // transposed direct form II states: pre-filter, RLB
	tp             tpHistory
}

// Meter measures the loudness and peak levels of an interleaved stream.
// Its zero value is not usable; construct one with NewMeter or
// NewMeterWeights. A Meter is not safe for concurrent use.
type Meter struct {
	fs       float64
	pre, rlb biquad
	ch       []channel

	next     int     // channel index of the next input sample
	frames   int64   // complete frames written
	nextEdge int64   // frame count at which the open sub-block closes
	acc      float64 // weighted sum of squares of the open sub-block

	sub []float64 // weighted sums of squares of closed 100 ms sub-blocks

	momMax, stMax float64 // largest mean-square powers seen, 400 ms and 3 s
	samplePk      float64 // largest |x|
	truePk        float64 // largest |x| of the 4x oversampled signal

	err     *SampleError
	scratch []float64 // reused by LoudnessRange
}

// NewMeter returns a meter for fs hertz and 1 to 3 channels, all weighted
// 1.0 as BS.1770-4 Table 3 prescribes for left, right and centre. For
// surround layouts use NewMeterWeights.
func NewMeter(fs float64, channels int) (*Meter, error) {
	if channels < 1 || channels > 3 {
		return nil, &ParamError{Func: "NewMeter", Param: "channels", Value: float64(channels),
			Want: "1 to 3 (use NewMeterWeights for more)"}
	}
	w := make([]float64, channels)
	for i := range w {
		w[i] = 1
	}
	return newMeter("NewMeter", fs, w)
}

// NewMeterWeights returns a meter for fs hertz with one channel per weight,
// in interleaving order. BS.1770-4 Table 3: 1.0 for left, right and centre,
// 1.41 for the surround channels; give 0 to exclude a channel (the
// low-frequency-effects channel is excluded).
func NewMeterWeights(fs float64, weights []float64) (*Meter, error) {
	const fn = "NewMeterWeights"
	if len(weights) < 1 || len(weights) > MaxChannels {
		return nil, &ParamError{Func: fn, Param: "len(weights)", Value: float64(len(weights)),
			Want: fmt.Sprintf("1 to %d", MaxChannels)}
	}
	positive := false
	for i, w := range weights {
		if !(w >= 0) || math.IsInf(w, 1) {
			return nil, &ParamError{Func: fn, Param: fmt.Sprintf("weights[%d]", i), Value: w,
				Want: "a finite value ≥ 0"}
		}
		positive = positive || w > 0
	}
	if !positive {
		return nil, &ParamError{Func: fn, Param: "weights", Value: 0, Want: "at least one weight > 0"}
	}
	return newMeter(fn, fs, weights)
}

func newMeter(fn string, fs float64, weights []float64) (*Meter, error) {
	if !(fs >= MinSampleRate && fs <= MaxSampleRate) {
		return nil, &ParamError{Func: fn, Param: "fs", Value: fs,
			Want: fmt.Sprintf("%d to %d Hz", MinSampleRate, MaxSampleRate)}
	}
	m := &Meter{
		fs:     fs,
		ch:     make([]channel, len(weights)),
		sub:    make([]float64, 0, initialSubs),
		momMax: math.Inf(-1),
		stMax:  math.Inf(-1),
	}
	m.pre, m.rlb = kWeighting(fs)
	for i, w := range weights {
		m.ch[i].weight = w
	}
	m.nextEdge = m.edge(1)
	return m, nil
}

// edge returns the frame count at which sub-block k begins: the nearest
// integer to k·fs/10. Sub-blocks are therefore fs/10 frames long when that
// is an integer and differ by at most one frame otherwise.
func (m *Meter) edge(k int64) int64 {
	return int64(math.Floor(float64(k)*m.fs/subPerSecond + 0.5))
}

// Write measures interleaved samples (frame by frame, channel by channel,
// full scale ±1). The slice need not hold whole frames: the stream is
// continuous across calls. Non-finite samples are measured as 0 and the
// first one is reported by Err.
//
// Write does not allocate, except when the list of 100 ms sub-block powers
// outgrows its capacity: the constructors reserve ten minutes and append
// doubles it, so a stream of duration T costs about log2(T/10 min)
// allocations in total.
func (m *Meter) Write(interleaved []float64) {
	pre, rlb := m.pre, m.rlb
	sp, tp := m.samplePk, m.truePk
	acc := m.acc
	for _, x := range interleaved {
		if x-x != 0 { // NaN or ±Inf
			m.badSample(x)
			x = 0
		}
		c := &m.ch[m.next]

		// K-weighting: pre-filter then RLB, transposed direct form II.
		y := pre.b0*x + c.p1
		c.p1 = pre.b1*x - pre.a1*y + c.p2
		c.p2 = pre.b2*x - pre.a2*y
		z := rlb.b0*y + c.r1
		c.r1 = rlb.b1*y - rlb.a1*z + c.r2
		c.r2 = rlb.b2*y - rlb.a2*z
		acc += c.weight * z * z

		a := math.Abs(x)
		if a > sp {
			sp = a
		}
		if ip := c.tp.push(x); ip > tp {
			tp = ip
		}

		m.next++
		if m.next == len(m.ch) {
			m.next = 0
			m.frames++
			if m.frames == m.nextEdge {
				m.acc = acc
				m.closeSub()
				acc = 0
			}
		}
	}
	m.acc = acc
	m.samplePk, m.truePk = sp, tp
}

func (m *Meter) badSample(x float64) {
	if m.err == nil {
		m.err = &SampleError{Frame: m.frames, Channel: m.next, Value: x}
	}
}

// closeSub stores the open sub-block and updates the momentary and
// short-term maxima, which are thus evaluated every 100 ms.
func (m *Meter) closeSub() {
	m.sub = append(m.sub, m.acc)
	m.acc = 0
	n := len(m.sub)
	m.nextEdge = m.edge(int64(n) + 1)
	if n >= momentarySubs {
		if z := m.power(n-momentarySubs, n); z > m.momMax {
			m.momMax = z
		}
	}
	if n >= shortSubs {
		if z := m.power(n-shortSubs, n); z > m.stMax {
			m.stMax = z
		}
	}
}

// power returns the weighted mean-square power z of sub-blocks [i, j).
func (m *Meter) power(i, j int) float64 {
	s := 0.0
	for _, v := range m.sub[i:j] {
		s += v
	}
	return s / float64(m.edge(int64(j))-m.edge(int64(i)))
}

// lufs converts a weighted mean-square power to loudness, BS.1770-4 Annex 1.
// It returns -Inf for z = 0.
func lufs(z float64) float64 {
	if z <= 0 {
		return math.Inf(-1)
	}
	return offsetLU + 10*math.Log10(z)
}

// Err returns a *SampleError describing the first non-finite input sample,
// or nil.
func (m *Meter) Err() error {
	if m.err == nil {
		return nil
	}
	return m.err
}

// Integrated returns the gated loudness of everything written so far, in
// LUFS (BS.1770-4 Annex 1): 400 ms blocks with 75 % overlap, an absolute gate
// at −70 LUFS, then a relative gate 10 LU below the loudness of the blocks
// that passed the first. It returns -Inf when no block passes (silence, or
// less than 400 ms written). Only complete 100 ms sub-blocks count.
func (m *Meter) Integrated() float64 {
	n := len(m.sub)
	sum, cnt := 0.0, 0
	for j := 0; j+momentarySubs <= n; j++ {
		if z := m.power(j, j+momentarySubs); lufs(z) > absoluteGate {
			sum += z
			cnt++
		}
	}
	if cnt == 0 {
		return math.Inf(-1)
	}
	gate := lufs(sum/float64(cnt)) + relativeGateI
	sum, cnt = 0, 0
	for j := 0; j+momentarySubs <= n; j++ {
		z := m.power(j, j+momentarySubs)
		if l := lufs(z); l > absoluteGate && l > gate {
			sum += z
			cnt++
		}
	}
	return lufs(sum / float64(cnt)) // cnt ≥ 1: the loudest block passes both gates
}

// MomentaryMax returns the largest momentary loudness (400 ms window,
// evaluated every 100 ms), in LUFS, or -Inf before 400 ms have been
// written. It is ungated.
func (m *Meter) MomentaryMax() float64 { return lufs(m.momMax) }

// ShortTermMax returns the largest short-term loudness (3 s window,
// evaluated every 100 ms), in LUFS, or -Inf before 3 s have been written.
// It is ungated.
func (m *Meter) ShortTermMax() float64 { return lufs(m.stMax) }

// LoudnessRange returns the loudness range in LU as defined by EBU Tech
// 3342: the short-term loudness (3 s window) evaluated every 100 ms, gated
// absolutely at −70 LUFS and relatively 20 LU below the power mean of the
// values that passed the absolute gate; the range is the difference between
// the 95th and the 10th percentile of what remains. Percentiles interpolate
// linearly between the closest ranks of the sorted values. It returns 0
// when fewer than two values pass the gates.
//
// LoudnessRange needs one float64 of scratch per 100 ms written; the buffer
// is kept and reused by later calls.
func (m *Meter) LoudnessRange() float64 {
	n := len(m.sub)
	st := m.scratch[:0]
	sum := 0.0
	for j := 0; j+shortSubs <= n; j++ {
		z := m.power(j, j+shortSubs)
		if l := lufs(z); l > absoluteGate {
			st = append(st, l)
			sum += z
		}
	}
	m.scratch = st
	if len(st) == 0 {
		return 0
	}
	gate := lufs(sum/float64(len(st))) + relativeGateLR
	kept := st[:0]
	for _, l := range st {
		if l >= gate {
			kept = append(kept, l)
		}
	}
	if len(kept) < 2 {
		return 0
	}
	slices.Sort(kept)
	return percentile(kept, lraHi) - percentile(kept, lraLow)
}

// percentile returns the p-quantile (0 ≤ p ≤ 1) of sorted values by linear
// interpolation between closest ranks.
func percentile(sorted []float64, p float64) float64 {
	pos := p * float64(len(sorted)-1)
	i := int(pos)
	if i >= len(sorted)-1 {
		return sorted[len(sorted)-1]
	}
	f := pos - float64(i)
	return sorted[i] + f*(sorted[i+1]-sorted[i])
}

// TruePeak returns the largest absolute value of the signal oversampled
// four times (BS.1770-4 Annex 2), over all channels, in dBTP; -Inf for
// silence. The factor is 4 at every sample rate. The inter-sample points
// after the last 12 samples written are not evaluated, since they depend on
// samples not yet seen.
func (m *Meter) TruePeak() float64 { return 20 * math.Log10(math.Max(m.truePk, m.samplePk)) }

// SamplePeak returns the largest absolute sample value over all channels, in
// dBFS; -Inf for silence.
func (m *Meter) SamplePeak() float64 { return 20 * math.Log10(m.samplePk) }
