package models

import "math"

// JFETParams are the parameters of a junction field-effect transistor in
// the square-law model.
type JFETParams struct {
	PChannel bool
	Idss     float64 // drain current at Vgs = 0 in saturation, A (> 0)
	// Pinchoff is the magnitude of the pinch-off voltage, V (> 0): an
	// n-channel device conducts for Vgs > −Pinchoff, a p-channel one for
	// Vgs < +Pinchoff.
	Pinchoff float64
	// ChannelModulation is the channel-length modulation λ, 1/V (≥ 0): the
	// saturation current grows by the factor 1 + λ·|Vds|.
	ChannelModulation float64
	// GateIs and GateN describe each gate–channel junction (Shockley law);
	// GateN 0 selects 1.
	GateIs, GateN float64
	// GS and GD are the gate–source and gate–drain depletion
	// capacitances (optional).
	GS, GD          Depletion
	ForwardFraction float64 // as for the transistor; 0 selects DefaultForwardFraction
}

// MOSFETParams are the parameters of an enhancement MOSFET in the
// square-law model, with its body tied to the source.
type MOSFETParams struct {
	PChannel bool
	// Threshold is the magnitude of the threshold voltage, V (> 0): an
	// n-channel device conducts for Vgs > Threshold, a p-channel one for
	// Vgs < −Threshold.
	Threshold float64
	// K is the transconductance parameter, A/V² (k = µ·Cox·W/L): in
	// saturation Id = (K/2)·(Vgs − Vth)².
	K                 float64
	ChannelModulation float64 // λ, 1/V (≥ 0)
	// BodyIs and BodyN describe the body diode from source to drain (n
	// channel; drain to source for p); BodyIs 0: none. BodyN 0 selects 1.
	BodyIs, BodyN float64
	// GateSource and GateDrain are constant gate capacitances, F
	// (optional).
	GateSource, GateDrain float64
}

// squareLaw is the Shichman–Hodges drain current of a symmetric
// square-law channel in n polarity (H. Shichman & D. A. Hodges, "Modeling
// and simulation of insulated-gate field-effect transistor switching
// circuits", IEEE J. Solid-State Circuits 3(3), 1968, from memory; with the
// channel-length factor 1 + λ·Vds in both regions, so that the current is
// continuous in value and slope at Vds = Vov):
//
//	Vov ≤ 0:          Id = 0
//	0 ≤ Vds < Vov:    Id = β·Vds·(2·Vov − Vds)·(1 + λ·Vds)
//	Vds ≥ Vov:        Id = β·Vov²·(1 + λ·Vds)
//
// with Vov = Vgs − Vto. For Vds < 0 drain and source swap roles:
// Id(Vgs, Vds) = −Id(Vgd, −Vds). It returns Id and its derivatives by Vgs
// and Vds.
func squareLaw(beta, vto, lambda, vgs, vds float64) (id, gm, gds float64) {
	if vds < 0 {
		i, g1, g2 := squareLaw(beta, vto, lambda, vgs-vds, -vds)
		// Id = −f(vgs − vds, −vds).
		return -i, -g1, g1 + g2
	}
	vov := vgs - vto
	if vov <= 0 {
		return 0, 0, 0
	}
	k := 1 + lambda*vds
	if vds < vov {
		f := beta * vds * (2*vov - vds)
		return f * k, 2 * beta * vds * k, 2*beta*(vov-vds)*k + f*lambda
	}
	f := beta * vov * vov
	return f * k, 2 * beta * vov * k, f * lambda
}

// JFET is a junction FET at a fixed temperature, as a two-port with common
// source: port 0 is gate–source (current into the gate), port 1
// drain–source (current into the drain). The channel follows squareLaw
// with β = Idss/Vp² and Vto = −Vp, which is Shockley's JFET law
// Id = Idss·(1 − Vgs/VP)²·(1 + λ·Vds) in saturation (VP = −Vp the signed
// pinch-off voltage; Sedra & Smith, "Microelectronic Circuits", the JFET;
// from memory). Each gate–channel junction is a Shockley diode:
//
//	Ig = Igs + Igd,   Id = Ichannel − Igd,
//	Igs = GateIs·(exp(Vgs/(n·Vt)) − 1),   Igd = GateIs·(exp(Vgd/(n·Vt)) − 1)
//
// Charges: the depletion charges Qgs(Vgs) and Qgd(Vgd) of GS and GD; the
// gate holds Qgs + Qgd, the drain −Qgd. A p-channel device uses the same
// equations with every voltage and current negated.
type JFET struct {
	p                 bool
	beta, vto, lambda float64
	gis, nvt, vcrit   float64
	gs, gd            depletion
	charged           bool
}

// NewJFET returns the JFET of parameters p at temperature t (kelvin).
func NewJFET(p JFETParams, t float64) *JFET {
	n := p.GateN
	if n == 0 {
		n = 1
	}
	nvt := n * ThermalVoltage(t)
	return &JFET{p: p.PChannel, beta: p.Idss / (p.Pinchoff * p.Pinchoff), vto: -p.Pinchoff, lambda: p.ChannelModulation,
		gis: p.GateIs, nvt: nvt, vcrit: criticalVoltage(nvt, p.GateIs),
		gs: newDepletion(p.GS, p.ForwardFraction), gd: newDepletion(p.GD, p.ForwardFraction),
		charged: p.GS.C0 != 0 || p.GD.C0 != 0}
}

