package models_test

import (
	"math"
	"testing"

	"renderchain/models"
)

// zener is a breakdown diode with the values of the zener-9v1 preset, no
// series resistance.
func zener() models.DiodeParams {
	p := *models.Presets["zener-9v1"].Diode
	p.Rs = 0
	return p
}

// TestDiodeBreakdown: the reverse current past the knee against the
// exponential breakdown law the doc comment states, and the two facts of
// the trade it must reproduce: at the rated voltage the reverse current is
// the knee (test) current a zener is specified at (common practice), and
// the dynamic resistance there is nbv·Vt/Ibv, the incremental resistance
// of an exponential law (the same as a forward diode's r = n·Vt/I, Sedra &
// Smith, "Microelectronic Circuits", the diode small-signal model; from
// memory). Forward, the Shockley law is untouched: the breakdown term is
// below 1e-60 A at 0 V and above.
//
// Tolerances: 1e-12 relative for the closed forms (exponents below 40, a
// few ulps each); 1e-9 for the knee current and resistance, which leave
// out the forward term Is and the constant Ibv·e^(−BV/(nbv·Vt)), both
// below 1e-9 of Ibv here.
func TestDiodeBreakdown(t *testing.T) {
	for _, name := range []string{"zener-4v7", "zener-9v1"} {
		p := *models.Presets[name].Diode
		d := models.NewDiode(p, tnom)
		bv, ibv := p.BreakdownVoltage, p.BreakdownCurrent
		nvt, nvtb := p.N*vtRef(tnom), p.BreakdownN*vtRef(tnom)
		for _, v := range []float64{-bv - 0.3, -bv - 0.1, -bv, -bv + 0.1, -bv / 2, -0.3, 0.3, 0.7} {
			want := p.Is*(math.Exp(v/nvt)-1) - ibv*(math.Exp(-(v+bv)/nvtb)-math.Exp(-bv/nvtb))
			i, _ := d.Current(v)
			if e := relErr(i, want); e > 1e-12 && math.Abs(i-want) > 1e-24 {
				t.Errorf("%s: I(%.2f V) = %.12g, closed form %.12g (rel err %.2g)", name, v, i, want, e)
			}
		}
		i, g := d.Current(-bv)
		if e := relErr(-i, ibv); e > 1e-9 {
			t.Errorf("%s: I(−BV) = %.9g A, knee current %g A (rel err %.2g)", name, i, ibv, e)
		}
		if e := relErr(1/g, nvtb/ibv); e > 1e-9 {
			t.Errorf("%s: dynamic resistance at the knee %.6g Ω, nbv·Vt/Ibv = %.6g Ω (rel err %.2g)", name, 1/g, nvtb/ibv, e)
		}
		if i0, _ := d.Current(0); i0 != 0 {
			t.Errorf("%s: I(0) = %g, want 0 exactly", name, i0)
		}
		t.Logf("%s: I(−%.1f V) = %.6g mA, r = %.3g Ω", name, bv, -i*1e3, 1/g)
	}
}

// TestDiodeBreakdownJacobian: dI/dV against central differences across
// forward bias, reverse bias, the knee, deep breakdown and its linear
// continuation (the scaled error of checkDerivatives, tolerance 1e-7).
func TestDiodeBreakdownJacobian(t *testing.T) {
	p := zener()
	d := models.NewDiode(p, tnom)
	f := func(v, i, j []float64) { d.Eval(v, i, j) }
	worst := 0.0
	for _, v := range []float64{0.7, 0.3, 0, -1, -8.9, -9.1, -9.3, -9.1 - 79*p.BreakdownN*vtRef(tnom), -9.1 - 100*p.BreakdownN*vtRef(tnom), -30} {
		worst = math.Max(worst, checkDerivatives(t, "zener", 1, f, []float64{v}, d.EmissionVoltage(), p.Is+p.BreakdownCurrent))
	}
	t.Logf("worst scaled error %.2g (tolerance 1e-7)", worst)
}

