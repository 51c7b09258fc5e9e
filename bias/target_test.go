package bias

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/dsp/resample"
	"renderchain/engine"
	"renderchain/internal/testchains"
	"renderchain/models"
)

// SolveTarget's rotation, re-applied with --set and solved afresh, gives
// the target within 10 mV (the figure; currents within 0.1 %), and
// the resistance it reports is R·t(x) of the linear trimmer (the chain-file
// core's definition of a pot's ccw–wiper section).
func TestTargetReached(t *testing.T) {
	cases := []struct {
		chain  testchains.Pair
		target string
		adjust string
	}{
		{testchains.SiPair(), "fz.Q2.vc=4.5V", ""},
		{testchains.SiPair(), "fz.Q2.vc=6V", "fz.TR2"},
		{testchains.SiPair(), "fz.Q2.vce=3V", "fz.trim2"},
		{testchains.SiPair(), "fz.Q2.ic=0.7mA", "fz.trim1"},
		{testchains.SiPair(), "fz.Q1.vc=1.3V", ""},
		{testchains.SiPair(), "fz.c2=5V", "fz.trim2"},
		{testchains.GePair(), "fz.Q2.vc=-4.5V", ""},
		{testchains.GePair(), "fz.Q2.vce=-3V", ""},
	}
	for _, tc := range cases {
		ch := tc.chain.Parse(t)
		tg, err := ParseTarget(ch, tc.target)
		if err != nil {
			t.Fatal(err)
		}
		adj, err := AdjusterFor(ch, tg, tc.adjust)
		if err != nil {
			t.Fatal(err)
		}
		res, err := SolveTarget(ch, tg, adj)
		if err != nil {
			t.Fatal(err)
		}
		if !res.Reached {
			t.Errorf("%s: not reached: %s", tc.target, res.Message())
			continue
		}
		check := ch.Clone()
		if err := check.Set(fmt.Sprintf("%s=%.12f", adj.Key(), res.Rotation)); err != nil {
			t.Fatal(err)
		}
		b, err := Solve(check)
		if err != nil {
			t.Fatal(err)
		}
		got, err := tg.Probe.Read(b)
		if err != nil {
			t.Fatal(err)
		}
		tol := 10e-3
		if tg.Probe.Unit() == "A" {
			tol = 1e-3 * math.Abs(tg.Value)
		}
		if math.Abs(got-tg.Value) > tol {
			t.Errorf("%s: %g at rotation %.6f", tc.target, got, res.Rotation)
		}
		if want := adj.Pot.Value * res.Rotation; math.Abs(res.Lower-want) > 1e-9*adj.Pot.Value || res.HasCW {
			t.Errorf("%s: ccw–wiper %g Ω, R·x = %g Ω", tc.target, res.Lower, want)
		}
		t.Logf("%s: %s = %.4f, error %.2g %s, %d DC solves", tc.target, adj.Key(), res.Rotation, got-tg.Value, tg.Probe.Unit(), res.Solves)
	}
}

// Out of reach: a result, with the closest value reachable. An independent
// 201-point scan of the travel must not find anything closer than it (to
// 1 mV), and the message says so.
func TestTargetOutOfReach(t *testing.T) {
	for _, target := range []string{"fz.Q2.vc=8.9V", "fz.Q2.vc=0.2V", "fz.Q2.vc=-4.5V"} {
		ch := testchains.SiPair().Parse(t)
		tg, _ := ParseTarget(ch, target)
		adj, _ := AdjusterFor(ch, tg, "")
		res, err := SolveTarget(ch, tg, adj)
		if err != nil {
			t.Fatal(err)
		}
		if res.Reached || !strings.Contains(res.Message(), "out of reach") {
			t.Fatalf("%s: reached %v, message %q", target, res.Reached, res.Message())
		}
		best := math.Inf(1)
		work := ch.Clone()
		for i := 0; i <= 200; i++ {
			work.Stage("fz").Knobs["trim2"] = float64(i) / 200
			b, err := Solve(work)
			if err != nil {
				t.Fatal(err)
			}
			v, _ := tg.Probe.Read(b)
			best = math.Min(best, math.Abs(v-tg.Value))
		}
		if math.Abs(res.Value-tg.Value) > best+1e-3 {
			t.Errorf("%s: closest reported %g, the scan finds within %g", target, res.Value, best)
		}
		if target == "fz.Q2.vc=-4.5V" && !strings.Contains(res.Message(), "did you mean") {
			t.Errorf("sign hint missing: %s", res.Message())
		}
		t.Logf("%s", res.Message())
	}
}

