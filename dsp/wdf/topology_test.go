package wdf

import (
	"math"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// runAgainstReference drives the WDF and the brute-force MNA transient
// (mna.Transient: trapezoidal companions, full Newton each step) with the
// same signal and returns the worst output difference.
func runAgainstReference(t *testing.T, b *bench, fs float64, n int, sig func(tt float64) float64) (float64, Stats) {
	t.Helper()
	s, op := b.compile(t, fs)
	ref := mna.NewTransient(b.c, fs, op)
	worst := 0.0
	for k := 0; k < n; k++ {
		vin := sig(float64(k) / fs)
		got := s.Tick(vin)
		if _, err := ref.Step(vin); err != nil {
			t.Fatalf("reference step %d: %v", k, err)
		}
		worst = math.Max(worst, math.Abs(got-ref.Voltage(b.c.Output)))
	}
	return worst, s.Stats()
}

// Three transistors and four diodes in one circuit, all at the root and
// solved jointly: the two-transistor stage, an emitter follower after it,
// an antiparallel clipping pair at the follower's output and a series pair
// of diodes to ground further on. Against the MNA reference within 1e-6 V
// (the bound) over a 50 ms burst.
func TestThreeTransistorsFourDiodes(t *testing.T) {
	b := twoTransistor()
	si := models.DiodeParams{Is: 2.52e-9, N: 1.752}
	b.c.Output = 0
	// Follower: base from the coupled output, emitter load, then clippers.
	b.r("RB", "vcc", "out", 470e3)
	b.npn("Q3", "vcc", "out", "e3", models.BJTParams{Is: 10e-15, BetaF: 180, BetaR: 4})
	b.r("RE3", "e3", "gnd", 10e3)
	b.cap("C4", "e3", "d", 1e-6)
	b.r("RD", "d", "gnd", 22e3)
	b.diode("D1", "d", "gnd", si)
	b.diode("D2", "gnd", "d", si)
	b.r("RS", "d", "s", 4.7e3)
	b.diode("D3", "s", "m", si)
	b.diode("D4", "m", "gnd", si)
	b.r("RL2", "s", "gnd", 100e3)
	b.out("s")
	worst, st := runAgainstReference(t, b, 192000, 9600, func(tt float64) float64 {
		return 0.3 * math.Min(1, tt/0.005) * math.Sin(2*math.Pi*330*tt)
	})
	s, _ := b.compile(t, 192000)
	_, k := s.States()
	t.Logf("3 BJTs + 4 diodes (%d root ports): worst |WDF − MNA| %.3g V; mean Newton %.2f, max %d, nonconverged %d", k, worst, st.MeanIterations(), st.MaxIterations, st.NonConverged)
	if k != 10 {
		t.Errorf("%d nonlinear root ports, want 10 (3×2 + 4)", k)
	}
	if worst > 1e-6 || st.NonConverged != 0 {
		t.Errorf("worst %.3g V (bound 1e-6), %d nonconverged", worst, st.NonConverged)
	}
}

// A topology that is no series/parallel tree: a Wheatstone bridge with a
// diode across its middle and a capacitor on one arm. Against the MNA
// reference within 1e-6 V.
func TestBridgeTopology(t *testing.T) {
	b := newBench()
	b.src("V1", "in", 0, true)
	b.r("R1", "in", "a", 1e3)
	b.r("R2", "in", "b", 2.2e3)
	b.r("R3", "a", "gnd", 3.3e3)
	b.cap("C1", "b", "gnd", 47e-9)
	b.r("R4", "b", "gnd", 1.5e3)
	b.diode("D1", "a", "b", models.DiodeParams{Is: 2.52e-9, N: 1.752})
	b.r("R5", "a", "out", 10e3)
	b.cap("C2", "out", "gnd", 10e-9)
	b.out("out")
	worst, st := runAgainstReference(t, b, 96000, 9600, func(tt float64) float64 { return 4 * math.Sin(2*math.Pi*700*tt) })
	t.Logf("bridge: worst %.3g V, mean Newton %.2f", worst, st.MeanIterations())
	if worst > 1e-6 {
		t.Errorf("worst %.3g V > 1e-6 V", worst)
	}
}

// When plain Newton is cut short (one iteration allowed), the sub-stepped
// fallback runs and is counted, and the output stays finite and close to a
// normal run (within 1 mV: the fallback's iterations are bounded too).
func TestFallbackIsCountedAndFinite(t *testing.T) {
	b := twoTransistor()
	op, err := mna.SolveDC(b.c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	strict, err := Compile(b.c, op, Options{SampleRate: 48000, MaxIter: 1})
	if err != nil {
		t.Fatal(err)
	}
	normal, err := Compile(b.c, op, Options{SampleRate: 48000})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for k := 0; k < 4800; k++ {
		vin := 0.8 * math.Sin(2*math.Pi*500*float64(k)/48000)
		y := strict.Tick(vin)
		if math.IsNaN(y) || math.IsInf(y, 0) {
			t.Fatalf("sample %d not finite", k)
		}
		worst = math.Max(worst, math.Abs(y-normal.Tick(vin)))
	}
	st := strict.Stats()
	if st.Fallbacks == 0 {
		t.Error("no fallback counted with MaxIter 1")
	}
	if worst > 1e-3 {
		t.Errorf("fallback output departs by %.3g V", worst)
	}
	t.Logf("MaxIter 1: %d fallbacks, %d nonconverged of %d samples; worst departure %.3g V", st.Fallbacks, st.NonConverged, st.Samples, worst)
}

// Process does not allocate.
func TestProcessZeroAlloc(t *testing.T) {
	s, _ := twoTransistor().compile(t, 96000)
	src := make([]float64, 256)
	for i := range src {
		src[i] = 0.2 * math.Sin(float64(i)/7)
	}
	dst := make([]float64, 256)
	if a := testing.AllocsPerRun(50, func() { s.Process(dst, src) }); a != 0 {
		t.Errorf("%v allocations per call", a)
	}
}
