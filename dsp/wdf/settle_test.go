package wdf

import (
	"errors"
	"math"
	"testing"

	"renderchain/models"
)

// SlowestDecay against closed forms. An RC low-pass has one pole at
// s = −1/(RC); the bilinear transform s = (2/T)(z − 1)/(z + 1) (Oppenheim &
// Schafer, "Discrete-Time Signal Processing", 3rd ed., sec. 7.2.3) puts it
// at z = (1 − a)/(1 + a), a = T/(2RC). A diode across the capacitor, biased
// forward through the resistor, adds its small-signal conductance
// g = Is/(n·Vt)·exp(V/(n·Vt)) (the derivative of Shockley's law at the
// operating point V) to 1/R: a = T·(1/R + g)/(2C). Tolerance 1e-9
// relative: an eigenvalue problem of size one or two, plus the device
// model's exponential (within 4e-16 of math.Exp).
func TestSlowestDecayClosedForm(t *testing.T) {
	const fs, R, C = 48000.0, 10e3, 100e-9
	T := 1 / fs
	b := newBench()
	b.src("V1", "in", 0, true)
	b.r("R1", "in", "out", R)
	b.cap("C1", "out", "gnd", C)
	b.out("out")
	s, _ := b.compile(t, fs)
	a := T / (2 * R * C)
	want := (1 - a) / (1 + a)
	got, err := s.SlowestDecay()
	if err != nil || math.Abs(got-want) > 1e-9*want {
		t.Errorf("RC: ρ = %.15g (%v), closed form %.15g", got, err, want)
	}
	n, err := s.WarmupSamples(1e-7)
	if wantN := math.Ceil(math.Log(1e-7) / math.Log(want)); err != nil || float64(n) != wantN {
		t.Errorf("RC: warm-up %d samples (%v), closed form %g", n, err, wantN)
	}

	// Two capacitors in parallel: one pole at −1/(R·(C + C2)); the loop of
	// the two capacitors adds a mode at z = −1, which is left out.
	const C2 = 47e-9
	b = newBench()
	b.src("V1", "in", 0, true)
	b.r("R1", "in", "out", R)
	b.cap("C1", "out", "gnd", C)
	b.cap("C2", "out", "gnd", C2)
	b.out("out")
	s, _ = b.compile(t, fs)
	a = T / (2 * R * (C + C2))
	want = (1 - a) / (1 + a)
	if got, err := s.SlowestDecay(); err != nil || math.Abs(got-want) > 1e-9*want {
		t.Errorf("RC ∥ C: ρ = %.15g (%v), closed form %.15g", got, err, want)
	}

	p := models.DiodeParams{Is: 2.52e-9, N: 1.752}
	d := newBench()
	d.src("VB", "vb", 5, false)
	d.src("V1", "in", 0, true)
	d.r("RB", "vb", "out", R)
	d.r("R1", "in", "out", R)
	d.cap("C1", "out", "gnd", C)
	d.diode("D1", "out", "gnd", p)
	d.out("out")
	sd, op := d.compile(t, fs)
	nvt := p.N * models.ThermalVoltage(models.NominalTemperature)
	g := p.Is / nvt * math.Exp(op.Devices[0].V[0]/nvt)
	a = T * (2/R + g) / (2 * C) // RB and R1 both go to AC ground
	want = (1 - a) / (1 + a)
	got, err = sd.SlowestDecay()
	if err != nil || math.Abs(got-want) > 1e-9*math.Abs(want) {
		t.Errorf("biased diode: ρ = %.15g (%v), closed form %.15g (g = %.4g S at %.4f V)", got, err, want, g, op.Devices[0].V[0])
	}
}