func TestTargetBadInput(t *testing.T) {
	ch := testchains.SiPair().Parse(t)
	for _, s := range []string{"fz.Q9.vc=4V", "fz.Q2.vq=4V", "nope.Q2.vc=4V", "fz.Q2.vc", "fz.Q2.vc=4A", "fz.nowhere=4V", "a.b.c.d=1"} {
		_, err := ParseTarget(ch, s)
		var fe *models.FieldError
		if !errors.As(err, &fe) || fe.Field != "target" || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: %v, want a one-line *models.FieldError on the target", s, err)
		}
	}
	tg, _ := ParseTarget(ch, "fz.c2=4V")
	if _, err := AdjusterFor(ch, tg, ""); err == nil {
		t.Error("a node target without --adjust was accepted")
	}
	if _, err := ResolveAdjuster(ch, "fz.nope", ""); err == nil {
		t.Error("unknown adjuster accepted")
	}
	if _, err := ResolveAdjuster(ch, "", "fz.Q9"); err == nil {
		t.Error("adjuster for a transistor no trimmer marks accepted")
	}
}

// transientInner runs package mna's brute-force transient solver as the
// oversampler's inner processor, in place of the wave digital solver: the
// input samples are source volts over gain, the output the node's voltage.
type transientInner struct {
	tr   *mna.Transient
	node int
	gain float64
	err  error
}

func (p *transientInner) Process(dst, src []float64) {
	for i, v := range src {
		if _, err := p.tr.Step(v * p.gain); err != nil && p.err == nil {
			p.err = err
		}
		dst[i] = p.tr.Voltage(p.node)
	}
}

