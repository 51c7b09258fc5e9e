package refnodal

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Thermal voltage k·T/q at temperature t (kelvin), with the exact SI
// values of the Boltzmann constant and the elementary charge (SI Brochure,
// 9th ed., 2019).
func Vt(t float64) float64 { return 1.380649e-23 * t / 1.602176634e-19 }

// Net is a netlist: fixed node voltages (sources to ground) and branches.
type Net struct {
	Fixed    map[string]float64
	branches []func(v func(string) float64, leave func(string, float64))
	nodes    []string
}

// New returns a net with the given fixed nodes ("gnd" is always 0 V).
func New(fixed map[string]float64) *Net {
	n := &Net{Fixed: map[string]float64{"gnd": 0}}
	for k, v := range fixed {
		n.Fixed[k] = v
	}
	return n
}

func (n *Net) use(names ...string) { n.nodes = append(n.nodes, names...) }

// R adds a resistor.
func (n *Net) R(a, b string, r float64) {
	n.use(a, b)
	n.branches = append(n.branches, func(v func(string) float64, leave func(string, float64)) {
		i := (v(a) - v(b)) / r
		leave(a, i)
		leave(b, -i)
	})
}

// BJT is a bipolar transistor: pins, saturation current, forward and
// reverse gains, forward Early voltage (0: none), leakage Icbo (0: none),
// polarity and thermal voltage.
type BJT struct {
	C, B, E          string
	Is, BF, BR, VA   float64
	Icbo             float64
	PNP              bool
	Vt               float64
	BaseResistance   float64 // Ω in series with the base pin (0: none)
	InternalBaseNode string  // its internal node name, when BaseResistance > 0
}

// Currents returns the currents into the collector and base at terminal
// voltages vc, vb, ve.
func (q BJT) Currents(vc, vb, ve float64) (ic, ib float64) {
	s := 1.0
	if q.PNP {
		s = -1
	}
	vbe, vbc := s*(vb-ve), s*(vb-vc)
	ef, er := math.Exp(vbe/q.Vt), math.Exp(vbc/q.Vt)
	transport := q.Is * (ef - er)
	if q.VA > 0 {
		transport *= 1 - vbc/q.VA
	}
	icn := transport - q.Is/q.BR*(er-1)
	ibn := q.Is/q.BF*(ef-1) + q.Is/q.BR*(er-1)
	if q.Icbo != 0 {
		leak := q.Icbo * (1 - er)
		if vbc > 0 {
			leak = -q.Icbo * vbc / q.Vt
		}
		icn += leak
		ibn -= leak
	}
	return s * icn, s * ibn
}

// BJT adds a transistor (and its base resistance).
func (n *Net) BJT(q BJT) {
	b := q.B
	if q.BaseResistance > 0 {
		b = q.InternalBaseNode
		n.R(q.B, b, q.BaseResistance)
	}
	n.use(q.C, b, q.E)
	n.branches = append(n.branches, func(v func(string) float64, leave func(string, float64)) {
		ic, ib := q.Currents(v(q.C), v(b), v(q.E))
		leave(q.C, ic)
		leave(b, ib)
		leave(q.E, -ic-ib)
	})
}

// Diode is a junction diode with optional breakdown (BV > 0).
type Diode struct {
	A, K         string
	Is, N        float64
	BV, IBV, NBV float64 // breakdown voltage, knee current, its emission coefficient (0: 1)
	Vt           float64
}

// Current returns the anode-to-cathode current at voltage vd.
func (d Diode) Current(vd float64) float64 {
	i := d.Is * math.Expm1(vd/(d.N*d.Vt))
	if d.BV > 0 {
		nbv := d.NBV
		if nbv == 0 {
			nbv = 1
		}
		w := nbv * d.Vt
		i -= d.IBV * (math.Exp(-(vd+d.BV)/w) - math.Exp(-d.BV/w))
	}
	return i
}

// Diode adds a diode.
func (n *Net) Diode(d Diode) {
	n.use(d.A, d.K)
	n.branches = append(n.branches, func(v func(string) float64, leave func(string, float64)) {
		i := d.Current(v(d.A) - v(d.K))
		leave(d.A, i)
		leave(d.K, -i)
	})
}

// JFET is a junction FET; Vp is the pinch-off voltage's magnitude.
type JFET struct {
	D, G, S          string
	Idss, Vp, Lambda float64
	GateIs, GateN    float64
	PChannel         bool
	Vt               float64
}

// channel returns the n-polarity drain current for vgs, vds ≥ 0.
func (j JFET) channel(vgs, vds float64) float64 {
	vov := vgs + j.Vp // Vgs − VP with VP = −Vp
	if vov <= 0 {
		return 0
	}
	k := 1 + j.Lambda*vds
	if vds < vov {
		return j.Idss * (2*(vov/j.Vp)*(vds/j.Vp) - (vds/j.Vp)*(vds/j.Vp)) * k
	}
	return j.Idss * (vov / j.Vp) * (vov / j.Vp) * k
}