// The two-transistor stage decays (every pole inside the unit circle), its
// warm-up is finite, and a lossless LC tank the input reaches gets no
// warm-up (ErrNoDecay): its bilinear poles lie on the unit circle, |z| = 1
// exactly for s = ±jω.
func TestSlowestDecayCircuits(t *testing.T) {
	s, _ := twoTransistor().compile(t, 96000)
	rho, err := s.SlowestDecay()
	if err != nil || !(rho > 0 && rho < 1) {
		t.Errorf("two-transistor stage: ρ = %g, %v", rho, err)
	}
	n, err := s.WarmupSamples(1e-7)
	t.Logf("two-transistor stage: ρ = %.9f, warm-up to 1e-7: %d samples (%.3f s)", rho, n, float64(n)/96000)
	if err != nil || n <= 0 {
		t.Errorf("warm-up %d, %v", n, err)
	}
	b := newBench()
	b.src("V1", "in", 0, true)
	b.cap("C0", "in", "t", 1e-9) // the source reaches the tank through C0 only
	b.ind("L1", "t", "gnd", 0.1)
	b.cap("C1", "t", "gnd", 1e-6)
	b.out("t")
	tank, _ := b.compile(t, 48000)
	// ρ is 1 up to rounding (1e-9: an eigenvalue of a 2×2 problem);
	// whichever side of 1 rounding puts it, no warm-up is finite.
	if rho, _ := tank.SlowestDecay(); math.Abs(rho-1) > 1e-9 {
		t.Errorf("lossless tank: ρ = %.17g, want 1", rho)
	}
	if n, err := tank.WarmupSamples(1e-7); !errors.Is(err, ErrNoDecay) {
		t.Errorf("lossless tank: warm-up %d, err %v; want ErrNoDecay", n, err)
	}
	if _, err := s.WarmupSamples(1); err == nil {
		t.Error("WarmupSamples(1): no error")
	}
}

// A clone started at the operating point some samples before a point of a
// running render must agree with that render from then on. The
// small-signal warm-up WarmupSamples(1e-7) is not a bound for a stage in
// clipping (its devices' conductances, and so its decay, move with the
// signal): on the two-transistor stage at 96 kHz, driven into clipping by a
// 441 Hz tone with a 3 Hz tremolo, it leaves millivolts, twice it about
// 2e-7 V, four times it 3e-14 V. With four times the warm-up, the start's
// mismatch (at most the 9 V supply) must be down to 1e-7 of it, 9e-7 V.
func TestWarmupForgetsTheStart(t *testing.T) {
	const fs = 96000.0
	s, _ := twoTransistor().compile(t, fs)
	w, err := s.WarmupSamples(1e-7)
	if err != nil {
		t.Fatal(err)
	}
	x := func(n int) float64 {
		tt := float64(n) / fs
		return 0.4 * (0.6 + 0.4*math.Sin(2*math.Pi*3*tt)) * math.Sin(2*math.Pi*441*tt)
	}
	end := 4*w + 9600
	start := end - 9600
	serial := make([]float64, end)
	for n := range serial {
		serial[n] = s.Tick(x(n))
	}
	diff := func(warm int) float64 {
		c := s.Clone()
		worst := 0.0
		for n := start - warm; n < end; n++ {
			y := c.Tick(x(n))
			if n >= start {
				worst = math.Max(worst, math.Abs(y-serial[n]))
			}
		}
		return worst
	}
	d1, d4 := diff(w), diff(4*w)
	t.Logf("small-signal warm-up %d samples (%.3f s): %.3g V from the serial render; four times it: %.3g V", w, float64(w)/fs, d1, d4)
	if d4 > 9e-7 {
		t.Errorf("after four times the warm-up the clone is %.3g V from the serial render > 9e-7 V", d4)
	}
}

// States the input cannot reach keep their operating-point values in any
// render, so their modes are no part of a warm-up: the RC low-pass of
// TestSlowestDecayClosedForm with an island beside it (a capacitor on a
// node held only by a 1 TΩ leak, as an open switch contact leaves one,
// and a lossless LC tank joined to nothing) has the RC's ρ = (1 − a)/(1 +
// a), a = T/(2RC), to 1e-9 (the closed form's tolerance above), where the
// island's modes (|z| = 1 − 5e-10 and |z| = 1) would otherwise make it
// ErrNoDecay.
func TestSlowestDecayLeavesIslandsOut(t *testing.T) {
	const fs, R, C = 48000.0, 10e3, 100e-9
	b := newBench()
	b.src("V1", "in", 0, true)
	b.r("R1", "in", "out", R)
	b.cap("C1", "out", "gnd", C)
	b.r("RLEAK", "island", "gnd", 1e12)
	b.cap("CI", "island", "gnd", 10e-9)
	b.ind("L1", "t", "gnd", 0.1)
	b.cap("CT", "t", "gnd", 1e-6)
	b.out("out")
	s, _ := b.compile(t, fs)
	a := 1 / fs / (2 * R * C)
	want := (1 - a) / (1 + a)
	if got, err := s.SlowestDecay(); err != nil || math.Abs(got-want) > 1e-9*want {
		t.Errorf("RC beside islands: ρ = %.15g (%v), closed form %.15g", got, err, want)
	}
}
