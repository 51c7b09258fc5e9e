package models

// DiodeParams are the parameters of a junction diode (Shockley model).
type DiodeParams struct {
	Is  float64 // saturation current at the nominal temperature, A
	N   float64 // emission coefficient
	Rs  float64 // series resistance, Ω (0 for none)
	Eg  float64 // band gap for Is(T), eV; 0 keeps Is fixed
	XTI float64 // saturation-current temperature exponent
	DiodeSecondOrder
}

// DiodeSecondOrder are the diode's parameters beyond the static Shockley
// law: reverse breakdown and charge storage. The zero value of each turns
// it off.
type DiodeSecondOrder struct {
	// BreakdownVoltage is the reverse voltage, V, at which the reverse
	// current reaches BreakdownCurrent (the knee of a zener); 0: no
	// breakdown.
	BreakdownVoltage float64
	BreakdownCurrent float64 // A, the reverse current at −BreakdownVoltage (> 0 with breakdown)
	// BreakdownN is the emission coefficient of the breakdown current; it
	// sets the slope past the knee (dynamic resistance BreakdownN·Vt/I).
	// 0 selects 1.
	BreakdownN float64
	Junction   Depletion // depletion capacitance
	// TransitTime is the transit time, s: the diffusion charge is
	// TransitTime times the forward (Shockley) current.
	TransitTime float64
	// ForwardFraction is the fraction of Junction.Potential past which the
	// depletion charge is linearised; 0 selects DefaultForwardFraction.
	ForwardFraction float64
}

// Diode is a junction diode at a fixed temperature, as a one-port from anode
// to cathode. Its forward current is Shockley's ideal-diode law (Shockley,
// "The theory of p-n junctions in semiconductors", Bell Syst. Tech. J. 28,
// 1949, eq. 5.11, with the emission coefficient n of circuit-simulation
// diode models):
//
//	I = Is·(exp(V/(n·Vt)) − 1)
//
// Reverse breakdown, when BreakdownVoltage BV > 0, adds an exponential
// reverse current anchored at the knee: at V = −BV it equals the knee
// current Ibv (the way a zener's voltage is specified, at a test
// current), and it falls by e per nbv·Vt of reverse voltage below the
// knee (the exponential breakdown law of circuit-simulation diode models,
// Massobrio & Antognetti, semiconductor device modeling, McGraw-Hill, 2nd
// ed., 1993, ch. 1; from memory). The constant term makes I(0) = 0 exactly:
//
//	Ibd = −Ibv·(exp(−(V + BV)/(nbv·Vt)) − exp(−BV/(nbv·Vt)))
//
// so the dynamic resistance past the knee is nbv·Vt/|I| (the incremental
// zener resistance of the exponential law).
//
// Charge storage (Charged): the depletion charge of Junction (see
// Depletion) plus the diffusion charge TransitTime·Is·(exp(V/(n·Vt)) − 1),
// whose capacitance τT·dI/dV is the textbook diffusion capacitance
// Cd = τT·I/(n·Vt) (Sedra & Smith, "Microelectronic Circuits", the diode's
// small-signal model; from memory).
//
// The series resistance Rs is not part of Diode: a circuit puts it in as a
// resistor to an internal node, so every solver sees the same equations.
type Diode struct {
	Is, NVt, vcrit float64
	// Breakdown: knee current, voltage, emission voltage, the constant
	// that zeroes the current at 0 V, and the critical voltage of the
	// reflected junction.
	ibv, bv, nvtb, ibv0, vcritb float64
	dep                         depletion
	tt                          float64
	charged                     bool
}

// NewDiode returns the diode of parameters p at temperature t (kelvin).
func NewDiode(p DiodeParams, t float64) *Diode {
	nvt := p.N * ThermalVoltage(t)
	is := SaturationCurrentAt(p.Is, p.N, p.Eg, p.XTI, t, NominalTemperature)
	d := &Diode{Is: is, NVt: nvt, vcrit: criticalVoltage(nvt, is)}
	if p.BreakdownVoltage > 0 {
		nb := p.BreakdownN
		if nb == 0 {
			nb = 1
		}
		d.bv, d.ibv, d.nvtb = p.BreakdownVoltage, p.BreakdownCurrent, nb*ThermalVoltage(t)
		d.ibv0, _ = limexp(-d.bv / d.nvtb)
		d.vcritb = criticalVoltage(d.nvtb, d.ibv)
	}
	d.dep = newDepletion(p.Junction, p.ForwardFraction)
	d.tt = p.TransitTime
	d.charged = p.Junction.C0 != 0 || p.TransitTime != 0
	return d
}

// Ports is 1: anode (+) to cathode.
func (d *Diode) Ports() int { return 1 }

// Current returns I(V) and dI/dV.
func (d *Diode) Current(v float64) (i, g float64) {
	i, g, _, _ = d.current(v)
	return i, g
}

