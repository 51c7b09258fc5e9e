package mna_test

import (
	"math"
	"math/cmplx"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

func logspace(lo, hi float64, n int) []float64 {
	f := make([]float64, n)
	for k := range f {
		f[k] = lo * math.Pow(hi/lo, float64(k)/float64(n-1))
	}
	return f
}

func cRelErr(got, want complex128) float64 { return cmplx.Abs(got-want) / cmplx.Abs(want) }

// compareResponse checks the first probe of an AC result against a
// closed form at each frequency, reporting errors above tol relative, and
// returns the worst relative error.
func compareResponse(t *testing.T, name string, freqs []float64, got [][]complex128, want func(f float64) complex128, tol float64) float64 {
	t.Helper()
	worst := 0.0
	for i, f := range freqs {
		w := want(f)
		e := cRelErr(got[i][0], w)
		worst = math.Max(worst, e)
		if e > tol {
			t.Errorf("%s at %g Hz: H = %v, reference %v (rel err %.2g > %.2g)", name, f, got[i][0], w, e, tol)
		}
	}
	return worst
}

// TestACLowPass: an RC low-pass against H(jω) = 1/(1 + jωRC), the
// first-order transfer function of every circuit text. Tolerance 1e-9
// relative: Gaussian elimination on a 3×3 complex system with entries
// within ~1e4 of each other loses at most a few digits of 1e-16.
func TestACLowPass(t *testing.T) {
	const r, c = 10e3, 10e-9
	n := newNet()
	n.Sig("VIN", "in", 0)
	n.R("R1", "in", "out", r)
	n.C("C1", "out", "gnd", c)
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	freqs := logspace(1, 1e6, 61)
	out := n.c.Lookup("out")
	h, err := mna.AC(n.c, op, freqs, []int{out, n.c.Lookup("in"), models.Ground})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for k, f := range freqs {
		want := 1 / complex(1, 2*math.Pi*f*r*c)
		e := cRelErr(h[k][0], want)
		worst = math.Max(worst, e)
		if e > 1e-9 {
			t.Errorf("f = %g Hz: H = %v, 1/(1+jωRC) = %v (rel err %.2g)", f, h[k][0], want, e)
		}
		if h[k][1] != 1 || h[k][2] != 0 {
			t.Errorf("f = %g Hz: input probe %v, ground probe %v; want 1 and 0", f, h[k][1], h[k][2])
		}
	}
	t.Logf("worst relative error %.2g (tolerance 1e-9)", worst)
}

// TestACSeriesResonance: a series R–L–C driven by the source, output across
// R: H = R/(R + jωL + 1/(jωC)). At f0 = 1/(2π√(LC)) the reactances cancel
// and H = 1 exactly; the half-power frequencies are
// ω± = ±R/(2L) + √((R/2L)² + 1/(LC)), where |H|² = 1/2 (series resonance,
// e.g. Alexander & Sadiku, "Fundamentals of Electric Circuits", ch. 14;
// from memory). Tolerance 1e-9 relative (absolute for the phase).
func TestACSeriesResonance(t *testing.T) {
	const r, l, c = 100.0, 10e-3, 100e-9
	n := newNet()
	n.Sig("VIN", "in", 0)
	n.L("L1", "in", "m", l)
	n.C("C1", "m", "out", c)
	n.R("R1", "out", "gnd", r)
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	f0 := 1 / (2 * math.Pi * math.Sqrt(l*c))
	a := r / (2 * l)
	w0sq := 1 / (l * c)
	fLo := (-a + math.Sqrt(a*a+w0sq)) / (2 * math.Pi)
	fHi := (a + math.Sqrt(a*a+w0sq)) / (2 * math.Pi)
	freqs := append([]float64{f0, fLo, fHi}, logspace(100, 1e5, 31)...)
	h, err := mna.AC(n.c, op, freqs, []int{n.c.Lookup("out")})
	if err != nil {
		t.Fatal(err)
	}
	if e := cmplx.Abs(h[0][0] - 1); e > 1e-9 {
		t.Errorf("H(f0 = %.3f Hz) = %v, want 1 (err %.2g)", f0, h[0][0], e)
	}
	for k, f := range []float64{fLo, fHi} {
		if p := cmplx.Abs(h[k+1][0]); math.Abs(p*p-0.5) > 1e-9 {
			t.Errorf("|H(%.3f Hz)|² = %.12g, want 1/2", f, p*p)
		}
	}
	worst := 0.0
	for k, f := range freqs {
		w := 2 * math.Pi * f
		want := complex(r, 0) / complex(r, w*l-1/(w*c))
		e := cRelErr(h[k][0], want)
		worst = math.Max(worst, e)
		if e > 1e-9 {
			t.Errorf("f = %g Hz: H = %v, want %v (rel err %.2g)", f, h[k][0], want, e)
		}
	}
	// The peak: |H| below 1 on either side of f0.
	if hh, _ := mna.AC(n.c, op, []float64{f0 * 0.99, f0 * 1.01}, []int{n.c.Lookup("out")}); !(cmplx.Abs(hh[0][0]) < 1 && cmplx.Abs(hh[1][0]) < 1) {
		t.Errorf("no peak at f0: %v", hh)
	}
	t.Logf("f0 = %.4f Hz, |H(f0)| − 1 = %.2g, worst relative error %.2g", f0, cmplx.Abs(h[0][0])-1, worst)
}

// TestACCommonEmitterGain: the bypassed common-emitter stage's mid-band
// gain from base to collector is −gm·Rc with gm = Ic/Vt (the hybrid-π
// model without output resistance, since the Ebers–Moll device has no
// Early effect; e.g. Sedra & Smith, "Microelectronic Circuits"; from
// memory). Ic is the collector current of the DC solution. At 10 kHz the
// 100 µF coupling capacitor (0.16 Ω against an input resistance of ~2 kΩ)
// and the 1 mF bypass (0.016 Ω against 1/gm ≈ 18 Ω) change the gain by
// about 0.1 %; tolerance 1 %.
func TestACCommonEmitterGain(t *testing.T) {
	n := ceStage(true)
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ic := op.Devices[0].I[1]
	gm := ic / vtRef(tnom)
	want := complex(-gm*4.7e3, 0)
	h, err := mna.AC(n.c, op, []float64{10e3}, []int{n.c.Lookup("c")})
	if err != nil {
		t.Fatal(err)
	}
	e := cRelErr(h[0][0], want)
	if e > 0.01 {
		t.Errorf("gain %v, −gm·Rc = %v (rel err %.2g > 1 %%)", h[0][0], want, e)
	}
	t.Logf("Ic = %.4g A, −gm·Rc = %.2f, AC gain %.2f∠%.2f°, rel err %.2g", ic, real(want), cmplx.Abs(h[0][0]), cmplx.Phase(h[0][0])*180/math.Pi, e)
}
