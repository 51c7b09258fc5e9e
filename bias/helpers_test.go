package bias

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

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
