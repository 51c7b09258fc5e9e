package wdf

import (
	"math"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// Test-only charged devices: a diode and a transistor with fixed linear
// capacitances across their junctions, reported as port charges
// (models.Charged). Because the solver discretises device charges with the
// trapezoidal rule, the bilinear transform a capacitor leaf uses, each
// must render like the plain device with explicit capacitor leaves.

// capDiode is a diode with capacitance C in parallel: q = C·v.
type capDiode struct {
	*models.Diode
	C float64
}

// HasCharges overrides the embedded diode's own answer.
func (d *capDiode) HasCharges() bool { return true }

func (d *capDiode) Charges(v, q, c []float64) {
	q[0] = d.C * v[0]
	c[0] = d.C
}

// capBJT is a transistor with Cbe from base to emitter and Cbc from base
// to collector. Its ports are (base, emitter) and (collector, emitter):
// the charge into the base is Cbe·vbe + Cbc·vbc, into the collector
// −Cbc·vbc, vbc = vbe − vce.
type capBJT struct {
	*models.BJT
	Cbe, Cbc float64
}

// HasCharges overrides the embedded transistor's own answer.
func (b *capBJT) HasCharges() bool { return true }

func (b *capBJT) Charges(v, q, c []float64) {
	vbc := v[0] - v[1]
	q[0] = b.Cbe*v[0] + b.Cbc*vbc
	q[1] = -b.Cbc * vbc
	c[0], c[1] = b.Cbe+b.Cbc, -b.Cbc
	c[2], c[3] = -b.Cbc, b.Cbc
}

// transBJT adds to capBJT a charge into the collector controlled by the
// base–emitter voltage, Ct·vbe (the shape of a diffusion charge), so that
// its capacitance matrix is not symmetric: a kernel that mixed up ∂q_b/∂v_ce
// and ∂q_c/∂v_be would show it.
type transBJT struct {
	capBJT
	Ct float64
}

func (b *transBJT) Charges(v, q, c []float64) {
	b.capBJT.Charges(v, q, c)
	q[1] += b.Ct * v[0]
	c[2] += b.Ct
}

// noCharge reports HasCharges false: the solver must skip its charges.
type noCharge struct{ capDiode }

func (noCharge) HasCharges() bool { return false }

// compileWith compiles b after replacing device k's model by wrap(model)
// (the DC operating point ignores charges, so it is solved as usual).
func (b *bench) compileWith(t testing.TB, fs float64, wrap map[int]func(models.Nonlinear) models.Nonlinear) (*Solver, *mna.OperatingPoint) {
	t.Helper()
	b.c.AddLeaks()
	op, err := mna.SolveDC(b.c, mna.DCOptions{})
	if err != nil {
		t.Fatalf("DC: %v", err)
	}
	for k, w := range wrap {
		op.Devices[k].Model = w(op.Devices[k].Model)
	}
	s, err := Compile(b.c, op, Options{SampleRate: fs})
	if err != nil {
		t.Fatalf("compile: %v", err)
	}
	return s, op
}

// A diode clipper whose diode carries 4.7 nF of charge capacitance, against
// the same clipper with a plain diode and a 4.7 nF capacitor leaf in
// parallel. Both are the trapezoidal rule on the same circuit, so they solve
// the same equations: they differ only by where Newton stops, within its
// tolerance of 1e-9 V per sample, in a circuit that does not amplify state
// errors. Tolerance 1e-8 V: ten times the Newton tolerance.
func TestChargedDiodeMatchesCapacitorLeaf(t *testing.T) {
	const fs, C = 96000.0, 4.7e-9
	si := models.DiodeParams{Is: 2.52e-9, N: 1.752}
	build := func(leaf bool) *bench {
		b := newBench()
		b.src("V1", "in", 0, true)
		b.r("R1", "in", "out", 4700)
		b.diode("D1", "out", "gnd", si)
		b.diode("D2", "gnd", "out", si)
		if leaf {
			b.cap("CJ", "out", "gnd", C)
		}
		b.out("out")
		return b
	}
	withCap := func(m models.Nonlinear) models.Nonlinear { return &capDiode{m.(*models.Diode), C} }
	charged, _ := build(false).compileWith(t, fs, map[int]func(models.Nonlinear) models.Nonlinear{0: withCap})
	leaf, _ := build(true).compile(t, fs)
	general, _ := build(false).compileWith(t, fs, map[int]func(models.Nonlinear) models.Nonlinear{0: withCap})
	general.small = nil // the same through the general kernel
	worst, worstGen := 0.0, 0.0
	for n := 0; n < 4800; n++ {
		x := 2 * math.Sin(2*math.Pi*3001*float64(n)/fs)
		a, b, g := charged.Tick(x), leaf.Tick(x), general.Tick(x)
		worst = math.Max(worst, math.Abs(a-b))
		worstGen = math.Max(worstGen, math.Abs(g-b))
	}
	t.Logf("charged diode vs capacitor leaf: worst %.3g V (fixed-size kernel), %.3g V (general); %+v", worst, worstGen, charged.Stats())
	if worst > 1e-8 || worstGen > 1e-8 {
		t.Errorf("charged diode departs from the capacitor leaf by %.3g / %.3g V > 1e-8 V", worst, worstGen)
	}
	if charged.Stats().NonConverged != 0 {
		t.Errorf("%d samples did not converge", charged.Stats().NonConverged)
	}
}

// A common-emitter stage whose transistor carries 22 pF base–emitter and
// 4.7 pF base–collector capacitance as port charges (the off-diagonal
// capacitance matrix of a two-port), against the plain transistor with two
// capacitor leaves, driven into clipping at 5 kHz. Tolerance 1e-8 V, as
// above; the Miller capacitance is large enough to change the output by
// far more than that (checked against the stage without capacitances).
func TestChargedTransistorMatchesCapacitorLeaves(t *testing.T) {
	const fs, cbe, cbc = 192000.0, 22e-12, 4.7e-12
	q := models.BJTParams{Is: 10e-15, BetaF: 200, BetaR: 4}
	build := func(leaves bool) *bench {
		b := newBench()
		b.src("VCC", "vcc", 9, false)
		b.src("VIN", "in", 0, true)
		b.r("RS", "in", "i", 22e3)
		b.cap("C1", "i", "b", 1e-6)
		b.r("RB1", "vcc", "b", 470e3)
		b.r("RB2", "b", "gnd", 68e3)
		b.npn("Q1", "c", "b", "e", q)
		b.r("RC", "vcc", "c", 10e3)
		b.r("RE", "e", "gnd", 470)
		b.cap("C2", "c", "out", 100e-9)
		b.r("RL", "out", "gnd", 100e3)
		if leaves {
			b.cap("CBE", "b", "e", cbe)
			b.cap("CBC", "b", "c", cbc)
		}
		b.out("out")
		return b
	}
	withCaps := func(m models.Nonlinear) models.Nonlinear { return &capBJT{m.(*models.BJT), cbe, cbc} }
	charged, _ := build(false).compileWith(t, fs, map[int]func(models.Nonlinear) models.Nonlinear{0: withCaps})
	leaf, _ := build(true).compile(t, fs)
	plain, _ := build(false).compile(t, fs)
	worst, effect := 0.0, 0.0
	for n := 0; n < 9600; n++ {
		x := 0.8 * math.Sin(2*math.Pi*5000*float64(n)/fs)
		a, b, c := charged.Tick(x), leaf.Tick(x), plain.Tick(x)
		worst = math.Max(worst, math.Abs(a-b))
		effect = math.Max(effect, math.Abs(b-c))
	}
	t.Logf("charged transistor vs capacitor leaves: worst %.3g V; the capacitances themselves change the output by up to %.3g V", worst, effect)
	if worst > 1e-8 {
		t.Errorf("charged transistor departs from the capacitor leaves by %.3g V > 1e-8 V", worst)
	}
	if effect < 1e-4 {
		t.Errorf("the capacitances change the output by only %.3g V: the test would not see a missing charge term", effect)
	}
}

// A device that implements models.Charged but reports HasCharges false
// renders exactly like the plain device (its charge work is skipped), and
// charged devices cost no allocation per sample.
func TestChargesSkippedAndAllocationFree(t *testing.T) {
	const fs = 96000.0
	si := models.DiodeParams{Is: 2.52e-9, N: 1.752}
	build := func() *bench {
		b := newBench()
		b.src("V1", "in", 0, true)
		b.r("R1", "in", "out", 4700)
		b.diode("D1", "out", "gnd", si)
		b.out("out")
		return b
	}
	off := func(m models.Nonlinear) models.Nonlinear {
		return &noCharge{capDiode{m.(*models.Diode), 1e-6}}
	}
	skipped, _ := build().compileWith(t, fs, map[int]func(models.Nonlinear) models.Nonlinear{0: off})
	plain, _ := build().compile(t, fs)
	// Tolerance 1e-12 V: the wrapper is evaluated through models.Nonlinear
	// with the same arithmetic as the direct call; with 1 µF of charge
	// counted by mistake the two would differ by volts.
	for n := 0; n < 2000; n++ {
		x := 2 * math.Sin(2*math.Pi*440*float64(n)/fs)
		if a, b := skipped.Tick(x), plain.Tick(x); math.Abs(a-b) > 1e-12 {
			t.Fatalf("sample %d: device without charges %.17g, plain diode %.17g", n, a, b)
		}
	}
	if skipped.charged {
		t.Error("a device reporting HasCharges false was counted as charged")
	}
	withCap := func(m models.Nonlinear) models.Nonlinear { return &capDiode{m.(*models.Diode), 1e-9} }
	for _, small := range []bool{true, false} {
		s, _ := build().compileWith(t, fs, map[int]func(models.Nonlinear) models.Nonlinear{0: withCap})
		if !small {
			s.small = nil
		}
		src := make([]float64, 256)
		for n := range src {
			src[n] = 2 * math.Sin(2*math.Pi*440*float64(n)/fs)
		}
		dst := make([]float64, len(src))
		if a := testing.AllocsPerRun(20, func() { s.Process(dst, src) }); a != 0 {
			t.Errorf("fixed-size kernel %v: %.1f allocations per block with a charged device", small, a)
		}
	}
}

// The Newton matrix with a charged transistor (asymmetric capacitance
// matrix) against central differences of the residual, as in
// TestNewtonMatrixAgainstCentralDifferences, through the general kernel's
// device evaluation: the charge terms (2/T)·C must be the derivative of the
// capacitive currents. Tolerance 1e-6 of J's scale, as there.
func TestNewtonMatrixWithCharges(t *testing.T) {
	wrap := func(m models.Nonlinear) models.Nonlinear {
		return &transBJT{capBJT{m.(*models.BJT), 22e-12, 4.7e-12}, 100e-12}
	}
	s, _ := twoTransistor().compileWith(t, 96000, map[int]func(models.Nonlinear) models.Nonlinear{0: wrap, 1: wrap})
	s.small = nil
	checkNewtonMatrix(t, s)
}

// viaInterface hides a model's concrete type, so the solver reaches its
// charges only through models.Charged; it passes on the emission voltage,
// which sets the solver's convergence test.
type viaInterface struct {
	models.Charged
	nvt float64
}

func (v viaInterface) EmissionVoltage() float64 { return v.nvt }

// The models' own charged diode and transistor (depletion capacitances and
// transit times), which the solver calls directly (Charge, Charges2):
// the two kernels bit for bit, and against the same devices reached only
// through models.Charged within 1e-8 V (ten times the Newton tolerance:
// the charges are the same numbers, but through the interface the solver
// cannot skip the junction limiting of small steps, whose rounding of
// Vce lets Newton stop at a different iterate).
// And a diode whose depletion capacitance has grading 0 (a constant C0 at
// every bias: C0·(1 − v/Vj)⁰, and C0/(1 − FC)·(1 − FC) past the forward
// point) against a capacitor leaf, within 1e-8 V as above.
func TestModelChargesDirectAndThroughInterface(t *testing.T) {
	const fs = 96000.0
	q := models.BJTParams{Is: 10e-15, BetaF: 200, BetaR: 4}
	q.BE = models.Depletion{C0: 8e-12, Potential: 0.75, Grading: 0.33}
	q.BC = models.Depletion{C0: 4e-12, Potential: 0.75, Grading: 0.33}
	q.TransitTime = 400e-12
	si := models.DiodeParams{Is: 2.52e-9, N: 1.752}
	si.Junction = models.Depletion{C0: 2e-12, Potential: 0.6, Grading: 0.5}
	si.TransitTime = 5e-9
	build := func() *bench { return followerIntoDiode(q, si) }
	hide := func(m models.Nonlinear) models.Nonlinear {
		return viaInterface{m.(models.Charged), m.(interface{ EmissionVoltage() float64 }).EmissionVoltage()}
	}
	direct, _ := build().compile(t, fs)
	if !direct.charged || direct.small == nil {
		t.Fatalf("charged %v, fixed-size kernel %v: want both", direct.charged, direct.small != nil)
	}
	hidden, _ := build().compileWith(t, fs, map[int]func(models.Nonlinear) models.Nonlinear{0: hide, 1: hide})
	general, _ := build().compile(t, fs)
	general.small = nil
	worstHidden := 0.0
	for n := 0; n < 4800; n++ {
		x := 2 * math.Sin(2*math.Pi*3001*float64(n)/fs)
		a, b, g := direct.Tick(x), hidden.Tick(x), general.Tick(x)
		if math.Float64bits(a) != math.Float64bits(g) {
			t.Fatalf("sample %d: fixed-size kernel %.17g, general kernel %.17g", n, a, g)
		}
		worstHidden = math.Max(worstHidden, math.Abs(a-b))
	}
	t.Logf("model charges, direct vs through models.Charged: worst %.3g V", worstHidden)
	if worstHidden > 1e-8 {
		t.Errorf("direct and interface charge paths differ by %.3g V > 1e-8 V", worstHidden)
	}

	const C = 4.7e-9
	flat := models.DiodeParams{Is: 2.52e-9, N: 1.752}
	flat.Junction = models.Depletion{C0: C, Potential: 0.6, Grading: 0}
	clip := func(p models.DiodeParams, leaf bool) *bench {
		b := newBench()
		b.src("V1", "in", 0, true)
		b.r("R1", "in", "out", 4700)
		b.diode("D1", "out", "gnd", p)
		if leaf {
			b.cap("CJ", "out", "gnd", C)
		}
		b.out("out")
		return b
	}
	charged, _ := clip(flat, false).compile(t, fs)
	plain := flat
	plain.Junction = models.Depletion{}
	leaf, _ := clip(plain, true).compile(t, fs)
	worst := 0.0
	for n := 0; n < 4800; n++ {
		x := 2 * math.Sin(2*math.Pi*3001*float64(n)/fs)
		worst = math.Max(worst, math.Abs(charged.Tick(x)-leaf.Tick(x)))
	}
	t.Logf("diode with a flat 4.7 nF junction vs capacitor leaf: worst %.3g V", worst)
	if worst > 1e-8 {
		t.Errorf("flat junction capacitance departs from the capacitor leaf by %.3g V > 1e-8 V", worst)
	}
}