// TestDiodeBreakdownLimit: a Newton step from 0 V to −30 V lands in deep
// breakdown; the limiter must replace it by the logarithmic step of
// junction limiting (Nagel 1975, sec. 4.3) applied to the reflected
// voltage u = −(V + BV): from u0 ≤ 0, u = nbv·Vt·ln(u_new/(nbv·Vt)), so that
// the breakdown current moves by the linearised amount Ibv·u_new/(nbv·Vt)
// instead of Ibv·e^(u_new/(nbv·Vt)). A step that stays inside the
// reverse-bias plateau is left alone. Tolerance 1e-12 V (one logarithm).
func TestDiodeBreakdownLimit(t *testing.T) {
	p := zener()
	d := models.NewDiode(p, tnom)
	nvtb := p.BreakdownN * vtRef(tnom)
	v := d.Limit1(-30, 0)
	uNew := 30 - p.BreakdownVoltage
	want := -p.BreakdownVoltage - nvtb*math.Log(uNew/nvtb)
	if math.Abs(v-want) > 1e-12 {
		t.Errorf("step 0 → −30 V limited to %.12g V, junction limiting gives %.12g V", v, want)
	}
	if i, _ := d.Current(v); relErr(-i, p.BreakdownCurrent*uNew/nvtb) > 1e-9 {
		t.Errorf("current after the limited step %g A, want Ibv·u/(nbv·Vt) = %g A", i, -p.BreakdownCurrent*uNew/nvtb)
	}
	if got := d.Limit1(-5, -2); got != -5 {
		t.Errorf("step −2 → −5 V (below the knee) changed to %g", got)
	}
	// Newton's method on the zener clipper (12 V, 1 kΩ, zener reversed)
	// converges with the limiter from 0 V.
	x := 0.0
	for k := 0; k < 100; k++ {
		i, g := d.Current(-x)
		// KCL at the cathode: (12 − x)/1k + i(−x) = 0 → residual r(x).
		r := (12-x)/1e3 + i
		dr := -1/1e3 - g
		xn := x - r/dr
		vn := d.Limit1(-xn, -x)
		x = -vn
	}
	i, _ := d.Current(-x)
	if r := (12-x)/1e3 + i; math.Abs(r) > 1e-12 {
		t.Errorf("Newton with limiting ended at %g V with KCL residual %g A", x, r)
	}
	t.Logf("clipper settles at %.6f V", x)
}

// TestDepletionCV: the junction capacitance against the textbook law
// Cj = Cj0/(1 + VR/V0)^m (Sedra & Smith, "Microelectronic Circuits", the
// junction capacitance; the exercise with Cj0 = 0.4 pF, V0 = 0.75 V,
// m = 1/3 gives 0.3016 pF at VR = 1 V and 0.1647 pF at 10 V: from memory,
// recomputed here from the formula), and C = dQ/dV by central differences
// on Charge, below and above the forward-bias point FC·V0 where the
// charge is linearised, with Q(0) = 0 and Q, C continuous there.
//
// Tolerances: 1e-12 relative against the formula (one pow each); 2e-4
// against the four-digit recalled values; continuity at FC·V0 to 1e-12
// relative (the two branches are algebraically equal there).
func TestDepletionCV(t *testing.T) {
	p := models.DiodeParams{Is: 1e-14, N: 1}
	p.Junction = models.Depletion{C0: 0.4e-12, Potential: 0.75, Grading: 1.0 / 3}
	d := models.NewDiode(p, tnom)
	for _, c := range []struct{ vr, quoted float64 }{{1, 0.3016e-12}, {10, 0.1647e-12}} {
		_, got := d.Charge(-c.vr)
		want := 0.4e-12 / math.Pow(1+c.vr/0.75, 1.0/3)
		if e := relErr(got, want); e > 1e-12 {
			t.Errorf("C(−%g V) = %.10g F, Cj0/(1 + VR/V0)^m = %.10g F", c.vr, got, want)
		}
		if e := relErr(got, c.quoted); e > 2e-4 {
			t.Errorf("C(−%g V) = %.4g pF, worked example %.4g pF", c.vr, got*1e12, c.quoted*1e12)
		}
	}
	if q, c := d.Charge(0); q != 0 || relErr(c, 0.4e-12) > 1e-15 {
		t.Errorf("Q(0), C(0) = %g, %g; want 0 and Cj0", q, c)
	}
	// Continuity at the forward-bias point.
	vf := models.DefaultForwardFraction * 0.75
	below := math.Nextafter(vf, 0)
	q1, c1 := d.Charge(below)
	q2, c2 := d.Charge(vf)
	if relErr(q1, q2) > 1e-12 || relErr(c1, c2) > 1e-12 {
		t.Errorf("at FC·V0: Q %.15g / %.15g, C %.15g / %.15g", q1, q2, c1, c2)
	}
	f := func(v, q, c []float64) { d.Charges(v, q, c) }
	worst := 0.0
	for _, v := range []float64{-20, -5, -1, -0.1, 0, 0.2, vf - 0.01, vf + 0.01, 0.6, 1.5} {
		worst = math.Max(worst, checkDerivatives(t, "depletion", 1, f, []float64{v}, 0.025, 1e-15))
	}
	// The abrupt junction (m = 1/2) has the closed-form charge
	// Q = 2·Cj0·V0·(1 − √(1 − V/V0)) (the integral of the law above; Sze
	// & Ng, "Physics of Semiconductor Devices", 3rd ed., sec. 2.3: the
	// depletion charge grows as the square root of V0 − V).
	p.Junction = models.Depletion{C0: 10e-12, Potential: 0.7, Grading: 0.5}
	d = models.NewDiode(p, tnom)
	for _, v := range []float64{-9, -1, 0.3} {
		q, _ := d.Charge(v)
		want := 2 * 10e-12 * 0.7 * (1 - math.Sqrt(1-v/0.7))
		if e := relErr(q, want); e > 1e-12 {
			t.Errorf("abrupt: Q(%g V) = %.12g C, 2·Cj0·V0·(1 − √(1 − V/V0)) = %.12g C", v, q, want)
		}
	}
	t.Logf("C = dQ/dV worst scaled error %.2g (tolerance 1e-7)", worst)
}

