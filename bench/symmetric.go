package bench

import (
	"context"
	"fmt"
	"math"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/wdf"
	"renderchain/models"
)

// SymmetricOptions set the test of SolveSymmetric. Zero values pick the
// defaults.
type SymmetricOptions struct {
	Level      float64 // test sine, V peak at the chain's source (default: the chain's input peak)
	Freq       float64 // Hz (default 1 kHz)
	Probe      string  // node watched (default: the adjusted transistor's collector)
	SampleRate float64 // solver rate, Hz (default 192 kHz, the render's 48 kHz × 4)
	Settle     float64 // s run before the record (default 0.1 s, with a 10 ms fade-in)
	Cycles     int     // cycles recorded (default 20)
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
		o.SampleRate = 192000
	}
	if o.Settle == 0 {
		o.Settle = 0.1
	}
	if o.Cycles == 0 {
		o.Cycles = 20
	}
	if o.Scan == 0 {
		o.Scan = 11
	}
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
	if !(opt.Level > 0) || !(opt.Freq > 0) || opt.Freq >= opt.SampleRate/4 {
		return nil, keyErr("symmetric", "the test sine needs a level above 0 V and a frequency in (0, %g Hz)", opt.SampleRate/4)
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
	if c0.Lookup(probe) <= 0 {
		return nil, keyErr(probe, "no node of that name to watch (e.g. %s)", someNodes(c0))
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
	if res.Bias, err = Solve(work); err != nil {
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

// measureSwing runs the test sine through the circuit at its present
// settings and measures the probe's excursions about its idle voltage.
func measureSwing(ctx context.Context, ch *chains.Chain, probe string, opt SymmetricOptions) (Swing, error) {
	nan := Swing{Asymmetry: math.NaN(), THD: math.NaN()}
	b, err := Solve(ch)
	if err != nil {
		return nan, err
	}
	n := b.Circuit.Lookup(probe)
	s, err := wdf.Compile(b.Circuit, b.DC, wdf.Options{SampleRate: opt.SampleRate, Probe: n})
	if err != nil {
		return nan, err
	}
	idle := b.DC.Node[n]
	fs, f0 := opt.SampleRate, opt.Freq
	settle := int(math.Ceil(opt.Settle * fs))
	record := int(math.Round(float64(opt.Cycles) * fs / f0))
	rec := make([]float64, record)
	const block = 1024
	src := make([]float64, block)
	dst := make([]float64, block)
	fade := 0.01 * fs
	w := 2 * math.Pi * f0 / fs
	for start := 0; start < settle+record; start += block {
		if ctx.Err() != nil {
			return nan, ctx.Err()
		}
		m := min(block, settle+record-start)
		for i := 0; i < m; i++ {
			k := float64(start + i)
			g := 1.0
			if k < fade {
				g = 0.5 - 0.5*math.Cos(math.Pi*k/fade)
			}
			src[i] = g * opt.Level * math.Sin(w*k)
		}
		s.Process(dst[:m], src[:m])
		for i := 0; i < m; i++ {
			if k := start + i - settle; k >= 0 {
				rec[k] = dst[i]
			}
		}
	}
	hi, lo := math.Inf(-1), math.Inf(1)
	for _, v := range rec {
		hi = math.Max(hi, v)
		lo = math.Min(lo, v)
	}
	// A node of a circuit fed by the supply and a test sine cannot leave
	// the rails by more than the sine; far beyond is a solver that ran away.
	limit := 2*(math.Abs(b.Supply)+opt.Level) + 1
	if !(hi-lo < 2*limit) || math.Abs(hi) > limit || math.Abs(lo) > limit {
		return nan, fmt.Errorf("the wave digital solver ran away (the probe reached %s)", models.FormatValue(math.Max(math.Abs(hi), math.Abs(lo)), "V"))
	}
	sw := Swing{Idle: idle, Up: math.Max(hi-idle, 0), Down: math.Max(idle-lo, 0), THD: math.NaN()}
	if sw.Up+sw.Down > 0 {
		sw.Asymmetry = (sw.Up - sw.Down) / (sw.Up + sw.Down)
	}
	if a, err := spectrum.Analyze(rec, fs, f0, nil); err == nil {
		sw.THD = a.THDF
	}
	return sw, nil
}
