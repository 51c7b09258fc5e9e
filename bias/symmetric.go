package bias

import (
	"context"
	"fmt"
	"math"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/engine"
	"renderchain/models"
)

// SymmetricOptions set the test of SolveSymmetric. Zero values pick the
// defaults.
type SymmetricOptions struct {
	Level      float64 // test sine, V peak at the chain's source (default: the chain's input peak)
	Freq       float64 // Hz (default 1 kHz)
	Probe      string  // node watched (default: the adjusted transistor's collector)
	SampleRate float64 // base rate, Hz (default 48 kHz); the circuit runs at SampleRate × Oversample
	Oversample int     // 0: the chain's own, else engine.DefaultOversample
	Cycles     int     // shortest record, in cycles (default 20)
	MaxSettle  float64 // the settle rule's limit, s (default 1 s)
	Tolerance  float64 // the settle rule's tolerance (default 1e-4)
	Scan       int     // rotations tried before refining (default 11)
}

func (o *SymmetricOptions) defaults(ch *chains.Chain) {
	if o.Level == 0 {
		o.Level = ch.InputPeak
	}
	if o.Freq == 0 {
		o.Freq = 1000
	}
	if o.SampleRate == 0 {
		o.SampleRate = 48000
	}
	if o.Cycles == 0 {
		o.Cycles = 20
	}
	if o.MaxSettle == 0 {
		o.MaxSettle = 1
	}
	if o.Tolerance == 0 {
		o.Tolerance = 1e-4
	}
	if o.Scan == 0 {
		o.Scan = 11
	}
}

// check refuses options out of range, as *models.FieldError.
func (o *SymmetricOptions) check() error {
	switch {
	case !models.SignalRange.Contains(o.Level):
		return models.Fieldf("level", models.FormatValue(o.Level, "V"), "must be %s", models.SignalRange.Describe())
	case !(o.SampleRate >= engine.MinRate && o.SampleRate <= engine.MaxRate):
		return models.Fieldf("sample_rate", fmt.Sprint(o.SampleRate), "must be between %d kHz and %d kHz", engine.MinRate/1000, engine.MaxRate/1000)
	case !(o.Freq > 0 && o.Freq < o.SampleRate/4):
		return models.Fieldf("frequency", models.FormatValue(o.Freq, "Hz"), "must lie between 0 Hz and a quarter of the %s rate", models.FormatValue(o.SampleRate, "Hz"))
	case o.Scan < 3 || o.Scan > 1000:
		return models.Fieldf("scan", fmt.Sprint(o.Scan), "must be between 3 and 1000")
	case o.Cycles < 1 || float64(o.Cycles)/o.Freq > 10:
		return models.Fieldf("cycles", fmt.Sprint(o.Cycles), "must be at least 1 and last at most 10 s")
	}
	return nil
}

// Swing is the response of the probe node to the test sine at one rotation.
type Swing struct {
	Rotation float64
	Idle     float64 // the probe's DC operating-point voltage, V
	Up, Down float64 // largest excursion above and below Idle, V
	// Asymmetry is (Up − Down)/(Up + Down): 0 when both half-waves reach
	// equally far from the idle point, i.e. clip at the same swing.
	Asymmetry float64
	THD       float64 // THD_F of the record (fraction)
}

// SymmetricResult is the outcome of SolveSymmetric.
type SymmetricResult struct {
	Adjust   *Adjuster
	Probe    string
	Options  SymmetricOptions
	Start    float64
	Rotation float64
	Reached  bool
	// At is the swing at Rotation; Scan the swings at the scanned
	// rotations.
	At           Swing
	Scan         []Swing
	Lower, Upper float64
	HasCW        bool
	Bias         *Bias
	// Note explains a setting that could not be found.
	Note string
}

// SymmetricTolerance is the |asymmetry| the refinement stops at: the two
// half-waves' excursions then differ by under 0.2 %.
const SymmetricTolerance = 1e-3

