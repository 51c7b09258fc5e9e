package bias

import (
	"context"
	"maps"
	"math"
	"slices"
	"sort"
	"strings"

	"renderchain/chains"
	"renderchain/models"
)

// Adjuster is the knob a target turns: a trimmer's (or any pot's) knob in
// one stage. Pot is the first pot that knob drives, whose sections Sections
// reports.
type Adjuster struct {
	Stage, Knob string
	Pot         *chains.Part
}

// Key returns the adjuster as a --set key, "fuzz.trim2".
func (a *Adjuster) Key() string { return a.Stage + "." + a.Knob }

// PotRef returns the pot's circuit ref, "fuzz.TR2".
func (a *Adjuster) PotRef() string { return a.Stage + "." + a.Pot.Ref }

// Sections returns the pot's ccw–wiper resistance R·t(x) and, when it has a
// cw pin, its wiper–cw resistance R·(1 − t(x)), at rotation x.
func (a *Adjuster) Sections(x float64) (ccwWiper, wiperCW float64, hasCW bool) {
	lo, hi := models.PotSections(a.Pot.Value, a.Pot.Taper, x)
	_, hasCW = a.Pot.Pins["cw"]
	return lo, hi, hasCW
}

// ResolveAdjuster finds the knob to turn. spec names it as STAGE.KNOB
// ("fuzz.trim2") or as the pot STAGE.REF ("fuzz.TR2"). With spec empty the
// trimmer is the pot whose template marks it with adjusts = "REF" for the
// transistor or FET device ("fuzz.Q2"); with device empty too, the marked
// trimmer of the last transistor or FET in chain order that has one.
func ResolveAdjuster(ch *chains.Chain, spec, device string) (*Adjuster, error) {
	if spec != "" {
		stage, name, ok := strings.Cut(spec, ".")
		st := ch.Stage(stage)
		if !ok || st == nil {
			return nil, keyErr("adjust", spec, "want STAGE.KNOB or STAGE.POT (stages: %s)", stageIDs(ch))
		}
		for _, p := range st.Parts {
			if p.Kind == chains.Pot && (p.Knob == name || p.Ref == name) {
				return &Adjuster{Stage: st.ID, Knob: p.Knob, Pot: p}, nil
			}
		}
		knobs := slices.Sorted(maps.Keys(st.Knobs))
		return nil, keyErr("adjust", spec, "stage %s has no knob or pot %q (knobs: %s)", st.ID, name, listOrNone(knobs))
	}
	if device != "" {
		stage, ref, _ := strings.Cut(device, ".")
		st := ch.Stage(stage)
		if st != nil {
			for _, p := range st.Parts {
				if p.Kind == chains.Pot && p.Adjusts == ref {
					return &Adjuster{Stage: st.ID, Knob: p.Knob, Pot: p}, nil
				}
			}
		}
		return nil, keyErr("adjust", device, "no trimmer in stage %s is marked adjusts = %q; name the knob to turn (STAGE.KNOB)", stage, ref)
	}
	var last *Adjuster
	for _, st := range ch.Stages {
		for _, q := range st.Parts {
			if !q.Kind.Transistor() && !q.Kind.FET() {
				continue
			}
			for _, p := range st.Parts {
				if p.Kind == chains.Pot && p.Adjusts == q.Ref {
					last = &Adjuster{Stage: st.ID, Knob: p.Knob, Pot: p}
					break
				}
			}
		}
	}
	if last == nil {
		return nil, keyErr("adjust", "", "no trimmer in the chain is marked with adjusts; name the knob to turn (STAGE.KNOB)")
	}
	return last, nil
}

// Target is a DC quantity to reach: Probe = Value.
type Target struct {
	Probe *Probe
	Value float64
	Text  string // as written
}

// ParseTarget reads "KEY=VALUE" (fuzz.Q2.vc=4.5V, fuzz.Q2.ic=1mA,
// fuzz.c2=4.5V) against a chain. Errors are *models.FieldError on the
// field "target".
func ParseTarget(ch *chains.Chain, s string) (*Target, error) {
	key, val, ok := strings.Cut(s, "=")
	if !ok {
		return nil, keyErr("target", s, "want KEY=VALUE, e.g. fuzz.Q2.vc=4.5V (or \"symmetric\")")
	}
	p, err := ParseProbe(ch, key)
	if err != nil {
		return nil, relabel(err, "target")
	}
	v, err := models.ParseValue(strings.TrimSpace(val), p.Kind())
	if err != nil {
		return nil, models.FieldOf("target", s, err)
	}
	return &Target{Probe: p, Value: v, Text: strings.TrimSpace(s)}, nil
}

// TargetResult is the outcome of SolveTarget.
type TargetResult struct {
	Target *Target
	Adjust *Adjuster
	// Start is the knob's rotation in the chain as given; Rotation the one
	// found (the closest reachable when Reached is false).
	Start, Rotation float64
	Reached         bool
	// Value is the quantity at Rotation; Lowest and Highest bound it over
	// the knob's travel (as scanned).
	Value, Lowest, Highest float64
	// Lower is the ccw–wiper resistance to measure on the pot at Rotation,
	// Upper the wiper–cw one when HasCW.
	Lower, Upper float64
	HasCW        bool
	// Alternatives are other rotations that reach the target too.
	Alternatives []float64
	// Solves counts the DC operating points computed.
	Solves int
	// Bias is the operating point at Rotation.
	Bias *Bias
}

// TargetScan is the number of evenly spaced rotations SolveTarget tries
// before refining; it finds every crossing farther apart than 1/40 turn.
const TargetScan = 41

// reachTolerance is the residual at which a refined root counts as
// reaching the target: 0.1 mV, or 10⁻⁴ of a current.
func reachTolerance(p *Probe, target float64) float64 {
	if p.Unit() == "A" {
		return 1e-4*math.Abs(target) + 1e-10
	}
	return 1e-4
}

