package bench

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"renderchain/chains"
)

// ceChain is a voltage-divider-biased common-emitter stage written out
// part by part (no template, so the test controls every value).
type ceChain struct {
	Vcc            string
	R1, R2, RC, RE string
	Kind           string // npn or pnp
	Beta           float64
	Swap           bool // collector and emitter pins swapped
}

func (c ceChain) toml() string {
	pins := `{ c = "c", b = "b", e = "e" }`
	if c.Swap {
		pins = `{ c = "e", b = "b", e = "c" }`
	}
	return fmt.Sprintf(`
name = "common-emitter test stage"
supply = %q
[input]
source = "ideal"
[output]
load = "1M"
[[stage]]
id = "ce"
parts = [
  { ref = "C1", kind = "capacitor", value = "1u",   pins = ["in", "b"] },
  { ref = "R1", kind = "resistor",  value = %q,     pins = ["v+", "b"] },
  { ref = "R2", kind = "resistor",  value = %q,     pins = ["b", "gnd"] },
  { ref = "RC", kind = "resistor",  value = %q,     pins = ["v+", "c"] },
  { ref = "RE", kind = "resistor",  value = %q,     pins = ["e", "gnd"] },
  { ref = "CE", kind = "capacitor", value = "100u", pins = ["e", "gnd"] },
  { ref = "Q1", kind = %q, is = "10f", hfe = %g, br = 4, pins = %s },
  { ref = "C2", kind = "capacitor", value = "100n", pins = ["c", "out"] },
]
`, c.Vcc, c.R1, c.R2, c.RC, c.RE, c.Kind, c.Beta, pins)
}

