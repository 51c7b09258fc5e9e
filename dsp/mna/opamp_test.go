package mna_test

import (
	"math"
	"math/cmplx"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// part adds a part with AddPart (internal nodes and elements as the
// solvers need them), failing the test on error.
func (n *netlist) part(t *testing.T, e models.Element, nodes ...string) {
	t.Helper()
	for _, s := range nodes {
		e.Nodes = append(e.Nodes, n.c.Node(s))
	}
	if _, err := n.c.AddPart(e); err != nil {
		t.Fatal(err)
	}
}

// idealOpAmp is the macromodel with the input resistance at its maximum
// and no output resistance, so that it is the single-pole voltage
// amplifier of the textbooks: A(f) = A0/(1 + j·f/fp), fp = GBW/A0.
func idealOpAmp(a0, gbw float64) models.OpAmpParams {
	return models.OpAmpParams{Gain: a0, GBW: gbw, InputResistance: 1e15, HeadroomHigh: 1.5, HeadroomLow: 1.5}
}

// opAmpStage is a single-supply amplifier on a 9 V supply with a 4.5 V
// reference net: non-inverting (signal into in+, r1 from in− to the
// reference, r2 from out to in−) or inverting (in+ on the reference, r1
// from the signal to in−, r2 from out to in−). The signal source sits at
// the reference's DC value; a 100 kΩ load goes to the reference.
func opAmpStage(t *testing.T, p models.OpAmpParams, inverting bool, r1, r2 float64) *netlist {
	n := newNet()
	n.V("VCC", "v+", "gnd", 9)
	n.V("VREF", "ref", "gnd", 4.5)
	n.Sig("VIN", "in", 4.5)
	if inverting {
		n.R("R1", "in", "inn", r1)
		n.part(t, models.Element{Ref: "U1", Kind: models.OpAmpKind, OpAmp: p}, "ref", "inn", "out", "v+", "gnd")
	} else {
		n.R("R1", "inn", "ref", r1)
		n.part(t, models.Element{Ref: "U1", Kind: models.OpAmpKind, OpAmp: p}, "in", "inn", "out", "v+", "gnd")
	}
	n.R("R2", "out", "inn", r2)
	n.R("RL", "out", "ref", 100e3)
	n.c.Output = n.c.Lookup("out")
	return n
}

// TestOpAmpClosedLoop: non-inverting and inverting amplifiers against the
// single-pole closed forms (Sedra & Smith, "Microelectronic Circuits",
// the op-amp with finite gain and its frequency response; from memory).
// With A = A0/(1 + j·f/fp), k = 1 + R2/R1 (the noise gain) and
// β = R1/(R1 + R2) = 1/k:
//
//	non-inverting  H = A/(1 + A·β) = A0/(1 + A0/k + j·f/fp),  f3dB = fp·(1 + A0/k)
//	inverting      H = −(R2/R1)/(1 + k/A) = −(R2/R1)·A0/(A0 + k + j·k·f/fp),  f3dB = fp·(A0 + k)/k
//
// both close to the textbook f3dB ≈ GBW/k. The closed forms are exact for
// the macromodel with Rin → ∞ and Rout = 0 (the limiters carry e^−300 of a
// current there): tolerance 1e-9 relative, the rounding of a 10-unknown
// complex solve. |H(f3dB)|² = |H(0)|²/2 is checked to 1e-9 as well.
func TestOpAmpClosedLoop(t *testing.T) {
	const a0, gbw = 2e5, 1e6
	fp := gbw / a0
	for _, tc := range []struct {
		name      string
		inverting bool
		r1, r2    float64
	}{
		{"non-inverting ×11", false, 10e3, 100e3},
		{"non-inverting ×101", false, 1e3, 100e3},
		{"inverting ×−10", true, 10e3, 100e3},
		{"inverting ×−47", true, 2.2e3, 103.4e3},
	} {
		n := opAmpStage(t, idealOpAmp(a0, gbw), tc.inverting, tc.r1, tc.r2)
		op, err := mna.SolveDC(n.c, mna.DCOptions{})
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		k := 1 + tc.r2/tc.r1
		// At DC the output sits at the reference less the error of the
		// finite gain: Vo = A0·(V+ − V−) with V− = ref + (Vo − ref)/k and
		// V+ = ref gives Vo = ref·(A0/k)/(1 + A0/k).
		if v, want := op.Node[n.c.Lookup("out")], 4.5*(a0/k)/(1+a0/k); relErr(v, want) > 1e-9 {
			t.Errorf("%s: DC output %.9g V, closed form %.9g V", tc.name, v, want)
		}
		h := func(f float64) complex128 {
			if tc.inverting {
				return complex(-tc.r2/tc.r1*a0, 0) / complex(a0+k, k*f/fp)
			}
			return complex(a0, 0) / complex(1+a0/k, f/fp)
		}
		f3 := fp * (1 + a0/k)
		if tc.inverting {
			f3 = fp * (a0 + k) / k
		}
		freqs := append([]float64{0.01, f3}, logspace(10, 10e6, 31)...)
		got, err := mna.AC(n.c, op, freqs, []int{n.c.Lookup("out")})
		if err != nil {
			t.Fatal(err)
		}
		worst := compareResponse(t, tc.name, freqs, got, h, 1e-9)
		r := cmplx.Abs(got[1][0]) / cmplx.Abs(got[0][0])
		if math.Abs(r*r-0.5) > 1e-9 {
			t.Errorf("%s: |H(f3dB)/H(0)|² = %.12g, want 1/2", tc.name, r*r)
		}
		t.Logf("%s: DC gain %.6f, f3dB %.1f Hz (GBW/k %.1f Hz), worst rel err %.2g", tc.name, real(got[0][0]), f3, gbw/k, worst)
	}
}

// TestOpAmpPresetGain: the op-amp presets, with their finite input and
// output resistances, in a ×11 non-inverting stage at 1 kHz against the
// single-pole closed form of their A0 and GBW. Rin (≥ 2 MΩ against the
// 9.1 kΩ of the feedback network) and Rout (≤ 300 Ω against a 100 kΩ load
// inside a loop gain of about 90 at 1 kHz) change the gain by well under
// 1e-3: the tolerance.
func TestOpAmpPresetGain(t *testing.T) {
	for _, name := range models.Names(models.OpAmpPresets) {
		p := models.OpAmpPresets[name].Params
		n := opAmpStage(t, p, false, 10e3, 100e3)
		op, err := mna.SolveDC(n.c, mna.DCOptions{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		got, err := mna.AC(n.c, op, []float64{1e3}, []int{n.c.Lookup("out")})
		if err != nil {
			t.Fatal(err)
		}
		want := complex(p.Gain, 0) / complex(1+p.Gain/11, 1e3*p.Gain/p.GBW)
		if e := cRelErr(got[0][0], want); e > 1e-3 {
			t.Errorf("%s: H(1 kHz) = %v, single-pole form %v (rel err %.2g)", name, got[0][0], want, e)
		}
	}
}

// TestOpAmpClipping: a ×11 non-inverting stage on a 9 V single supply
// driven far past its swing, by DC sweep. The output must rise
// monotonically and saturate where the part says: V+ − HeadroomHigh and
// V− + HeadroomLow. The macromodel's doc comment bounds the gain node to
// within 2.3 knee widths of the stated level for a differential overdrive
// of 0.1 V to 1 V; the output adds Rout times its current. Tolerance:
// 2.3·knee + |Rout·Iout|, with the overdrive checked to lie in that range.
func TestOpAmpClipping(t *testing.T) {
	for _, name := range []string{"opamp-general-dual", "opamp-low-power-single"} {
		p := models.OpAmpPresets[name].Params
		n := opAmpStage(t, p, false, 10e3, 100e3)
		sig := n.c.Element("VIN")
		out, in, inn := n.c.Lookup("out"), n.c.Lookup("in"), n.c.Lookup("inn")
		drive := n.c.Lookup("U1#drive")
		prev, worst := math.Inf(-1), 0.0
		for k := -40; k <= 40; k++ {
			sig.Value = 4.5 + float64(k)*0.02 // ±0.8 V around the reference
			op, err := mna.SolveDC(n.c, mna.DCOptions{})
			if err != nil {
				t.Fatalf("%s at %g V: %v", name, sig.Value, err)
			}
			v := op.Node[out]
			if !(v > prev) {
				t.Errorf("%s: output %g V at input %g V is not above %g V (not monotonic)", name, v, sig.Value, prev)
			}
			prev = v
			vd := op.Node[in] - op.Node[inn]
			iout := (op.Node[drive] - v) / p.OutputResistance
			var level float64
			switch {
			case vd >= 0.1:
				level = 9 - p.HeadroomHigh
			case vd <= -0.1:
				level = p.HeadroomLow
			default:
				continue
			}
			if math.Abs(vd) > 1 {
				t.Fatalf("%s: overdrive %g V outside the documented range", name, vd)
			}
			tol := 2.3*models.DefaultOpAmpKnee + math.Abs(p.OutputResistance*iout)
			e := math.Abs(v + p.OutputResistance*iout - level)
			worst = math.Max(worst, e)
			if e > 2.3*models.DefaultOpAmpKnee {
				t.Errorf("%s: input %.2f V: output %.4f V (%.4f V before Rout), stated swing %.3f V (off by %.3g V > %.3g V)",
					name, sig.Value, v, v+p.OutputResistance*iout, level, e, tol)
			}
		}
		t.Logf("%s: swing %.3f … %.3f V stated; worst distance of the saturated gain node %.3g V (tolerance %.3g V)",
			name, p.HeadroomLow, 9-p.HeadroomHigh, worst, 2.3*models.DefaultOpAmpKnee)
	}
}

// TestOpAmpTransient: the ×11 non-inverting stage in the transient
// reference (48 kHz). Driven by a 1 kHz sine of 0.8 V peak for 3 ms, every
// sample is finite and the peaks sit within the clipping tolerance of
// TestOpAmpClipping (the overdrive at the peaks is 0.8 − 3/11 ≈ 0.53 V).
// Driven by 10 mV, the last period's peak is |H(1 kHz)|·10 mV with H the
// single-pole closed form of TestOpAmpClosedLoop: tolerance 1 %, for the
// peak of a sine sampled 48 times a period (at most 1 − cos(π/48) ≈ 0.2 %
// low), the bilinear transform's warping (f/fs = 1/48, 0.05 % at the
// 90 kHz closed-loop pole) and the preset's finite Rin and Rout.
func TestOpAmpTransient(t *testing.T) {
	p := models.OpAmpPresets["opamp-general-dual"].Params
	n := opAmpStage(t, p, false, 10e3, 100e3)
	op, err := mna.SolveDC(n.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	const fs = 48000.0
	out := n.c.Lookup("out")
	run := func(amp float64) (lo, hi, lastPeak float64) {
		tr := mna.NewTransient(n.c, fs, op)
		lo, hi = math.Inf(1), math.Inf(-1)
		for k := 1; k <= 144; k++ {
			vin := amp * math.Sin(2*math.Pi*1e3*float64(k)/fs)
			if _, err := tr.Step(vin); err != nil {
				t.Fatalf("sample %d: %v", k, err)
			}
			v := tr.Voltage(out)
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("sample %d: output %g", k, v)
			}
			hi, lo = math.Max(hi, v), math.Min(lo, v)
			if k > 96 {
				lastPeak = math.Max(lastPeak, math.Abs(v-op.Node[out]))
			}
		}
		return lo, hi, lastPeak
	}
	lo, hi, _ := run(0.8)
	tol := 2.3*models.DefaultOpAmpKnee + p.OutputResistance*3/9.1e3
	if math.Abs(hi-7.5) > tol || math.Abs(lo-1.5) > tol {
		t.Errorf("peaks %.4f / %.4f V, stated swing 1.5 … 7.5 V (±%.3g V)", lo, hi, tol)
	}
	_, _, peak := run(0.01)
	want := 0.01 * cmplx.Abs(complex(p.Gain, 0)/complex(1+p.Gain/11, 1e3*p.Gain/p.GBW))
	if e := relErr(peak, want); e > 0.01 {
		t.Errorf("small-signal peak %.6g V, closed form %.6g V (rel err %.2g > 1 %%)", peak, want, e)
	}
	t.Logf("clipped peaks %.4f / %.4f V; small-signal peak %.5g V, closed form %.5g V", lo, hi, peak, want)
}
