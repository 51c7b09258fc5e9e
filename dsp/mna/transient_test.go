package mna_test

import (
	"math"
	"math/cmplx"
	"testing"

	"renderchain/dsp/mna"
)

// rcNet is the RC low-pass of the transient tests: τ = 10 kΩ · 100 nF = 1 ms.
func rcNet() (*netlist, float64) {
	const r, c = 10e3, 100e-9
	n := newNet()
	n.Sig("VIN", "in", 0)
	n.R("R1", "in", "out", r)
	n.C("C1", "out", "gnd", c)
	return n, r * c
}

// TestTransientRCStep: a unit step into the RC low-pass at fs = 48 kHz.
//
// (1) The trapezoidal companion model turns dv/dt = (u − v)/τ into the
// bilinear difference equation
//
//	v[n] = ((1 − a)·v[n−1] + a·(u[n] + u[n−1]))/(1 + a),  a = h/(2τ)
//
// (Chua & Lin 1975, ch. 13; the bilinear transform s → (2/h)(1 − z⁻¹)/(1 + z⁻¹)),
// evaluated here directly. Tolerance 1e-12 V: both sides are the same
// linear recurrence, computed along different roundings, and Newton stops
// on a 1e-12 V step.
//
// (2) Against the continuous solution. The samples u[0] = 0, u[n≥1] = 1
// are, for the trapezoidal rule, a ramp from 0 to 1 over the first step
// and then a constant, whose exact response is
// v(t) = 1 − (τ/h)·(e^(h/τ) − 1)·e^(−t/τ) for t ≥ h. The trapezoidal rule's
// error constant is 1/12 (Dahlquist & Björck, "Numerical Methods", 1974,
// sec. 8.3; from memory): expanding both solutions gives
// |error| ≤ (h/τ)²/12·(1 + h/τ) for every n ≥ 1. Against the ideal step
// 1 − e^(−t/τ) the error is instead about h/(2τ) (the half-sample the ramp
// delays it by), logged for reference.
func TestTransientRCStep(t *testing.T) {
	const fs = 48000.0
	n, tau := rcNet()
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	tr := mna.NewTransient(n.c, fs, op)
	out := n.c.Lookup("out")
	h := 1 / fs
	a := h / (2 * tau)
	bound := (h / tau) * (h / tau) / 12 * (1 + h/tau)
	k := tau / h * math.Expm1(h/tau)
	var v, uPrev float64
	worstRec, worstAna, worstStep := 0.0, 0.0, 0.0
	for i := 1; i <= 10*48; i++ { // ten time constants
		if _, err := tr.Step(1); err != nil {
			t.Fatalf("step %d: %v", i, err)
		}
		got := tr.Voltage(out)
		v = ((1-a)*v + a*(1+uPrev)) / (1 + a)
		uPrev = 1
		tn := float64(i) * h
		ana := 1 - k*math.Exp(-tn/tau)
		worstRec = math.Max(worstRec, math.Abs(got-v))
		worstAna = math.Max(worstAna, math.Abs(got-ana))
		worstStep = math.Max(worstStep, math.Abs(got-(1-math.Exp(-tn/tau))))
		if math.Abs(got-v) > 1e-12 {
			t.Fatalf("n=%d: v = %.15g, bilinear recurrence %.15g", i, got, v)
		}
		if math.Abs(got-ana) > bound {
			t.Fatalf("n=%d: v = %.12g, exact %.12g (err %.3g > bound %.3g)", i, got, ana, math.Abs(got-ana), bound)
		}
	}
	t.Logf("h/τ = %.4g: recurrence err %.2g (tol 1e-12), continuous err %.3g (bound (h/τ)²/12·(1+h/τ) = %.3g), vs ideal step %.3g (h/2τ = %.3g)",
		h/tau, worstRec, worstAna, bound, worstStep, h/(2*tau))
}