func (c ceChain) parse(t testing.TB) *chains.Chain {
	t.Helper()
	ch, err := chains.Parse("ce.toml", c.toml())
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// pairChain is the two-transistor direct-coupled stage with DC feedback
// from the second emitter to the first base, written out part by part.
type pairChain struct {
	Vcc          string
	Kind, Model  string // "npn", "" or "pnp", "ge-pnp"
	Is           string
	Beta1, Beta2 float64
	Icbo         string // "" for none
	R1, R2, R3   string
	R4           string
	Trim1, Trim2 float64
	Gain         float64
}

func siPair() pairChain {
	return pairChain{Vcc: "9V", Kind: "npn", Is: "10f", Beta1: 215, Beta2: 393, R1: "27k", R2: "1k8", R3: "1k", R4: "100k", Trim1: 0.5, Trim2: 0.5, Gain: 0.7}
}

func gePair() pairChain {
	return pairChain{Vcc: "-9V", Kind: "pnp", Model: "ge-pnp", Is: "200n", Beta1: 75, Beta2: 110, Icbo: "2u", R1: "4k7", R2: "2k7", R3: "470", R4: "47k", Trim1: 0.5, Trim2: 0.5, Gain: 0.8}
}

func (p pairChain) toml() string {
	dev := func(beta float64) string {
		s := fmt.Sprintf(`kind = %q, is = %q, hfe = %g, br = 4`, p.Kind, p.Is, beta)
		if p.Model != "" {
			s += fmt.Sprintf(`, model = %q`, p.Model)
		}
		if p.Icbo != "" {
			s += fmt.Sprintf(`, icbo = %q`, p.Icbo)
		}
		return s
	}
	return fmt.Sprintf(`
name = "direct-coupled pair test stage"
supply = %q
[input]
source = "ideal"
[output]
load = "1M"
[[stage]]
id = "fz"
knobs = { trim1 = %g, trim2 = %g, gain = %g }
parts = [
  { ref = "R0",  kind = "resistor",  value = "10k",  pins = ["in", "i1"] },
  { ref = "C1",  kind = "capacitor", value = "1u",   pins = ["i1", "b1"] },
  { ref = "Q1",  %s, pins = { c = "c1", b = "b1", e = "gnd" } },
  { ref = "R1",  kind = "resistor",  value = %q,     pins = ["t1", "c1"] },
  { ref = "TR1", kind = "pot", value = "50k", knob = "trim1", adjusts = "Q1", pins = { ccw = "v+", wiper = "t1" } },
  { ref = "Q2",  %s, pins = { c = "c2", b = "c1", e = "e2" } },
  { ref = "R2",  kind = "resistor",  value = %q,     pins = ["t2", "c2"] },
  { ref = "TR2", kind = "pot", value = "10k", knob = "trim2", adjusts = "Q2", pins = { ccw = "v+", wiper = "t2" } },
  { ref = "R3",  kind = "resistor",  value = %q,     pins = ["e2", "gnd"] },
  { ref = "VR1", kind = "pot", value = "1k", knob = "gain", pins = { ccw = "fz", wiper = "fz", cw = "e2" } },
  { ref = "C2",  kind = "capacitor", value = "47u",  pins = ["fz", "gnd"] },
  { ref = "R4",  kind = "resistor",  value = %q,     pins = ["e2", "b1"] },
  { ref = "C3",  kind = "capacitor", value = "100n", pins = ["c2", "out"] },
  { ref = "R5",  kind = "resistor",  value = "470k", pins = ["out", "gnd"] },
]
`, p.Vcc, p.Trim1, p.Trim2, p.Gain, dev(p.Beta1), p.R1, dev(p.Beta2), p.R2, p.R3, p.R4)
}

func (p pairChain) parse(t testing.TB) *chains.Chain {
	t.Helper()
	ch, err := chains.Parse("pair.toml", p.toml())
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// An independent nodal solver: Kirchhoff's current law at every free node
// with Ebers–Moll transistors written out here from the transport
// equations (Ebers & Moll 1954; the chain-file core's statement of them)
// and the collector–base leakage law the device model documents, solved by
// damped Newton with a central-difference Jacobian and gonum's dense LU.

type refRes struct {
	a, b string
	r    float64
}

type refBJT struct {
	c, b, e              string
	is, bf, br, icbo, vt float64
	pnp                  bool
}

// currents returns the currents into the collector and base.
func (q refBJT) currents(vc, vb, ve float64) (ic, ib float64) {
	s := 1.0
	if q.pnp {
		s = -1
	}
	vbe, vbc := s*(vb-ve), s*(vb-vc)
	ef, er := math.Exp(vbe/q.vt), math.Exp(vbc/q.vt)
	icn := q.is*(ef-er) - q.is/q.br*(er-1)
	ibn := q.is/q.bf*(ef-1) + q.is/q.br*(er-1)
	if q.icbo != 0 {
		leak := q.icbo * (1 - er)
		if vbc > 0 {
			leak = -q.icbo * vbc / q.vt
		}
		icn += leak
		ibn -= leak
	}
	return s * icn, s * ibn
}

type refNet struct {
	fixed map[string]float64
	res   []refRes
	bjts  []refBJT
}

func (n *refNet) solve(t *testing.T) map[string]float64 {
	t.Helper()
	var free []string
	idx := map[string]int{}
	add := func(s string) {
		if _, ok := n.fixed[s]; ok {
			return
		}
		if _, ok := idx[s]; !ok {
			idx[s] = len(free)
			free = append(free, s)
		}
	}
	for _, r := range n.res {
		add(r.a)
		add(r.b)
	}
	for _, q := range n.bjts {
		add(q.c)
		add(q.b)
		add(q.e)
	}
	x := make([]float64, len(free))
	volt := func(x []float64, s string) float64 {
		if v, ok := n.fixed[s]; ok {
			return v
		}
		return x[idx[s]]
	}
	resid := func(x []float64) []float64 {
		f := make([]float64, len(x))
		leave := func(s string, i float64) {
			if k, ok := idx[s]; ok {
				f[k] += i
			}
		}
		for _, r := range n.res {
			i := (volt(x, r.a) - volt(x, r.b)) / r.r
			leave(r.a, i)
			leave(r.b, -i)
		}
		for _, q := range n.bjts {
			ic, ib := q.currents(volt(x, q.c), volt(x, q.b), volt(x, q.e))
			leave(q.c, ic)
			leave(q.b, ib)
			leave(q.e, -ic-ib)
		}
		return f
	}
	m := len(x)
	for it := 0; it < 2000; it++ {
		f := resid(x)
		jac := mat.NewDense(m, m, nil)
		const h = 1e-7
		for j := 0; j < m; j++ {
			xp := append([]float64(nil), x...)
			xm := append([]float64(nil), x...)
			xp[j] += h
			xm[j] -= h
			fp, fm := resid(xp), resid(xm)
			for i := 0; i < m; i++ {
				jac.Set(i, j, (fp[i]-fm[i])/(2*h))
			}
		}
		var dx mat.VecDense
		if err := dx.SolveVec(jac, mat.NewVecDense(m, f)); err != nil {
			t.Fatalf("independent solve: %v", err)
		}
		step := 0.0
		for i := 0; i < m; i++ {
			step = math.Max(step, math.Abs(dx.AtVec(i)))
		}
		scale := 1.0
		if step > 0.05 { // damping: at most 50 mV per node per iteration
			scale = 0.05 / step
		}
		for i := 0; i < m; i++ {
			x[i] -= scale * dx.AtVec(i)
		}
		if step < 1e-12 {
			out := map[string]float64{}
			for k, v := range n.fixed {
				out[k] = v
			}
			for i, s := range free {
				out[s] = x[i]
			}
			return out
		}
	}
	t.Fatal("independent solve did not converge")
	return nil
}
