package chains_test

import (
	"context"
	"math"
	"math/cmplx"
	"testing"

	"renderchain/chains"
	"renderchain/measure"
)

// smallSignal is the chain's small-signal response through the response
// command's path (measure.SmallSignal: build, DC point, linearised AC),
// from the source to probe ("" for the output), as complex numbers.
func smallSignal(t *testing.T, ch *chains.Chain, probe string, freqs ...float64) []complex128 {
	t.Helper()
	pts, err := measure.SmallSignal(ch, freqs, measure.ResponseOptions{Probe: probe})
	if err != nil {
		t.Fatal(err)
	}
	out := make([]complex128, len(pts))
	for i, p := range pts {
		out[i] = cmplx.Rect(math.Pow(10, float64(p.DB)/20), float64(p.Deg)*math.Pi/180)
	}
	return out
}

// renderGain is the chain's gain at f through the render path (measure.Sine:
// the wave digital solver at 4 × 48 kHz behind the oversampler), for a
// small sine of the given amplitude, in dB.
func renderGain(t *testing.T, ch *chains.Chain, f, amp float64) float64 {
	t.Helper()
	r, err := measure.Sine(context.Background(), ch, f, amp, measure.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return float64(r.GainDB)
}

// warped is the analogue frequency the bilinear discretisation at rate fs
// shows at f: (fs/π)·tan(π·f/fs) (Oppenheim & Schafer, Discrete-Time
// Signal Processing, sec. 7.2); the render path runs at 4 × 48 kHz.
func warped(f float64) float64 {
	const fs = 4 * 48000
	return fs / math.Pi * math.Tan(math.Pi*f/fs)
}

func relErr(got, want complex128) float64 { return cmplx.Abs(got/want - 1) }

// A rotary tone-cap selector: 10 kΩ in series, each position puts one cap
// from the output to ground through its contact. Each position's response
// is the first-order low-pass of the network it selects, with the contact
// resistance Rs in the cap's branch: H = (1 + jωRs·C)/(1 + jω(R + Rs)·C),
// corner 1/(2π(R + Rs)C) (the RC low-pass of any circuits text: common
// practice). Through the response path the linear model is exact, so the
// tolerance is 1e-9 relative (rounding only); at the corner the level is
// −3.01 dB within 0.001 dB (Rs = 50 mΩ moves it by 4e-6 dB). The flat
// position passes the signal unchanged (its caps hang on open contacts).
func TestSwitchSelectsCorners(t *testing.T) {
	const r = 10e3
	caps := map[string]float64{"flat": 0, "bright": 2.2e-9, "mid": 6.8e-9, "dark": 22e-9}
	src := `name = "selector"
[output]
load = "none"
[[stage]]
id = "s"
parts = [
  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "C1", kind = "capacitor", value = "2n2", pins = ["c1", "gnd"] },
  { ref = "C2", kind = "capacitor", value = "6n8", pins = ["c2", "gnd"] },
  { ref = "C3", kind = "capacitor", value = "22n", pins = ["c3", "gnd"] },
  { ref = "SW1", kind = "switch", positions = [
      { name = "flat", connect = [] },
      { name = "bright", connect = [["out", "c1"]] },
      { name = "mid", connect = [["out", "c2"]] },
      { name = "dark", connect = [["out", "c3"]] } ] },
]
`
	for _, pos := range []string{"flat", "bright", "mid", "dark"} {
		ch, err := chains.Parse("selector.toml", src)
		if err != nil {
			t.Fatal(err)
		}
		if err := ch.Set("s.SW1=" + pos); err != nil {
			t.Fatal(err)
		}
		c := caps[pos]
		rs := chains.DefaultContactResistance
		fc := 1000.0
		if c > 0 {
			fc = 1 / (2 * math.Pi * (r + rs) * c)
		}
		freqs := []float64{fc / 10, fc, 3 * fc}
		got := smallSignal(t, ch, "", freqs...)
		for i, f := range freqs {
			want := complex(1, 0)
			if c > 0 {
				w := 2 * math.Pi * f
				want = complex(1, w*rs*c) / complex(1, w*(r+rs)*c)
			}
			if e := relErr(got[i], want); e > 1e-9 {
				t.Errorf("%s at %.1f Hz: %v, closed form %v (rel. error %.2g)", pos, f, got[i], want, e)
			}
		}
		if c > 0 {
			db := 20 * math.Log10(cmplx.Abs(got[1]))
			if math.Abs(db+10*math.Log10(2)) > 1e-3 {
				t.Errorf("%s: %.4f dB at the corner %.1f Hz, want −3.0103 dB", pos, db, fc)
			}
			t.Logf("%s: corner %.1f Hz, %.5f dB there", pos, fc, db)
		}
	}
}

// A non-inverting op-amp stage on a half-supply reference built of parts,
// through the chain path. The macromodel's open loop is A(jω) =
// A0/(1 + jω·A0/(2π·GBW)) (the single-pole op-amp; Sedra & Smith,
// "Microelectronic Circuits", the op-amp's frequency response, from
// memory), and the closed loop G = A/(1 + β·A), β = Zg/(Zg + Rf) with the
// gain leg Zg = Rg + 1/(jωCg); the input reaches the non-inverting pin
// through the coupling cap and the bias resistor to the reference node,
// Vp/Vin = (R3 + Zref)/(ZC2 + R3 + Zref), Zref = R1‖R2‖ZC1. The chosen
// input resistance (1 TΩ) and zero output resistance leave nothing else:
// within 1e-6 relative (the 1 TΩ across the inputs carries Vout/A0 over
// 1 TΩ). The −3 dB frequency of the single-pole loop is
// β0·GBW·(1 + 1/(β0·A0)) (the closed-loop pole): the level there is
// 3.0103 dB below the DC closed-loop gain A0/(1 + β0·A0) within 0.01 dB
// (the input and gain-leg corners sit below 0.2 Hz), and at 10 Hz the gain
// is 1 + Rf/Rg within 0.02 dB (the loop gain there is about 900: 0.01 dB
// short). Through the render path (wave digital solver,
// oversampler) the gain at 1 kHz matches the closed form at the warped
// frequency within 0.02 dB (the oversampler's 0.01 dB passband ripple,
// twice).
func TestOpAmpClosedLoop(t *testing.T) {
	const (
		a0, gbw    = 1e5, 100e3
		r1, r2, c1 = 100e3, 100e3, 10e-6
		c2, r3     = 10e-6, 1e6
		rf, rg, cg = 100e3, 10e3, 100e-6
		beta0      = rg / (rg + rf)
	)
	src := `name = "non-inverting stage"
supply = "9V"
[input]
peak = "1V"
[output]
load = "none"
[[stage]]
id = "s"
parts = [
  { ref = "R1", kind = "resistor",  value = "100k", pins = ["v+", "ref"] },
  { ref = "R2", kind = "resistor",  value = "100k", pins = ["ref", "gnd"] },
  { ref = "C1", kind = "capacitor", value = "10u",  pins = ["ref", "gnd"] },
  { ref = "C2", kind = "capacitor", value = "10u",  pins = ["in", "p"] },
  { ref = "R3", kind = "resistor",  value = "1M",   pins = ["p", "ref"] },
  { ref = "U1", kind = "opamp", open_loop_gain = 1e5, gbw = "100kHz", input_resistance = 1e12, output_resistance = 0,
    headroom_high = "1.5V", headroom_low = "1.5V", pins = { noninv = "p", inv = "m", out = "out" } },
  { ref = "R4", kind = "resistor",  value = "100k", pins = ["out", "m"] },
  { ref = "R5", kind = "resistor",  value = "10k",  pins = ["m", "g"] },
  { ref = "C3", kind = "capacitor", value = "100u", pins = ["g", "gnd"] },
]
`
	ch, err := chains.Parse("stage.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	closed := func(f float64) complex128 {
		w := 2 * math.Pi * f
		jw := complex(0, w)
		zref := 1 / (1/complex(r1, 0) + 1/complex(r2, 0) + jw*c1)
		vp := (r3 + zref) / (1/(jw*c2) + r3 + zref)
		zg := rg + 1/(jw*cg)
		beta := zg / (zg + rf)
		a := a0 / (1 + jw*a0/(2*math.Pi*gbw))
		return vp * a / (1 + beta*a)
	}
	f3 := beta0 * gbw * (1 + 1/(beta0*a0))
	freqs := []float64{10, 1000, 5000, f3, 20000, 50000}
	got := smallSignal(t, ch, "", freqs...)
	for i, f := range freqs {
		if e := relErr(got[i], closed(f)); e > 1e-6 {
			t.Errorf("%.0f Hz: %v, single-pole closed form %v (rel. error %.2g)", f, got[i], closed(f), e)
		}
	}
	g0 := 20 * math.Log10(a0/(1+beta0*a0)) // the closed loop at DC
	low := 20 * math.Log10(cmplx.Abs(got[0]))
	at3 := 20 * math.Log10(cmplx.Abs(got[3]))
	if d := g0 - at3; math.Abs(d-10*math.Log10(2)) > 0.01 {
		t.Errorf("at the closed-loop pole %.1f Hz: %.4f dB below the DC closed-loop gain, want 3.0103 dB", f3, d)
	}
	if ideal := 20 * math.Log10(1+rf/rg); math.Abs(low-ideal) > 0.02 {
		t.Errorf("gain at 10 Hz %.4f dB, want 20·log10(1 + Rf/Rg) = %.4f dB", low, ideal)
	}
	t.Logf("10 Hz: %.4f dB (1 + Rf/Rg: %.4f dB); at %.1f Hz %.4f dB below the DC closed loop", low, 20*math.Log10(1+rf/rg), f3, g0-at3)
	// The render path at 1 kHz, 10 mV (0.11 V out: far from the limits).
	want := 20 * math.Log10(cmplx.Abs(closed(warped(1000))))
	if g := renderGain(t, ch, 1000, 0.01); math.Abs(g-want) > 0.02 {
		t.Errorf("render gain at 1 kHz %.4f dB, closed form %.4f dB", g, want)
	} else {
		t.Logf("render gain at 1 kHz %.4f dB, closed form %.4f dB", g, want)
	}
}

// A transformer stage: winding 1 driven by the source, winding 2 (twice
// the turns: L2 = 2²·L1) into a 100 kΩ load, and an unloaded third winding
// like the second but wired the other way round (its start on ground).
// Through the response path against the coupled-inductor closed form
// (Kirchhoff's laws with mutual inductance Mij = k·√(Li·Lj) between every
// pair; any circuits text): with Zi = Ri + jωLi and I2 = −V2/RL,
// I1 = V1/(Z1 + ω²M12²/(RL + Z2)), V2 = jωM12·I1·RL/(RL + Z2), and the
// open winding's end at −jω(M13·I1 + M23·I2). Exact for the linear model:
// within 1e-9 relative. The turns ratio shows as |V2/V1| = 2 within 0.5 %
// at 1 kHz (k = 0.999, light load), the reversed winding in antiphase. The
// render path's gain at 1 kHz matches the closed form at the warped
// frequency within 0.02 dB (the oversampler's passband ripple, twice).
func TestTransformerRatio(t *testing.T) {
	const (
		l1, r1, r2, rl, k = 10.0, 50.0, 200.0, 100e3, 0.999
		rl3               = 1e6 // the reversed winding's load (RL3)
		n                 = 2.0
	)
	l2 := n * n * l1
	src := `name = "transformer stage"
[input]
peak = "1V"
[output]
load = "100k"
[[stage]]
id = "s"
parts = [
  { ref = "T1", kind = "transformer", coupling = 0.999, windings = [
      { inductance = "10H", resistance = "50", pins = ["in", "gnd"] },
      { turns = 2, resistance = "200", pins = ["out", "gnd"] },
      { turns = 2, resistance = "200", pins = ["gnd", "rev"] } ] },
  { ref = "RL3", kind = "resistor", value = "1M", pins = ["rev", "gnd"] },
]
`
	ch, err := chains.Parse("tr.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	// Coupled-inductor equations v_k = Σ_j Z_kj·i_j (i_k into winding k's
	// start), Z_kk = R_k + jωL_k, Z_kj = jωk·sqrt(L_k·L_j); winding 1
	// driven by 1 V, winding 2 loaded by rl and winding 3 by rl3 (v_k =
	// −R_load·i_k; winding 3 is reversed, start on ground, so V(rev) =
	// −v3). Solved by Cramer's rule.
	closed := func(f float64) (v2, v3 complex128) {
		w := 2 * math.Pi * f
		m := k * math.Sqrt(l1*l2) // M12 = M13; M23 = k·L2
		jm, jm23 := complex(0, w*m), complex(0, w*k*l2)
		z := [3][3]complex128{
			{complex(r1, w*l1), jm, jm},
			{jm, complex(r2+rl, w*l2), jm23},
			{jm, jm23, complex(r2+rl3, w*l2)},
		}
		det := func(a [3][3]complex128) complex128 {
			return a[0][0]*(a[1][1]*a[2][2]-a[1][2]*a[2][1]) - a[0][1]*(a[1][0]*a[2][2]-a[1][2]*a[2][0]) + a[0][2]*(a[1][0]*a[2][1]-a[1][1]*a[2][0])
		}
		d := det(z)
		col := func(c int) complex128 { // the current of winding c+1 for v = [1, 0, 0]
			a := z
			a[0][c], a[1][c], a[2][c] = 1, 0, 0
			return det(a) / d
		}
		return -complex(rl, 0) * col(1), complex(rl3, 0) * col(2)
	}
	freqs := []float64{20, 100, 1000, 10000}
	got := smallSignal(t, ch, "", freqs...)
	rev := smallSignal(t, ch, "s.rev", freqs...)
	for i, f := range freqs {
		v2, v3 := closed(f)
		if e := relErr(got[i], v2); e > 1e-9 {
			t.Errorf("%.0f Hz: V2 %v, coupled-inductor closed form %v (rel. error %.2g)", f, got[i], v2, e)
		}
		if e := relErr(rev[i], v3); e > 1e-9 {
			t.Errorf("%.0f Hz: reversed winding %v, closed form %v (rel. error %.2g)", f, rev[i], v3, e)
		}
	}
	// Near the turns ratio but for the copper: r2/rl + n²·r1/rl ≈ 0.4 % at
	// these loads, plus the third winding's load and k < 1; 1 % bounds it
	// (the exact figure is the closed form above).
	if ratio := cmplx.Abs(got[2]); math.Abs(ratio/n-1) > 0.01 {
		t.Errorf("|V2/V1| at 1 kHz %.5f, turns ratio %g", ratio, n)
	} else {
		t.Logf("|V2/V1| at 1 kHz %.5f (turns ratio %g, k %g); reversed winding at %.1f°", ratio, n, k, cmplx.Phase(rev[2]/got[2])*180/math.Pi)
	}
	if math.Abs(math.Abs(cmplx.Phase(rev[2]/got[2]))-math.Pi) > 0.01 {
		t.Errorf("reversed winding not in antiphase: %.2f°", cmplx.Phase(rev[2]/got[2])*180/math.Pi)
	}
	v2, _ := closed(warped(1000))
	want := 20 * math.Log10(cmplx.Abs(v2))
	if g := renderGain(t, ch, 1000, 0.1); math.Abs(g-want) > 0.02 {
		t.Errorf("render gain at 1 kHz %.4f dB, closed form %.4f dB", g, want)
	} else {
		t.Logf("render gain at 1 kHz %.4f dB, closed form %.4f dB", g, want)
	}
}
