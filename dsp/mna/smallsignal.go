package mna

import "renderchain/models"

// SmallSignal is a circuit linearised at an operating point, in the layout
// of the AC analysis (inductors with branch currents): for a 1 V phasor on
// the signal source and every other source at rest, the phasors x of the
// unknowns at angular frequency ω solve
//
//	(G + jω·C)·x = B
//
// G holds the conductances: resistors, the ideal elements (Real.Ideal),
// the branch incidence of inductors and each device's Jacobian at the
// operating point. C holds the capacitances: capacitors, −L on the
// diagonal of each inductor's branch row (V(p) − V(m) − jωL·I = 0), and
// each charge-storing device's capacitance matrix (models.Charged) at the
// operating point. Both are row-major Dim×Dim; B is 1 in the signal
// source's branch row. A pole analysis finds the ω where G + jωC is
// singular (the generalised eigenvalues of (G, −C)).
type SmallSignal struct {
	Layout *Layout
	G, C   []float64
	B      []float64
}

// Linearize returns the small-signal system of c at the operating point
// op (from SolveDC on c).
func Linearize(c *models.Circuit, op *OperatingPoint) *SmallSignal {
	lay := NewLayout(c, true)
	g, cs := NewReal(lay), NewReal(lay)
	ss := &SmallSignal{Layout: lay, G: g.A, C: cs.A, B: g.Z}
	for i := range c.Elements {
		e := &c.Elements[i]
		switch e.Kind {
		case models.ResistorKind:
			g.Conductance(e.Nodes[0], e.Nodes[1], 1/e.Value)
		case models.CapacitorKind:
			cs.Conductance(e.Nodes[0], e.Nodes[1], e.Value)
		case models.InductorKind:
			g.Branch(i, e.Nodes[0], e.Nodes[1], 0, 0)
			k := lay.BranchRow(i)
			cs.A[k*lay.Dim+k] -= e.Value
		default:
			g.Ideal(i, e, 0)
			if e.Kind == models.VoltageSourceKind && e.Signal {
				ss.B[lay.BranchRow(i)] = 1
			}
		}
	}
	var buf [64]float64
	for _, d := range op.Devices {
		g.Ports(d.Ports, d.Jac)
		if q, ok := d.Model.(models.Charged); ok && hasCharges(d.Model) {
			p := len(d.Ports)
			qv, cm := buf[:p], make([]float64, p*p)
			q.Charges(d.V, qv, cm)
			cs.Ports(d.Ports, cm)
		}
	}
	return ss
}

// hasCharges reports whether a device stores charge: a Charged device
// does unless it says otherwise (HasCharges).
func hasCharges(m models.Nonlinear) bool {
	if _, ok := m.(models.Charged); !ok {
		return false
	}
	if h, ok := m.(interface{ HasCharges() bool }); ok {
		return h.HasCharges()
	}
	return true
}

// At returns the complex matrix G + jωC at angular frequency w into a
// (len Dim², allocated when nil) and returns it.
func (s *SmallSignal) At(w float64, a []complex128) []complex128 {
	if a == nil {
		a = make([]complex128, len(s.G))
	}
	for i := range s.G {
		a[i] = complex(s.G[i], w*s.C[i])
	}
	return a
}
