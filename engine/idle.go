package engine

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"sync"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/models"
	"renderchain/report"
)

// The rendered idle check: what a node does with nothing at the input.
const (
	// IdleFloor is the level, V rms about the mean, above which a node is
	// counted as active with silence in, and the shift of its mean from
	// the operating point, V, above which it is counted as moved. The
	// solver makes no noise, so a stable circuit's node falls back to its
	// operating point once the kick has decayed (far below a microvolt in
	// the tests); 100 µV is about the hiss of a quiet pedal at its output
	// (−80 dBV; builders quote −80 to −90 dBV, from memory), so anything
	// above it is a sound the circuit makes by itself that a listener
	// would hear over the hiss.
	IdleFloor = 100e-6
	// DefaultIdleKick is the kick's peak at the source, V: small enough to
	// keep a stable circuit linear, large against rounding (1e-16 of the
	// idle voltages) so a growing pole shows within the check.
	DefaultIdleKick = 1e-3
	// IdleKickLength is the kick's length, s: one raised-cosine pulse.
	IdleKickLength = 1e-3
	// Bounds of the check's two parts, s: the wait after the kick
	// (15 slowest time constants, or 20 e-folds of the fastest-growing
	// pole, within these bounds) and the analysed window (eight periods of
	// the predicted oscillation, within these bounds).
	MinIdleSettle, MaxIdleSettle = 0.5, 8.0
	MinIdleWindow, MaxIdleWindow = 0.5, 4.0
	// DefaultIdleRate is the base rate of the check, Hz.
	DefaultIdleRate = 48000.0
)

// IdleOptions tune Idle. The zero value checks the output at 48 kHz with
// a 1 mV kick.
type IdleOptions struct {
	SampleRate float64 // base rate, Hz; 0: DefaultIdleRate
	Node       int     // node watched (an index of Circuit); 0: the output
	Kick       float64 // the kick's peak at the source, V; 0: DefaultIdleKick
}

// Idle is what a node did with silence in after a kick.
type Idle struct {
	Node           string  // the node's name
	Kick           float64 // the kick's peak at the source, V
	Settle, Window float64 // s: the wait after the kick, the window analysed after it
	// RMS is the node's RMS about its mean over the window, V; Shift the
	// window's mean minus the node's operating-point voltage, V; Peak the
	// largest distance from the operating point in the window, V.
	RMS, Shift, Peak float64
	// FrequencyHz is the frequency of the oscillation measured from the
	// window (rising crossings of its mean, with hysteresis), NaN when the
	// node does not oscillate or the window holds fewer than two whole
	// periods.
	FrequencyHz float64
	// Oscillates: RMS at or above IdleFloor. Latched: not oscillating, but
	// the mean moved by IdleFloor or more from the operating point.
	Oscillates, Latched bool
	// FullScale is the output's full scale, V, when the node is the output (for
	// levels in dBFS), else 0.
	FullScale float64
}

// Idle is the rendered stability check: the circuit starts at its
// operating point, takes a kick (one raised-cosine pulse of opt.Kick volts
// and IdleKickLength at the source), then silence: first a wait for the
// kick to die away (or for a growing pole to grow), then a window in
// which the node's level, shift and frequency are measured. A stable
// circuit returns to its operating point; an unstable one oscillates or
// latches. The wait and the window are sized from the pole analysis (see
// the bounds above); a frequency above the base rate's Nyquist limit
// cannot be seen.
func (p *Prepared) Idle(ctx context.Context, opt IdleOptions) (*Idle, error) {
	fs := opt.SampleRate
	if fs == 0 {
		fs = DefaultIdleRate
	}
	node := opt.Node
	if node == 0 {
		node = p.Circuit.Output
	}
	kick := opt.Kick
	if kick == 0 {
		kick = DefaultIdleKick
	}
	if !(kick > 0 && kick <= 1) {
		return nil, models.Fieldf("kick", models.FormatValue(kick, "V"), "outside 0…1 V")
	}
	settle, window := p.idleDurations()
	nk := max(2, int(math.Round(IdleKickLength*fs)))
	x := make([]float64, nk)
	for i := range x {
		x[i] = kick * 0.5 * (1 - math.Cos(2*math.Pi*float64(i)/float64(nk-1)))
	}
	ns, nw := int(math.Round(settle*fs)), int(math.Round(window*fs))
	y, _, err := p.Render(ctx, fs, node, x, ns+nw)
	if err != nil {
		return nil, err
	}
	w := y[nk+ns:]
	dc := p.DC.Node[node]
	var m report.PeakRMS
	m.Add(w)
	r := &Idle{Node: p.NodeName(node), Kick: kick, Settle: settle, Window: window}
	mean := m.Mean()
	var ss float64
	for _, v := range w {
		ss += (v - mean) * (v - mean)
		r.Peak = math.Max(r.Peak, math.Abs(v-dc))
	}
	r.RMS = math.Sqrt(ss / float64(len(w)))
	r.Shift = mean - dc
	r.Oscillates = r.RMS >= IdleFloor
	r.Latched = !r.Oscillates && math.Abs(r.Shift) >= IdleFloor
	r.FrequencyHz = math.NaN()
	if r.Oscillates {
		r.FrequencyHz = crossingFrequency(w, mean, 0.3*r.RMS, fs)
	}
	if node == p.Circuit.Output {
		r.FullScale = p.Chain.FullScale
	}
	return r, nil
}

