package models

import "math"

// Nonlinear is a nonlinear multi-port device as the solvers see it: P ports,
// each a pair of terminals with a port voltage and a port current flowing
// into the port's positive terminal. Eval must be cheap and allocation-free;
// the solvers call it in their Newton loops.
type Nonlinear interface {
	// Ports returns the number of ports P.
	Ports() int
	// Eval writes the port currents i (len P) and the Jacobian di/dv
	// (row-major P×P) for the port voltages v (len P).
	Eval(v, i, jac []float64)
	// Limit restrains a Newton step from vold to vnew (both len P) in place,
	// so that exponentials are not overshot.
	Limit(vnew, vold []float64)
}

// MaxPortVoltage bounds the magnitude of any device port voltage a solver
// may accept, volts: no effect-pedal circuit puts a kilovolt across a
// junction, so a larger value marks a spurious root.
const MaxPortVoltage = 1e3

// physicalJunction reports whether a junction voltage v with emission
// voltage nvt is one a finite circuit current can produce: forward bias
// inside the exponential's range (below expLimit·nVt, about 2 V for a
// silicon junction) and reverse bias within MaxPortVoltage.
func physicalJunction(v, nvt float64) bool {
	return v < expLimit*nvt && v > -MaxPortVoltage
}

// expLimit is the point past which exponentials are continued linearly.
// exp(80) ≈ 5.5e34: no junction in a working circuit gets near (80·Vt ≈ 2 V
// across an ideal junction), and the linear continuation keeps Newton's
// intermediate iterates finite (the "limexp" device of circuit simulators).
const expLimit = 80.0

// limexp returns exp(x) and its derivative, continued linearly past expLimit.
//
// Below −expFloor the exponential is taken as 0: e^−50 ≈ 2e-22 is lost
// against the 1 it is always compared with (Is·(e^x − 1)), and a reverse-
// biased junction then costs no exponential at all.
func limexp(x float64) (e, de float64) {
	if x > expLimit {
		return limexpTail(x)
	}
	if x < -expFloor {
		return 0, 0
	}
	e = math.Exp(x)
	return e, e
}

const expFloor = 50.0

var expAtLimit = math.Exp(expLimit)

func limexpTail(x float64) (e, de float64) {
	return expAtLimit * (1 + x - expLimit), expAtLimit
}

// pnjlim limits the change of a junction voltage between Newton iterates, as
// in the junction limiting of classical circuit simulation (L. W. Nagel,
// UCB ERL-M520, 1975, sec. 4.3): above the critical voltage
// vcrit = nVt·ln(nVt/(√2·Is)) a step larger than 2·nVt is replaced by the
// logarithm of the step, so the diode current rather than the voltage moves
// by the linearised amount.
func pnjlim(vnew, vold, nvt, vcrit float64) float64 {
	if vnew > vcrit && math.Abs(vnew-vold) > 2*nvt {
		if vold > 0 {
			arg := 1 + (vnew-vold)/nvt
			if arg > 0 {
				return vold + nvt*math.Log(arg)
			}
			return vcrit
		}
		return nvt * math.Log(vnew/nvt)
	}
	return vnew
}

func criticalVoltage(nvt, is float64) float64 {
	return nvt * math.Log(nvt/(math.Sqrt2*is))
}

// Charged is a Nonlinear device that also stores charge on its ports:
// junction depletion and diffusion charges. Port k's charge q_k is the
// charge that has flowed into its Plus terminal, so its capacitive current
// is dq_k/dt, added to the current Eval returns. Charges is static: the
// solvers own the time discretisation (the trapezoidal rule, the bilinear
// transform every linear reactive element uses) and the per-sample state
// (last charge and last capacitive current), so a device stays a pure
// function of its port voltages. The DC solve ignores charges; the
// small-signal analyses add jω times the capacitance matrix at the
// operating point.
type Charged interface {
	Nonlinear
	// Charges writes the port charges q (len P), coulombs, and the
	// capacitance matrix dq/dv (row-major P×P), farads, for the port
	// voltages v (len P). It must be cheap and allocation-free.
	Charges(v, q, c []float64)
}