// TestDiffusionCapacitance: with only a transit time the capacitance is
// the textbook diffusion capacitance Cd = τT·I/(n·Vt) (Sedra & Smith, the
// diode's small-signal model; from memory). The textbook form drops Is
// against I: tolerance 2·Is/I relative at each point (the model's
// τT·(I + Is)/(n·Vt) differs from it by exactly Is/I).
func TestDiffusionCapacitance(t *testing.T) {
	p := siDiode()
	p.TransitTime = 5e-9
	d := models.NewDiode(p, tnom)
	if !d.HasCharges() || models.NewDiode(siDiode(), tnom).HasCharges() {
		t.Fatal("HasCharges does not follow the parameters")
	}
	for _, v := range []float64{0.45, 0.55, 0.65} {
		i, _ := d.Current(v)
		_, c := d.Charge(v)
		want := 5e-9 * i / (p.N * vtRef(tnom))
		if e := relErr(c, want); e > 2*p.Is/i {
			t.Errorf("Cd(%g V) = %.8g F, τ·I/(n·Vt) = %.8g F (rel err %.2g > 2·Is/I = %.2g)", v, c, want, e, 2*p.Is/i)
		}
	}
}

// earlyBJT is the si-npn preset with Early voltage va and nothing else of
// the second order.
func earlyBJT(va float64) models.BJTParams {
	p := *models.Presets["si-npn"].BJT
	p.EarlyVoltage = va
	return p
}

// TestBJTEarly: the output conductance in forward activity is
// Is·exp(Vbe/Vt)/VA exactly, the textbook ro = VA/IC with IC the current
// the Early effect multiplies (Sedra & Smith, "Microelectronic Circuits",
// iC = IS·e^(vBE/VT)·(1 + vCE/VA); from memory), and the Ic–Vce lines of
// every Vbe extrapolate to zero current at Vcb = −VA, the Early voltage
// as Gummel & Poon (1970) define it (the base-charge factor 1 − Vbc/VA).
// The reverse-junction terms are e^−150 and below at these points, so
// the relations hold to rounding: tolerance 1e-12 relative for ro, 1e-9 V
// for the intercept (a line through two points 5 V apart).
func TestBJTEarly(t *testing.T) {
	for _, va := range []float64{30, 90, 200} {
		q := models.NewBJT(earlyBJT(va), tnom)
		vt := vtRef(tnom)
		for _, vbe := range []float64{0.55, 0.62, 0.68} {
			icp := 10e-15 * math.Exp(vbe/vt)
			_, _, jac := q.Eval2(vbe, 5)
			if e := relErr(1/jac[3], va/icp); e > 1e-12 {
				t.Errorf("VA %g, Vbe %g: ro = %.10g Ω, VA/IC = %.10g Ω", va, vbe, 1/jac[3], va/icp)
			}
			_, i1 := q.Currents(vbe, 4)
			_, i2 := q.Currents(vbe, 9)
			vce0 := 4 - i1*(9-4)/(i2-i1)
			if d := math.Abs((vce0 - vbe) - (-va)); d > 1e-9*va {
				t.Errorf("VA %g, Vbe %g: lines meet at Vcb = %.12g V, want −VA", va, vbe, vce0-vbe)
			}
		}
	}
}