// idleDurations sizes the check from the pole analysis: the wait is 15
// slowest stable time constants (a stable transient falls by e^−15, about
// 3e-7) or 20 e-folds of the fastest-growing pole (a growth of 5e8 from
// the kick), the window eight periods of the least damped unstable pole,
// each within its bounds.
func (p *Prepared) idleDurations() (settle, window float64) {
	settle = 15 * p.SlowestTimeConstant()
	window = MinIdleWindow
	if p.Unstable() {
		fastest := 0.0
		for _, s := range p.Stability.Unstable {
			fastest = math.Max(fastest, real(s))
		}
		settle = math.Max(settle, 20/fastest)
		if f := mna.PoleHz(p.Stability.Unstable[0]); f > 0 {
			window = 8 / f
		}
	}
	return math.Min(math.Max(settle, MinIdleSettle), MaxIdleSettle), math.Min(math.Max(window, MinIdleWindow), MaxIdleWindow)
}

// crossingFrequency measures the frequency of x from its rising crossings
// of level: a crossing counts once x has been below level − h since the
// last one (hysteresis h), its time interpolated linearly between samples.
// NaN with fewer than three crossings (two whole periods).
func crossingFrequency(x []float64, level, h, fs float64) float64 {
	if !(h > 0) {
		return math.NaN()
	}
	armed := false
	first, last, n := 0.0, 0.0, 0
	for i := 1; i < len(x); i++ {
		if x[i] < level-h {
			armed = true
		}
		if armed && x[i-1] < level && x[i] >= level {
			t := float64(i-1) + (level-x[i-1])/(x[i]-x[i-1])
			if n == 0 {
				first = t
			}
			last = t
			n++
			armed = false
		}
	}
	if n < 3 {
		return math.NaN()
	}
	return float64(n-1) * fs / (last - first)
}

// Describe words the check's finding for a report: the frequency and level
// of an oscillation, the shift of a latch, or that the node stayed quiet.
func (r *Idle) Describe() string {
	what := r.Node
	if r.FullScale > 0 {
		what = "the output"
	}
	lead := fmt.Sprintf("rendered check (silence in for %s after a %s kick): %s", formatSeconds(r.Settle), models.FormatValue(r.Kick, "V"), what)
	switch {
	case r.Oscillates:
		freq := "with no steady period in the " + formatSeconds(r.Window) + " window"
		if report.Finite(r.FrequencyHz) {
			freq = "at " + formatHz(r.FrequencyHz)
		}
		return fmt.Sprintf("%s oscillates %s, %s", lead, freq, r.level())
	case r.Latched:
		return fmt.Sprintf("%s moved %s from its idle point and stays there", lead, models.FormatValue(r.Shift, "V"))
	}
	return fmt.Sprintf("%s stays within %s rms of its idle point", lead, models.FormatValue(IdleFloor, "V"))
}

// level writes the oscillation's size: peak in dBFS at the output, and its
// RMS in volts.
func (r *Idle) level() string {
	rms := models.FormatValue(roundSignificant(r.RMS, 3), "V") + " rms"
	if r.FullScale > 0 {
		return fmt.Sprintf("peak %+.1f dBFS (%s)", report.DB(r.Peak/r.FullScale), rms)
	}
	return rms
}

func formatSeconds(s float64) string { return models.FormatValue(roundSignificant(s, 3), "s") }

// idleCache holds the rendered check of the output, run once.
type idleCache struct {
	mu   sync.Mutex
	done bool
	text string
}

// IdleWarning backs a pole warning with the rendered check: when the pole
// analysis found the circuit unstable it runs Idle on the output and, if
// the output stays quiet (a latch behind a coupling capacitor, an
// oscillation behind a volume knob at zero), on the node the growing mode
// moves most (ModeNode); it returns what it found as a warning line, the
// same line on later calls. For a stable circuit it renders nothing and
// returns "".
func (p *Prepared) IdleWarning(ctx context.Context) (string, error) {
	if !p.Unstable() {
		return "", nil
	}
	p.idle.mu.Lock()
	defer p.idle.mu.Unlock()
	if p.idle.done {
		return p.idle.text, nil
	}
	r, err := p.Idle(ctx, IdleOptions{})
	if err != nil {
		return "", err
	}
	if n := p.ModeNode(); !r.Oscillates && !r.Latched && n > 0 && n != p.Circuit.Output {
		if r, err = p.Idle(ctx, IdleOptions{Node: n}); err != nil {
			return "", err
		}
	}
	p.idle.text = r.Describe()
	if !r.Oscillates && !r.Latched {
		p.idle.text += ": the growth may be slower than the check or held inside the circuit; listen for it"
	}
	p.idle.done = true
	return p.idle.text, nil
}

// ModeNode returns the node (an index of Circuit) that the least damped
// unstable pole's mode moves most (mna.Mode), leaving out nodes inside
// parts; 0 for a stable circuit or when the mode cannot be found.
func (p *Prepared) ModeNode() int {
	if !p.Unstable() {
		return 0
	}
	x, err := mna.Mode(p.Circuit, p.DC, p.Stability.Unstable[0])
	if err != nil {
		return 0
	}
	best, size := 0, 0.0
	for n := 1; n < len(p.Circuit.Nodes); n++ {
		if chains.InternalNode(p.Circuit.Nodes[n]) {
			continue
		}
		if a := cmplx.Abs(x[n-1]); a > size {
			best, size = n, a
		}
	}
	return best
}

// CheckedWarnings returns the prepared chain's warnings with the rendered
// check's line (IdleWarning) right after the stability warning when the
// circuit is unstable; for a stable one, a copy of Warnings.
func (p *Prepared) CheckedWarnings(ctx context.Context) (report.Warnings, error) {
	w := report.Warnings{}
	line, err := p.IdleWarning(ctx)
	if err != nil {
		return nil, err
	}
	pole := StabilityWarning(p.Stability)
	for _, s := range p.Warnings {
		w.Add("%s", s)
		if s == pole && line != "" {
			w.Add("%s", line)
		}
	}
	return w, nil
}
