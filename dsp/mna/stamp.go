package mna

import "renderchain/models"

// Layout maps a circuit to the unknowns of modified nodal analysis (Ho,
// Ruehli, Brennan, "The modified nodal approach to network analysis", IEEE
// Trans. Circuits Syst. 22(6), 1975): one voltage per node other than
// ground, then one current per branch whose voltage is fixed (ideal
// sources, buffers, the windings after the first of an ideal transformer,
// and, where the analysis asks, inductors).
type Layout struct {
	Nodes    int         // node count including ground
	Branches map[int]int // element index → (first) branch number
	Dim      int
}

// branchCount is the number of branch currents element e adds.
func branchCount(e *models.Element, inductorBranches bool) int {
	switch e.Kind {
	case models.VoltageSourceKind, models.BufferKind:
		return 1
	case models.InductorKind:
		if inductorBranches {
			return 1
		}
	case models.IdealTransformerKind:
		return len(e.Ratios)
	}
	return 0
}

// NewLayout assigns branch rows to voltage sources, buffers and ideal
// transformers (one per winding after the first), and to inductors when
// inductorBranches is set (DC: inductors are shorts; AC and transient:
// their impedance is written in the branch row).
func NewLayout(c *models.Circuit, inductorBranches bool) *Layout {
	l := &Layout{Nodes: len(c.Nodes), Branches: map[int]int{}}
	k := 0
	for i := range c.Elements {
		if n := branchCount(&c.Elements[i], inductorBranches); n > 0 {
			l.Branches[i] = k
			k += n
		}
	}
	l.Dim = l.Nodes - 1 + k
	return l
}

// Row returns the unknown's index of node n, or −1 for ground.
func (l *Layout) Row(n int) int { return n - 1 }

// BranchRow returns the row of element e's (first) branch current; an
// ideal transformer's winding k ≥ 2 has row BranchRow(e) + k − 2.
func (l *Layout) BranchRow(e int) int { return l.Nodes - 1 + l.Branches[e] }

// Real is a real MNA system A·x = z being stamped.
type Real struct {
	L    *Layout
	A, Z []float64
}

// NewReal returns a zeroed system for the layout.
func NewReal(l *Layout) *Real {
	return &Real{L: l, A: make([]float64, l.Dim*l.Dim), Z: make([]float64, l.Dim)}
}

// Reset zeroes the system for a new stamping pass.
func (s *Real) Reset() {
	clear(s.A)
	clear(s.Z)
}

func (s *Real) add(r, c int, v float64) {
	if r >= 0 && c >= 0 {
		s.A[r*s.L.Dim+c] += v
	}
}

// Conductance stamps g siemens between nodes a and b.
func (s *Real) Conductance(a, b int, g float64) {
	ra, rb := s.L.Row(a), s.L.Row(b)
	s.add(ra, ra, g)
	s.add(rb, rb, g)
	s.add(ra, rb, -g)
	s.add(rb, ra, -g)
}

// Transconductance stamps a current g·(V(cp) − V(cm)) flowing from node op
// through the element to node om (out of op, into om).
func (s *Real) Transconductance(op, om, cp, cm int, g float64) {
	rp, rm, rcp, rcm := s.L.Row(op), s.L.Row(om), s.L.Row(cp), s.L.Row(cm)
	s.add(rp, rcp, g)
	s.add(rp, rcm, -g)
	s.add(rm, rcp, -g)
	s.add(rm, rcm, g)
}

// Current stamps a current source of i amperes flowing out of node a,
// through the source, into node b.
func (s *Real) Current(a, b int, i float64) {
	if r := s.L.Row(a); r >= 0 {
		s.Z[r] -= i
	}
	if r := s.L.Row(b); r >= 0 {
		s.Z[r] += i
	}
}

// Branch stamps element e's branch: V(p) − V(m) − r·I = v, with the branch
// current I flowing from p through the element to m.
func (s *Real) Branch(e, p, m int, r, v float64) {
	k := s.L.BranchRow(e)
	rp, rm := s.L.Row(p), s.L.Row(m)
	s.add(rp, k, 1)
	s.add(rm, k, -1)
	s.add(k, rp, 1)
	s.add(k, rm, -1)
	s.add(k, k, -r)
	s.Z[k] += v
}

