package models

// BJTParams are the parameters of a bipolar transistor in the Ebers–Moll
// transport model.
type BJTParams struct {
	PNP   bool
	Is    float64 // transport saturation current at the nominal temperature, A
	BetaF float64 // forward current gain βF (the hFE a tester reads)
	BetaR float64 // reverse current gain βR
	// Icbo is the collector–base leakage at the nominal temperature, A. It
	// matters for germanium; silicon devices leave it 0.
	Icbo float64
	// LeakDoubling is the temperature rise, K, over which Icbo doubles
	// (about 10 K for germanium: common practice).
	LeakDoubling float64
	Eg           float64 // band gap for Is(T), eV; 0 keeps Is fixed
	XTI          float64 // saturation-current temperature exponent
	BJTSecondOrder
}

// BJTSecondOrder are the transistor's parameters beyond the Ebers–Moll
// core: the Early effect, base resistance and charge storage. The zero
// value of each turns it off, leaving the transport model as it is.
type BJTSecondOrder struct {
	// EarlyVoltage is the forward Early voltage VA, V: the output
	// conductance in forward activity is Ic/VA. 0: none (infinite VA).
	EarlyVoltage float64
	// BaseResistance is the ohmic base resistance, Ω, between the base pin
	// and the internal base node. The device itself does not see it:
	// Circuit.AddPart puts in the resistor and the internal node.
	BaseResistance float64
	BE, BC         Depletion // base–emitter and base–collector depletion capacitances
	// TransitTime is the forward transit time τF, s: the base–emitter
	// diffusion charge is τF·Is·(exp(Vbe/Vt) − 1).
	TransitTime float64
	// ForwardFraction is the fraction of each junction's built-in
	// potential past which its depletion charge is linearised; 0 selects
	// DefaultForwardFraction.
	ForwardFraction float64
}

// BJT is a bipolar transistor at a fixed temperature, as a two-port with
// common emitter: port 0 is base–emitter (current Ib into the base), port 1
// collector–emitter (current Ic into the collector). The emitter current is
// −(Ib + Ic).
//
// Currents follow the Ebers–Moll transport form (Ebers & Moll, "Large-signal
// behavior of junction transistors", Proc. IRE 42(12), 1954; transport
// version as in Getreu, "Modeling the Bipolar Transistor", Tektronix 1976,
// eqs. 2.10–2.11):
//
//	Ic = Is·(exp(Vbe/Vt) − exp(Vbc/Vt)) − (Is/βR)·(exp(Vbc/Vt) − 1)
//	Ib = (Is/βF)·(exp(Vbe/Vt) − 1) + (Is/βR)·(exp(Vbc/Vt) − 1)
//
// A PNP device uses the same equations with every junction voltage and
// terminal current negated. Germanium leakage adds a collector–base current
// Il = Icbo(T)·(1 − exp(Vbc/Vt)) (continued linearly, −Icbo·Vbc/Vt, for a
// forward-biased collector junction), which saturates at Icbo under reverse
// bias and vanishes at Vbc = 0; it flows into the collector and out of the
// base, so with the base open it is multiplied by βF + 1, as real leakage is.
//
// The Early effect scales the transport current by the normalised base
// charge of the Gummel–Poon model with only the forward Early voltage,
// 1/qb = 1 − Vbc/VA (H. K. Gummel & H. C. Poon, "An integral charge control
// model of bipolar transistors", Bell Syst. Tech. J. 49(5), 1970; Getreu
// 1976, ch. 4, q1 = 1/(1 − Vbc/VA); from memory):
//
//	Ic = Is·(exp(Vbe/Vt) − exp(Vbc/Vt))·(1 − Vbc/VA) − (Is/βR)·(exp(Vbc/Vt) − 1)
//
// so that in forward activity dIc/dVce = Is·exp(Vbe/Vt)/VA, the textbook
// output resistance ro = VA/Ic (Sedra & Smith, "Microelectronic
// Circuits", the Early effect; from memory), and the Ic–Vce lines of all
// Vbe meet at Vcb = −VA.
//
// Charge storage (Charged): the depletion charges of the base–emitter and
// base–collector junctions (see Depletion) and the forward diffusion
// charge τF·Is·(exp(Vbe/Vt) − 1) on the base–emitter junction, whose
// capacitance is the textbook Cde = τF·gm (Gummel & Poon 1970; Sedra &
// Smith, the hybrid-π model's Cπ = Cde + Cje). The base holds
// Qbe + Qbc, the collector −Qbc.
type BJT struct {
	pnp              bool
	is, bf, br, vt   float64
	ivt              float64 // 1/Vt
	isr, isf         float64 // Is/βR, Is/βF
	icbo             float64
	ivaf             float64 // 1/VA, 0 without the Early effect
	vcritBE, vcritBC float64
	be, bc           depletion
	tf               float64
	charged          bool
}

