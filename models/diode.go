package models

// DiodeParams are the parameters of a junction diode (Shockley model).
type DiodeParams struct {
	Is  float64 // saturation current at the nominal temperature, A
	N   float64 // emission coefficient
	Rs  float64 // series resistance, Ω (0 for none)
	Eg  float64 // band gap for Is(T), eV; 0 keeps Is fixed
	XTI float64 // saturation-current temperature exponent
}

// Diode is a junction diode at a fixed temperature, as a one-port from anode
// to cathode. Its current is Shockley's ideal-diode law (Shockley, "The theory
// of p-n junctions in semiconductors", Bell Syst. Tech. J. 28, 1949, eq. 5.11,
// with the emission coefficient n of circuit-simulation diode models):
//
//	I = Is·(exp(V/(n·Vt)) − 1)
//
// The series resistance Rs is not part of Diode: a circuit puts it in as a
// resistor to an internal node, so every solver sees the same equations.
type Diode struct {
	Is, NVt, vcrit float64
}

// NewDiode returns the diode of parameters p at temperature t (kelvin).
func NewDiode(p DiodeParams, t float64) *Diode {
	nvt := p.N * ThermalVoltage(t)
	is := SaturationCurrentAt(p.Is, p.N, p.Eg, p.XTI, t, NominalTemperature)
	return &Diode{Is: is, NVt: nvt, vcrit: criticalVoltage(nvt, is)}
}

// Ports is 1: anode (+) to cathode.
func (d *Diode) Ports() int { return 1 }

// Current returns I(V) and dI/dV.
func (d *Diode) Current(v float64) (i, g float64) {
	e, de := limexp(v / d.NVt)
	return d.Is * (e - 1), d.Is * de / d.NVt
}

// Eval implements Nonlinear.
func (d *Diode) Eval(v, i, jac []float64) {
	i[0], jac[0] = d.Current(v[0])
}

// Limit1 is Limit for one voltage: the limited value of a step v0 → v.
func (d *Diode) Limit1(v, v0 float64) float64 { return pnjlim(v, v0, d.NVt, d.vcrit) }

// Limit implements Nonlinear with junction limiting.
func (d *Diode) Limit(vnew, vold []float64) {
	vnew[0] = pnjlim(vnew[0], vold[0], d.NVt, d.vcrit)
}

// Physical reports whether v is a physically reachable diode voltage (see
// physicalJunction); solvers reject roots outside it.
func (d *Diode) Physical(v float64) bool { return physicalJunction(v, d.NVt) }

// EmissionVoltage returns n·Vt, the voltage scale of the exponential.
func (d *Diode) EmissionVoltage() float64 { return d.NVt }