// Currents returns the gate and drain currents at terminal voltages.
func (j JFET) Currents(vd, vg, vs float64) (ig, id float64) {
	s := 1.0
	if j.PChannel {
		s = -1
	}
	vgs, vds := s*(vg-vs), s*(vd-vs)
	var ich float64
	if vds >= 0 {
		ich = j.channel(vgs, vds)
	} else {
		ich = -j.channel(vgs-vds, -vds) // source and drain swap roles
	}
	n := j.GateN
	if n == 0 {
		n = 1
	}
	igs := j.GateIs * math.Expm1(vgs/(n*j.Vt))
	igd := j.GateIs * math.Expm1((vgs-vds)/(n*j.Vt))
	return s * (igs + igd), s * (ich - igd)
}

// JFET adds a JFET.
func (n *Net) JFET(j JFET) {
	n.use(j.D, j.G, j.S)
	n.branches = append(n.branches, func(v func(string) float64, leave func(string, float64)) {
		ig, id := j.Currents(v(j.D), v(j.G), v(j.S))
		leave(j.G, ig)
		leave(j.D, id)
		leave(j.S, -ig-id)
	})
}

// MOSFET is an enhancement MOSFET with its body on the source.
type MOSFET struct {
	D, G, S        string
	Vth, K, Lambda float64
	BodyIs, BodyN  float64
	PChannel       bool
	Vt             float64
}

func (m MOSFET) channel(vgs, vds float64) float64 {
	vov := vgs - m.Vth
	if vov <= 0 {
		return 0
	}
	k := 1 + m.Lambda*vds
	if vds < vov {
		return m.K * (vov*vds - vds*vds/2) * k
	}
	return m.K / 2 * vov * vov * k
}

// Current returns the drain current at terminal voltages.
func (m MOSFET) Current(vd, vg, vs float64) float64 {
	s := 1.0
	if m.PChannel {
		s = -1
	}
	vgs, vds := s*(vg-vs), s*(vd-vs)
	var id float64
	if vds >= 0 {
		id = m.channel(vgs, vds)
	} else {
		id = -m.channel(vgs-vds, -vds)
	}
	if m.BodyIs > 0 {
		n := m.BodyN
		if n == 0 {
			n = 1
		}
		id -= m.BodyIs * math.Expm1(-vds/(n*m.Vt)) // body diode, source to drain
	}
	return s * id
}

// MOSFET adds a MOSFET.
func (n *Net) MOSFET(m MOSFET) {
	n.use(m.D, m.G, m.S)
	n.branches = append(n.branches, func(v func(string) float64, leave func(string, float64)) {
		id := m.Current(v(m.D), v(m.G), v(m.S))
		leave(m.D, id)
		leave(m.S, -id)
	})
}

// OpAmp adds an op-amp at DC: Rin between the inputs, and a source
// A0·(V(plus) − V(minus)) from ground driving out through Rout (> 0).
func (n *Net) OpAmp(plus, minus, out string, a0, rin, rout float64) {
	n.R(plus, minus, rin)
	n.use(out)
	n.branches = append(n.branches, func(v func(string) float64, leave func(string, float64)) {
		leave(out, (v(out)-a0*(v(plus)-v(minus)))/rout)
	})
}

// Solve returns every node's voltage. guess holds starting voltages of
// free nodes (others start at 0 V). Steps are damped to at most 50 mV per
// node per iteration; the solve ends when the largest step is below
// 1e-11 V.
func (n *Net) Solve(guess map[string]float64) (map[string]float64, error) {
	var free []string
	idx := map[string]int{}
	for _, s := range n.nodes {
		if _, ok := n.Fixed[s]; ok {
			continue
		}
		if _, ok := idx[s]; !ok {
			idx[s] = len(free)
			free = append(free, s)
		}
	}
	m := len(free)
	x := make([]float64, m)
	for i, s := range free {
		x[i] = guess[s]
	}
	resid := func(x []float64) []float64 {
		f := make([]float64, m)
		v := func(s string) float64 {
			if u, ok := n.Fixed[s]; ok {
				return u
			}
			return x[idx[s]]
		}
		leave := func(s string, i float64) {
			if k, ok := idx[s]; ok {
				f[k] += i
			}
		}
		for _, b := range n.branches {
			b(v, leave)
		}
		return f
	}
	jac := mat.NewDense(m, m, nil)
	xp, xm := make([]float64, m), make([]float64, m)
	for it := 0; it < 20000; it++ {
		f := resid(x)
		const h = 1e-7
		for j := 0; j < m; j++ {
			copy(xp, x)
			copy(xm, x)
			xp[j] += h
			xm[j] -= h
			fp, fm := resid(xp), resid(xm)
			for i := 0; i < m; i++ {
				jac.Set(i, j, (fp[i]-fm[i])/(2*h))
			}
		}
		var dx mat.VecDense
		if err := dx.SolveVec(jac, mat.NewVecDense(m, f)); err != nil {
			return nil, fmt.Errorf("refnodal: %v", err)
		}
		step := 0.0
		for i := 0; i < m; i++ {
			step = math.Max(step, math.Abs(dx.AtVec(i)))
		}
		scale := 1.0
		if step > 0.05 {
			scale = 0.05 / step
		}
		for i := 0; i < m; i++ {
			x[i] -= scale * dx.AtVec(i)
		}
		if step < 1e-11 {
			out := map[string]float64{}
			for k, v := range n.Fixed {
				out[k] = v
			}
			for i, s := range free {
				out[s] = x[i]
			}
			return out, nil
		}
	}
	return nil, fmt.Errorf("refnodal: no convergence")
}