// current is Current, also returning exp(V/(n·Vt)) and its derivative
// with respect to V/(n·Vt) (limexp).
func (d *Diode) current(v float64) (i, g, e, de float64) {
	e, de = limexp(v / d.NVt)
	i, g = d.Is*(e-1), d.Is*de/d.NVt
	if d.bv != 0 {
		eb, deb := limexp(-(v + d.bv) / d.nvtb)
		i -= d.ibv * (eb - d.ibv0)
		g += d.ibv * deb / d.nvtb
	}
	return i, g, e, de
}

// EvalCharge returns Current and Charge at v, the same numbers bit for
// bit, with the junction's exponential computed once for the current and
// the diffusion charge.
func (d *Diode) EvalCharge(v float64) (i, g, q, c float64) {
	var e, de float64
	i, g, e, de = d.current(v)
	q, c = d.charge(v, e, de)
	return i, g, q, c
}

// Eval implements Nonlinear.
func (d *Diode) Eval(v, i, jac []float64) {
	i[0], jac[0] = d.Current(v[0])
}

// Limit1 is Limit for one voltage: the limited value of a step v0 → v.
// Past the breakdown knee the same junction limiting acts on the
// reflected voltage −(V + BV), the exponent of the breakdown current.
func (d *Diode) Limit1(v, v0 float64) float64 {
	if d.bv != 0 && v < -d.bv+10*d.nvtb && v < v0 {
		u := pnjlim(-(v + d.bv), -(v0 + d.bv), d.nvtb, d.vcritb)
		return -(u + d.bv)
	}
	return pnjlim(v, v0, d.NVt, d.vcrit)
}

// Limit implements Nonlinear with junction limiting.
func (d *Diode) Limit(vnew, vold []float64) {
	vnew[0] = d.Limit1(vnew[0], vold[0])
}

// Physical reports whether v is a physically reachable diode voltage (see
// physicalJunction; past the breakdown knee, the reflected junction
// likewise); solvers reject roots outside it.
func (d *Diode) Physical(v float64) bool {
	if d.bv != 0 && -(v+d.bv) >= expLimit*d.nvtb {
		return false
	}
	return physicalJunction(v, d.NVt)
}

// EmissionVoltage returns the voltage scale of the stiffest exponential:
// n·Vt, or the breakdown's nbv·Vt when that is smaller.
func (d *Diode) EmissionVoltage() float64 {
	if d.bv != 0 && d.nvtb < d.NVt {
		return d.nvtb
	}
	return d.NVt
}

// HasCharges reports whether the diode stores charge (a junction
// capacitance or a transit time); solvers skip Charge when it does not.
func (d *Diode) HasCharges() bool { return d.charged }

// Charge returns the charge Q(V) that has flowed into the anode, coulombs,
// and the capacitance dQ/dV, farads: depletion plus diffusion charge.
func (d *Diode) Charge(v float64) (q, c float64) {
	var e, de float64
	if d.tt != 0 {
		e, de = limexp(v / d.NVt)
	}
	return d.charge(v, e, de)
}

// charge is Charge with exp(V/(n·Vt)) and its derivative given (used only
// with a transit time).
func (d *Diode) charge(v, e, de float64) (q, c float64) {
	q, c = d.dep.charge(v)
	if d.tt != 0 {
		q += d.tt * d.Is * (e - 1)
		c += d.tt * d.Is * de / d.NVt
	}
	return q, c
}

// Charges implements Charged.
func (d *Diode) Charges(v, q, c []float64) {
	q[0], c[0] = d.Charge(v[0])
}

// check reports what is wrong with the parameters, or "".
func (p DiodeParams) check() string {
	if !(p.Is > 0) || !(p.N > 0) || !finite(p.Is, p.N, p.Rs, p.Eg, p.XTI) || p.Rs < 0 {
		return "diode needs finite is > 0 and n > 0 (and rs ≥ 0)"
	}
	s := p.DiodeSecondOrder
	if !finite(s.BreakdownVoltage, s.BreakdownCurrent, s.BreakdownN, s.TransitTime) {
		return "diode parameters must be finite"
	}
	if s.BreakdownVoltage < 0 || s.BreakdownVoltage > MaxPortVoltage {
		return "breakdown voltage must be between 0 (none) and 1 kV"
	}
	if s.BreakdownVoltage > 0 && !(s.BreakdownCurrent > 0 && s.BreakdownCurrent < 10) {
		return "a breakdown voltage needs a knee current above 0 and below 10 A"
	}
	if s.BreakdownN < 0 || s.BreakdownN > 100 {
		return "breakdown emission coefficient must be between 0 (default 1) and 100"
	}
	if r := s.Junction.check(); r != "" {
		return "junction capacitance: " + r
	}
	return checkStorage(s.TransitTime, s.ForwardFraction)
}

// Verify that Diode satisfies the interfaces it promises.
var _ Charged = (*Diode)(nil)
