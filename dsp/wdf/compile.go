package wdf

import (
	"fmt"
	"math"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// leaf kinds of the adapted one-ports.
const (
	leafResistor = iota
	leafCapacitor
	leafInductor
)

// port is one port of the root R-type adaptor.
type port struct {
	plus, minus int
	r           float64 // port resistance, Ω
	leaf        int     // leaf kind for adapted ports
	elem        int     // element index (adapted ports)
}

// Adaptor is the root R-type adaptor of a circuit, derived by modified nodal
// analysis. Every linear one-port (resistor, capacitor, inductor, pot
// section) is an adapted port of it; every nonlinear device port is an
// unadapted port at the root; ideal voltage sources, buffers, controlled
// current sources and ideal transformers (mna.Real.Ideal) are absorbed
// inside it, the sources entering as inputs u. Any linear multiport can
// be absorbed this way (Werner, Bernardini, Smith & Sarti 2018, below).
//
// Replacing each port j by its Thévenin equivalent (the incident wave b_j
// in series with the port resistance R_j) and solving the MNA system gives
// port voltages v = M·b + Mu·u; with the wave definitions a = v + R·i,
// b = v − R·i this is the scattering relation a = S·b + T·u with
//
//	S = 2M − I,   T = 2Mu.
//
// This is the MNA derivation of the R-type scattering matrix of Werner,
// Nangia, Smith & Abel, "Resolving wave digital filters with
// multiple/multiport nonlinearities", DAFx-15 (2015) (their
// S = I + 2[0 R]X⁻¹[0 I]ᵀ, from memory; written here with a Norton stamp of
// each port, which gives the same S), and of Werner, Bernardini, Smith &
// Sarti, "Modeling circuits with arbitrary topologies and active linear
// multiports using wave digital filters", IEEE TCAS-I 65(12), 2018. The
// equality is checked in the tests against Fettweis's closed-form series
// and parallel adaptors.
type Adaptor struct {
	ports   []port
	sources []int // element indices of ideal voltage sources (the inputs u)
	nodes   int
	// M (ports×ports), Mu (ports×sources): port voltages per unit incident
	// wave and per source volt. N, Nu: the same for every node voltage.
	M, Mu, N, Nu []float64
}

// Scattering returns the adaptor's scattering matrix S = 2M − I, row-major.
func (a *Adaptor) Scattering() []float64 {
	p := len(a.ports)
	s := make([]float64, p*p)
	for i := range s {
		s[i] = 2 * a.M[i]
	}
	for i := 0; i < p; i++ {
		s[i*p+i]--
	}
	return s
}

// newAdaptor stamps the MNA system of the ports and absorbed elements and
// solves it for the unit responses.
func newAdaptor(c *models.Circuit, ports []port) (*Adaptor, error) {
	ad := &Adaptor{ports: ports, nodes: len(c.Nodes)}
	// Layout: sources and buffers get branch rows; inductors are ports here.
	lay := mna.NewLayout(c, false)
	sys := mna.NewReal(lay)
	for _, pt := range ports {
		sys.Conductance(pt.plus, pt.minus, 1/pt.r)
	}
	// Absorbed elements: ideal sources (inputs u), buffers, controlled
	// sources and ideal transformers, stamped as every analysis does.
	for i := range c.Elements {
		e := &c.Elements[i]
		if sys.Ideal(i, e, 0) && e.Kind == models.VoltageSourceKind {
			ad.sources = append(ad.sources, i)
		}
	}
	lu := mna.NewLU(lay.Dim)
	if err := lu.Factor(sys.A); err != nil {
		return nil, mna.Singular(c, lay, err, "the wave digital adaptor is singular")
	}
	np, ns, nn := len(ports), len(ad.sources), len(c.Nodes)
	ad.M, ad.Mu = make([]float64, np*np), make([]float64, np*ns)
	ad.N, ad.Nu = make([]float64, nn*np), make([]float64, nn*ns)
	z := make([]float64, lay.Dim)
	read := func(col int, m []float64, mcols int, n []float64) {
		for r, pt := range ports {
			m[r*mcols+col] = mna.NodeVoltage(z, pt.plus) - mna.NodeVoltage(z, pt.minus)
		}
		for node := 0; node < nn; node++ {
			n[node*mcols+col] = mna.NodeVoltage(z, node)
		}
	}
	for j, pt := range ports {
		clear(z)
		g := 1 / pt.r
		if r := lay.Row(pt.plus); r >= 0 {
			z[r] += g
		}
		if r := lay.Row(pt.minus); r >= 0 {
			z[r] -= g
		}
		lu.Solve(z)
		read(j, ad.M, np, ad.N)
	}
	for j, e := range ad.sources {
		clear(z)
		z[lay.BranchRow(e)] = 1
		lu.Solve(z)
		read(j, ad.Mu, ns, ad.Nu)
	}
	for _, v := range ad.M {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &models.CircuitError{What: "circuit", Reason: "the wave digital adaptor is ill-conditioned"}
		}
	}
	return ad, nil
}

