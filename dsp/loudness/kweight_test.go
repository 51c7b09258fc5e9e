package loudness

import (
	"math"
	"testing"
)

// BS.1770-4 Annex 1, Tables 1 and 2, typed here independently of kweight.go.
var (
	table1 = [5]float64{1.53512485958697, -2.69169618940638, 1.19839281085285, -1.69065929318241, 0.73248077421585}
	table2 = [5]float64{1.0, -2.0, 1.0, -1.99004745483398, 0.99007225036621}
)

func coefs(c biquad) [5]float64 { return [5]float64{c.b0, c.b1, c.b2, c.a1, c.a2} }

// At 48 kHz the meter must use BS.1770-4's tabulated coefficients, and the
// prototype route (invert at 48 kHz, re-discretise at 48 kHz) must land on
// them too. Tolerance 1e-8: the table's coefficients are given to 14 decimals;
// 1e-8 is the brief's bound and leaves room for rounding in the
// inversion (measured ≈ 1e-15).
func TestKWeighting48kMatchesTable(t *testing.T) {
	m := newTestMeter(t, 48000, 2)
	cases := []struct {
		name string
		got  biquad
		want [5]float64
	}{
		{"meter pre-filter vs Table 1", m.pre, table1},
		{"meter RLB vs Table 2", m.rlb, table2},
		{"prototype pre-filter at 48 kHz vs Table 1", preProto.at(48000), table1},
		{"prototype RLB at 48 kHz vs Table 2", rlbProto.at(48000), table2},
	}
	for _, c := range cases {
		got := coefs(c.got)
		worst := 0.0
		for i := range got {
			worst = math.Max(worst, math.Abs(got[i]-c.want[i]))
		}
		t.Logf("%s: max |Δ| = %.2g", c.name, worst)
		if worst > 1e-8 {
			t.Errorf("%s: got %v, want %v (max |Δ| %.3g > 1e-8)", c.name, got, c.want, worst)
		}
	}
}

// The analog parameters recovered from the 48 kHz table agree with the
// values published with the widely used re-derivation of the K-weighting
// filter for arbitrary rates (from memory): shelf f0 = 1681.974450955533 Hz,
// G = 3.999843853973347 dB, Q = 0.7071752369554196, shelf exponent
// Vb = Vh^0.4996667741545416; RLB f0 = 38.13547087602444 Hz,
// Q = 0.5003270373238773. Relative tolerance 1e-9: the RLB poles sit at
// |z| ≈ 0.995, where the inversion loses about 3 of the table's 15 digits.
func TestKWeightingPrototypeParameters(t *testing.T) {
	vh := preProto.n2
	cases := []struct {
		name      string
		got, want float64
	}{
		{"shelf f0 (Hz)", preProto.f0, 1681.974450955533},
		{"shelf G (dB)", 20 * math.Log10(vh), 3.999843853973347},
		{"shelf Q", preProto.q, 0.7071752369554196},
		{"shelf DC gain", preProto.n0, 1},
		{"shelf Vb exponent", math.Log(preProto.n1*preProto.q) / math.Log(vh), 0.4996667741545416},
		{"RLB f0 (Hz)", rlbProto.f0, 38.13547087602444},
		{"RLB Q", rlbProto.q, 0.5003270373238773},
	}
	for _, c := range cases {
		rel := math.Abs(c.got-c.want) / math.Abs(c.want)
		t.Logf("%s: got %.15g, want %.15g, rel %.2g", c.name, c.got, c.want, rel)
		if rel > 1e-9 {
			t.Errorf("%s: got %.15g, want %.15g (rel %.3g > 1e-9)", c.name, c.got, c.want, rel)
		}
	}
	// The RLB stage is a pure high-pass: no DC or first-order numerator term
	// (BS.1770-4 Table 2 numerator 1, -2, 1 = (1 - z⁻¹)²).
	if math.Abs(rlbProto.n0) > 1e-12 || math.Abs(rlbProto.n1) > 1e-12 {
		t.Errorf("RLB prototype numerator n0 = %g, n1 = %g, want 0, 0", rlbProto.n0, rlbProto.n1)
	}
}

// BS.1770-4 Annex 1 (from memory): the −0.691 dB constant of the loudness
// formula cancels the K-weighting gain at 997 Hz. Tolerance 0.0005 dB: the constant is
// given to three decimals.
func TestKWeightingGainAt997Hz(t *testing.T) {
	g := kResponse(48000, 997)
	t.Logf("K-weighting gain at 997 Hz, 48 kHz: %.5f dB", g)
	if math.Abs(g+offsetLU) > 0.0005 {
		t.Errorf("gain at 997 Hz = %.5f dB, want %.3f ± 0.0005", g, -offsetLU)
	}
}

// At other rates the re-discretised filter must keep the 48 kHz response
// (the reference of BS.1770-4) at 1 kHz and 10 kHz within 0.05 dB: half
// the ±0.1 LU tolerance of EBU Tech 3341, so that the filter leaves room
// for the rest of the meter.
func TestKWeightingOtherRates(t *testing.T) {
	for _, fs := range []float64{22050, 32000, 44100, 88200, 96000, 176400, 192000} {
		for _, f := range []float64{1000, 10000} {
			if f >= 0.45*fs {
				continue
			}
			ref, got := kResponse(48000, f), kResponse(fs, f)
			d := got - ref
			t.Logf("fs %6.0f Hz, %5.0f Hz: %.5f dB (48 kHz: %.5f), Δ %+.5f dB", fs, f, got, ref, d)
			if math.Abs(d) > 0.05 {
				t.Errorf("fs %g Hz at %g Hz: %.4f dB, 48 kHz reference %.4f dB (Δ %.4f > 0.05)", fs, f, got, ref, d)
			}
		}
	}
}