// TestBJTSecondOrderJacobian: Eval2's Jacobian with the Early effect, and
// Charges2's capacitance matrix, against central differences at every
// point of bjtPoints for the four families with their typical
// second-order values (DevicePreset.Complete), NPN and PNP. Tolerance 1e-7
// of the row scale (see checkDerivatives); for the charges the scale
// floor is the zero-bias capacitance times Vt.
func TestBJTSecondOrderJacobian(t *testing.T) {
	for _, k := range []string{"si-npn", "si-pnp", "ge-npn", "ge-pnp"} {
		p := *models.Presets[k].Complete().BJT
		q := models.NewBJT(p, tnom)
		if !q.HasCharges() || models.NewBJT(*models.Presets[k].BJT, tnom).HasCharges() {
			t.Errorf("%s: HasCharges does not follow the parameters", k)
		}
		vt := q.EmissionVoltage()
		s := sgn(p)
		cur := func(v, i, j []float64) { q.Eval(v, i, j) }
		chg := func(v, qq, c []float64) { q.Charges(v, qq, c) }
		worstI, worstQ := 0.0, 0.0
		for _, pt := range bjtPoints {
			v := []float64{s * pt.vbe, s * pt.vce}
			worstI = math.Max(worstI, checkDerivatives(t, k+" "+pt.name+" current", 2, cur, v, vt, p.Is+p.Icbo))
			worstQ = math.Max(worstQ, checkDerivatives(t, k+" "+pt.name+" charge", 2, chg, v, vt, (p.BE.C0+p.BC.C0)*vt))
			// Charges agrees with Charges2.
			qb, qc, c := q.Charges2(v[0], v[1])
			var qq [2]float64
			var cc [4]float64
			q.Charges(v, qq[:], cc[:])
			if qq[0] != qb || qq[1] != qc || cc != c {
				t.Errorf("%s %s: Charges and Charges2 disagree", k, pt.name)
			}
		}
		t.Logf("%s: worst scaled error, currents %.2g, charges %.2g (tolerance 1e-7)", k, worstI, worstQ)
	}
}

// TestBJTChargeForms: the capacitances of the hybrid-π model at a forward
// active point (Sedra & Smith, "Microelectronic Circuits", the
// high-frequency hybrid-π model; Gummel & Poon 1970): Cπ = Cde + Cje with
// Cde = τF·gm, gm = dIc/dVbe, and Cμ = Cjc(Vbc), the base–collector
// depletion law; the capacitance matrix is [[Cπ + Cμ, −Cμ], [−Cμ, Cμ]]
// in the (Vbe, Vce) ports. The depletion parts are recomputed here from
// the law (below and, for Vbe, above the forward-bias point). PNP charges
// mirror NPN ones: q(v) = −q_npn(−v). Tolerance 1e-12 relative (a pow and
// an exp each).
func TestBJTChargeForms(t *testing.T) {
	p := *models.Presets["si-npn"].Complete().BJT
	p.EarlyVoltage = 0 // gm of the transport current alone
	q := models.NewBJT(p, tnom)
	vbe, vce := 0.65, 5.0
	_, _, jac := q.Eval2(vbe, vce)
	gm := jac[2] + jac[3] // dIc/dVbe at fixed Vbc: the forward transport slope
	_, _, c := q.Charges2(vbe, vce)
	fc := models.DefaultForwardFraction
	m, vj, cj0 := p.BE.Grading, p.BE.Potential, p.BE.C0
	// Above FC·Vj the depletion capacitance is the tangent line of the law.
	cje := cj0 / math.Pow(1-fc, 1+m) * (1 - fc*(1+m) + m*vbe/vj)
	cmu := p.BC.C0 / math.Pow(1-(vbe-vce)/p.BC.Potential, p.BC.Grading)
	cpi := cje + p.TransitTime*gm
	want := [4]float64{cpi + cmu, -cmu, -cmu, cmu}
	for k := range want {
		if e := relErr(c[k], want[k]); e > 1e-12 {
			t.Errorf("C[%d] = %.12g F, hybrid-π form %.12g F (rel err %.2g)", k, c[k], want[k], e)
		}
	}
	t.Logf("Cπ = %.4g pF (Cde %.4g pF), Cμ = %.4g pF", cpi*1e12, p.TransitTime*gm*1e12, cmu*1e12)
	pp := p
	pp.PNP = true
	qp := models.NewBJT(pp, tnom)
	for _, pt := range bjtPoints {
		b1, c1, m1 := q.Charges2(pt.vbe, pt.vce)
		b2, c2, m2 := qp.Charges2(-pt.vbe, -pt.vce)
		if b2 != -b1 || c2 != -c1 || m1 != m2 {
			t.Errorf("%s: PNP charges (%g, %g) are not the mirror of (%g, %g)", pt.name, b2, c2, b1, c1)
		}
	}
}