// NewBJT returns the transistor of parameters p at temperature t (kelvin).
func NewBJT(p BJTParams, t float64) *BJT {
	vt := ThermalVoltage(t)
	is := SaturationCurrentAt(p.Is, 1, p.Eg, p.XTI, t, NominalTemperature)
	b := &BJT{pnp: p.PNP, is: is, bf: p.BetaF, br: p.BetaR, vt: vt, ivt: 1 / vt, isr: is / p.BetaR, isf: is / p.BetaF,
		icbo: LeakageAt(p.Icbo, p.LeakDoubling, t, NominalTemperature)}
	b.vcritBE = criticalVoltage(vt, is/p.BetaF)
	b.vcritBC = criticalVoltage(vt, is/p.BetaR)
	if p.EarlyVoltage > 0 {
		b.ivaf = 1 / p.EarlyVoltage
	}
	b.be = newDepletion(p.BE, p.ForwardFraction)
	b.bc = newDepletion(p.BC, p.ForwardFraction)
	b.tf = p.TransitTime
	b.charged = p.BE.C0 != 0 || p.BC.C0 != 0 || p.TransitTime != 0
	return b
}

// Ports is 2: (base, emitter) and (collector, emitter).
func (b *BJT) Ports() int { return 2 }

// PNP reports whether the device is a PNP transistor.
func (b *BJT) PNP() bool { return b.pnp }

// Currents returns Ib and Ic for the given Vbe and Vce (terminal voltages,
// for either polarity).
func (b *BJT) Currents(vbe, vce float64) (ib, ic float64) {
	var v, i [2]float64
	var j [4]float64
	v[0], v[1] = vbe, vce
	b.Eval(v[:], i[:], j[:])
	return i[0], i[1]
}

// Eval implements Nonlinear.
func (b *BJT) Eval(v, i, jac []float64) {
	var j [4]float64
	i[0], i[1], j = b.Eval2(v[0], v[1])
	copy(jac[:4], j[:])
}

// Eval2 is Eval without slices: it returns Ib, Ic and the Jacobian
// [dIb/dVbe, dIb/dVce, dIc/dVbe, dIc/dVce] for port voltages Vbe, Vce.
func (b *BJT) Eval2(vbe, vce float64) (ib, ic float64, jac [4]float64) {
	var st BJTState
	b.evalInto(vbe, vce, &st)
	return st.Ib, st.Ic, st.J
}

// BJTState is a transistor's state at one pair of port voltages (Vbe,
// Vce): the port currents and Jacobian of Eval2 and the charges and
// capacitance matrix of Charges2, in their layouts.
type BJTState struct {
	Ib, Ic float64
	J      [4]float64 // dIb/dVbe, dIb/dVce, dIc/dVbe, dIc/dVce
	Qb, Qc float64
	C      [4]float64 // dqb/dVbe, dqb/dVce, dqc/dVbe, dqc/dVce
}

// EvalCharges writes Eval2 and Charges2 at (vbe, vce) into st, the same
// numbers bit for bit, with the base–emitter exponential computed once
// for the transport current and the diffusion charge.
func (b *BJT) EvalCharges(vbe, vce float64, st *BJTState) {
	ef, def := b.evalInto(vbe, vce, st)
	b.chargesInto(vbe, vce, ef, def, st)
}

// evalInto is Eval2 into st's currents and Jacobian; it returns
// exp(Vbe/Vt) and its derivative with respect to Vbe (limexp, for the
// polarity-corrected Vbe).
func (b *BJT) evalInto(vbe, vce float64, st *BJTState) (ef, def float64) {
	if b.pnp {
		vbe, vce = -vbe, -vce
	}
	vbc := vbe - vce
	ivt := b.ivt
	ef, def = limexp(vbe * ivt)
	er, der := limexp(vbc * ivt)
	def *= ivt
	der *= ivt
	is, isr, isf := b.is, b.isr, b.isf
	it := is * (ef - er) // transport current
	ic := it - isr*(er-1)
	ib := isf*(ef-1) + isr*(er-1)
	// Derivatives with respect to vbe and vbc.
	dicBE := is * def
	dicBC := -(is + isr) * der
	if b.ivaf != 0 {
		// Transport current times (1 − Vbc/VA).
		k := 1 - vbc*b.ivaf
		ic = it*k - isr*(er-1)
		dicBE *= k
		dicBC = -is*der*k - it*b.ivaf - isr*der
	}
	dibBE := isf * def
	dibBC := isr * der
	if b.icbo != 0 {
		var il, dil float64
		if vbc <= 0 {
			il = b.icbo * (1 - er)
			dil = -b.icbo * der
		} else {
			il = -b.icbo * vbc * ivt
			dil = -b.icbo * ivt
		}
		ic += il
		ib -= il
		dicBC += dil
		dibBC -= dil
	}
	// Chain rule to (vbe, vce): vbc = vbe − vce.
	st.J = [4]float64{
		dibBE + dibBC, // dIb/dVbe
		-dibBC,        // dIb/dVce
		dicBE + dicBC, // dIc/dVbe
		-dicBC,        // dIc/dVce
	}
	if b.pnp {
		// i(v) = −f(−v): the Jacobian is f'(−v), unchanged.
		ib, ic = -ib, -ic
	}
	st.Ib, st.Ic = ib, ic
	return ef, def
}