// Ports is 2: (gate, source) and (drain, source).
func (j *JFET) Ports() int { return 2 }

// Eval2 returns the gate and drain currents and the Jacobian
// [dIg/dVgs, dIg/dVds, dId/dVgs, dId/dVds].
func (j *JFET) Eval2(vgs, vds float64) (ig, id float64, jac [4]float64) {
	if j.p {
		vgs, vds = -vgs, -vds
	}
	vgd := vgs - vds
	ich, gm, gds := squareLaw(j.beta, j.vto, j.lambda, vgs, vds)
	e1, d1 := limexp(vgs / j.nvt)
	e2, d2 := limexp(vgd / j.nvt)
	igs, ggs := j.gis*(e1-1), j.gis*d1/j.nvt
	igd, ggd := j.gis*(e2-1), j.gis*d2/j.nvt
	ig, id = igs+igd, ich-igd
	jac = [4]float64{ggs + ggd, -ggd, gm - ggd, gds + ggd}
	if j.p {
		ig, id = -ig, -id
	}
	return ig, id, jac
}

// Eval implements Nonlinear.
func (j *JFET) Eval(v, i, jac []float64) {
	var m [4]float64
	i[0], i[1], m = j.Eval2(v[0], v[1])
	copy(jac[:4], m[:])
}

// Limit implements Nonlinear: junction limiting (Nagel 1975) on both gate
// junctions, Vgs and Vgd; the square-law channel needs none.
func (j *JFET) Limit(vnew, vold []float64) {
	s := 1.0
	if j.p {
		s = -1
	}
	gs := pnjlim(s*vnew[0], s*vold[0], j.nvt, j.vcrit)
	gd := pnjlim(s*(vnew[0]-vnew[1]), s*(vold[0]-vold[1]), j.nvt, j.vcrit)
	vnew[0], vnew[1] = s*gs, s*(gs-gd)
}

// EmissionVoltage returns n·Vt of the gate junctions, the voltage scale of
// the device's stiffest nonlinearity (the square law's own scale, its
// overdrive, is larger but near pinch-off): solvers use it to estimate
// the Newton error Δ²/(2·scale) of a step Δ.
func (j *JFET) EmissionVoltage() float64 { return j.nvt }

// HasCharges reports whether gate capacitances are given.
func (j *JFET) HasCharges() bool { return j.charged }

// Charges implements Charged: q = [gate, drain].
func (j *JFET) Charges(v, q, c []float64) {
	s, vgs, vds := 1.0, v[0], v[1]
	if j.p {
		s, vgs, vds = -1, -vgs, -vds
	}
	qgs, cgs := j.gs.charge(vgs)
	qgd, cgd := j.gd.charge(vgs - vds)
	q[0], q[1] = s*(qgs+qgd), -s*qgd
	c[0], c[1], c[2], c[3] = cgs+cgd, -cgd, -cgd, cgd
}

// MOSFET is an enhancement MOSFET at a fixed temperature, as a two-port
// with common source: port 0 is gate–source (no gate current), port 1
// drain–source. The channel follows squareLaw with β = K/2 and
// Vto = Threshold, which is the textbook square law (Sedra & Smith,
// "Microelectronic Circuits", the MOSFET; from memory):
//
//	saturation: Id = (K/2)·(Vgs − Vth)²·(1 + λ·Vds)
//	triode:     Id = K·((Vgs − Vth)·Vds − Vds²/2)·(1 + λ·Vds)
//
// The body diode (anode at the source, the body tied to it) adds
// −BodyIs·(exp(−Vds/(n·Vt)) − 1) to the drain current. The gate
// capacitances are constant: the gate holds Cgs·Vgs + Cgd·Vgd, the drain
// −Cgd·Vgd. A p-channel device uses the same equations with every voltage
// and current negated.
type MOSFET struct {
	p                 bool
	beta, vto, lambda float64
	bis, nvt, vcrit   float64
	cgs, cgd          float64
}

// NewMOSFET returns the MOSFET of parameters p at temperature t (kelvin).
func NewMOSFET(p MOSFETParams, t float64) *MOSFET {
	n := p.BodyN
	if n == 0 {
		n = 1
	}
	m := &MOSFET{p: p.PChannel, beta: p.K / 2, vto: p.Threshold, lambda: p.ChannelModulation,
		bis: p.BodyIs, nvt: n * ThermalVoltage(t), cgs: p.GateSource, cgd: p.GateDrain}
	if m.bis > 0 {
		m.vcrit = criticalVoltage(m.nvt, m.bis)
	}
	return m
}

// Ports is 2: (gate, source) and (drain, source).
func (m *MOSFET) Ports() int { return 2 }