// Buffer stamps an ideal unity-gain buffer from node in to node out: its
// branch sets V(out) = V(in) and sources whatever current out needs.
func (s *Real) Buffer(e, out, in int) {
	k := s.L.BranchRow(e)
	ro, ri := s.L.Row(out), s.L.Row(in)
	s.add(ro, k, 1)
	s.add(k, ro, 1)
	s.add(k, ri, -1)
}

// Ideal stamps element i if it is one of the ideal linear elements every
// analysis writes the same way, and reports whether it did:
//
//   - an ideal voltage source, of value v (the caller chooses: the DC
//     value scaled for source stepping, the DC value plus the signal in a
//     transient step, 0 in small-signal and wave digital adaptor systems);
//   - a buffer: V(out) = V(in), the output current a branch unknown;
//   - a voltage-controlled current source: the transconductance stamp;
//   - an ideal transformer of N windings: branch currents I_k into the
//     start of windings k = 2…N, rows V_k − n_k·V_1 = 0, and the first
//     winding's current −Σ n_k·I_k (power balance) in its KCL rows.
//
// Resistors, capacitors, inductors and nonlinear devices are left to the
// caller: each analysis writes them its own way.
func (s *Real) Ideal(i int, e *models.Element, v float64) bool {
	switch e.Kind {
	case models.VoltageSourceKind:
		s.Branch(i, e.Nodes[0], e.Nodes[1], 0, v)
	case models.BufferKind:
		s.Buffer(i, e.Nodes[0], e.Nodes[1])
	case models.ControlledCurrentKind:
		s.Transconductance(e.Nodes[0], e.Nodes[1], e.Nodes[2], e.Nodes[3], e.Value)
	case models.IdealTransformerKind:
		k0 := s.L.BranchRow(i)
		p1, m1 := s.L.Row(e.Nodes[0]), s.L.Row(e.Nodes[1])
		for w, n := range e.Ratios {
			k := k0 + w
			p, m := s.L.Row(e.Nodes[2*w+2]), s.L.Row(e.Nodes[2*w+3])
			s.add(p, k, 1)
			s.add(m, k, -1)
			s.add(p1, k, -n)
			s.add(m1, k, n)
			s.add(k, p, 1)
			s.add(k, m, -1)
			s.add(k, p1, -n)
			s.add(k, m1, n)
		}
	default:
		return false
	}
	return true
}

// Ports stamps a port matrix m (row-major P×P, e.g. a device Jacobian or
// capacitance matrix) between the ports: entry (a, b) is the current into
// port a's Plus pin per volt across port b.
func (s *Real) Ports(ports []models.Port, m []float64) {
	p := len(ports)
	for a := 0; a < p; a++ {
		for b := 0; b < p; b++ {
			if g := m[a*p+b]; g != 0 {
				s.Transconductance(ports[a].Plus, ports[a].Minus, ports[b].Plus, ports[b].Minus, g)
			}
		}
	}
}

// Device stamps the Newton companion of a nonlinear device linearised at
// port voltages v0 with port currents i0 and Jacobian jac (row-major):
// i ≈ i0 + J·(v − v0), each port current flowing into its Plus node's pin.
func (s *Real) Device(ports []models.Port, v0, i0, jac []float64) {
	p := len(ports)
	for a := 0; a < p; a++ {
		ieq := i0[a]
		for b := 0; b < p; b++ {
			g := jac[a*p+b]
			ieq -= g * v0[b]
			// Current into port a's Plus pin leaves node Plus.
			s.Transconductance(ports[a].Plus, ports[a].Minus, ports[b].Plus, ports[b].Minus, g)
		}
		s.Current(ports[a].Plus, ports[a].Minus, ieq)
	}
}

// NodeVoltage reads node n's voltage from a solution vector.
func NodeVoltage(x []float64, n int) float64 {
	if n == models.Ground {
		return 0
	}
	return x[n-1]
}