// Limit2 is Limit without slices: it returns the limited (Vbe, Vce) for a
// step from (vbe0, vce0) to (vbe, vce).
func (b *BJT) Limit2(vbe, vce, vbe0, vce0 float64) (float64, float64) {
	s := 1.0
	if b.pnp {
		s = -1
	}
	be := pnjlim(s*vbe, s*vbe0, b.vt, b.vcritBE)
	bc := pnjlim(s*(vbe-vce), s*(vbe0-vce0), b.vt, b.vcritBC)
	return s * be, s * (be - bc)
}

// Limit implements Nonlinear: junction limiting on Vbe and Vbc.
func (b *BJT) Limit(vnew, vold []float64) {
	s := 1.0
	if b.pnp {
		s = -1
	}
	be0, be1 := s*vold[0], s*vnew[0]
	bc0, bc1 := s*(vold[0]-vold[1]), s*(vnew[0]-vnew[1])
	be := pnjlim(be1, be0, b.vt, b.vcritBE)
	bc := pnjlim(bc1, bc0, b.vt, b.vcritBC)
	vnew[0] = s * be
	vnew[1] = s * (be - bc)
}

// Physical reports whether the port voltages are physically reachable:
// both junctions inside the range of physicalJunction.
func (b *BJT) Physical(vbe, vce float64) bool {
	if b.pnp {
		vbe, vce = -vbe, -vce
	}
	return physicalJunction(vbe, b.vt) && physicalJunction(vbe-vce, b.vt) &&
		vce < MaxPortVoltage && vce > -MaxPortVoltage
}

// EmissionVoltage returns Vt, the voltage scale of the exponentials.
func (b *BJT) EmissionVoltage() float64 { return b.vt }

// HasCharges reports whether the transistor stores charge (a junction
// capacitance or a transit time); solvers skip Charges2 when it does not.
func (b *BJT) HasCharges() bool { return b.charged }

// Charges2 returns the charge that has flowed into the base (qb) and into
// the collector (qc), coulombs, and the capacitance matrix
// [dqb/dVbe, dqb/dVce, dqc/dVbe, dqc/dVce], farads, for port voltages Vbe,
// Vce (the layout of Eval2's Jacobian).
func (b *BJT) Charges2(vbe, vce float64) (qb, qc float64, c [4]float64) {
	var ef, def float64
	if b.tf != 0 {
		u := vbe
		if b.pnp {
			u = -u
		}
		ef, def = limexp(u * b.ivt)
		def *= b.ivt
	}
	var st BJTState
	b.chargesInto(vbe, vce, ef, def, &st)
	return st.Qb, st.Qc, st.C
}

// chargesInto is Charges2 into st's charges and capacitance matrix, with
// exp(Vbe/Vt) and its derivative with respect to Vbe given for the
// polarity-corrected Vbe (used only with a transit time).
func (b *BJT) chargesInto(vbe, vce, ef, def float64, st *BJTState) {
	s := 1.0
	if b.pnp {
		s, vbe, vce = -1, -vbe, -vce
	}
	vbc := vbe - vce
	qbe, cbe := b.be.charge(vbe)
	qbc, cbc := b.bc.charge(vbc)
	if b.tf != 0 {
		qbe += b.tf * b.is * (ef - 1)
		cbe += b.tf * b.is * def
	}
	// q(v) = −f(−v) for a PNP: the capacitance matrix is unchanged.
	st.C = [4]float64{cbe + cbc, -cbc, -cbc, cbc}
	st.Qb, st.Qc = s*(qbe+qbc), -s*qbc
}

// Charges implements Charged.
func (b *BJT) Charges(v, q, c []float64) {
	var m [4]float64
	q[0], q[1], m = b.Charges2(v[0], v[1])
	copy(c[:4], m[:])
}

// check reports what is wrong with the parameters, or "".
func (p BJTParams) check() string {
	if !(p.Is > 0) || !(p.BetaF > 0) || !(p.BetaR > 0) || p.Icbo < 0 ||
		!finite(p.Is, p.BetaF, p.BetaR, p.Icbo, p.LeakDoubling, p.Eg, p.XTI) {
		return "transistor needs is, hfe and br > 0 (and icbo ≥ 0)"
	}
	s := p.BJTSecondOrder
	if !finite(s.EarlyVoltage, s.BaseResistance, s.TransitTime) {
		return "transistor parameters must be finite"
	}
	if s.EarlyVoltage < 0 || s.EarlyVoltage > 0 && s.EarlyVoltage < 1 {
		return "Early voltage must be 0 (none) or at least 1 V"
	}
	if s.BaseResistance < 0 || s.BaseResistance > 1e6 {
		return "base resistance must be between 0 and 1 MΩ"
	}
	if r := s.BE.check(); r != "" {
		return "base–emitter capacitance: " + r
	}
	if r := s.BC.check(); r != "" {
		return "base–collector capacitance: " + r
	}
	return checkStorage(s.TransitTime, s.ForwardFraction)
}

var _ Charged = (*BJT)(nil)