// SolveSymmetric finds the rotation of adj's knob at which a test sine at
// the given level swings the probe node equally far above and below its idle
// voltage, i.e. where both half-waves clip at the same excursion: the
// largest symmetric swing the stage gives. It simulates the circuit with the
// wave digital solver at each rotation tried (a scan, then Brent's method on
// the asymmetry's sign change nearest the present rotation). A level that
// does not clip at any rotation, or an asymmetry that keeps one sign, is
// reported in Note with Reached false and the least asymmetric setting.
func SolveSymmetric(ctx context.Context, ch *chains.Chain, adj *Adjuster, opt SymmetricOptions) (*SymmetricResult, error) {
	opt.defaults(ch)
	if err := opt.check(); err != nil {
		return nil, err
	}
	work := ch.Clone()
	st := work.Stage(adj.Stage)
	probe := opt.Probe
	if probe == "" {
		probe = defaultProbe(work, adj)
	}
	c0, err := work.Build()
	if err != nil {
		return nil, err
	}
	if _, err := work.Wiring().Resolve(c0, probe); err != nil {
		return nil, keyErr("probe", probe, "no node of that name to watch (e.g. %s)", someNodes(c0))
	}
	res := &SymmetricResult{Adjust: adj, Probe: probe, Options: opt, Start: st.Knobs[adj.Knob]}
	var firstErr error
	swing := func(x float64) Swing {
		st.Knobs[adj.Knob] = x
		s, err := measureSwing(ctx, work, probe, opt)
		if err != nil && firstErr == nil {
			firstErr = err
		}
		s.Rotation = x
		return s
	}
	for i := 0; i < opt.Scan; i++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		res.Scan = append(res.Scan, swing(float64(i)/float64(opt.Scan-1)))
	}
	if ctx.Err() != nil {
		return nil, ctx.Err()
	}
	clips := false
	for _, s := range res.Scan {
		clips = clips || math.Abs(s.Asymmetry) > 0.05 || s.THD > 0.05
	}
	best := -1
	for i, s := range res.Scan {
		if !math.IsNaN(s.Asymmetry) && (best < 0 || math.Abs(s.Asymmetry) < math.Abs(res.Scan[best].Asymmetry)) {
			best = i
		}
	}
	if best < 0 {
		return nil, firstErr
	}
	// Crossing nearest the start.
	bracket := -1
	for i := 0; i+1 < len(res.Scan); i++ {
		a, b := res.Scan[i].Asymmetry, res.Scan[i+1].Asymmetry
		if a*b <= 0 && !math.IsNaN(a*b) {
			mid := (res.Scan[i].Rotation + res.Scan[i+1].Rotation) / 2
			if bracket < 0 || math.Abs(mid-res.Start) < math.Abs((res.Scan[bracket].Rotation+res.Scan[bracket+1].Rotation)/2-res.Start) {
				bracket = i
			}
		}
	}
	switch {
	case !clips:
		res.Rotation, res.At = res.Scan[best].Rotation, res.Scan[best]
		res.Note = sprintf("the %s test sine does not clip %s at any setting: raise the level to find the symmetric setting", models.FormatValue(opt.Level, "V"), probe)
	case bracket < 0:
		res.Rotation, res.At = res.Scan[best].Rotation, res.Scan[best]
		res.Note = sprintf("the swing at %s stays lopsided over the whole travel of %s (least asymmetry %.3f at %.3f)", probe, adj.Key(), res.At.Asymmetry, res.Rotation)
	default:
		lo, hi := res.Scan[bracket], res.Scan[bracket+1]
		f := func(x float64) float64 {
			if ctx.Err() != nil {
				return math.NaN()
			}
			return swing(x).Asymmetry
		}
		x, _, _ := brentRoot(f, lo.Rotation, hi.Rotation, lo.Asymmetry, hi.Asymmetry, 1e-4, 30)
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		res.Rotation = x
		res.At = swing(x)
		res.Reached = math.Abs(res.At.Asymmetry) <= 10*SymmetricTolerance
		if !res.Reached {
			res.Note = sprintf("the asymmetry jumps across zero near %.3f (%.3f there): the stage may switch state", x, res.At.Asymmetry)
		}
	}
	st.Knobs[adj.Knob] = res.Rotation
	if res.Bias, err = SolveContext(ctx, work); err != nil {
		return nil, err
	}
	res.Lower, res.Upper, res.HasCW = adj.Sections(res.Rotation)
	return res, nil
}

// defaultProbe is the collector of the transistor the trimmer is marked for,
// else the stage's output node, by the chain's wiring.
func defaultProbe(ch *chains.Chain, adj *Adjuster) string {
	st := ch.Stage(adj.Stage)
	w := ch.Wiring()
	for _, p := range st.Parts {
		if p.Kind.Transistor() && p.Ref == adj.Pot.Adjusts {
			return w.Node(st.ID, p.Pins["c"])
		}
	}
	return w.Node(st.ID, "out")
}

// measureSwing runs the engine's test sine through the circuit at its
// present settings, on the render's path (oversampled, at the base rate),
// and measures the probe's excursions about its idle voltage on the
// settled record.
func measureSwing(ctx context.Context, ch *chains.Chain, probe string, opt SymmetricOptions) (Swing, error) {
	nan := Swing{Asymmetry: math.NaN(), THD: math.NaN()}
	p, err := engine.PrepareContext(ctx, ch, opt.Oversample)
	if err != nil {
		return nan, err
	}
	n, err := p.Node(probe)
	if err != nil {
		return nan, err
	}
	rec, err := p.Sine(ctx, engine.SineOptions{Freq: opt.Freq, Amplitude: opt.Level, SampleRate: opt.SampleRate, Node: n,
		MinRecord: float64(opt.Cycles) / opt.Freq, MaxSettle: opt.MaxSettle, Tolerance: opt.Tolerance, NodePeaks: true})
	if err != nil {
		return nan, err
	}
	idle := p.DC.Node[n]
	// The swing as the solver computes the node, not the band-limited
	// record's (whose fast edges overshoot: engine.SineRecord).
	hi, lo := rec.NodeMax, rec.NodeMin
	// A node of a circuit fed by the supply and a test sine cannot leave
	// the rails by more than the sine; far beyond is a solver that ran away.
	limit := 2*(math.Abs(ch.Supply)+opt.Level) + 1
	if !(hi-lo < 2*limit) || math.Abs(hi) > limit || math.Abs(lo) > limit {
		return nan, fmt.Errorf("the wave digital solver ran away (the probe reached %s)", models.FormatValue(math.Max(math.Abs(hi), math.Abs(lo)), "V"))
	}
	sw := Swing{Idle: idle, Up: math.Max(hi-idle, 0), Down: math.Max(idle-lo, 0), THD: math.NaN()}
	if sw.Up+sw.Down > 0 {
		sw.Asymmetry = (sw.Up - sw.Down) / (sw.Up + sw.Down)
	}
	if a, err := spectrum.Analyze(rec.Samples, opt.SampleRate, rec.Sine.Frequency(), nil); err == nil {
		sw.THD = a.THDF
	}
	return sw, nil
}
