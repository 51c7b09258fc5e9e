package models

import "math"

// Depletion describes the depletion (transition) capacitance of a p–n
// junction. The zero value means no capacitance.
type Depletion struct {
	C0        float64 // capacitance at zero bias, F (0: none)
	Potential float64 // built-in potential, V (> 0 when C0 > 0)
	Grading   float64 // grading exponent, 0 ≤ m < 1 (1/2 abrupt, 1/3 linearly graded)
}

// DefaultForwardFraction is the fraction of the built-in potential past
// which the depletion charge is continued by its tangent-parabola form
// (0.5, the usual choice of circuit-simulation junction models: common
// practice).
const DefaultForwardFraction = 0.5

// depletion is a Depletion prepared for evaluation.
//
// Below the forward-bias point Vf = FC·Vj the capacitance is the
// depletion-approximation law (Sze & Ng, "Physics of Semiconductor
// Devices", 3rd ed., 2007, sec. 2.3: C ∝ (Vbi − V)^−1/2 for an abrupt and
// ^−1/3 for a linearly graded junction; the general exponent m as in
// Sedra & Smith, "Microelectronic Circuits", Cj = Cj0/(1 + VR/V0)^m):
//
//	C(v) = C0·(1 − v/Vj)^−m
//	Q(v) = C0·Vj/(1 − m)·(1 − (1 − v/Vj)^(1−m))        (Q = ∫₀ᵛ C)
//
// The law diverges at v = Vj, so above Vf it is continued by the
// tangent line of C (a parabola in Q), as in the junction model of
// classical circuit simulation (L. W. Nagel, UCB ERL-M520, 1975; G.
// Massobrio & P. Antognetti, semiconductor device modeling, McGraw-Hill,
// 2nd ed., 1993, ch. 1, the FC linearisation; from memory):
//
//	C(v) = C0/(1 − FC)^(1+m)·(1 − FC·(1 + m) + m·v/Vj)
//	Q(v) = C0·F1 + C0/(1 − FC)^(1+m)·((1 − FC·(1 + m))·(v − Vf) + m/(2Vj)·(v² − Vf²))
//
// with F1 = Vj/(1 − m)·(1 − (1 − FC)^(1−m)); C and Q are continuous at Vf
// and C is continuous in slope there.
type depletion struct {
	c0, vj, m, vf float64
	q0            float64 // C0·F1, the charge at Vf
	k             float64 // C0/(1 − FC)^(1+m)
	f3            float64 // 1 − FC·(1 + m)
	// Constants of charge: 1/Vj, C0·Vj/(1 − m), m/Vj, m/(2·Vj), Vf².
	ivj, qs, mvj, m2vj, vf2 float64
}

func newDepletion(d Depletion, fc float64) depletion {
	if d.C0 == 0 {
		return depletion{}
	}
	if fc == 0 {
		fc = DefaultForwardFraction
	}
	m := d.Grading
	p := depletion{c0: d.C0, vj: d.Potential, m: m, vf: fc * d.Potential}
	p.q0 = d.C0 * d.Potential / (1 - m) * (1 - math.Pow(1-fc, 1-m))
	p.k = d.C0 / math.Pow(1-fc, 1+m)
	p.f3 = 1 - fc*(1+m)
	p.ivj = 1 / p.vj
	p.qs = p.c0 * p.vj / (1 - m)
	p.mvj = m / p.vj
	p.m2vj = m / (2 * p.vj)
	p.vf2 = p.vf * p.vf
	return p
}

// charge returns Q(v) and C(v) = dQ/dv.
func (p *depletion) charge(v float64) (q, c float64) {
	if p.c0 == 0 {
		return 0, 0
	}
	if v < p.vf {
		x := 1 - v*p.ivj // > 1 − FC > 0
		var xm float64   // x^(−m)
		switch p.m {
		case 0.5:
			xm = 1 / math.Sqrt(x)
		case 0:
			xm = 1
		default:
			if x < 0x1p20 {
				// exp(−m·ln x) by the reduced log and exp (powReduced:
				// within 13 ulps for any junction in a pedal), about a
				// third of math.Pow's time.
				xm = powReduced(x, p.m)
			} else {
				// Megavolts of reverse bias on a Newton iterate (or NaN):
				// the general functions.
				xm = math.Exp(-p.m * math.Log(x))
			}
		}
		c = p.c0 * xm
		q = p.qs * (1 - x*xm)
		return q, c
	}
	c = p.k * (p.f3 + p.mvj*v)
	q = p.q0 + p.k*(p.f3*(v-p.vf)+p.m2vj*(v*v-p.vf2))
	return q, c
}

// check reports what is wrong with a depletion description, or "".
func (d Depletion) check() string {
	switch {
	case d.C0 == 0 && d.Potential == 0 && d.Grading == 0:
		return ""
	case !(d.C0 >= 0) || d.C0 > 1e-6:
		return "zero-bias capacitance must be between 0 and 1 µF"
	case !(d.Potential > 0) || d.Potential > 5:
		return "built-in potential must be above 0 and at most 5 V"
	case !(d.Grading >= 0) || !(d.Grading < 1):
		return "grading exponent must be at least 0 and below 1"
	}
	return ""
}

// checkFraction reports whether a forward-bias fraction is usable: 0 (the
// default) or inside (0, 1).
func checkFraction(fc float64) bool { return fc == 0 || (fc > 0 && fc < 1) }

// checkStorage reports what is wrong with a junction's transit time and
// forward-bias fraction, or "".
func checkStorage(tt, fc float64) string {
	if tt < 0 || tt > 1e-3 {
		return "transit time must be between 0 and 1 ms"
	}
	if !checkFraction(fc) {
		return "forward-bias fraction must be 0 (default) or between 0 and 1"
	}
	return ""
}

// softplus returns ln(1 + e^u) and its derivative, the logistic function
// 1/(1 + e^−u), without overflow for any u.
func softplus(u float64) (f, df float64) {
	if u > 0 {
		e := math.Exp(-u)
		return u + math.Log1p(e), 1 / (1 + e)
	}
	e := math.Exp(u)
	return math.Log1p(e), e / (1 + e)
}

// finite reports whether every value is a finite number.
func finite(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