// Options tune a Solver.
type Options struct {
	SampleRate float64 // internal sample rate, Hz (required)
	// Probe is the node whose voltage Process writes; 0 (ground) selects
	// the circuit's output node.
	Probe int
	// MaxIter bounds plain Newton per sample (default 30); Tol is the step
	// tolerance in volts (default 1e-9).
	MaxIter int
	Tol     float64
}

// Compile builds the wave digital solver of circuit c at the given sample
// rate, with its states and device voltages taken from the DC operating
// point op, so that with the signal at rest the first sample reproduces the
// operating point.
func Compile(c *models.Circuit, op *mna.OperatingPoint, opt Options) (*Solver, error) {
	if !(opt.SampleRate > 0) {
		return nil, fmt.Errorf("wdf: sample rate %g must be positive", opt.SampleRate)
	}
	if opt.MaxIter == 0 {
		opt.MaxIter = 30
	}
	if opt.Tol == 0 {
		opt.Tol = 1e-9
	}
	if opt.Probe == models.Ground {
		opt.Probe = c.Output
	}
	T := 1 / opt.SampleRate
	var ports []port
	// Adapted leaves: port resistances of the wave digital one-ports
	// (Fettweis, "Wave digital filters: theory and practice", Proc. IEEE
	// 74(2), 1986, table II): resistor R; capacitor T/(2C) with b[n] =
	// a[n−1]; inductor 2L/T with b[n] = −a[n−1] (bilinear transform).
	for i, e := range c.Elements {
		switch e.Kind {
		case models.ResistorKind:
			ports = append(ports, port{e.Nodes[0], e.Nodes[1], e.Value, leafResistor, i})
		case models.CapacitorKind:
			ports = append(ports, port{e.Nodes[0], e.Nodes[1], T / (2 * e.Value), leafCapacitor, i})
		case models.InductorKind:
			ports = append(ports, port{e.Nodes[0], e.Nodes[1], 2 * e.Value / T, leafInductor, i})
		}
	}
	nE := len(ports)
	// Unadapted root ports: one per nonlinear device port. Their
	// resistances cancel from the joint solve below; they are chosen at the
	// device's small-signal slope at the operating point, 1/(di/dv),
	// clamped to [10 Ω, 1 MΩ], which keeps I − M_II well conditioned.
	if len(op.Devices) != len(c.Devices()) {
		return nil, fmt.Errorf("wdf: operating point does not belong to this circuit")
	}
	for _, d := range op.Devices {
		p := len(d.Ports)
		for k, pt := range d.Ports {
			g := d.Jac[k*p+k]
			r := 1e6
			if g > 1e-6 {
				r = math.Max(10, 1/g)
			}
			ports = append(ports, port{pt.Plus, pt.Minus, r, -1, d.Element})
		}
	}
	ad, err := newAdaptor(c, ports)
	if err != nil {
		return nil, err
	}
	return newSolver(c, op, ad, nE, opt)
}
