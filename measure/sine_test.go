package measure

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"runtime"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/models"
	"renderchain/report"
)

func loadChain(t testing.TB, name string) *chains.Chain {
	t.Helper()
	ch, err := chains.Load("testdata/" + name + ".toml")
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

const (
	rcR         = 10e3   // Ω, testdata/rc-lowpass.toml
	rcC         = 10e-9  // F
	internalFs  = 192000 // Hz: 48 kHz × the default oversampling of 4
	rippleLimit = 0.01   // dB: the rate converter's passband ripple bound (dsp/resample.PassbandRipple)
)

// warped is the analogue frequency the wave digital solver's bilinear
// discretisation at rate fs shows at frequency f: (fs/π)·tan(π·f/fs)
// (Oppenheim & Schafer, Discrete-Time Signal Processing, sec. 7.2).
func warped(f, fs float64) float64 { return fs / math.Pi * math.Tan(math.Pi*f/fs) }

// rcLowpass is the first-order low-pass 1/(1 + jωRC) (handbook formula).
func rcLowpass(f float64) complex128 {
	return 1 / complex(1, 2*math.Pi*f*rcR*rcC)
}

// An RC low-pass measured through the whole render path: its gain and
// phase against the analytic first-order formula, and its distortion
// against the floor a linear circuit allows.
func TestSineLinearRC(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	tests := []struct {
		freq     float64
		coherent bool
	}{
		{100, true}, {1000, true}, {5000, true}, {1000.3, false}, {15000, true},
	}
	for _, tc := range tests {
		r, err := Sine(context.Background(), ch, tc.freq, 0.5, Options{})
		if err != nil {
			t.Fatalf("%g Hz: %v", tc.freq, err)
		}
		h := rcLowpass(warped(tc.freq, internalFs))
		wantDB := db(cmplx.Abs(h))
		wantDeg := cmplx.Phase(h) * 180 / math.Pi
		gotDB := float64(r.GainDB)
		t.Logf("%7g Hz: gain %.5f dB (analytic %.5f, error %.2e dB), phase %.4f° (analytic %.4f°), THD_F %.2e, THD+N %.2e, %s, settled at %.2f s",
			tc.freq, gotDB, wantDB, gotDB-wantDB, r.Fundamental.PhaseDeg, wantDeg, float64(r.THDPercent)/100, float64(r.THDNPercent)/100, r.Record.Method, r.Settle.Seconds)
		// Tolerance: the rate converter's passband ripple bound, 0.01 dB.
		if math.Abs(gotDB-wantDB) > rippleLimit {
			t.Errorf("%g Hz: gain %.5f dB, want %.5f ± %g dB", tc.freq, gotDB, wantDB, rippleLimit)
		}
		// Tolerance 0.05°: the converter's filters are linear-phase with
		// their delay removed, so only its ripple can shift the phase.
		if math.Abs(r.Fundamental.PhaseDeg-wantDeg) > 0.05 {
			t.Errorf("%g Hz: phase %.4f°, want %.4f° ± 0.05°", tc.freq, r.Fundamental.PhaseDeg, wantDeg)
		}
		// A linear circuit makes no harmonics; what the render path can
		// add is bounded by the converter's 100 dB stopband: THD_F below
		// 1e-5 (−100 dB).
		if float64(r.THDPercent)/100 > 1e-5 || float64(r.THDNPercent)/100 > 1e-5 {
			t.Errorf("%g Hz: THD_F %.2e, THD+N %.2e; want both below 1e-5", tc.freq, float64(r.THDPercent)/100, float64(r.THDNPercent)/100)
		}
		if r.Record.Coherent != tc.coherent || !r.Settle.Settled || r.Clipping.Clips {
			t.Errorf("%g Hz: coherent %v (want %v), settled %v, clips %v", tc.freq, r.Record.Coherent, tc.coherent, r.Settle.Settled, r.Clipping.Clips)
		}
	}
}

// Probing the source node measures the EMF itself: 0 dB and 0° through the
// render path (tolerance: the converter's 0.01 dB passband ripple).
func TestSineProbeSource(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	r, err := Sine(context.Background(), ch, 2000, 0.25, Options{Probe: "in"})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(float64(r.GainDB)) > rippleLimit || math.Abs(r.Fundamental.PhaseDeg) > 0.05 || r.Probe != "in" {
		t.Errorf("probe in: gain %.5f dB, phase %.4f°, probe %q; want 0 dB, 0°, in", float64(r.GainDB), r.Fundamental.PhaseDeg, r.Probe)
	}
	// The peak of a 0.25 V sine (tolerance: ripple, 0.01 dB = 0.115 %).
	if math.Abs(r.PeakPositiveV-0.25) > 0.25*0.00115 || math.Abs(r.PeakNegativeV+0.25) > 0.25*0.00115 {
		t.Errorf("peaks %+.6f / %+.6f V, want ±0.25 V", r.PeakPositiveV, r.PeakNegativeV)
	}
}

// A symmetric antiparallel-diode clipper has half-wave symmetry, f(−x) =
// −f(x), so its output holds odd harmonics only (physics; any Fourier
// text): even harmonics must stay below −80 dBc while the odd ones are
// strong.
func TestSineClipperOddOnly(t *testing.T) {
	ch := loadChain(t, "clipper")
	for _, amp := range []float64{0.3, 1, 3} {
		r, err := Sine(context.Background(), ch, 1000, amp, Options{})
		if err != nil {
			t.Fatal(err)
		}
		worstEven := math.Inf(-1)
		for _, h := range r.Harmonics {
			if h.Order%2 == 0 {
				worstEven = math.Max(worstEven, float64(h.DBc))
			}
		}
		h3 := harmonicDBc(r, 3)
		t.Logf("%g V peak: THD_F %.3f %%, H3 %.1f dBc, worst even %.1f dBc, even/odd %.1f dB, asymmetry %.1e, dwell %.2f/%.2f, clips %v",
			amp, float64(r.THDPercent), h3, worstEven, float64(r.EvenOddDB), float64(r.PeakAsymmetry),
			float64(r.Clipping.DwellPositive), float64(r.Clipping.DwellNegative), r.Clipping.Clips)
		if worstEven > -80 {
			t.Errorf("%g V: worst even harmonic %.1f dBc, want below −80 dBc", amp, worstEven)
		}
		// The check must not pass vacuously: the diodes conduct hard
		// at these levels (threshold about 0.5 V), so H3 is large.
		if amp >= 1 && h3 < -40 {
			t.Errorf("%g V: H3 %.1f dBc; the clipper should be clipping (> −40 dBc)", amp, h3)
		}
		// Symmetric excursions (tolerance 1e-4 of the swing).
		if math.Abs(float64(r.PeakAsymmetry)) > 1e-4 || math.Abs(r.DCV) > 1e-6 {
			t.Errorf("%g V: asymmetry %.2e, DC %.2e V; want symmetric about 0", amp, float64(r.PeakAsymmetry), r.DCV)
		}
	}
}

// Common practice (bench fact, no published source): a two-transistor
// fuzz's trimmers are set with a 20 mV peak-to-peak sine; correctly biased,
// its output at minimum fuzz is close to a clean sine and at maximum fuzz
// close to a square wave. For the silicon fuzz template at its default
// trimmers: THD_F below 10 % at minimum fuzz, above 30 % at maximum, at
// 1 kHz.
func TestSineFuzzTemplateTrimmerLevel(t *testing.T) {
	ch := loadChain(t, "fuzz-si")
	amp, err := models.ParseAmplitude("20mVpp")
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		fuzz     string
		min, max float64 // THD_F, %
	}{{"0", 0, 10}, {"1", 30, 100}} {
		c := ch.Clone()
		if err := c.Set("fuzz.fuzz=" + tc.fuzz); err != nil {
			t.Fatal(err)
		}
		r, err := Sine(context.Background(), c, 1000, amp, Options{})
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("fuzz %s: THD_F %.4g %%, THD+N %.4g %%, gain %.2f dB, output %.3f V rms, H2 %.1f dBc, H3 %.1f dBc, clips %v, settled %v at %.2f s",
			tc.fuzz, float64(r.THDPercent), float64(r.THDNPercent), float64(r.GainDB), r.Fundamental.VRMS, harmonicDBc(r, 2), harmonicDBc(r, 3),
			r.Clipping.Clips, r.Settle.Settled, r.Settle.Seconds)
		if float64(r.THDPercent) < tc.min || float64(r.THDPercent) > tc.max {
			t.Errorf("fuzz %s: THD_F %.4g %%, want between %g %% and %g %%", tc.fuzz, float64(r.THDPercent), tc.min, tc.max)
		}
	}
}

