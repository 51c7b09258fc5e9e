package mna_test

import (
	"math"
	"math/cmplx"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// solveDense solves a·x = b (n×n, row-major, complex) by Gaussian
// elimination with partial pivoting, in place; written here so that the
// reference below shares no code with the package under test.
func solveDense(n int, a, b []complex128) {
	for c := 0; c < n; c++ {
		p := c
		for r := c + 1; r < n; r++ {
			if cmplx.Abs(a[r*n+c]) > cmplx.Abs(a[p*n+c]) {
				p = r
			}
		}
		for k := 0; k < n; k++ {
			a[c*n+k], a[p*n+k] = a[p*n+k], a[c*n+k]
		}
		b[c], b[p] = b[p], b[c]
		for r := c + 1; r < n; r++ {
			f := a[r*n+c] / a[c*n+c]
			for k := c; k < n; k++ {
				a[r*n+k] -= f * a[c*n+k]
			}
			b[r] -= f * b[c]
		}
	}
	for r := n - 1; r >= 0; r-- {
		s := b[r]
		for k := r + 1; k < n; k++ {
			s -= a[r*n+k] * b[k]
		}
		b[r] = s / a[r*n+r]
	}
}

// TestCommonEmitterMiller: a common-emitter stage whose transistor has
// every second-order value of the si-npn family (base resistance, Early
// voltage, junction capacitances, transit time), fed from a 10 kΩ source,
// against an independent complex nodal analysis of its hybrid-π
// equivalent written out here (Sedra & Smith, "Microelectronic Circuits",
// the high-frequency hybrid-π model and the common-emitter stage's
// response; from memory):
//
//	source ─ Rs ─ b ─ rb ─ b′ ─ (rπ ∥ Cπ) ─ e
//	                       b′ ─ Cμ ─ c,   c ─ (gm·vb′e, ro, Rc) ─ e
//
// with the element values computed here from the stated device equations
// at the solved operating point: gm = ∂Ic/∂Vbe, 1/rπ = ∂Ib/∂Vbe,
// 1/ro = ∂Ic/∂Vce = Is·e^(Vbe/Vt)/VA, Cπ = Cje(Vbe) + τF·Is·e^(Vbe/Vt)/Vt
// (the depletion law's tangent past FC·Vje), Cμ = Cjc(Vbc). The two must
// agree at every frequency from 100 Hz to 100 MHz and their −3 dB
// frequencies, where the Miller effect of Cμ sets the pole, within 1 %.
// Measured: the responses agree to about 4e-15 and the −3 dB frequencies
// to the bisection's resolution. Tolerance 1e-8 on the response (a few
// complex solves and exponentials, reverse-junction terms of e^−280 left
// out of the reference) and 1 % on the pole.
// The textbook Miller estimate fp = 1/(2π·R′·(Cπ + Cμ·(1 + gm·R′L))),
// R′ = rπ ∥ (Rs + rb), is logged: it neglects the output pole.
func TestCommonEmitterMiller(t *testing.T) {
	const rs, rc, vcc = 10e3, 4.7e3, 12.0
	p := *models.Presets["si-npn"].Complete().BJT
	p.Eg = 0
	n := newNet()
	n.V("VCC", "v+", "gnd", vcc)
	n.Sig("VIN", "s", 0.72)
	n.R("RS", "s", "b", rs)
	n.R("RC", "v+", "c", rc)
	n.part(t, models.Element{Ref: "Q1", Kind: models.BJTKind, BJT: p}, "c", "b", "gnd")
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	vt := vtRef(tnom)
	vbe := op.Node[n.c.Lookup("Q1#base")]
	vce := op.Node[n.c.Lookup("c")]
	vbc := vbe - vce
	if vce < 1 || vbe < 0.5 {
		t.Fatalf("not in forward activity: Vbe %g, Vce %g", vbe, vce)
	}
	// Hybrid-π elements from the stated equations (forward activity: the
	// e^(Vbc/Vt) terms are below 1e-120 and left out).
	ef := p.Is * math.Exp(vbe/vt)
	k := 1 - vbc/p.EarlyVoltage
	gm := ef/vt*k - ef/p.EarlyVoltage // ∂/∂Vbe of Is·e^(Vbe/Vt)·(1 − (Vbe − Vce)/VA)
	gpi := ef / (p.BetaF * vt)
	gout := ef / p.EarlyVoltage
	fc := models.DefaultForwardFraction
	var cje float64
	if vbe >= fc*p.BE.Potential {
		cje = p.BE.C0 / math.Pow(1-fc, 1+p.BE.Grading) * (1 - fc*(1+p.BE.Grading) + p.BE.Grading*vbe/p.BE.Potential)
	} else {
		cje = p.BE.C0 / math.Pow(1-vbe/p.BE.Potential, p.BE.Grading)
	}
	cpi := cje + p.TransitTime*ef/vt
	cmu := p.BC.C0 / math.Pow(1-vbc/p.BC.Potential, p.BC.Grading)
	rb := p.BaseResistance
	ref := func(f float64) complex128 {
		w := 2 * math.Pi * f
		ypi := complex(gpi, w*cpi)
		ymu := complex(0, w*cmu)
		// Unknowns b, b′, c; the source is 1 V.
		a := []complex128{
			complex(1/rs+1/rb, 0), complex(-1/rb, 0), 0,
			complex(-1/rb, 0), complex(1/rb, 0) + ypi + ymu, -ymu,
			0, complex(gm, 0) - ymu, complex(1/rc+gout, 0) + ymu,
		}
		b := []complex128{complex(1/rs, 0), 0, 0}
		solveDense(3, a, b)
		return b[2]
	}
	freqs := logspace(100, 100e6, 61)
	out := n.c.Lookup("c")
	h, err := mna.AC(n.c, op, freqs, []int{out})
	if err != nil {
		t.Fatal(err)
	}
	worst := compareResponse(t, "against the hybrid-π", freqs, h, ref, 1e-8)
	// −3 dB frequencies by bisection on |H|² = |H(100 Hz)|²/2.
	f3 := func(hf func(float64) complex128) float64 {
		h0 := cmplx.Abs(hf(100))
		lo, hi := 100.0, 100e6
		for k := 0; k < 200 && hi/lo > 1+1e-12; k++ {
			mid := math.Sqrt(lo * hi)
			if cmplx.Abs(hf(mid)) > h0/math.Sqrt2 {
				lo = mid
			} else {
				hi = mid
			}
		}
		return math.Sqrt(lo * hi)
	}
	fMNA := f3(func(f float64) complex128 {
		r, err := mna.AC(n.c, op, []float64{f}, []int{out})
		if err != nil {
			t.Fatal(err)
		}
		return r[0][0]
	})
	fRef := f3(ref)
	if e := relErr(fMNA, fRef); e > 0.01 {
		t.Errorf("−3 dB at %.1f Hz, hybrid-π %.1f Hz (rel err %.2g > 1 %%)", fMNA, fRef, e)
	}
	rl := 1 / (1/rc + gout)
	rp := 1 / (gpi + 1/(rs+rb))
	miller := 1 / (2 * math.Pi * rp * (cpi + cmu*(1+gm*rl)))
	t.Logf("Ic %.4g mA, gain %.1f, Cπ %.3g pF, Cμ %.3g pF; −3 dB: AC %.1f Hz, hybrid-π %.1f Hz (rel %.2g), Miller estimate %.1f Hz; worst response error %.2g",
		op.Devices[0].I[1]*1e3, cmplx.Abs(h[0][0]), cpi*1e12, cmu*1e12, fMNA, fRef, relErr(fMNA, fRef), miller, worst)
}

// TestCommonEmitterTransientCharges: the stage of TestCommonEmitterMiller
// in the transient reference, driven by a 50 µV sine at its −3 dB
// frequency region (68 kHz, sampled at 100 points a period): the complex
// gain of the settled output (a one-bin DFT over the last 5 periods, after
// 15) must match mna.AC's, which checks the transistor's two-port charges
// in the time domain against the small-signal analysis. Tolerance 0.5 %:
// the bilinear transform moves a pole at f by about (π·f/fs)²/3 ≈ 3e-4
// relative, the 50 µV drive leaves harmonics near 1e-3 of the output, and
// the DFT window holds whole periods.
func TestCommonEmitterTransientCharges(t *testing.T) {
	p := *models.Presets["si-npn"].Complete().BJT
	p.Eg = 0
	n := newNet()
	n.V("VCC", "v+", "gnd", 12)
	n.Sig("VIN", "s", 0.72)
	n.R("RS", "s", "b", 10e3)
	n.R("RC", "v+", "c", 4.7e3)
	n.part(t, models.Element{Ref: "Q1", Kind: models.BJTKind, BJT: p}, "c", "b", "gnd")
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	const f, per, amp = 68e3, 100, 50e-6
	fs := f * per
	out := n.c.Lookup("c")
	h, err := mna.AC(n.c, op, []float64{f}, []int{out})
	if err != nil {
		t.Fatal(err)
	}
	tr := mna.NewTransient(n.c, fs, op)
	var acc complex128
	for k := 1; k <= 20*per; k++ {
		ph := 2 * math.Pi * float64(k) / per
		if _, err := tr.Step(amp * math.Sin(ph)); err != nil {
			t.Fatal(err)
		}
		if k > 15*per {
			acc += complex(tr.Voltage(out)-op.Node[out], 0) * cmplx.Exp(complex(0, -ph))
		}
	}
	// x(k) = Re(G·amp·e^(j(ph − π/2))) gives Σ x·e^(−j·ph) = G·amp·e^(−jπ/2)·N/2.
	got := acc / complex(5*per/2, 0) / complex(0, -amp)
	if e := cRelErr(got, h[0][0]); e > 5e-3 {
		t.Errorf("transient gain %v, AC %v (rel err %.2g > 0.5 %%)", got, h[0][0], e)
	}
	t.Logf("68 kHz: transient %.4f∠%.2f°, AC %.4f∠%.2f° (rel err %.2g)", cmplx.Abs(got), cmplx.Phase(got)*180/math.Pi,
		cmplx.Abs(h[0][0]), cmplx.Phase(h[0][0])*180/math.Pi, cRelErr(got, h[0][0]))
}