// The symmetric setting, checked with an independent simulator: the slow
// full-Newton transient solver of package mna (trapezoidal companions and a
// full Newton solve each step, a different method from the wave digital
// adaptor), driven through the same oversampler (dsp/resample, 48 kHz × 4)
// by the same test sine at the rotation found, must show excursions about
// the idle voltage equal within 2 % (asymmetry |a| < 0.02; the two solvers
// discretise with the same bilinear rule and agree to well under that),
// while the travel's ends are lopsided the opposite ways.
func TestSymmetricSetting(t *testing.T) {
	ch := testchains.SiPair().Parse(t)
	adj, err := ResolveAdjuster(ch, "", "")
	if err != nil || adj.Knob != "trim2" {
		t.Fatalf("default adjuster %v, %v; want trim2 (the last marked transistor's)", adj, err)
	}
	res, err := SolveSymmetric(context.Background(), ch, adj, SymmetricOptions{Level: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	if !res.Reached || res.Probe != "fz.c2" {
		t.Fatalf("not reached (probe %s): %s", res.Probe, res.Note)
	}
	first, last := res.Scan[0].Asymmetry, res.Scan[len(res.Scan)-1].Asymmetry
	if !(first < -0.1 && last > 0.1) {
		t.Errorf("scan ends %.3f, %.3f: want clearly lopsided both ways", first, last)
	}
	work := ch.Clone()
	work.Stage("fz").Knobs["trim2"] = res.Rotation
	p, err := engine.Prepare(work, 0)
	if err != nil {
		t.Fatal(err)
	}
	o := res.Options
	n := p.Circuit.Lookup(res.Probe)
	tr := mna.NewTransient(p.Circuit, o.SampleRate*float64(p.Oversample), p.DC)
	tr.Tol = 1e-9
	inner := &transientInner{tr: tr, node: n, gain: work.InputPeak}
	os, err := resample.NewOversampler(p.Oversample, o.SampleRate, inner, engine.MaxBlock)
	if err != nil {
		t.Fatal(err)
	}
	al, err := resample.NewAligner(os, os.Latency(), engine.MaxBlock)
	if err != nil {
		t.Fatal(err)
	}
	// The engine's sine (same amplitude, fade and phase) for 0.25 s, and
	// the last 20 cycles of it: the settle rule's stretch.
	sine := engine.Sine{A: o.Level / work.InputPeak, F: o.Freq, FS: o.SampleRate, Fade: engine.FadeLength(o.Freq, o.SampleRate, o.MaxSettle)}
	total, record := int(0.25*o.SampleRate), int(float64(o.Cycles)*o.SampleRate/o.Freq)
	src := make([]float64, engine.MaxBlock)
	dst := make([]float64, engine.MaxBlock)
	hi, lo := math.Inf(-1), math.Inf(1)
	for done, k := 0, 0; done < total; done += len(src) {
		sine.Fill(src)
		for _, v := range dst[:al.Process(dst, src)] {
			if k >= total-record && k < total {
				hi, lo = math.Max(hi, v), math.Min(lo, v)
			}
			k++
		}
	}
	if inner.err != nil {
		t.Fatal(inner.err)
	}
	idle := p.DC.Node[n]
	up, down := hi-idle, idle-lo
	a := (up - down) / (up + down)
	t.Logf("symmetric at %s = %.4f: wave digital %+.5f (up %.3f V, down %.3f V); transient reference %+.5f (up %.3f V, down %.3f V)",
		adj.Key(), res.Rotation, res.At.Asymmetry, res.At.Up, res.At.Down, a, up, down)
	if math.Abs(a) > 0.02 || math.Abs(res.At.Asymmetry) > 10*SymmetricTolerance {
		t.Errorf("asymmetry at the setting: reference %.4f, own %.4f", a, res.At.Asymmetry)
	}
}

// A level too small to clip anything is reported, not passed off as a
// setting.
func TestSymmetricNoClipping(t *testing.T) {
	ch := testchains.GePair().Parse(t)
	adj, _ := ResolveAdjuster(ch, "fz.trim2", "")
	res, err := SolveSymmetric(context.Background(), ch, adj, SymmetricOptions{Level: 1e-5, Scan: 5, MaxSettle: 0.1, Cycles: 5})
	if err != nil {
		t.Fatal(err)
	}
	if res.Reached || !strings.Contains(res.Note, "does not clip") {
		t.Errorf("reached %v, note %q", res.Reached, res.Note)
	}
}

// A FET's drain is a target like a collector: the JFET booster example's
// marked drain trimmer is found from the FET's ref, the drain reaches
// 4.5 V within 10 mV (the figure of TestTargetReached), and at the
// rotation found Ohm's law holds across the drain network, (V+ − Vd)/Id =
// 1.8 kΩ + R·t(x) of the linear 5 kΩ trimmer, within 1e-6 (the DC solve
// converges to steps of 1e-10 V on volts). A transistor's quantity on a
// FET is refused with the FET's list.
func TestTargetOnAFET(t *testing.T) {
	ch, err := chains.Load("../chains/examples/jfet-boost.toml")
	if err != nil {
		t.Fatal(err)
	}
	tg, err := ParseTarget(ch, "boost.Q1.vd=4.5V")
	if err != nil {
		t.Fatal(err)
	}
	adj, err := AdjusterFor(ch, tg, "")
	if err != nil {
		t.Fatal(err)
	}
	r, err := SolveTarget(ch, tg, adj)
	if err != nil {
		t.Fatal(err)
	}
	f := r.Bias.FET("boost.Q1")
	if !r.Reached || r.Adjust.Key() != "boost.drain" || f == nil || math.Abs(f.Vd-4.5) > 0.01 {
		t.Fatalf("reached %v with %s, FET %+v", r.Reached, r.Adjust.Key(), f)
	}
	lower, _, _ := r.Adjust.Sections(r.Rotation)
	if got, want := (9-f.Vd)/f.Id, 1.8e3+lower; math.Abs(got/want-1) > 1e-6 {
		t.Errorf("drain network %g Ω by Ohm's law, 1.8 kΩ + trimmer section %g Ω", got, want)
	}
	if _, err := ParseTarget(ch, "boost.Q1.vc=4.5V"); err == nil || !strings.Contains(err.Error(), "not a FET quantity (id, ig, vd, vds, vg, vgs, vs)") {
		t.Errorf("boost.Q1.vc: %v", err)
	}
}
