package mna_test

import (
	"math"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// abruptJunction is a reverse-biased abrupt junction (grading 1/2) with
// a negligible saturation current: 100 pF at zero bias, 0.7 V built-in.
func abruptJunction() models.DiodeParams {
	p := models.DiodeParams{Is: 1e-15, N: 1}
	p.Junction = models.Depletion{C0: 100e-12, Potential: 0.7, Grading: 0.5}
	return p
}

// abruptCharge is the depletion charge of an abrupt junction,
// Q(V) = 2·C0·V0·(1 − √(1 − V/V0)), the integral of C0·(1 − V/V0)^−1/2
// (Sze & Ng, "Physics of Semiconductor Devices", 3rd ed., sec. 2.3).
func abruptCharge(v float64) float64 { return 2 * 100e-12 * 0.7 * (1 - math.Sqrt(1-v/0.7)) }

// junctionRC is the source, a 10 kΩ resistor and the junction reversed
// (anode at node k, cathode on ground), the source at −1 V at rest.
func junctionRC() *netlist {
	n := newNet()
	n.Sig("VIN", "s", -1)
	n.R("R1", "s", "k", 10e3)
	n.D("D1", "k", "gnd", abruptJunction())
	return n
}

// TestTransientJunctionCharge: the source steps from −1 V to −10 V and
// charges the reverse-biased junction through 10 kΩ (τ = R·C between
// 0.26 and 0.64 µs), at 50 MHz for 8 µs.
//
// (1) Charge conservation. The trapezoidal rule on the port charge,
// i_n = (2/h)·(q_n − q_{n−1}) − i_{n−1}, makes the trapezoidal sum of the
// current exactly q_N − q_0 (Chua & Lin 1975, ch. 13: the charge-based
// companion model conserves charge), so the resistor current summed by
// the trapezoidal rule equals the closed-form charge change
// Q(V_N) − Q(V_0). Tolerance 1e-9 relative: Newton stops on 1e-12 V,
// and the junction's leakage (1e-15 A for 8 µs) is 1e-11 of the charge.
//
// (2) The waveform. Charging an abrupt junction through R from a source
// at Vs has the closed form (separating dQ/dt = (Vs − V)/R with
// u = √(1 − V/V0), us = √(1 − Vs/V0)):
//
//	t(V) = (R·C0/us)·(ln|(u0 − us)/(u0 + us)| − ln|(u − us)/(u + us)|)
//
// The trapezoidal rule sees the step as a ramp over the first sample,
// which delays the response by h/2: each sample V_n is compared with the
// closed form at t_n − h/2. The rule's error is O((h/τ)²) of the swing
// (h/τ ≤ 0.08 here): tolerance 1e-3 of the 9 V swing.
func TestTransientJunctionCharge(t *testing.T) {
	const fs, r, vs = 50e6, 10e3, -10.0
	n := junctionRC()
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	tr := mna.NewTransient(n.c, fs, op)
	k := n.c.Lookup("k")
	h := 1 / fs
	v0 := op.Node[k]
	iPrev := (-1 - v0) / r
	sum := 0.0
	us := math.Sqrt(1 - vs/0.7)
	u0 := math.Sqrt(1 - v0/0.7)
	lg := func(u float64) float64 { return math.Log(math.Abs((u - us) / (u + us))) }
	worst := 0.0
	var v float64
	for i := 1; i <= 400; i++ {
		if _, err := tr.Step(vs + 1); err != nil {
			t.Fatal(err)
		}
		v = tr.Voltage(k)
		ii := (vs - v) / r
		sum += h / 2 * (ii + iPrev)
		iPrev = ii
		// Closed-form voltage at t_n − h/2: invert t(V) by bisection.
		tn := (float64(i) - 0.5) * h
		lo, hi := vs, v0
		for b := 0; b < 200; b++ {
			mid := 0.5 * (lo + hi)
			tm := r * 100e-12 / us * (lg(u0) - lg(math.Sqrt(1-mid/0.7)))
			if tm > tn { // mid is closer to vs than the solution
				lo = mid
			} else {
				hi = mid
			}
		}
		e := math.Abs(v-0.5*(lo+hi)) / 9
		worst = math.Max(worst, e)
		if e > 1e-3 {
			t.Errorf("sample %d: V = %.6f, closed form %.6f (err %.2g of the swing)", i, v, 0.5*(lo+hi), e)
		}
	}
	want := abruptCharge(v) - abruptCharge(v0)
	if e := relErr(sum, want); e > 1e-9 {
		t.Errorf("∑ i·dt = %.12g C, Q(V_N) − Q(V_0) = %.12g C (rel err %.2g)", sum, want, e)
	}
	t.Logf("charge moved %.6g C (closed form %.6g C, rel err %.2g); worst waveform error %.2g of the swing (tolerance 1e-3)",
		sum, want, relErr(sum, want), worst)
}

// TestACJunctionCapacitance: the same junction in the small-signal
// analysis is an RC low-pass of C = C0/√(1 − V/V0) at its bias (the
// depletion law) and R = 10 kΩ: H = 1/(1 + jωRC) (every circuit text).
// The junction's conductance at −1 V is 1e-15/Vt·e^−39 S, nothing against
// 10 kΩ: tolerance 1e-9 relative.
func TestACJunctionCapacitance(t *testing.T) {
	n := junctionRC()
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	c := 100e-12 / math.Sqrt(1-op.Node[n.c.Lookup("k")]/0.7)
	freqs := logspace(1e3, 1e8, 21)
	h, err := mna.AC(n.c, op, freqs, []int{n.c.Lookup("k")})
	if err != nil {
		t.Fatal(err)
	}
	for i, f := range freqs {
		want := 1 / complex(1, 2*math.Pi*f*10e3*c)
		if e := cRelErr(h[i][0], want); e > 1e-9 {
			t.Errorf("%g Hz: H = %v, 1/(1 + jωRC) = %v (rel err %.2g)", f, h[i][0], want, e)
		}
	}
}

// TestZenerClipper: 12 V through 1 kΩ into a reversed 9.1 V zener. Past
// the knee the zener's reverse current is Ibv·e^((V − BV)/(nbv·Vt)), so
// the current obeys I = Ibv·exp((12 − BV − I·R)/(nbv·Vt)), whose solution
// is I = (nbv·Vt/R)·W((R·Ibv/(nbv·Vt))·e^((12 − BV)/(nbv·Vt))) (the form
// of Banwell & Jayakumar, Electron. Lett. 36(4), 2000, for a junction
// with series resistance). The forward term (Is = 1 pA) and the constant
// Ibv·e^(−BV/(nbv·Vt)) are left out of the closed form: tolerance 1e-8
// relative, above their share of the ~3 mA current.
func TestZenerClipper(t *testing.T) {
	p := *models.Presets["zener-9v1"].Diode
	p.Rs = 0
	n := newNet()
	n.V("V1", "a", "gnd", 12)
	n.R("R1", "a", "k", 1e3)
	n.D("D1", "gnd", "k", p)
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	nvt := p.BreakdownN * vtRef(tnom)
	v := 12 - p.BreakdownVoltage
	want := nvt / 1e3 * lambertW(math.Log(1e3*p.BreakdownCurrent/nvt)+v/nvt)
	got := (12 - op.Node[n.c.Lookup("k")]) / 1e3
	if e := relErr(got, want); e > 1e-8 {
		t.Errorf("zener current %.10g A, closed form %.10g A (rel err %.2g)", got, want, e)
	}
	t.Logf("V(k) = %.5f V, I = %.6g mA (rel err %.2g), method %s", op.Node[n.c.Lookup("k")], got*1e3, relErr(got, want), op.Method)
}

// TestJFETSelfBias: an n-channel JFET with a 680 Ω source resistor and its
// gate on ground through 1 MΩ, the textbook self-bias (Sedra & Smith,
// "Microelectronic Circuits", JFET biasing; from memory): with λ = 0 and
// Vgs = −Id·Rs, Shockley's law Id = Idss·(1 − Id·Rs/Vp)² is a quadratic,
// Idss·a²·Id² − (2·Idss·a + 1)·Id + Idss = 0 with a = Rs/Vp, whose smaller
// root is the operating point. The gate leakage (1e-14 A through 1 MΩ)
// shifts Vgs by 1e-8 V: tolerance 1e-7 relative.
func TestJFETSelfBias(t *testing.T) {
	p := models.JFETPresets["n-jfet"].Params
	p.ChannelModulation = 0
	const vdd, rd, rs = 9.0, 2.2e3, 680.0
	n := newNet()
	n.V("VDD", "v+", "gnd", vdd)
	n.R("RD", "v+", "d", rd)
	n.R("RS", "s", "gnd", rs)
	n.R("RG", "g", "gnd", 1e6)
	n.part(t, models.Element{Ref: "J1", Kind: models.JFETKind, JFET: p}, "d", "g", "s")
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	a := rs / p.Pinchoff
	b := 2*p.Idss*a + 1
	want := (b - math.Sqrt(b*b-4*p.Idss*p.Idss*a*a)) / (2 * p.Idss * a * a)
	got := op.Node[n.c.Lookup("s")] / rs
	if e := relErr(got, want); e > 1e-7 {
		t.Errorf("Id = %.10g A, quadratic %.10g A (rel err %.2g)", got, want, e)
	}
	vgs := op.Node[n.c.Lookup("g")] - op.Node[n.c.Lookup("s")]
	vds := op.Node[n.c.Lookup("d")] - op.Node[n.c.Lookup("s")]
	if vds < vgs+p.Pinchoff {
		t.Errorf("not saturated: Vds %g < Vgs − VP %g", vds, vgs+p.Pinchoff)
	}
	t.Logf("Id %.5g mA (rel err %.2g), Vgs %.4f V, Vds %.3f V", got*1e3, relErr(got, want), vgs, vds)
}

// TestMOSFETBias: an n-channel enhancement MOSFET with its gate on a
// 1 MΩ/1 MΩ divider from 12 V, 1 kΩ in the source and 1 kΩ in the drain
// (Sedra & Smith, MOSFET biasing with a source resistor; from memory).
// With λ = 0, Id = (k/2)·(Vg − Id·Rs − Vth)²: with y = Vg − Vth − Id·Rs,
// (k·Rs/2)·y² + y − (Vg − Vth) = 0 gives y and Id = (k/2)·y². The body
// diode's reverse saturation current (3e-11 A) is left out: tolerance
// 1e-7 relative.
func TestMOSFETBias(t *testing.T) {
	p := models.MOSFETPresets["n-mosfet"].Params
	p.ChannelModulation = 0
	n := newNet()
	n.V("VDD", "v+", "gnd", 12)
	n.R("R1", "v+", "g", 1e6)
	n.R("R2", "g", "gnd", 1e6)
	n.R("RD", "v+", "d", 1e3)
	n.R("RS", "s", "gnd", 1e3)
	n.part(t, models.Element{Ref: "M1", Kind: models.MOSFETKind, MOSFET: p}, "d", "g", "s")
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	aa, c0 := p.K*1e3/2, 6-p.Threshold
	y := (-1 + math.Sqrt(1+4*aa*c0)) / (2 * aa)
	want := p.K / 2 * y * y
	got := op.Node[n.c.Lookup("s")] / 1e3
	if e := relErr(got, want); e > 1e-7 {
		t.Errorf("Id = %.10g A, quadratic %.10g A (rel err %.2g)", got, want, e)
	}
	t.Logf("Id %.5g mA (rel err %.2g), Vov %.4f V, method %s", got*1e3, relErr(got, want), y, op.Method)
}
