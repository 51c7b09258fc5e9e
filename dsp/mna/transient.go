package mna

import (
	"math"

	"renderchain/models"
)

// Transient is a brute-force time-domain solver: modified nodal analysis
// with trapezoidal companion models for capacitors, inductors and the
// port charges of charge-storing devices (models.Charged) (Chua &
// Lin, "Computer-Aided Analysis of Electronic Circuits", 1975, ch. 13;
// Vlach & Singhal, "Computer Methods for Circuit Analysis and Design",
// 2nd ed., sec. 11.3) and a full Newton solve of the whole system at every
// step. It is slow and is kept as an independent reference for the wave
// digital solver, which discretises with the same bilinear rule.
type Transient struct {
	c    *models.Circuit
	lay  *Layout
	sys  *Real
	lu   *LU
	x    []float64
	h    float64
	capV map[int]float64 // previous voltage of each capacitor
	capI map[int]float64 // previous current
	indV map[int]float64
	indI map[int]float64
	devs []DeviceState
	vold [][]float64
	// Charge state of each charge-storing device (nil entries for the
	// others): the port charges and capacitive port currents of the last
	// step, and scratch for the present iterate.
	qPrev, iqPrev [][]float64
	q, cm, iq     [][]float64
	input         int // element index of the signal source, −1 if none
	// Tol is the Newton step tolerance, relative to the largest unknown
	// plus one (default 1e-12).
	Tol float64
}

// NewTransient starts a transient run at sample rate fs from the DC point op.
func NewTransient(c *models.Circuit, fs float64, op *OperatingPoint) *Transient {
	lay := NewLayout(c, true)
	t := &Transient{c: c, lay: lay, sys: NewReal(lay), lu: NewLU(lay.Dim), x: make([]float64, lay.Dim), h: 1 / fs,
		capV: map[int]float64{}, capI: map[int]float64{}, indV: map[int]float64{}, indI: map[int]float64{}, input: -1, Tol: 1e-12}
	for n := 1; n < lay.Nodes; n++ {
		t.x[n-1] = op.Node[n]
	}
	for i, e := range c.Elements {
		switch e.Kind {
		case models.CapacitorKind:
			t.capV[i] = op.ElementVoltage(i)
		case models.InductorKind:
			t.indI[i] = op.Branch[i]
		case models.VoltageSourceKind:
			if e.Signal {
				t.input = i
			}
		}
		if k, ok := lay.Branches[i]; ok {
			t.x[lay.Nodes-1+k] = op.Branch[i]
		}
	}
	for _, d := range op.Devices {
		p := len(d.V)
		t.devs = append(t.devs, DeviceState{DeviceInstance: d.DeviceInstance, V: make([]float64, p), I: make([]float64, p), Jac: make([]float64, p*p)})
		t.vold = append(t.vold, append([]float64(nil), d.V...))
		var qp, iqp, q, cm, iq []float64
		if ch, ok := d.Model.(models.Charged); ok && hasCharges(d.Model) {
			qp, iqp, q, cm, iq = make([]float64, p), make([]float64, p), make([]float64, p), make([]float64, p*p), make([]float64, p)
			ch.Charges(d.V, qp, cm) // at rest: the DC charges, no current
		}
		t.qPrev, t.iqPrev = append(t.qPrev, qp), append(t.iqPrev, iqp)
		t.q, t.cm, t.iq = append(t.q, q), append(t.cm, cm), append(t.iq, iq)
	}
	return t
}

// charge adds device k's capacitive port currents and their Jacobian to
// d.I and d.Jac at port voltages d.V, by the trapezoidal rule on the port
// charges: i = (2/h)·(q − q_prev) − i_prev, di/dv = (2/h)·dq/dv (the
// companion model of a nonlinear capacitor, Chua & Lin 1975, ch. 13).
func (t *Transient) charge(k int, d *DeviceState) {
	if t.q[k] == nil {
		return
	}
	q, cm, iq := t.q[k], t.cm[k], t.iq[k]
	d.Model.(models.Charged).Charges(d.V, q, cm)
	g := 2 / t.h
	for j := range q {
		iq[j] = g*(q[j]-t.qPrev[k][j]) - t.iqPrev[k][j]
		d.I[j] += iq[j]
	}
	for j := range cm {
		d.Jac[j] += g * cm[j]
	}
}

// Step advances one sample with the signal source at its DC value plus vin
// and returns the Newton iterations it took.
func (t *Transient) Step(vin float64) (int, error) {
	const maxIter = 100
	step := 0.0
	for it := 1; it <= maxIter; it++ {
		s := t.sys
		s.Reset()
		for i := range t.c.Elements {
			e := &t.c.Elements[i]
			a, b := e.Nodes[0], e.Nodes[1]
			switch e.Kind {
			case models.ResistorKind:
				s.Conductance(a, b, 1/e.Value)
			case models.CapacitorKind:
				g := 2 * e.Value / t.h
				s.Conductance(a, b, g)
				s.Current(a, b, -(g*t.capV[i] + t.capI[i]))
			case models.InductorKind:
				r := 2 * e.Value / t.h
				s.Branch(i, a, b, r, -r*t.indI[i]-t.indV[i])
			default:
				v := e.Value
				if i == t.input {
					v += vin
				}
				s.Ideal(i, e, v)
			}
		}
		for k := range t.devs {
			d := &t.devs[k]
			portVoltages(t.x, d.Ports, d.V)
			d.Model.Limit(d.V, t.vold[k])
			copy(t.vold[k], d.V)
			d.Model.Eval(d.V, d.I, d.Jac)
			t.charge(k, d)
			s.Device(d.Ports, d.V, d.I, d.Jac)
		}
		if err := t.lu.Factor(s.A); err != nil {
			return it, err
		}
		t.lu.Solve(s.Z)
		step = 0.0
		for i := range t.x {
			step = math.Max(step, math.Abs(s.Z[i]-t.x[i]))
		}
		copy(t.x, s.Z)
		// Tol is relative to the largest unknown (at least 1 V or 1 A), so
		// rounding in a large, stiff system cannot stall it.
		if step < t.Tol*(1+maxAbs(t.x)) {
			t.commit()
			return it, nil
		}
	}
	t.commit()
	return maxIter, &NonConvergenceError{Iterations: maxIter, Residual: step}
}

func (t *Transient) commit() {
	for k := range t.devs {
		if t.q[k] == nil {
			continue
		}
		d := &t.devs[k]
		portVoltages(t.x, d.Ports, d.V)
		t.charge(k, d)
		copy(t.qPrev[k], t.q[k])
		copy(t.iqPrev[k], t.iq[k])
	}
	for i, e := range t.c.Elements {
		switch e.Kind {
		case models.CapacitorKind:
			v := NodeVoltage(t.x, e.Nodes[0]) - NodeVoltage(t.x, e.Nodes[1])
			g := 2 * e.Value / t.h
			t.capI[i] = g*(v-t.capV[i]) - t.capI[i]
			t.capV[i] = v
		case models.InductorKind:
			t.indV[i] = NodeVoltage(t.x, e.Nodes[0]) - NodeVoltage(t.x, e.Nodes[1])
			t.indI[i] = t.x[t.lay.BranchRow(i)]
		}
	}
}

// Voltage returns node n's voltage after the last step.
func (t *Transient) Voltage(n int) float64 { return NodeVoltage(t.x, n) }
