package wdf

import (
	"math"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// wrightOmega solves ω + ln ω = z to machine precision by Newton's method
// on the defining equation (Corless & Jeffrey, "The Wright ω function",
// AISC 2002, eq. 1), started from its asymptotes ω ≈ e^z (z → −∞) and
// ω ≈ z − ln z (z → +∞).
func wrightOmega(z float64) float64 {
	w := math.Exp(z)
	if z > 1 {
		w = z - math.Log(z)
	}
	for i := 0; i < 100; i++ {
		f := w + math.Log(w) - z
		d := f / (1 + 1/w)
		wn := w - d
		if wn <= 0 {
			wn = w / 10
		}
		if math.Abs(wn-w) <= 1e-16*math.Abs(wn) {
			return wn
		}
		w = wn
	}
	return w
}

// diodeReflect is the explicit wave-domain diode of Werner, Nangia,
// Bernardini, Smith & Sarti, "An improved and generalized diode clipper
// model for wave digital filters", AES Conv. 139 (2015), eq. 10:
// b = a + 2R·Is − 2nVt·ω(ln(R·Is/(nVt)) + (a + R·Is)/(nVt)). With pair set,
// the antiparallel pair by the same expression applied to |a| with the sign
// of a restored (their sec. 3), which neglects the reverse diode's current;
// that current is at most Is, so the voltage error is at most R·Is.
func diodeReflect(a, r, is, nvt float64, pair bool) float64 {
	s := 1.0
	if pair && a < 0 {
		s, a = -1, -a
	}
	z := math.Log(r*is/nvt) + (a+r*is)/nvt
	return s * (a + 2*r*is - 2*nvt*wrightOmega(z))
}

// The diode clipper Vs–R–(C ∥ D) built as a classical WDF (parallel
// three-port adaptor of Fettweis 1986, eq. 35, reflection-free at the
// diode's port) with the explicit Wright-ω diode, against the MNA-derived
// R-type solver with its Newton root. Tolerance 1e-9 V (the bound):
// the explicit solution is exact for one diode; for the pair its error
// bound R·Is is 7e-12 V with the values below (R = 1/(1/2200 + 2·fs·C)).
func TestDiodeClipperWrightOmega(t *testing.T) {
	const fs, R, C = 48000.0, 2200.0, 10e-9
	cases := []struct {
		name string
		p    models.DiodeParams
		pair bool
	}{
		{"single", models.DiodeParams{Is: 2.52e-9, N: 1.752}, false},
		{"antiparallel", models.DiodeParams{Is: 1e-14, N: 1}, true},
	}
	for _, tc := range cases {
		b := newBench()
		b.src("V1", "in", 0, true)
		b.r("R1", "in", "out", R)
		b.cap("C1", "out", "gnd", C)
		b.diode("D1", "out", "gnd", tc.p)
		if tc.pair {
			b.diode("D2", "gnd", "out", tc.p)
		}
		b.out("out")
		s, _ := b.compile(t, fs)
		nvt := tc.p.N * models.ThermalVoltage(models.NominalTemperature)
		g1, g2 := 1/R, 2*fs*C
		g3 := g1 + g2
		state := 0.0 // capacitor: b = a[n−1], at rest 0 V
		worst := 0.0
		for n := 0; n < 4800; n++ {
			vs := 3 * math.Sin(2*math.Pi*220*float64(n)/fs)
			a1, a2 := vs, state // waves into the adaptor from the source and from C
			b3 := (g1*a1 + g2*a2) / g3
			a3 := diodeReflect(b3, 1/g3, tc.p.Is, nvt, tc.pair)
			v := (g1*a1 + g2*a2 + g3*a3) / (2 * g3)
			state = 2*v - a2
			got := s.Tick(vs)
			worst = math.Max(worst, math.Abs(got-v))
		}
		if worst > 1e-9 {
			t.Errorf("%s: worst deviation from the Wright-ω WDF %.3g V > 1e-9 V", tc.name, worst)
		}
		st := s.Stats()
		t.Logf("%s: worst deviation %.3g V, mean Newton iterations %.2f, max %d", tc.name, worst, st.MeanIterations(), st.MaxIterations)
	}
}

// twoTransistor builds a two-transistor direct-coupled stage with DC
// feedback from the second emitter to the first base (values of this
// project's own choosing), with an input coupling cap, an emitter bypass
// and an output coupling cap into a load.
func twoTransistor() *bench {
	b := newBench()
	q := models.BJTParams{Is: 10e-15, BetaF: 215, BetaR: 4}
	q2 := models.BJTParams{Is: 10e-15, BetaF: 393, BetaR: 4}
	b.src("VCC", "vcc", 9, false)
	b.src("VIN", "in", 0, true)
	b.cap("C1", "in", "b1", 2.2e-6)
	b.npn("Q1", "c1", "b1", "gnd", q)
	b.r("RC1", "vcc", "c1", 39e3)
	b.npn("Q2", "c2", "c1", "e2", q2)
	b.r("RC2", "vcc", "c2", 6.8e3)
	b.r("RE2", "e2", "gnd", 820)
	b.r("RT2", "e2", "x", 270)
	b.cap("CE2", "x", "gnd", 22e-6)
	b.r("RF", "e2", "b1", 82e3)
	b.cap("C2", "c2", "out", 100e-9)
	b.r("RL", "out", "gnd", 100e3)
	b.out("out")
	return b
}

// The wave digital solver against an independent brute-force reference:
// MNA with trapezoidal companions and a full Newton solve every step
// (mna.Transient). Both discretise with the bilinear rule, so they solve the
// same equations; tolerance 1e-6 V (the bound) over a 100 ms burst.
func TestTwoTransistorAgainstTransientReference(t *testing.T) {
	const fs = 192000.0
	b := twoTransistor()
	s, op := b.compile(t, fs)
	ref := mna.NewTransient(b.c, fs, op)
	out := b.c.Output
	worst := 0.0
	n := int(0.1 * fs)
	for k := 0; k < n; k++ {
		tt := float64(k) / fs
		env := math.Min(1, tt/0.01) // 10 ms rise: a burst, not a step
		vin := 0.5 * env * math.Sin(2*math.Pi*441*tt)
		got := s.Tick(vin)
		if _, err := ref.Step(vin); err != nil {
			t.Fatalf("reference step %d: %v", k, err)
		}
		worst = math.Max(worst, math.Abs(got-ref.Voltage(out)))
	}
	st := s.Stats()
	t.Logf("worst |WDF − MNA| at the output %.3g V; mean Newton %.2f, max %d, fallbacks %d, nonconverged %d",
		worst, st.MeanIterations(), st.MaxIterations, st.Fallbacks, st.NonConverged)
	if worst > 1e-6 {
		t.Errorf("WDF departs from the MNA reference by %.3g V > 1e-6 V", worst)
	}
	if st.NonConverged != 0 {
		t.Errorf("%d samples did not converge", st.NonConverged)
	}
}