func TestSineBadInput(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	tests := []struct {
		freq, amp float64
		opt       Options
		want      string // in the message
	}{
		{24000, 0.1, Options{}, "24 kHz"},
		{30000, 0.1, Options{}, "Nyquist"},
		{4.9, 0.1, Options{}, "5 Hz"},
		{1000, 0, Options{}, "amplitude"},
		{1000, -1, Options{}, "amplitude"},
		{1000, math.NaN(), Options{}, "amplitude"},
		{1000, 0.1, Options{Probe: "rc.nowhere"}, `"rc.nowhere"`},
		{1000, 0.1, Options{Probe: "gnd"}, "ground"},
		{1000, 0.1, Options{MaxOrder: 1}, "harmonic"},
	}
	for _, tc := range tests {
		_, err := Sine(context.Background(), ch, tc.freq, tc.amp, tc.opt)
		var fe *models.FieldError
		if !errors.As(err, &fe) || !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("Sine(%g Hz, %g V, %+v) = %v; want a one-line *models.FieldError naming %s", tc.freq, tc.amp, tc.opt, err, tc.want)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Sine(ctx, ch, 1000, 0.1, Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled context: %v", err)
	}
}

// Dwell ratios of waveforms with known Fourier series (Abramowitz &
// Stegun-style handbook series): a sine is 1 by definition; a square wave,
// (4/π)·Σ sin(hθ)/h over odd h, is flat-topped; a triangle,
// (8/π²)·Σ (−1)^((h−1)/2) sin(hθ)/h², is pointed.
func TestDwellRatios(t *testing.T) {
	series := func(amp func(h int) float64) *spectrum.Analysis {
		an := &spectrum.Analysis{Fundamental: spectrum.Harmonic{Order: 1, Amplitude: amp(1)}}
		for h := 2; h <= 10; h++ {
			an.Harmonics = append(an.Harmonics, spectrum.Harmonic{Order: h, Amplitude: math.Abs(amp(h)),
				Phase: map[bool]float64{true: math.Pi, false: 0}[amp(h) < 0]})
		}
		return an
	}
	sine := series(func(h int) float64 { return map[bool]float64{true: 1}[h == 1] })
	square := series(func(h int) float64 {
		if h%2 == 0 {
			return 0
		}
		return 4 / math.Pi / float64(h)
	})
	triangle := series(func(h int) float64 {
		if h%2 == 0 {
			return 0
		}
		return 8 / (math.Pi * math.Pi) * math.Pow(-1, float64((h-1)/2)) / float64(h*h)
	})
	tests := []struct {
		name   string
		an     *spectrum.Analysis
		lo, hi float64
	}{
		// Tolerance for the sine: one point of the 2048-point cycle,
		// 1/(2048·0.1436) = 0.0034.
		{"sine", sine, 1 - 0.0035, 1 + 0.0035},
		{"square", square, 2.5, 3.5},
		{"triangle", triangle, 0.5, 0.8},
	}
	for _, tc := range tests {
		up, down := dwellRatios(tc.an)
		if up < tc.lo || up > tc.hi || math.Abs(up-down) > 0.0035 {
			t.Errorf("%s: dwell ratios %.4f / %.4f, want both in [%g, %g]", tc.name, up, down, tc.lo, tc.hi)
		}
	}
}

// The measurement streams: memory allocated does not grow with how long it
// waits for the output to settle. A tolerance no window can meet runs it
// to the limit; 0.5 s and 2 s of rendering must allocate the same to
// within 64 KiB, where buffering the stream would cost 8 bytes a sample
// (576 KiB for the 1.5 s difference at 48 kHz).
func TestSineConstantMemory(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	alloc := func(maxSettle float64) uint64 {
		var before, after runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&before)
		r, err := Sine(context.Background(), ch, 1000.3, 0.5, Options{SettleTolerance: 1e-300, MaxSettle: maxSettle})
		runtime.ReadMemStats(&after)
		if err != nil {
			t.Fatal(err)
		}
		if r.Settle.Settled || r.Settle.Seconds < maxSettle-0.2 || len(r.Warnings) == 0 {
			t.Errorf("MaxSettle %g s: settled %v at %.2f s, warnings %v; want the limit reached and warned about", maxSettle, r.Settle.Settled, r.Settle.Seconds, r.Warnings)
		}
		return after.TotalAlloc - before.TotalAlloc
	}
	short, long := alloc(0.5), alloc(2)
	t.Logf("allocated %d B for 0.5 s, %d B for 2 s", short, long)
	if long > short+64<<10 {
		t.Errorf("2 s allocates %d B more than 0.5 s: the measurement should stream in constant memory", long-short)
	}
}

func db(ratio float64) float64 { return report.DB(ratio) }

// A source sine beyond models.LargeSignal (5 V peak, past any pickup:
// common practice) is measured but warned about with the millivolt
// reading; the RC low-pass at 5 V and below is not.
func TestSineLargeSourceWarns(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	for _, c := range []struct {
		amp  float64
		want bool
	}{{5, false}, {20, true}} {
		r, err := Sine(context.Background(), ch, 1000, c.amp, Options{})
		if err != nil {
			t.Fatal(err)
		}
		got := strings.Contains(strings.Join(r.Warnings, "\n"), "beyond any guitar")
		if got != c.want || c.want && !strings.Contains(strings.Join(r.Warnings, "\n"), "did you mean 20 mV?") {
			t.Errorf("%g V: warnings %q, want the large-signal one %v", c.amp, r.Warnings, c.want)
		}
	}
}
