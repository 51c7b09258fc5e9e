package loudness

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// writeFadedSine writes A·w(n)·sin(2π·f·n/fs + φ) to channel ch of m (other
// channels silent), where w is a 20 ms raised-cosine fade-in and then 1.
// The fade keeps the onset band-limited: an abrupt start would make the
// reconstructed waveform overshoot (Gibbs), which is a real true peak but
// not the sine's.
func writeFadedSine(m *Meter, ch int, a, f, phase, seconds float64) {
	fs, nch := m.fs, len(m.ch)
	total := int(seconds * fs)
	fade := int(0.02 * fs)
	buf := make([]float64, 1024*nch)
	for start := 0; start < total; start += 1024 {
		k := min(1024, total-start)
		for i := range k {
			n := start + i
			w := 1.0
			if n < fade {
				w = 0.5 - 0.5*math.Cos(math.Pi*float64(n)/float64(fade))
			}
			buf[i*nch+ch] = a * w * math.Sin(2*math.Pi*f*float64(n)/fs+phase)
		}
		m.Write(buf[:k*nch])
	}
}

// EBU Tech 3341 true-peak cases 15–20 in spirit (from memory): sines whose
// sample values miss the crest by a known amount. For each, the crest A lies
// exactly half-way between two samples, a point on the 4x grid:
//
//	fs/4 at 45°:   samples at 45° + k·90°,   sample peak A·sin 45°   = −3.01 dB re A
//	fs/6 at 0°:    samples at k·60°,         sample peak A·sin 60°   = −1.25 dB
//	fs/8 at 22.5°: samples at 22.5° + k·45°, sample peak A·sin 67.5° = −0.69 dB
//	fs/4 at 0°:    samples hit the crest,    sample peak A           =  0 dB
//
// Expected true peak 20·log10 A with the Tech 3341 tolerance −0.4/+0.2 dB,
// and, since the crest is on the grid, the interpolator's own bound
// ±0.02 dB (its error ≤ 1.8e-3 of the amplitude, see
// TestInterpolatorPassband). Sample peaks are closed-form: ±1e-9 dB
// (rounding only). The sine is in the right channel of a stereo meter,
// with the left channel silent.
func TestTruePeakKnownCrest(t *testing.T) {
	const a = 0.5 // −6.02 dBFS
	deg := math.Pi / 180
	cases := []struct {
		name         string
		fs, f, phase float64
		sampleRatio  float64 // sample peak / A
	}{
		{"fs/4 at 45°", 48000, 12000, 45 * deg, math.Sin(45 * deg)},
		{"fs/6 at 0°", 48000, 8000, 0, math.Sin(60 * deg)},
		{"fs/8 at 22.5°", 48000, 6000, 22.5 * deg, math.Sin(67.5 * deg)},
		{"fs/4 at 0°", 48000, 12000, 0, 1},
		{"fs/4 at 45°, 44.1 kHz", 44100, 11025, 45 * deg, math.Sin(45 * deg)},
		{"fs/4 at 45°, 192 kHz", 192000, 48000, 45 * deg, math.Sin(45 * deg)},
	}
	want := 20 * math.Log10(a)
	for _, c := range cases {
		m := newTestMeter(t, c.fs, 2)
		writeFadedSine(m, 1, a, c.f, c.phase, 1)
		tp, sp := m.TruePeak(), m.SamplePeak()
		wantSP := 20 * math.Log10(a*c.sampleRatio)
		t.Logf("%s: sample peak %.4f dBFS (want %.4f), true peak %.4f dBTP (want %.4f, Δ %+.4f)",
			c.name, sp, wantSP, tp, want, tp-want)
		if math.Abs(sp-wantSP) > 1e-9 {
			t.Errorf("%s: sample peak %.6f dBFS, want %.6f", c.name, sp, wantSP)
		}
		if d := tp - want; d < -0.4 || d > 0.2 {
			t.Errorf("%s: true peak %.3f dBTP, want %.3f −0.4/+0.2 (Tech 3341)", c.name, tp, want)
		}
		if d := tp - want; math.Abs(d) > 0.02 {
			t.Errorf("%s: true peak %.4f dBTP, want %.4f ± 0.02 (interpolator bound)", c.name, tp, want)
		}
	}
}

// For a sine of any phase, the 4x grid lies at most 1/8 sample from the
// crest, so the largest grid value is at least A·cos(π·f/(4·fs)) (closed
// form) and at most A; the interpolator may add its error bound, 1.8e-3·A.
// Frequencies up to 0.4167·fs (20 kHz at 48 kHz), seeded random phases.
func TestTruePeakAnyPhase(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	const a, eps = 0.25, 1.8e-3
	for i := range 24 {
		fs := []float64{44100, 48000, 96000}[i%3]
		f := 100 + rng.Float64()*(0.4167*fs-100)
		phase := 2 * math.Pi * rng.Float64()
		m := newTestMeter(t, fs, 1)
		writeFadedSine(m, 0, a, f, phase, 0.2)
		got := math.Pow(10, m.TruePeak()/20)
		lo, hi := a*(math.Cos(math.Pi*f/(4*fs))-eps), a*(1+eps)
		if got < lo || got > hi {
			t.Errorf("fs %g, f %.1f Hz, phase %.3f: true peak %.6f, want [%.6f, %.6f]", fs, f, phase, got, lo, hi)
		}
	}
}

// Each fractional phase of the interpolator against ideal band-limited
// interpolation (Shannon): for x[k] = exp(jωk) the exact value at
// k = tpCentre + p/4 is exp(jω(tpCentre + p/4)). The design claims an error
// ≤ 1.8e-3 up to 0.4167·fs; this checks it on a 10 Hz grid at 48 kHz.
func TestInterpolatorPassband(t *testing.T) {
	const fs = 48000
	worst := 0.0
	for p := range tpPhases {
		for f := 0.0; f <= 0.4167*fs; f += 10 {
			w := 2 * math.Pi * f / fs
			var y complex128
			for k, h := range tpPhases[p] {
				y += complex(h, 0) * cmplx.Exp(complex(0, w*float64(k)))
			}
			ideal := cmplx.Exp(complex(0, w*(tpCentre+float64(p+1)/tpFactor)))
			worst = math.Max(worst, cmplx.Abs(y-ideal))
		}
	}
	t.Logf("largest interpolation error up to 0.4167 fs: %.3g of amplitude", worst)
	if worst > 1.8e-3 {
		t.Errorf("interpolation error %.3g > 1.8e-3", worst)
	}
}
