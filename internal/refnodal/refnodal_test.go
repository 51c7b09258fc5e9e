package refnodal

import (
	"math"
	"testing"
)

// A divider solves to Ohm's law exactly (within 1e-12 V), and a diode fed
// through a resistor satisfies its implicit closed form
// V = I·R + n·Vt·ln(1 + I/Is) (KVL with Shockley's law solved for the
// junction voltage) within 1e-12 relative.
func TestSolveClosedForms(t *testing.T) {
	n := New(map[string]float64{"v+": 9})
	n.R("v+", "a", 30e3)
	n.R("a", "gnd", 15e3)
	v, err := n.Solve(nil)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(v["a"]-3) > 1e-12 {
		t.Errorf("divider %g V, want 3 V", v["a"])
	}
	vt := Vt(298.15)
	n = New(map[string]float64{"v+": 5})
	n.R("v+", "k", 10e3)
	n.Diode(Diode{A: "k", K: "gnd", Is: 2.52e-9, N: 1.752, Vt: vt})
	v, err = n.Solve(map[string]float64{"k": 0.6})
	if err != nil {
		t.Fatal(err)
	}
	i := (5 - v["k"]) / 10e3
	if want := 1.752 * vt * math.Log1p(i/2.52e-9); math.Abs(v["k"]/want-1) > 1e-12 {
		t.Errorf("diode at %g V, implicit closed form %g V", v["k"], want)
	}
}

// The transistor's Early effect: in forward activity dIc/dVce = Ic/VA at
// Vbc → 0 (the output resistance ro = VA/Ic; Sedra & Smith, from memory),
// read by central difference within 1e-6 relative.
func TestEarlyConductance(t *testing.T) {
	q := BJT{Is: 1e-14, BF: 200, BR: 4, VA: 50, Vt: Vt(298.15)}
	const vbe, h = 0.65, 1e-4
	ic := func(vce float64) float64 { c, _ := q.Currents(vce, vbe, 0); return c }
	g := (ic(vbe+h) - ic(vbe-h)) / (2 * h)
	transport := q.Is * (math.Exp(vbe/q.Vt) - 1)
	if want := transport / q.VA; math.Abs(g/want-1) > 1e-6 {
		t.Errorf("output conductance %g S, Ic/VA %g S", g, want)
	}
}
