package models

// LimiterParams describe a soft limiter: a one-port that conducts nothing
// below its onset voltage and like a conductance above it, with a smooth
// knee between.
type LimiterParams struct {
	Onset       float64 // V: port voltage at the middle of the knee
	Conductance float64 // S: slope far above the onset (> 0)
	Knee        float64 // V: width of the knee (> 0)
}

// Limiter is a soft limiter as a one-port, the output-swing stop of the
// op-amp macromodel. Its current is the softplus function (the integral of
// the logistic function, a smooth ramp max(0, x) of width s):
//
//	I(V) = G·s·ln(1 + exp((V − V0)/s)),   dI/dV = G/(1 + exp(−(V − V0)/s))
//
// It is 0 to within G·s·e^−k at k knee widths below the onset, and
// G·(V − V0) to within G·s·e^−k at k widths above. Evaluated without
// overflow on either side, it needs no limiting: past the knee it is
// linear, so Newton's method settles in a step or two.
type Limiter struct {
	v0, g, s float64
}

// NewLimiter returns the limiter of parameters p.
func NewLimiter(p LimiterParams) *Limiter {
	return &Limiter{v0: p.Onset, g: p.Conductance, s: p.Knee}
}

// Ports is 1.
func (l *Limiter) Ports() int { return 1 }

// Current returns I(V) and dI/dV.
func (l *Limiter) Current(v float64) (i, g float64) {
	f, df := softplus((v - l.v0) / l.s)
	return l.g * l.s * f, l.g * df
}

// Eval implements Nonlinear.
func (l *Limiter) Eval(v, i, jac []float64) { i[0], jac[0] = l.Current(v[0]) }

// EmissionVoltage returns the knee width s, the voltage scale of the
// curvature (solvers estimate the Newton error of a step Δ as Δ²/(2·s)).
func (l *Limiter) EmissionVoltage() float64 { return l.s }

// Limit implements Nonlinear: none is needed.
func (l *Limiter) Limit(vnew, vold []float64) {}

func (p LimiterParams) check() string {
	if !finite(p.Onset, p.Conductance, p.Knee) || !(p.Conductance > 0) || !(p.Knee > 0) ||
		p.Onset > MaxPortVoltage || p.Onset < -MaxPortVoltage {
		return "limiter needs a finite onset, conductance > 0 and knee > 0"
	}
	return ""
}
