package mna_test

import (
	"math"
	"math/cmplx"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// A mode satisfies its defining equation, and its shape follows the
// circuit's symmetry. RC low-pass (R from the source to "out", C to
// ground): the one pole's mode moves only "out" (the source node is held).
// Cross-coupled NPN pair (see TestPolesOfCrossCoupledPair): the growing
// pair is the differential mode, so the two collectors move equal and
// opposite (v(c1) = −v(c2)) and the joined emitters stay put (an AC
// ground in the differential mode; Sedra & Smith, "Microelectronic
// Circuits", the differential pair's half-circuit). Tolerance 1e-6:
// inverse iteration with a shift 1e-9 from the pole leaves other modes
// far smaller; the residual ‖(G + s·C)·x‖ is bounded by rounding times the
// matrix norm.
func TestMode(t *testing.T) {
	t.Run("RC low-pass", func(t *testing.T) {
		n := newNet()
		n.Sig("src", "in", 0)
		n.R("R1", "in", "out", 10e3)
		n.C("C1", "out", "gnd", 22e-9)
		op, _ := mna.SolveDC(n.c, mna.DCOptions{})
		st, _ := mna.Poles(n.c, op)
		x, err := mna.Mode(n.c, op, st.Poles[0])
		if err != nil {
			t.Fatal(err)
		}
		in, out := n.c.Lookup("in")-1, n.c.Lookup("out")-1
		if cmplx.Abs(x[out]-1) > 1e-6 || cmplx.Abs(x[in]) > 1e-6 {
			t.Fatalf("mode %v: want out 1, in 0", x)
		}
	})
	t.Run("cross-coupled pair: differential", func(t *testing.T) {
		n := crossCoupledPair(10e-3, 10e-9, 2e3)
		op, err := mna.SolveDC(n.c, mna.DCOptions{})
		if err != nil {
			t.Fatal(err)
		}
		st, _ := mna.Poles(n.c, op)
		if len(st.Unstable) == 0 {
			t.Fatal("the pair should oscillate")
		}
		x, err := mna.Mode(n.c, op, st.Unstable[0])
		if err != nil {
			t.Fatal(err)
		}
		c1, c2, e := x[n.c.Lookup("c1")-1], x[n.c.Lookup("c2")-1], x[n.c.Lookup("e")-1]
		if cmplx.Abs(c1+c2) > 1e-6 || cmplx.Abs(e) > 1e-6 || math.Abs(cmplx.Abs(c1)-1) > 1e-6 {
			t.Fatalf("c1 %v, c2 %v, e %v: want c1 = −c2 of size 1, e = 0", c1, c2, e)
		}
		// The defining equation, (G + s·C)·x = 0, relative to ‖G‖·‖x‖.
		ss := mna.Linearize(n.c, op)
		dim := ss.Layout.Dim
		s := st.Unstable[0]
		gmax := 0.0
		for _, v := range ss.G {
			gmax = math.Max(gmax, math.Abs(v))
		}
		for i := 0; i < dim; i++ {
			var r complex128
			for j := 0; j < dim; j++ {
				r += (complex(ss.G[i*dim+j], 0) + s*complex(ss.C[i*dim+j], 0)) * x[j]
			}
			if cmplx.Abs(r) > 1e-6*gmax {
				t.Fatalf("row %d: residual %v against ‖G‖ %g", i, r, gmax)
			}
		}
	})
}

// crossCoupledPair builds the oscillator of TestPolesOfCrossCoupledPair:
// two NPN transistors, each base on the other's collector, each collector
// loaded by L ∥ C ∥ rp to a 9 V supply, emitters joined on 168 kΩ.
func crossCoupledPair(l, c, rp float64) *netlist {
	q := models.BJTParams{Is: 1e-14, BetaF: 200, BetaR: 2}
	n := newNet()
	n.V("vcc", "v+", "gnd", 9)
	n.Sig("src", "in", 0)
	n.R("Rin", "in", "gnd", 1e3)
	for _, side := range []struct{ c, other string }{{"c1", "c2"}, {"c2", "c1"}} {
		n.L("L"+side.c, "v+", side.c, l)
		n.C("C"+side.c, side.c, "gnd", c)
		n.R("R"+side.c, "v+", side.c, rp)
		n.Q("Q"+side.c, side.c, side.other, "e", q)
	}
	n.R("Rtail", "e", "gnd", 168e3)
	return n
}
