package mna_test

import (
	"fmt"
	"math"
	"math/cmplx"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// ctTransformer is a 1 H primary and a centre-tapped secondary as two
// 2.25 H windings (each half 1.5 times the primary's turns), coupling
// 0.98, with winding resistances.
func ctTransformer() models.TransformerParams {
	return models.TransformerParams{Coupling: 0.98, Windings: []models.Winding{{Inductance: 1, Resistance: 50}, {Inductance: 2.25, Resistance: 30}, {Inductance: 2.25, Resistance: 35}}}
}

// TestTransformerImpedanceMatrix proves the transformer route of AddPart
// (leakage, magnetising inductance and an ideal transformer of ratios
// √(Li/L1)) against the coupled-inductor equations it stands for: with
// every winding's end on ground, driving winding j alone through a 1 Ω
// sense resistor with the others open, the open voltages are
// V_i = Z_ij·I_j with
//
//	Z_jj = R_j + jω·L_j,   Z_ij = jω·k·√(L_i·L_j)
//
// (the mutual inductance of coupled coils, M = k·√(L1·L2): e.g. Alexander
// & Sadiku, "Fundamentals of Electric Circuits", magnetically coupled
// circuits; from memory). Every entry of the 3×3 matrix is checked from
// 10 Hz (magnetising current: Z_11 ≈ R_1) to 10 kHz (turns ratio: the
// open-circuit voltage ratio V_i/V_j → k·√(L_i/L_j)). Tolerance 1e-9
// relative: a complex linear solve of 14 unknowns with entries within
// 1e6 of each other.
func TestTransformerImpedanceMatrix(t *testing.T) {
	p := ctTransformer()
	k := p.Coupling
	w := p.Windings
	freqs := []float64{10, 100, 1e3, 10e3}
	worst := 0.0
	for j := range w {
		n := newNet()
		n.Sig("VIN", "s", 0)
		n.R("RS", "s", "p1", 1)
		var pins []string
		for i := range w {
			start := fmt.Sprint("w", i+1)
			if i == j {
				start = "p1"
			}
			pins = append(pins, start, "gnd")
		}
		n.part(t, models.Element{Ref: "T1", Kind: models.TransformerKind, Transformer: p}, pins...)
		op, err := mna.SolveDC(n.c, mna.DCOptions{})
		if err != nil {
			t.Fatal(err)
		}
		probes := []int{n.c.Lookup("p1")}
		for i := range w {
			probes = append(probes, n.c.Lookup(pins[2*i]))
		}
		h, err := mna.AC(n.c, op, freqs, probes)
		if err != nil {
			t.Fatal(err)
		}
		for fi, f := range freqs {
			om := 2 * math.Pi * f
			ij := (1 - h[fi][0]) / 1 // through the 1 Ω sense resistor
			for i := range w {
				want := complex(0, om*k*math.Sqrt(w[i].Inductance*w[j].Inductance))
				if i == j {
					want = complex(w[j].Resistance, om*w[j].Inductance)
				}
				got := h[fi][i+1] / ij
				e := cRelErr(got, want)
				worst = math.Max(worst, e)
				if e > 1e-9 {
					t.Errorf("drive %d, %g Hz: Z[%d][%d] = %v, coupled inductors %v (rel err %.2g)", j+1, f, i+1, j+1, got, want, e)
				}
			}
			if j == 0 && f == 10e3 {
				r := cmplx.Abs(h[fi][2] / h[fi][1])
				t.Logf("10 kHz open-circuit ratio V2/V1 = %.5f (k·√(L2/L1) = %.5f)", r, k*1.5)
			}
		}
	}
	t.Logf("worst relative error of the impedance matrix %.2g (tolerance 1e-9)", worst)
}

// TestTransformerLeakage: with the secondary shorted (through its small
// winding resistance) the primary sees the coupled-inductor input
// impedance Z = R1 + jωL1 + (ωM)²/(R2 + jωL2) (the reflected impedance,
// Alexander & Sadiku, magnetically coupled circuits; from memory), which
// for R → 0 is the leakage inductance referred to the primary,
// jω·L1·(1 − k²). Tolerance 1e-9 relative against the exact form; the
// leakage approximation is logged (off by R2/(ωL2) ≈ 1e-5 here).
func TestTransformerLeakage(t *testing.T) {
	const l1, l2, k, r2 = 0.5, 8.0, 0.995, 1e-3
	n := newNet()
	n.Sig("VIN", "s", 0)
	n.R("RS", "s", "p1", 1)
	n.part(t, models.Element{Ref: "T1", Kind: models.TransformerKind, Transformer: models.TransformerParams{Coupling: k,
		Windings: []models.Winding{{Inductance: l1}, {Inductance: l2, Resistance: r2}}}}, "p1", "gnd", "gnd", "gnd")
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	freqs := []float64{100, 1e3, 10e3}
	h, err := mna.AC(n.c, op, freqs, []int{n.c.Lookup("p1")})
	if err != nil {
		t.Fatal(err)
	}
	m := k * math.Sqrt(l1*l2)
	for i, f := range freqs {
		om := 2 * math.Pi * f
		z := h[i][0] / (1 - h[i][0])
		want := complex(0, om*l1) + complex(om*om*m*m, 0)/complex(r2, om*l2)
		if e := cRelErr(z, want); e > 1e-9 {
			t.Errorf("%g Hz: Z = %v, reflected-impedance form %v (rel err %.2g)", f, z, want, e)
		}
		leak := complex(0, om*l1*(1-k*k))
		t.Logf("%g Hz: Z = %.6g∠%.4f°, leakage jωL1(1 − k²) = %.6g (rel diff %.2g)", f, cmplx.Abs(z), cmplx.Phase(z)*180/math.Pi, imag(leak), cRelErr(z, leak))
	}
}

// TestTransformerDC: a transformer passes no DC. A 1 V source through
// 100 Ω into the primary (winding resistance 50 Ω) drives the current
// 1/(100 + 50) A through it, and the loaded secondary sits at 0 V (the
// magnetising inductance shorts the ideal transformer at DC). Tolerance
// 1e-12 (absolute volts, relative amperes): one linear solve.
func TestTransformerDC(t *testing.T) {
	n := newNet()
	n.V("V1", "s", "gnd", 1)
	n.R("RS", "s", "p1", 100)
	n.part(t, models.Element{Ref: "T1", Kind: models.TransformerKind, Transformer: ctTransformer()}, "p1", "gnd", "a", "ct", "ct", "b")
	n.R("RA", "a", "ct", 1e3)
	n.R("RB", "b", "ct", 1e3)
	n.R("RCT", "ct", "gnd", 1e3)
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	i := (1 - op.Node[n.c.Lookup("p1")]) / 100
	if relErr(i, 1.0/150) > 1e-12 {
		t.Errorf("primary DC current %g A, want 1/150 A", i)
	}
	for _, s := range []string{"a", "b", "ct"} {
		if v := op.Node[n.c.Lookup(s)]; math.Abs(v) > 1e-12 {
			t.Errorf("secondary node %s at %g V DC, want 0", s, v)
		}
	}
}