// Eval2 returns the gate current (always 0) and the drain current with the
// Jacobian [dIg/dVgs, dIg/dVds, dId/dVgs, dId/dVds].
func (m *MOSFET) Eval2(vgs, vds float64) (ig, id float64, jac [4]float64) {
	if m.p {
		vgs, vds = -vgs, -vds
	}
	id, gm, gds := squareLaw(m.beta, m.vto, m.lambda, vgs, vds)
	if m.bis != 0 {
		e, de := limexp(-vds / m.nvt)
		id -= m.bis * (e - 1)
		gds += m.bis * de / m.nvt
	}
	jac = [4]float64{0, 0, gm, gds}
	if m.p {
		id = -id
	}
	return 0, id, jac
}

// Eval implements Nonlinear.
func (m *MOSFET) Eval(v, i, jac []float64) {
	var j [4]float64
	i[0], i[1], j = m.Eval2(v[0], v[1])
	copy(jac[:4], j[:])
}

// Limit implements Nonlinear. The square law has no exponential to
// overshoot, but from cut-off (where its slope is zero) a Newton step can
// throw Vgs far: the project's own rule lets one step move Vgs by at most
// 1 V plus its distance from the threshold, so the distance can at most
// double per step. The body diode's voltage −Vds gets junction limiting
// (Nagel 1975).
func (m *MOSFET) Limit(vnew, vold []float64) {
	s := 1.0
	if m.p {
		s = -1
	}
	gs, gs0 := s*vnew[0], s*vold[0]
	if lim := 1 + math.Abs(gs0-m.vto); math.Abs(gs-gs0) > lim {
		gs = gs0 + math.Copysign(lim, gs-gs0)
	}
	ds := s * vnew[1]
	if m.bis != 0 {
		ds = -pnjlim(-ds, -s*vold[1], m.nvt, m.vcrit)
	}
	vnew[0], vnew[1] = s*gs, s*ds
}

// EmissionVoltage returns n·Vt of the body diode (Vt without one): a
// voltage scale for solvers' Newton error estimate Δ²/(2·scale). The
// square law's own scale is its overdrive Vgs − Vth, which only falls
// below this within a few tens of millivolts of the threshold.
func (m *MOSFET) EmissionVoltage() float64 { return m.nvt }

// HasCharges reports whether gate capacitances are given.
func (m *MOSFET) HasCharges() bool { return m.cgs != 0 || m.cgd != 0 }

// Charges implements Charged: q = [gate, drain].
func (m *MOSFET) Charges(v, q, c []float64) {
	vgd := v[0] - v[1]
	q[0], q[1] = m.cgs*v[0]+m.cgd*vgd, -m.cgd*vgd
	c[0], c[1], c[2], c[3] = m.cgs+m.cgd, -m.cgd, -m.cgd, m.cgd
}

func (p JFETParams) check() string {
	if !finite(p.Idss, p.Pinchoff, p.ChannelModulation, p.GateIs, p.GateN) {
		return "JFET parameters must be finite"
	}
	switch {
	case !(p.Idss > 0) || p.Idss > 10:
		return "JFET needs idss above 0 and below 10 A"
	case !(p.Pinchoff > 0) || p.Pinchoff > 100:
		return "JFET pinch-off voltage (magnitude) must be above 0 and at most 100 V"
	case p.ChannelModulation < 0 || p.ChannelModulation > 1:
		return "channel-length modulation must be between 0 and 1 /V"
	case !(p.GateIs > 0) || p.GateIs > 1e-3:
		return "JFET gate saturation current must be above 0 and below 1 mA"
	case p.GateN < 0 || p.GateN > 10:
		return "JFET gate emission coefficient must be between 0 (default 1) and 10"
	case !checkFraction(p.ForwardFraction):
		return "forward-bias fraction must be 0 (default) or between 0 and 1"
	}
	if r := p.GS.check(); r != "" {
		return "gate–source capacitance: " + r
	}
	if r := p.GD.check(); r != "" {
		return "gate–drain capacitance: " + r
	}
	return ""
}

func (p MOSFETParams) check() string {
	if !finite(p.Threshold, p.K, p.ChannelModulation, p.BodyIs, p.BodyN, p.GateSource, p.GateDrain) {
		return "MOSFET parameters must be finite"
	}
	switch {
	case !(p.Threshold > 0) || p.Threshold > 100:
		return "MOSFET threshold (magnitude) must be above 0 and at most 100 V"
	case !(p.K > 0) || p.K > 1e3:
		return "MOSFET transconductance parameter k must be above 0 and at most 1 kA/V²"
	case p.ChannelModulation < 0 || p.ChannelModulation > 1:
		return "channel-length modulation must be between 0 and 1 /V"
	case p.BodyIs < 0 || p.BodyIs > 1e-3:
		return "body-diode saturation current must be between 0 (none) and 1 mA"
	case p.BodyN < 0 || p.BodyN > 10:
		return "body-diode emission coefficient must be between 0 (default 1) and 10"
	case p.GateSource < 0 || p.GateSource > 1e-6 || p.GateDrain < 0 || p.GateDrain > 1e-6:
		return "gate capacitances must be between 0 and 1 µF"
	}
	return ""
}

var (
	_ Charged = (*JFET)(nil)
	_ Charged = (*MOSFET)(nil)
)