// TestTransientBilinearWarping: in steady state a sine of frequency f
// through the trapezoidal RC low-pass has the gain of the analogue filter
// at the prewarped frequency, H = 1/(1 + jRC·(2/h)·tan(πf·h)) (the
// frequency warping of the bilinear transform: Oppenheim & Schafer,
// "Discrete-Time Signal Processing", bilinear transformation; from
// memory). Measured by a DFT over 10 whole periods after 100 τ, when the
// start-up transient is below e^(−90). Tolerance 1e-9 relative.
func TestTransientBilinearWarping(t *testing.T) {
	const fs, f = 48000.0, 1000.0
	n, tau := rcNet()
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	tr := mna.NewTransient(n.c, fs, op)
	out := n.c.Lookup("out")
	const settle, span = 4800, 480
	var num, den complex128
	for i := 1; i <= settle+span; i++ {
		u := math.Sin(2 * math.Pi * f * float64(i) / fs)
		if _, err := tr.Step(u); err != nil {
			t.Fatal(err)
		}
		if i > settle {
			w := cmplx.Exp(complex(0, -2*math.Pi*f*float64(i)/fs))
			num += complex(tr.Voltage(out), 0) * w
			den += complex(u, 0) * w
		}
	}
	got := num / den
	h := 1 / fs
	want := 1 / complex(1, tau*2/h*math.Tan(math.Pi*f*h))
	analogue := 1 / complex(1, 2*math.Pi*f*tau)
	if e := cRelErr(got, want); e > 1e-9 {
		t.Errorf("steady-state gain %v, bilinear %v (rel err %.2g)", got, want, e)
	} else {
		t.Logf("gain %.9f∠%.6f°: rel err %.2g against the warped response (the unwarped analogue differs by %.2g)",
			cmplx.Abs(got), cmplx.Phase(got)*180/math.Pi, e, cRelErr(got, analogue))
	}
}

// TestTransientDiodeResistor: without capacitors or inductors each
// transient step is a DC solve at the present input, so a diode in series
// with 1 kΩ driven by a 2 V sine must carry the Banwell–Jayakumar current
// at every sample. Tolerance 1e-9 relative plus 1e-13 A: Newton stops on
// a 1e-12 V step, which is 1e-15 A through 1 kΩ, and the reverse current
// (−Is = −2.5 nA) is exact.
func TestTransientDiodeResistor(t *testing.T) {
	n := newNet()
	n.Sig("VIN", "in", 0)
	n.R("R1", "in", "k", 1e3)
	p := siDiode()
	n.D("D1", "k", "gnd", p)
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	tr := mna.NewTransient(n.c, 48000, op)
	k := n.c.Lookup("k")
	nvt := p.N * vtRef(tnom)
	worst, maxIt := 0.0, 0
	for i := 1; i <= 480; i++ {
		u := 2 * math.Sin(2*math.Pi*100*float64(i)/48000)
		it, err := tr.Step(u)
		if err != nil {
			t.Fatalf("sample %d: %v", i, err)
		}
		maxIt = max(maxIt, it)
		got := (u - tr.Voltage(k)) / 1e3
		want := diodeSeriesCurrent(u, 1e3, p.Is, nvt)
		e := math.Abs(got - want)
		if e > 1e-9*math.Abs(want)+1e-13 {
			t.Fatalf("sample %d (u = %.4f V): I = %.12g A, Lambert-W %.12g A", i, u, got, want)
		}
		worst = math.Max(worst, e/(math.Abs(want)+1e-12))
	}
	t.Logf("worst relative current error %.2g, at most %d Newton iterations per sample", worst, maxIt)
}

// BenchmarkTransientStep times one sample of the reference solver on a
// common-emitter stage with coupling and bypass capacitors.
func BenchmarkTransientStep(b *testing.B) {
	n := ceStage(true)
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		b.Fatal(err)
	}
	tr := mna.NewTransient(n.c, 48000, op)
	k := 0
	for b.Loop() {
		if _, err := tr.Step(0.01 * math.Sin(float64(k)*0.13)); err != nil {
			b.Fatal(err)
		}
		k++
	}
}
