package engine

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"runtime"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/resample"
	"renderchain/internal/testchains"
	"renderchain/models"
)

const (
	dividerChain = testchains.Divider
	rcChain      = testchains.RCLowpass // 10 kΩ, 22 nF
)

func engine(t testing.TB, src string, oversample int) *Prepared {
	t.Helper()
	ch, err := chains.Parse("t.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	e, err := Prepare(ch, oversample)
	if err != nil {
		t.Fatal(err)
	}
	return e
}

// The oversampling factor is resolved in one place: the caller's, else
// the chain's, else DefaultOversample; 1…16 (resample.MaxFactor) and no
// other.
func TestOversample(t *testing.T) {
	if models.OversampleRange.Hi != resample.MaxFactor {
		t.Fatalf("models.OversampleRange tops at %g, the resampler at %d", models.OversampleRange.Hi, resample.MaxFactor)
	}
	ch, err := chains.Parse("t.toml", dividerChain)
	if err != nil {
		t.Fatal(err)
	}
	if n, err := Oversample(ch, 0); n != DefaultOversample || err != nil {
		t.Errorf("default: %d, %v", n, err)
	}
	ch.Oversample = 8
	if n, _ := Oversample(ch, 0); n != 8 {
		t.Errorf("chain's own: %d", n)
	}
	if n, _ := Oversample(ch, 2); n != 2 {
		t.Errorf("caller's: %d", n)
	}
	for _, bad := range []int{-1, 17, 32} {
		_, err := Oversample(ch, bad)
		var fe *models.FieldError
		if !errors.As(err, &fe) || fe.Field != "oversample" {
			t.Errorf("oversample %d: %v", bad, err)
		}
	}
}

// The one test sine through a linear RC low-pass: after the settle rule
// the record's fundamental is the continuous circuit's response at the
// bilinear transform's warped frequency (fs/π)·tan(π·f/fs) (Oppenheim &
// Schafer, sec. 7.2; from memory), |H| = 1/√(1 + (ωRC)²). Tolerance 0.01
// dB: the resampler's passband ripple is at most 0.01 dB each way
// (package resample), while an unsettled record or a wrong scale would be
// far off. The record holds whole cycles (coherent) and settles.
func TestSineThroughRC(t *testing.T) {
	e := engine(t, rcChain, 4)
	const f, amp = 1000.0, 0.5
	rec, err := e.Sine(context.Background(), SineOptions{Freq: f, Amplitude: amp, SampleRate: 48000})
	if err != nil {
		t.Fatal(err)
	}
	if !rec.Settled || !rec.Coherent {
		t.Fatalf("settled %v coherent %v", rec.Settled, rec.Coherent)
	}
	var re, im float64
	for i, v := range rec.Samples {
		ph := rec.Sine.Phase(rec.Start + i)
		re += v * math.Sin(ph)
		im += v * math.Cos(ph)
	}
	got := 2 * math.Hypot(re, im) / float64(len(rec.Samples))
	fw := 192000 / math.Pi * math.Tan(math.Pi*f/192000)
	want := amp * cmplx.Abs(1/complex(1, 2*math.Pi*fw*10e3*22e-9))
	if d := 20 * math.Log10(got/want); math.Abs(d) > 0.01 {
		t.Errorf("fundamental %.6f V, closed form %.6f V (%.4f dB)", got, want, d)
	}
}

// Render returns exactly len(x)+tail samples lined up with x: through the
// divider the output is x/2 (the divider's ratio), to the resampler's
// passband ripple, 0.01 dB each way ((10^(0.02/20) − 1) of the amplitude).
func TestRenderFinite(t *testing.T) {
	e := engine(t, dividerChain, 4)
	x := make([]float64, 5000)
	for i := range x {
		g := math.Min(1, float64(i)/480) * math.Min(1, float64(len(x)-1-i)/480)
		x[i] = 0.4 * g * math.Sin(2*math.Pi*700*float64(i)/48000)
	}
	y, ch, err := e.Render(context.Background(), 48000, e.Circuit.Output, x, 300)
	if err != nil {
		t.Fatal(err)
	}
	if len(y) != len(x)+300 || ch.Stats().NonConverged != 0 {
		t.Fatalf("%d samples", len(y))
	}
	tol := (math.Pow(10, 0.02/20) - 1) * 0.4
	for i := range x {
		if d := math.Abs(y[i] - x[i]/2); d > tol {
			t.Fatalf("sample %d: %g, want %g", i, y[i], x[i]/2)
		}
	}
}

// The sine run streams: a wait to the 2 s limit allocates what a wait to
// 0.5 s does, within 64 KiB (buffering would cost 8 bytes a sample).
func TestSineConstantMemory(t *testing.T) {
	e := engine(t, rcChain, 2)
	alloc := func(maxSettle float64) uint64 {
		var before, after runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&before)
		rec, err := e.Sine(context.Background(), SineOptions{Freq: 1000.3, Amplitude: 0.5, SampleRate: 48000, Tolerance: 1e-300, MaxSettle: maxSettle})
		runtime.ReadMemStats(&after)
		if err != nil || rec.Settled {
			t.Fatalf("%v, settled %v", err, rec.Settled)
		}
		return after.TotalAlloc - before.TotalAlloc
	}
	short, long := alloc(0.5), alloc(2)
	if long > short+64<<10 {
		t.Errorf("2 s allocates %d B more than 0.5 s", long-short)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := e.Sine(ctx, SineOptions{Freq: 1000, Amplitude: 0.1, SampleRate: 48000}); err == nil {
		t.Error("cancelled context accepted")
	}
}

// A render through the demo chain starts at its operating point: with a
// silent input the output stays silent (no start-up thump). Bound 1 µV:
// −120 dB re 1 V, below a 16-bit step at the demo's 1 V full scale
// (3e-5 V), and far above the Newton tolerance's effect (≈1e-9 V); a
// start away from the DC point would show the coupling caps charging,
// volts at the output.
func TestNoThumpFromOperatingPoint(t *testing.T) {
	ch, err := chains.Load("../chains/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	e, err := Prepare(ch, 2)
	if err != nil {
		t.Fatal(err)
	}
	c, err := e.NewChannel(48000)
	if err != nil {
		t.Fatal(err)
	}
	src := make([]float64, 4096)
	dst := make([]float64, 4096)
	worst := 0.0
	for k := 0; k < 5; k++ {
		n := c.Process(dst, src)
		for _, v := range dst[:n] {
			worst = math.Max(worst, math.Abs(v*ch.FullScale))
		}
	}
	if worst > 1e-6 {
		t.Errorf("silent input gives %.3g V at the output", worst)
	}
}

// The hot loop does not allocate.
func TestChannelZeroAlloc(t *testing.T) {
	e := engine(t, strings.Replace(dividerChain, `pins = ["out", "gnd"] },`, `pins = ["out", "gnd"] },
  { ref = "D1", kind = "diode", pins = { anode = "out", cathode = "gnd" } },`, 1), 4)
	c, err := e.NewChannel(48000)
	if err != nil {
		t.Fatal(err)
	}
	src := make([]float64, 512)
	for i := range src {
		src[i] = math.Sin(float64(i) / 10)
	}
	dst := make([]float64, 512)
	c.Process(dst, src)
	if a := testing.AllocsPerRun(20, func() { c.Process(dst, src) }); a != 0 {
		t.Errorf("%v allocations per block", a)
	}
}

// Regression: a germanium build biased far off (Q2 trimmer at 0.1 and 0.2)
// and driven hard at 2x oversampling once let Newton start from an
// extrapolation that put a junction far into forward bias and accept a
// spurious root of the linearly continued exponentials, and the states ran
// away (1e25 V). The output of a −9 V circuit into its load cannot exceed
// the supply: check it stays below 9 V at every sample.
func TestGermaniumHardDriveStaysBounded(t *testing.T) {
	for _, trim := range []string{"0.1", "0.2"} {
		ch, err := chains.Load("../chains/germanium.toml")
		if err != nil {
			t.Fatal(err)
		}
		for _, kv := range []string{"fuzz.trim2=" + trim, "input.peak=400mV"} {
			if err := ch.Set(kv); err != nil {
				t.Fatal(err)
			}
		}
		e, err := Prepare(ch, 2)
		if err != nil {
			t.Fatal(err)
		}
		c, err := e.NewChannel(48000)
		if err != nil {
			t.Fatal(err)
		}
		src := make([]float64, 4096)
		dst := make([]float64, 4096)
		worst := 0.0
		for blk := 0; blk < 6; blk++ {
			for i := range src {
				src[i] = math.Sin(2 * math.Pi * 1000 * float64(blk*4096+i) / 48000)
			}
			n := c.Process(dst, src)
			for _, v := range dst[:n] {
				worst = math.Max(worst, math.Abs(v*ch.FullScale))
			}
		}
		if !(worst < 9) {
			t.Errorf("trim2 %s: output reached %.3g V", trim, worst)
		}
		if st := c.Stats(); st.NonConverged != 0 {
			t.Errorf("trim2 %s: %d samples did not converge", trim, st.NonConverged)
		}
	}
}

func TestRecordGeometry(t *testing.T) {
	tests := []struct {
		fs, f        float64
		minN         int
		n            int
		coherent     bool
		unitN, unitM int
	}{
		{48000, 1000, 4800, 4800, true, 48, 1},
		{48000, 440, 4800, 4800, true, 1200, 11},
		{44100, 1000, 4410, 4410, true, 441, 10},
		{48000, 5, 4800, 9600, true, 9600, 1},
		// No coherent unit within a second: ⌈4800·1000.3/48000⌉ = 101
		// cycles, round(101·48000/1000.3) = 4847 samples.
		{48000, 1000.3, 4800, 4847, false, 0, 0},
	}
	for _, tc := range tests {
		n, coh, un, um := RecordGeometry(tc.fs, tc.f, tc.minN)
		if n != tc.n || coh != tc.coherent || un != tc.unitN || um != tc.unitM {
			t.Errorf("RecordGeometry(%g, %g, %d) = %d, %v, %d, %d; want %d, %v, %d, %d",
				tc.fs, tc.f, tc.minN, n, coh, un, um, tc.n, tc.coherent, tc.unitN, tc.unitM)
		}
		// A coherent record holds a whole number of cycles (to the
		// 1e-6 cycle dsp/spectrum asks of one).
		cycles := float64(n) * tc.f / tc.fs
		if tc.coherent && math.Abs(cycles-math.Round(cycles)) > 1e-6 {
			t.Errorf("%g Hz: %d samples hold %.9f cycles", tc.f, n, cycles)
		}
	}
}

// The settle rule on windows whose DC decays as D·e^(−k·a): the relative
// change between windows k−1 and k is D·e^(−k·a)·(e^a − 1)/R, so the first
// k ≥ 2 with two consecutive changes within tol follows in closed form.
func TestSettleDetector(t *testing.T) {
	const (
		R   = 1.0 // RMS of the AC part
		D   = 0.5 // initial DC offset, V
		a   = 0.7 // decay per window
		tol = 1e-5
	)
	want := -1
	change := func(k int) float64 { return D * math.Exp(-float64(k)*a) * (math.Exp(a) - 1) / R }
	for k := 2; ; k++ {
		if change(k) <= tol && change(k-1) <= tol {
			want = k
			break
		}
	}
	d := settleDetector{tol: tol}
	w := make([]float64, 96)
	got := -1
	for k := 0; k < 100; k++ {
		dc := D * math.Exp(-float64(k)*a)
		for i := range w {
			w[i] = dc + R*math.Sqrt2*math.Sin(2*math.Pi*float64(i)/48)
		}
		d.next(w)
		if d.settled() {
			got = k
			break
		}
	}
	if got != want {
		t.Errorf("settled at window %d, want %d (closed form)", got, want)
	}
	allocs := testing.AllocsPerRun(100, func() { d.next(w) })
	if allocs != 0 {
		t.Errorf("settleDetector.next allocates %.0f times per call, want 0", allocs)
	}
}
