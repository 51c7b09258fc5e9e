package chains_test

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/dsp/wdf"
	"renderchain/internal/refnodal"
	"renderchain/measure"
	"renderchain/models"
)

// templateChain is one stage "s" of the named template with its default
// knobs behind an ideal source, into the default 1 MΩ load.
func templateChain(t testing.TB, name, supply string) *chains.Chain {
	t.Helper()
	ch, err := chains.Parse(name+".toml", fmt.Sprintf("name = %q\nsupply = %q\n[[stage]]\nid = \"s\"\ntemplate = %q\n", name, supply, name))
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// Taper fractions written out from the README's definitions, so the hand
// netlists below do not borrow the project's own code: linear t = x,
// audio t = (81^x − 1)/80, reverse-audio t = 1 − audio(1 − x).
func audio(x float64) float64    { return (math.Pow(81, x) - 1) / 80 }
func revAudio(x float64) float64 { return 1 - audio(1-x) }

// pot adds a pot's two sections (ccw–wiper R·t, wiper–cw R·(1 − t)); an
// empty end leaves that section out, as Build does for a rheostat.
func pot(n *refnodal.Net, ccw, wiper, cw string, r, frac float64) {
	if ccw != "" && ccw != wiper {
		n.R(ccw, wiper, r*frac)
	}
	if cw != "" && cw != wiper {
		n.R(wiper, cw, r*(1-frac))
	}
}

// Device helpers: the presets' values (models.Presets, the named models'
// complete sets), in the independent solver's own equations.
var vt25 = refnodal.Vt(models.NominalTemperature)

func bjt(n *refnodal.Net, ref, c, b, e, model string, hfe float64) {
	p := models.Presets[model].Complete().BJT
	n.BJT(refnodal.BJT{C: c, B: b, E: e, Is: p.Is, BF: hfe, BR: p.BetaR, VA: p.EarlyVoltage, Icbo: p.Icbo, PNP: p.PNP, Vt: vt25,
		BaseResistance: p.BaseResistance, InternalBaseNode: "s." + ref + "#base"})
}

func diode(n *refnodal.Net, ref, a, k, model string) {
	p := models.Presets[model].Complete().Diode
	j := "s." + ref + "#junction"
	n.R(a, j, p.Rs)
	n.Diode(refnodal.Diode{A: j, K: k, Is: p.Is, N: p.N, BV: p.BreakdownVoltage, IBV: p.BreakdownCurrent, NBV: p.BreakdownN, Vt: vt25})
}

// templateCase is a template with its hand-written DC netlist: every part
// of the template file transcribed by hand, caps open, inductances
// shorted (a transformer at DC is its winding resistances).
type templateCase struct {
	name, supply string
	net          func(n *refnodal.Net)
	guess        map[string]float64
}

var templateCases = []templateCase{
	{"fuzz-ge3", "-9V", func(n *refnodal.Net) {
		for i, hfe := range []float64{70, 90, 110} {
			c, b := fmt.Sprintf("s.c%d", i+1), fmt.Sprintf("s.b%d", i+1)
			bjt(n, fmt.Sprintf("Q%d", i+1), c, b, "gnd", "ge-pnp", hfe)
			n.R(c, "v+", 8.2e3)
			n.R(c, b, 1e6)
		}
		pot(n, "gnd", "s.f2", "s.f1", 50e3, audio(0.7))
		pot(n, "gnd", "out", "s.l1", 100e3, audio(0.5))
		n.R("out", "gnd", 1e6)
	}, map[string]float64{"s.c1": -4, "s.c2": -4, "s.c3": -4, "s.b1": -0.2, "s.b2": -0.2, "s.b3": -0.2}},
	{"fuzz-si4", "9V", func(n *refnodal.Net) {
		bjt(n, "Q1", "s.c1", "s.b1", "s.e1", "si-npn", 250)
		n.R("v+", "s.c1", 15e3)
		n.R("s.c1", "s.b1", 3.3e6)
		n.R("s.e1", "gnd", 470)
		pot(n, "gnd", "s.s2", "s.s1", 100e3, audio(0.6))
		bjt(n, "Q2", "s.c2", "s.b2", "s.e2", "si-npn", 250)
		n.R("v+", "s.c2", 12e3)
		n.R("s.c2", "s.b2", 2.7e6)
		n.R("s.e2", "gnd", 100)
		diode(n, "D1", "s.k2", "s.b2", "si-signal")
		diode(n, "D2", "s.b2", "s.k2", "si-signal")
		bjt(n, "Q3", "s.c3", "s.b3", "s.e3", "si-npn", 250)
		n.R("v+", "s.c3", 12e3)
		n.R("s.c3", "s.b3", 2.7e6)
		n.R("s.e3", "gnd", 100)
		n.R("s.k3", "s.d3", 1e3)
		diode(n, "D3", "s.d3", "gnd", "si-signal")
		diode(n, "D4", "gnd", "s.d3", "si-signal")
		n.R("s.d3", "s.lp", 18e3)
		n.R("s.hp", "gnd", 33e3)
		pot(n, "s.lp", "s.t", "s.hp", 100e3, 0.5)
		bjt(n, "Q4", "s.c4", "s.b4", "s.e4", "si-npn", 250)
		n.R("v+", "s.c4", 10e3)
		n.R("s.c4", "s.b4", 2e6)
		n.R("s.e4", "gnd", 1e3)
		pot(n, "gnd", "out", "s.v1", 100e3, audio(0.5))
		n.R("out", "gnd", 1e6)
	}, map[string]float64{"s.c1": 4, "s.c2": 4, "s.c3": 4, "s.c4": 4, "s.b1": 0.7, "s.b2": 0.6, "s.b3": 0.6, "s.b4": 1, "s.k2": 0.6,
		"s.D1#junction": 0.6, "s.D2#junction": 0.6}}, // near the nodes the series resistances tie them to
	{"octave-transformer", "9V", func(n *refnodal.Net) {
		n.R("v+", "s.b1", 82e3)
		n.R("s.b1", "gnd", 15e3)
		bjt(n, "Q1", "s.c1", "s.b1", "s.e1", "si-npn", 200)
		n.R("s.e1", "gnd", 680)
		pot(n, "s.eb", "s.eb", "s.e1", 1e3, revAudio(0.4))
		n.R("v+", "s.c1", 150)  // the primary's resistance
		n.R("s.sa", "gnd", 150) // the secondary's halves, the tap on ground
		n.R("gnd", "s.sb", 150)
		diode(n, "D1", "s.sa", "s.r", "ge-signal")
		diode(n, "D2", "s.sb", "s.r", "ge-signal")
		n.R("s.r", "gnd", 47e3)
		pot(n, "gnd", "out", "s.l1", 100e3, audio(0.7))
		n.R("out", "gnd", 1e6)
	}, map[string]float64{"s.c1": 8.8, "s.b1": 1.3, "s.e1": 0.7}},
	{"octave-splitter", "9V", func(n *refnodal.Net) {
		n.R("v+", "s.b1", 100e3)
		n.R("s.b1", "gnd", 22e3)
		bjt(n, "Q1", "s.c1", "s.b1", "s.e1", "si-npn", 200)
		n.R("v+", "s.c1", 4.7e3)
		n.R("s.e1", "s.e1b", 150)
		n.R("s.e1b", "gnd", 1e3)
		n.R("v+", "s.b2", 150e3)
		n.R("s.b2", "gnd", 100e3)
		bjt(n, "Q2", "s.c2", "s.b2", "s.e2", "si-npn", 200)
		n.R("s.c2x", "s.c2", 3.9e3)
		pot(n, "v+", "s.c2x", "", 2e3, 0.4)
		n.R("s.e2", "gnd", 4.7e3)
		n.R("s.ka", "gnd", 100e3)
		n.R("s.kb", "gnd", 100e3)
		diode(n, "D1", "s.ka", "s.r", "ge-signal")
		diode(n, "D2", "s.kb", "s.r", "ge-signal")
		n.R("s.r", "gnd", 47e3)
		pot(n, "gnd", "out", "s.l1", 100e3, audio(0.8))
		n.R("out", "gnd", 1e6)
	}, map[string]float64{"s.c1": 5, "s.b1": 1.5, "s.e1": 0.9, "s.c2": 6, "s.b2": 3.4, "s.e2": 2.8}},
	{"opamp-clip", "9V", func(n *refnodal.Net) {
		n.R("v+", "s.ref", 100e3)
		n.R("s.ref", "gnd", 100e3)
		n.R("s.p", "s.ref", 1e6)
		u := models.OpAmpPresets["opamp-general-dual"].Params
		n.OpAmp("s.p", "s.m", "s.o", u.Gain, u.InputResistance, u.OutputResistance)
		n.R("s.o", "s.f", 10e3)
		pot(n, "s.f", "s.m", "", 500e3, audio(0.5))
		diode(n, "D1", "s.o", "s.m", "si-signal")
		diode(n, "D2", "s.m", "s.o", "si-signal")
		n.R("s.m", "s.g", 3.3e3)
		n.R("s.l1", "s.l2", 1e3)
		pot(n, "gnd", "out", "s.l2", 10e3, audio(0.6))
		n.R("out", "gnd", 1e6)
	}, map[string]float64{"s.ref": 4.5, "s.p": 4.5, "s.m": 4.5, "s.o": 4.5}},
	{"jfet-boost", "9V", func(n *refnodal.Net) {
		n.R("s.g", "gnd", 1e6)
		j := models.JFETPresets["n-jfet"].Params
		n.JFET(refnodal.JFET{D: "s.d", G: "s.g", S: "s.s", Idss: j.Idss, Vp: j.Pinchoff, Lambda: j.ChannelModulation,
			GateIs: j.GateIs, GateN: j.GateN, Vt: vt25})
		n.R("s.s", "gnd", 1e3)
		pot(n, "s.sb", "s.sb", "s.s", 10e3, revAudio(0.5))
		n.R("s.dx", "s.d", 1.8e3)
		pot(n, "v+", "s.dx", "", 5e3, 0.5)
		n.R("out", "gnd", 1e6)
		n.R("out", "gnd", 1e6)
	}, map[string]float64{"s.d": 4, "s.s": 1}},
}

// Each new template's DC operating point (engine.Prepare through bias:
// the flattening, then dsp/mna's DC solve) against an independent nodal
// solve of the template's parts transcribed by hand (internal/refnodal:
// the device equations written again from their sources, Kirchhoff's law
// by hand, central-difference Newton with gonum's LU). Every node the
// bias report names must be in the hand netlist and agree within 1 µV:
// both solve the same equations to Newton tolerances near 1e-10 V, and
// the hand netlists include every element that carries DC (the 1 TΩ
// leaks Build adds go on nodes that only junctions reach; none of these
// templates has one).
func TestTemplatesAgainstIndependentDC(t *testing.T) {
	for _, tc := range templateCases {
		t.Run(tc.name, func(t *testing.T) {
			ch := templateChain(t, tc.name, tc.supply)
			b, err := bias.Solve(ch)
			if err != nil {
				t.Fatal(err)
			}
			v := -9.0
			if tc.supply == "9V" {
				v = 9
			}
			net := refnodal.New(map[string]float64{"v+": v, "in": 0})
			tc.net(net)
			want, err := net.Solve(tc.guess)
			if err != nil {
				t.Fatal(err)
			}
			worst, compared := 0.0, 0
			for _, nd := range b.Nodes {
				w, ok := want[nd.Name]
				if !ok {
					if !nd.Internal {
						t.Errorf("node %s (%.6f V) is not in the hand netlist", nd.Name, nd.Volts)
					}
					continue
				}
				compared++
				d := math.Abs(nd.Volts - w)
				worst = math.Max(worst, d)
				if d > 1e-6 {
					t.Errorf("node %s = %.9f V, independent solve %.9f V", nd.Name, nd.Volts, w)
				}
			}
			if len(b.Warnings) > 0 {
				t.Errorf("warnings at the default settings: %q", b.Warnings)
			}
			t.Logf("%d nodes, worst difference %.3g V", compared, worst)
		})
	}
}

// stripCharges sets every charge-storage parameter of the chain's device
// parts to zero through --set keys, so the chain holds no device charges.
func stripCharges(t *testing.T, ch *chains.Chain) {
	keys := map[chains.PartKind][]string{
		chains.NPN: {"be_capacitance", "bc_capacitance", "transit_time"}, chains.PNP: {"be_capacitance", "bc_capacitance", "transit_time"},
		chains.Diode: {"junction_capacitance", "transit_time"},
		chains.NJFET: {"gs_capacitance", "gd_capacitance"}, chains.PJFET: {"gs_capacitance", "gd_capacitance"},
		chains.NMOSFET: {"gs_capacitance", "gd_capacitance"}, chains.PMOSFET: {"gs_capacitance", "gd_capacitance"},
	}
	for _, st := range ch.Stages {
		for _, p := range st.Parts {
			for _, k := range keys[p.Kind] {
				if err := ch.Set(st.ID + "." + p.Ref + "." + k + "=0"); err != nil {
					t.Fatal(err)
				}
			}
		}
	}
}

// charged reports whether any device of c stores charge.
func charged(c *models.Circuit) bool {
	for _, d := range c.Devices() {
		if ch, ok := d.Model.(interface{ HasCharges() bool }); ok && ch.HasCharges() {
			return true
		}
	}
	return false
}

// worstAgainstTransient drives the wave digital solver (the render's
// solver) and the brute-force reference mna.Transient (trapezoidal
// companions, a full Newton solve each step) with the same 20 ms burst at
// the render's internal rate and returns the worst output difference.
func worstAgainstTransient(t *testing.T, ch *chains.Chain, amp float64) float64 {
	t.Helper()
	c, op := solved(t, ch)
	const fs = 4 * 48000
	s, err := wdf.Compile(c, op, wdf.Options{SampleRate: fs})
	if err != nil {
		t.Fatal(err)
	}
	ref := mna.NewTransient(c, fs, op)
	ref.Tol = 1e-9 // relative to the largest unknown plus one: about 1e-8 V, as bias tests use it
	worst := 0.0
	for k := 0; k < fs/50; k++ {
		tt := float64(k) / fs
		vin := amp * math.Min(1, tt/0.005) * math.Sin(2*math.Pi*330*tt)
		got := s.Tick(vin)
		if _, err := ref.Step(vin); err != nil {
			t.Fatalf("reference step %d: %v", k, err)
		}
		worst = math.Max(worst, math.Abs(got-ref.Voltage(c.Output)))
	}
	if st := s.Stats(); st.NonConverged > 0 {
		t.Errorf("%d samples did not converge", st.NonConverged)
	}
	return worst
}

// TransientTolerance bounds the worst output difference between the
// render's solver and the reference over the burst: 1 µV, the bound the
// wave digital solver's own tests hold against the reference. Both
// discretise with the same bilinear (trapezoidal) rule, so they differ
// only by their Newton tolerances (about 1e-9 V per step in the wave
// digital solver, 1e-8 V in the reference as set here).
const TransientTolerance = 1e-6

// Each new template with its devices' charges set to zero, driven with a
// 20 ms, 330 Hz burst of 0.2 V at the source (all of them clip or
// rectify at that level): the render's solver against the reference.
func TestTemplatesAgainstTransientReference(t *testing.T) {
	for _, tc := range templateCases {
		t.Run(tc.name, func(t *testing.T) {
			ch := templateChain(t, tc.name, tc.supply)
			stripCharges(t, ch)
			worst := worstAgainstTransient(t, ch, 0.2)
			t.Logf("worst |wave digital − reference| %.3g V", worst)
			if worst > TransientTolerance {
				t.Errorf("worst difference %.3g V over %g V", worst, TransientTolerance)
			}
		})
	}
}

// The same with the named models' charges in place (junction and
// diffusion capacitances): the reference and the render's solver both
// integrate them by the trapezoidal rule.
func TestTemplatesWithChargesAgainstTransientReference(t *testing.T) {
	for _, tc := range templateCases {
		t.Run(tc.name, func(t *testing.T) {
			ch := templateChain(t, tc.name, tc.supply)
			c, _ := ch.Build()
			if !charged(c) {
				t.Fatalf("%s has no device charges: the check would be the one above", tc.name)
			}
			worst := worstAgainstTransient(t, ch, 0.2)
			t.Logf("worst |wave digital − reference| %.3g V", worst)
			if worst > TransientTolerance {
				t.Errorf("worst difference %.3g V over %g V", worst, TransientTolerance)
			}
		})
	}
}

// sine measures a chain through the render path (measure.Sine).
func sine(t *testing.T, ch *chains.Chain, f, amp float64) *measure.Result {
	t.Helper()
	r, err := measure.Sine(context.Background(), ch, f, amp, measure.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if r.Solver.NonConverged > 0 || math.IsNaN(r.PeakPositiveV) || math.IsNaN(r.PeakNegativeV) {
		t.Errorf("solver: %+v, peaks %g %g", r.Solver, r.PeakPositiveV, r.PeakNegativeV)
	}
	return r
}

func harmonic(r *measure.Result, order int) float64 {
	for _, h := range r.Harmonics {
		if h.Order == order {
			return float64(h.DBc)
		}
	}
	return math.Inf(-1)
}

// The new templates at their default settings do what they are for,
// measured through the render path:
//   - the cascades clip a 100 mV, 330 Hz sine (THD above 10 %: what a fuzz
//     is for), with every transistor active and every collector between
//     35 % and 65 % of the supply at idle;
//   - the octave-up rectifiers turn a 200 mV, 220 Hz sine into mostly its
//     second harmonic, at least 10 dB above what is left of the
//     fundamental (a balanced full-wave rectifier leaves none: the Fourier
//     series of |sin| holds only even harmonics, 2/π − (4/π)·Σ cos(2kx)/(4k² − 1));
//   - the op-amp clipper's transfer is odd about the reference
//     (antiparallel identical diodes), so its even harmonics stay below
//     −60 dBc while it clips (THD above 5 % at 200 mV, 330 Hz);
//   - the JFET booster with the source fully bypassed and channel-length
//     modulation set to 0 follows the square law: a gate–source sine of
//     amplitude v about an overdrive Vov gives a second harmonic of
//     v/(4·Vov) of the fundamental (expand (Vov + v·sin)²; Sedra & Smith,
//     the JFET's square law, from memory). At 20 mV and 1 kHz, with Vov
//     read from bias and v reduced by the bypass's 7 Ω against the
//     device's transconductance (1.6 %), within 3 % (the second-harmonic
//     current the bypass feeds back lowers it by about 0.8 %). With the
//     preset's λ = 0.01 /V the drain's swing would take a further 17 % off
//     (2·Vov·λ·gain), which is why it is set to 0 here.
func TestTemplatesBehave(t *testing.T) {
	for _, name := range []string{"fuzz-ge3", "fuzz-si4"} {
		supply := map[string]string{"fuzz-ge3": "-9V", "fuzz-si4": "9V"}[name]
		ch := templateChain(t, name, supply)
		r := sine(t, ch, 330, 0.1)
		if float64(r.THDPercent) < 10 {
			t.Errorf("%s: THD %.1f %% at 100 mV", name, float64(r.THDPercent))
		}
		b, err := bias.Solve(ch)
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range b.Transistors {
			if frac := q.Vc / ch.Supply; q.Region != bias.Active || frac < 0.35 || frac > 0.65 {
				t.Errorf("%s: %s %s, collector at %.0f %% of the supply", name, q.Ref, q.Region, 100*frac)
			}
		}
		t.Logf("%s: THD %.1f %%, output %.3f V peak", name, float64(r.THDPercent), r.Fundamental.VPeak)
	}
	for _, name := range []string{"octave-transformer", "octave-splitter"} {
		r := sine(t, templateChain(t, name, "9V"), 220, 0.2)
		if h2 := harmonic(r, 2); h2 < 10 {
			t.Errorf("%s: second harmonic %.1f dBc", name, h2)
		} else {
			t.Logf("%s: second harmonic %+.1f dBc, fourth %+.1f dBc", name, h2, harmonic(r, 4))
		}
	}
	r := sine(t, templateChain(t, "opamp-clip", "9V"), 330, 0.2)
	for _, k := range []int{2, 4, 6} {
		if h := harmonic(r, k); h > -60 {
			t.Errorf("opamp-clip: harmonic %d at %.1f dBc", k, h)
		}
	}
	if float64(r.THDPercent) < 5 {
		t.Errorf("opamp-clip: THD %.2f %% at 200 mV", float64(r.THDPercent))
	}
	t.Logf("opamp-clip: THD %.1f %%, 2nd %.0f dBc, 3rd %.1f dBc", float64(r.THDPercent), harmonic(r, 2), harmonic(r, 3))

	ch := templateChain(t, "jfet-boost", "9V")
	for _, kv := range []string{"s.boost=1", "s.Q1.channel_modulation=0"} {
		if err := ch.Set(kv); err != nil {
			t.Fatal(err)
		}
	}
	b, err := bias.Solve(ch)
	if err != nil {
		t.Fatal(err)
	}
	q := b.FET("s.Q1")
	if q == nil || q.Region != bias.Active {
		t.Fatalf("JFET %+v", q)
	}
	gm := 2 * q.Id / q.Overdrive // square law: gm = 2·Id/Vov
	zs := cmplx.Abs(complex(1, -1/(2*math.Pi*1000*22e-6)))
	v := 0.02 / (1 + gm*zs)
	want := v / (4 * q.Overdrive)
	r = sine(t, ch, 1000, 0.02)
	got := math.Pow(10, harmonic(r, 2)/20)
	if math.Abs(got/want-1) > 0.03 {
		t.Errorf("jfet-boost: second harmonic %.4f %%, square law %.4f %%", 100*got, 100*want)
	}
	t.Logf("jfet-boost: Vov %.3f V, second harmonic %.4f %% (square law %.4f %%), gain %.2f dB", q.Overdrive, 100*got, 100*want, float64(r.GainDB))
}