// BenchmarkBJTEval2Early is BenchmarkBJTEval2 with the Early effect on.
func BenchmarkBJTEval2Early(b *testing.B) {
	q := models.NewBJT(earlyBJT(90), tnom)
	for k := 0; b.Loop(); k++ {
		ib, ic, _ := q.Eval2(0.6+1e-6*float64(k&1023), 4.5)
		benchSink += ib + ic
	}
}

// BenchmarkBJTCharges2 times the charges of a transistor with every
// capacitance given.
func BenchmarkBJTCharges2(b *testing.B) {
	q := models.NewBJT(*models.Presets["si-npn"].Complete().BJT, tnom)
	for k := 0; b.Loop(); k++ {
		qb, qc, _ := q.Charges2(0.6+1e-6*float64(k&1023), 4.5)
		benchSink += qb + qc
	}
}

// The fused evaluations that solvers call once per Newton iterate
// (BJT.EvalCharges, Diode.EvalCharge) must return exactly what the
// separate calls return (Eval2 and Charges2; Current and Charge): they
// only share the junction exponential, so any difference is a bug in one
// of them. Checked bit for bit for every preset with charges, both
// polarities, across cut-off, forward activity, saturation, the forward
// linearisation of the depletion law, breakdown and the linear
// continuation of the exponential.
func TestFusedEvaluations(t *testing.T) {
	volts := []float64{-60, -9.1, -5, -1, -0.3, 0, 0.1, 0.3, 0.45, 0.6, 0.7, 0.8, 1.2, 2.5, 4.5}
	n := 0
	for _, name := range models.PresetNames() {
		pre := models.Presets[name].Complete()
		if pre.BJT != nil {
			for _, pnp := range []bool{false, true} {
				p := *pre.BJT
				p.PNP = pnp
				b := models.NewBJT(p, tnom)
				for _, vbe := range volts {
					for _, vce := range volts {
						var st models.BJTState
						b.EvalCharges(vbe, vce, &st)
						ib, ic, j := b.Eval2(vbe, vce)
						qb, qc, c := b.Charges2(vbe, vce)
						want := models.BJTState{Ib: ib, Ic: ic, J: j, Qb: qb, Qc: qc, C: c}
						if st != want {
							t.Fatalf("%s (pnp %v) at Vbe %g, Vce %g: EvalCharges %+v, separate calls %+v", name, pnp, vbe, vce, st, want)
						}
						n++
					}
				}
			}
		}
		if pre.Diode != nil {
			d := models.NewDiode(*pre.Diode, tnom)
			for _, v := range volts {
				i, g, q, c := d.EvalCharge(v)
				wi, wg := d.Current(v)
				wq, wc := d.Charge(v)
				if i != wi || g != wg || q != wq || c != wc {
					t.Fatalf("%s at %g V: EvalCharge %g %g %g %g, separate calls %g %g %g %g", name, v, i, g, q, c, wi, wg, wq, wc)
				}
				n++
			}
		}
	}
	t.Logf("%d operating points identical", n)
}
