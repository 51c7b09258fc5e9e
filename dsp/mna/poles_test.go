package mna_test

import (
	"math"
	"math/cmplx"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// rlcPoles returns the roots of C·s² + G·s + 1/L = 0, the natural
// frequencies of a parallel RLC tank of net conductance G (textbook
// second-order characteristic equation), the one with Im s ≥ 0 first.
func rlcPoles(g, c, l float64) (complex128, complex128) {
	d := cmplx.Sqrt(complex(g*g-4*c/l, 0))
	return (complex(-g, 0) + d) / complex(2*c, 0), (complex(-g, 0) - d) / complex(2*c, 0)
}

func TestPolesOfPassiveNetworks(t *testing.T) {
	// Tolerance 1e-9 relative: the eigenvalues of a well-scaled dense
	// matrix are accurate to a small multiple of rounding times its
	// condition (Golub & Van Loan, sec. 7.2.2); these networks are small.
	const tol = 1e-9
	t.Run("RC low-pass: one pole at -1/RC", func(t *testing.T) {
		n := newNet()
		n.Sig("src", "in", 0)
		n.R("R1", "in", "out", 10e3)
		n.C("C1", "out", "gnd", 22e-9)
		st := poles(t, n.c)
		want := complex(-1/(10e3*22e-9), 0)
		if len(st.Poles) != 1 || cmplx.Abs(st.Poles[0]-want) > tol*cmplx.Abs(want) {
			t.Fatalf("poles %v, want [%v]", st.Poles, want)
		}
		if len(st.Unstable) != 0 {
			t.Fatalf("a passive RC reported unstable: %v", st.Unstable)
		}
	})
	t.Run("series RLC: s = -R/2L ± j·sqrt(1/LC - (R/2L)^2)", func(t *testing.T) {
		const r, l, c = 100.0, 10e-3, 100e-9
		n := newNet()
		n.Sig("src", "in", 0)
		n.R("R1", "in", "a", r)
		n.L("L1", "a", "b", l)
		n.C("C1", "b", "gnd", c)
		st := poles(t, n.c)
		alpha := r / (2 * l)
		want := complex(-alpha, math.Sqrt(1/(l*c)-alpha*alpha))
		if len(st.Poles) != 1 || cmplx.Abs(st.Poles[0]-want) > tol*cmplx.Abs(want) {
			t.Fatalf("poles %v, want [%v] (one of the conjugate pair)", st.Poles, want)
		}
	})
}

// TestPolesOfCrossCoupledPair checks an active circuit against the
// hybrid-π closed form. Two NPN transistors cross-coupled (each base on the
// other's collector), each collector loaded by L ∥ C ∥ Rp to the supply,
// emitters joined on a tail resistor. In the differential mode the emitters
// are an AC ground, and each collector node sees its tank, the collector
// current −gm·v of the transistor it does not drive, and the base input
// conductance gπ of the one it does: a parallel RLC of net conductance
// G = 1/Rp − gm + gπ (the negative-resistance LC oscillator of textbooks,
// e.g. Razavi, "Design of Analog CMOS Integrated Circuits", 2nd ed.,
// sec. 15.2.3, with gm = Ic/Vt and gπ = Ib/Vt for the bipolar pair, Sedra
// & Smith, "Microelectronic Circuits", the hybrid-π model). With little
// tank loss the differential pole pair lies right of the imaginary axis
// (the circuit oscillates near 1/(2π·sqrt(LC))); with a heavy load it lies
// left of it.
func TestPolesOfCrossCoupledPair(t *testing.T) {
	const l, c = 10e-3, 10e-9
	for _, tc := range []struct {
		name     string
		rp       float64
		unstable bool
	}{
		{"light load oscillates", 2e3, true},
		{"heavy load is stable", 500, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			n := crossCoupledPair(l, c, tc.rp)
			op, err := mna.SolveDC(n.c, mna.DCOptions{})
			if err != nil {
				t.Fatal(err)
			}
			vt := vtRef(tnom)
			ib, ic := op.Devices[0].I[0], op.Devices[0].I[1]
			gm, gpi := ic/vt, ib/vt
			g := 1/tc.rp - gm + gpi
			want, _ := rlcPoles(g, c, l)
			st := poles(t, n.c)
			found := false
			for _, s := range st.Poles {
				// 1e-4 relative: gm = Ic/Vt neglects the reverse junction's
				// slope at Vbc = 0 (Is/Vt against Ic/Vt, about 1e-9 here) and
				// the common-mode pair is a different, damped pole.
				if cmplx.Abs(s-want) < 1e-4*cmplx.Abs(want) {
					found = true
				}
			}
			if !found {
				t.Fatalf("no pole near the closed form %v (G = %.4g S); poles: %v", want, g, st.Poles)
			}
			if got := len(st.Unstable) > 0; got != tc.unstable {
				t.Fatalf("unstable = %v (%v), want %v", got, st.Unstable, tc.unstable)
			}
			if tc.unstable {
				f := mna.PoleHz(st.Unstable[0])
				f0 := 1 / (2 * math.Pi * math.Sqrt(l*c))
				if math.Abs(f-f0)/f0 > 0.05 {
					t.Fatalf("oscillates near %.0f Hz; the tank resonates at %.0f Hz", f, f0)
				}
			}
		})
	}
}

func poles(t *testing.T, c *models.Circuit) *mna.Stability {
	t.Helper()
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	st, err := mna.Poles(c, op)
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// TestPolesOfNegativeConductanceTank checks the parallel RLC tank with a
// voltage-controlled current source wired as a negative conductance −gm
// against the roots of C·s² + (1/R − gm)·s + 1/L = 0 (the characteristic
// equation of a parallel RLC, any circuits textbook). gm below 1/R damps
// the tank; gm above it makes the pair grow: the circuit oscillates at
// close to 1/(2π·sqrt(LC)).
func TestPolesOfNegativeConductanceTank(t *testing.T) {
	const r, l, c = 10e3, 100e-3, 100e-9
	for _, tc := range []struct {
		gm       float64
		unstable bool
	}{{0.5 / r, false}, {0.9 / r, false}, {1.1 / r, true}, {2 / r, true}} {
		n := newNet()
		n.Sig("src", "in", 0)
		n.R("Rin", "in", "a", 1e9)
		n.R("R", "a", "gnd", r)
		n.L("L", "a", "gnd", l)
		n.C("C", "a", "gnd", c)
		// out+ = gnd, out− = a, controlled by V(a): gm·V(a) flows from
		// ground into node a.
		n.add(models.ControlledCurrentKind, "G", tc.gm, "gnd", "a", "a", "gnd")
		st := poles(t, n.c)
		want, _ := rlcPoles(1/r+1/1e9-tc.gm, c, l)
		// 1e-9 relative, as for the passive networks.
		if len(st.Poles) != 1 || cmplx.Abs(st.Poles[0]-want) > 1e-9*cmplx.Abs(want) {
			t.Fatalf("gm %.3g S: poles %v, want [%v]", tc.gm, st.Poles, want)
		}
		if got := len(st.Unstable) == 1; got != tc.unstable {
			t.Fatalf("gm %.3g S: unstable %v, want %v", tc.gm, got, tc.unstable)
		}
	}
}