// SolveTarget turns adj's knob over its travel to bring the target
// quantity to its value: a scan of TargetScan rotations brackets every
// crossing, Brent's method refines each to 1e-10 of a turn, and the
// crossing nearest the chain's present rotation wins. If no rotation
// reaches it, Reached is false and Rotation and Value give the closest
// approach (refined by golden-section search); that is a result, not an
// error.
func SolveTarget(ch *chains.Chain, t *Target, adj *Adjuster) (*TargetResult, error) {
	return SolveTargetContext(context.Background(), ch, t, adj)
}

// SolveTargetContext is SolveTarget that stops when ctx is done: every
// operating point it solves checks ctx (SolveContext), and once ctx is
// done the search returns the context's error.
func SolveTargetContext(ctx context.Context, ch *chains.Chain, t *Target, adj *Adjuster) (*TargetResult, error) {
	work := ch.Clone()
	st := work.Stage(adj.Stage)
	if st == nil {
		return nil, keyErr("adjust", adj.Key(), "no stage %q", adj.Stage)
	}
	res := &TargetResult{Target: t, Adjust: adj, Start: st.Knobs[adj.Knob]}
	var firstErr error
	eval := func(x float64) (float64, *Bias) {
		st.Knobs[adj.Knob] = x
		if ctx.Err() != nil {
			return math.NaN(), nil
		}
		res.Solves++
		b, err := SolveContext(ctx, work)
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			return math.NaN(), nil
		}
		v, err := t.Probe.Read(b)
		if err != nil {
			if firstErr == nil {
				firstErr = err
			}
			return math.NaN(), nil
		}
		return v, b
	}
	f := func(x float64) float64 { v, _ := eval(x); return v - t.Value }
	xs := make([]float64, TargetScan)
	fs := make([]float64, TargetScan)
	res.Lowest, res.Highest = math.Inf(1), math.Inf(-1)
	for i := range xs {
		xs[i] = float64(i) / float64(TargetScan-1)
		fs[i] = f(xs[i])
		if v := fs[i] + t.Value; !math.IsNaN(v) {
			res.Lowest = math.Min(res.Lowest, v)
			res.Highest = math.Max(res.Highest, v)
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if math.IsInf(res.Lowest, 1) {
		return nil, firstErr
	}
	tol := reachTolerance(t.Probe, t.Value)
	var roots []float64
	for i := 0; i+1 < len(xs); i++ {
		a, b := fs[i], fs[i+1]
		if math.IsNaN(a) || math.IsNaN(b) {
			continue
		}
		if a == 0 {
			roots = append(roots, xs[i])
			continue
		}
		if a*b < 0 {
			x, fx, _ := brentRoot(f, xs[i], xs[i+1], a, b, 1e-10, 100)
			if math.Abs(fx) <= tol {
				roots = append(roots, x)
			}
		}
	}
	if n := len(fs) - 1; fs[n] == 0 {
		roots = append(roots, xs[n])
	}
	if len(roots) > 0 {
		sort.Slice(roots, func(i, j int) bool {
			return math.Abs(roots[i]-res.Start) < math.Abs(roots[j]-res.Start)
		})
		res.Rotation, res.Reached, res.Alternatives = roots[0], true, roots[1:]
	} else {
		best := -1
		for i, v := range fs {
			if !math.IsNaN(v) && (best < 0 || math.Abs(v) < math.Abs(fs[best])) {
				best = i
			}
		}
		lo := xs[max(best-1, 0)]
		hi := xs[min(best+1, len(xs)-1)]
		x, g := goldenMin(func(x float64) float64 { return math.Abs(f(x)) }, lo, hi, 40)
		res.Rotation = xs[best]
		if g < math.Abs(fs[best]) {
			res.Rotation = x
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	v, b := eval(res.Rotation)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if b == nil {
		return nil, firstErr
	}
	res.Value, res.Bias = v, b
	res.Lower, res.Upper, res.HasCW = adj.Sections(res.Rotation)
	return res, nil
}

// Message is a one-line account of the result for people.
func (r *TargetResult) Message() string {
	p := r.Target.Probe
	if r.Reached {
		s := sprintf("%s = %s at %s = %.3f: measure %s between ccw and wiper of %s",
			p.Key, p.format(r.Value), r.Adjust.Key(), r.Rotation, models.FormatValue(r.Lower, "Ω"), r.Adjust.PotRef())
		if r.HasCW {
			s += sprintf(" (%s wiper to cw)", models.FormatValue(r.Upper, "Ω"))
		}
		return s
	}
	s := sprintf("%s = %s is out of reach with %s: it spans %s … %s over the travel; closest %s at %.3f (%s ccw–wiper)",
		p.Key, p.format(r.Target.Value), r.Adjust.Key(), p.format(r.Lowest), p.format(r.Highest), p.format(r.Value), r.Rotation, models.FormatValue(r.Lower, "Ω"))
	if lo, hi := r.Lowest, r.Highest; -r.Target.Value >= lo && -r.Target.Value <= hi {
		s += sprintf("; values are signed as measured: did you mean %s?", p.format(-r.Target.Value))
	}
	return s
}

// AdjusterFor picks the knob for a target: spec if given, else the trimmer
// marked for the target's transistor or FET. A node target needs spec.
func AdjusterFor(ch *chains.Chain, t *Target, spec string) (*Adjuster, error) {
	if spec == "" && t.Probe.Ref == "" {
		return nil, keyErr("adjust", t.Probe.Key, "a node target needs the knob to turn (STAGE.KNOB)")
	}
	return ResolveAdjuster(ch, spec, t.Probe.Ref)
}
