package spectrum

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// line is one sinusoidal component amp·sin(order·2π·f0·t + phase).
type line struct {
	order      int
	amp, phase float64
}

// synth returns n samples at fs of dc plus the given lines of f0.
func synth(n int, fs, f0, dc float64, lines ...line) []float64 {
	x := make([]float64, n)
	for t := range x {
		v := dc
		for _, l := range lines {
			v += l.amp * math.Sin(2*math.Pi*float64(l.order)*f0*float64(t)/fs+l.phase)
		}
		x[t] = v
	}
	return x
}

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// Closed form for two harmonics: THD_F = √(0.01² + 0.005²) = 1.1180 %
// (definition of IEC 61000-2-2 applied to the line amplitudes).
func TestAnalyzeTwoHarmonics(t *testing.T) {
	const (
		fs   = 48000.0
		a2   = 0.01
		a3   = 0.005
		ph1  = 0.4
		ph2  = 0.3
		ph3  = -1.1
		want = 0.011180339887498949 // √(a2²+a3²)
	)
	// Tolerance: the signal is noise-free and every component is
	// modelled, so the estimate is exact up to floating-point rounding
	// over N ≈ 5e4 samples; 1e-9 relative leaves room for that and
	// nothing else.
	const tol = 1e-9
	cases := []struct {
		name   string
		n      int
		f0     float64
		method Method
		want   Method
	}{
		{"coherent auto", 48000, 1000, MethodAuto, MethodBins},
		{"coherent fit", 48000, 1000, MethodFit, MethodFit},
		{"non-coherent auto", 47123, 1000, MethodAuto, MethodFit},
		{"non-coherent off-grid f0", 30011, 997.3, MethodFit, MethodFit},
		// 4099 is prime: exercises the Bluestein path; 41 cycles.
		{"coherent prime length", 4099, 41 * fs / 4099, MethodBins, MethodBins},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x := synth(c.n, fs, c.f0, 0, line{1, 1, ph1}, line{2, a2, ph2}, line{3, a3, ph3})
			a, err := Analyze(x, fs, c.f0, &Options{Method: c.method})
			if err != nil {
				t.Fatal(err)
			}
			if a.Method != c.want {
				t.Errorf("method %v, want %v", a.Method, c.want)
			}
			if e := relErr(a.THDF, want); e > tol {
				t.Errorf("THD_F = %.12g, want %.12g (rel err %.2g)", a.THDF, want, e)
			}
			// THD_R = THD_F/√(1+THD_F²) (definition, closed form).
			if e := relErr(a.THDR, want/math.Sqrt(1+want*want)); e > tol {
				t.Errorf("THD_R = %.12g, rel err %.2g", a.THDR, e)
			}
			if len(a.Harmonics) != 9 {
				t.Fatalf("%d harmonics, want orders 2..10", len(a.Harmonics))
			}
			checkLine(t, a.Fundamental, 1, c.f0, 1, ph1, 0, 100)
			checkLine(t, a.Harmonics[0], 2, 2*c.f0, a2, ph2, -40, 1)
			checkLine(t, a.Harmonics[1], 3, 3*c.f0, a3, ph3, 20*math.Log10(a3), 0.5)
			for _, h := range a.Harmonics[2:] {
				if h.Amplitude > 1e-12 {
					t.Errorf("order %d amplitude %.3g, want 0", h.Order, h.Amplitude)
				}
			}
			t.Logf("THD_F rel err %.2g", relErr(a.THDF, want))
		})
	}
}

func checkLine(t *testing.T, h Harmonic, order int, f, amp, phase, dbc, pct float64) {
	t.Helper()
	if h.Order != order || math.Abs(h.Frequency-f) > 1e-9*f {
		t.Errorf("line %d at %g Hz, want %d at %g Hz", h.Order, h.Frequency, order, f)
	}
	// Noise-free, fully modelled: exact to rounding (1e-9 relative,
	// 1e-8 rad, 1e-8 dB).
	if relErr(h.Amplitude, amp) > 1e-9 {
		t.Errorf("order %d amplitude %.12g, want %.12g", order, h.Amplitude, amp)
	}
	if math.Abs(math.Remainder(h.Phase-phase, 2*math.Pi)) > 1e-8 {
		t.Errorf("order %d phase %.12g, want %.12g", order, h.Phase, phase)
	}
	if math.Abs(h.DBc-dbc) > 1e-8 {
		t.Errorf("order %d dBc %.12g, want %.12g", order, h.DBc, dbc)
	}
	if relErr(h.Percent, pct) > 1e-9 {
		t.Errorf("order %d percent %.12g, want %.12g", order, h.Percent, pct)
	}
}

// A square wave's Fourier series has odd harmonics 1/k (handbook series,
// e.g. Kreyszig, Advanced Engineering Mathematics, Fourier series of a
// square wave). Σ_{k odd} 1/k² = π²/8, so with every order counted
// THD_F = √(π²/8 − 1) = 48.34 % and THD_R = √(1 − 8/π²) = 43.52 %.
func TestAnalyzeSquareWaveSeries(t *testing.T) {
	const (
		fs  = 48000.0
		n   = 8192
		m   = 3 // cycles; order 999 sits at bin 2997 < N/2
		top = 999
	)
	f0 := m * fs / n
	var lines []line
	var sumH float64 // Σ_{k=3,5..999} 1/k²
	for k := 1; k <= top; k += 2 {
		lines = append(lines, line{k, 1 / float64(k), 0})
		if k > 1 {
			sumH += 1 / float64(k*k)
		}
	}
	x := synth(n, fs, f0, 0, lines...)
	a, err := Analyze(x, fs, f0, &Options{MaxOrder: top})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Harmonics) != top-1 {
		t.Fatalf("%d harmonics, want %d", len(a.Harmonics), top-1)
	}
	// Against the truncated series itself: exact to rounding (1e-9).
	if e := relErr(a.THDF, math.Sqrt(sumH)); e > 1e-9 {
		t.Errorf("THD_F %.10g vs truncated series %.10g (rel %.2g)", a.THDF, math.Sqrt(sumH), e)
	}
	// Against the closed form of the infinite series. Truncation at 999
	// drops Σ_{k≥1001, odd} 1/k² < ∫_{999}^∞ dk/(2k²) = 1/1998 from
	// THD_F², so THD_F may sit below √(π²/8−1) by at most
	// (1/1998)/(2·0.4834) = 5.2e-4: tolerance 6e-4 (0.06 percentage
	// points).
	thdInf := math.Sqrt(math.Pi*math.Pi/8 - 1)
	if d := thdInf - a.THDF; d < 0 || d > 6e-4 {
		t.Errorf("THD_F = %.4f %%, closed form %.4f %% (diff %.2g)", 100*a.THDF, 100*thdInf, d)
	}
	// THD_R: same tail bound scaled by dTHD_R/dTHD_F = (1+THD_F²)^(-3/2) < 1.
	thdRInf := math.Sqrt(1 - 8/(math.Pi*math.Pi))
	if d := thdRInf - a.THDR; d < 0 || d > 6e-4 {
		t.Errorf("THD_R = %.4f %%, closed form %.4f %% (diff %.2g)", 100*a.THDR, 100*thdRInf, d)
	}
	if e := relErr(a.THDR, a.THDF/math.Sqrt(1+a.THDF*a.THDF)); e > 1e-12 {
		t.Errorf("THD_R %.12g breaks THD_F/√(1+THD_F²) (rel %.2g)", a.THDR, e)
	}
	// A square wave has no even harmonics (half-wave symmetry).
	if a.EvenEnergy > 1e-20 {
		t.Errorf("even energy %.3g, want 0", a.EvenEnergy)
	}
	t.Logf("THD_F %.5f %% (closed form %.5f %%), THD_R %.5f %% (closed form %.5f %%)",
		100*a.THDF, 100*thdInf, 100*a.THDR, 100*thdRInf)
}

// THD+N of a sine plus seeded white Gaussian noise of variance σ². The
// noise's one-sided density is σ²/(fs/2), so its RMS in [20 Hz, 20 kHz]
// is σ·√((20000−20)/(fs/2)) (Parseval; common practice).
func TestAnalyzeTHDNWhiteNoise(t *testing.T) {
	const (
		fs    = 48000.0
		f0    = 1000.0
		sigma = 1e-3
		lo    = 20.0
		hi    = 20000.0
	)
	bandRMS := sigma * math.Sqrt((hi-lo)/(fs/2))
	want := bandRMS / (1 / math.Sqrt2)
	cases := []struct {
		name string
		n    int
		seed uint64
		// Statistical tolerance, relative, on THD+N (an RMS). With
		// K ≈ 19980 bins in the band each bin's power is χ²₂, so the band
		// power has relative s.d. 1/√K = 0.71 % and its root 0.35 %; 4 s.d.
		// is 1.4 %. The Blackman–Harris window's noise bandwidth
		// (2.0 bins) halves the independent bins: s.d. 0.5 %, 4 s.d. 2 %.
		tol float64
	}{
		{"coherent", 48000, 1, 0.015},
		{"non-coherent", 47123, 2, 0.02},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(c.seed, 0x5eed))
			noise := make([]float64, c.n)
			for i := range noise {
				noise[i] = sigma * rng.NormFloat64()
			}
			x := synth(c.n, fs, f0, 0, line{1, 1, 0.2})
			for i := range x {
				x[i] += noise[i]
			}
			a, err := Analyze(x, fs, f0, nil)
			if err != nil {
				t.Fatal(err)
			}
			if e := relErr(a.THDN, want); e > c.tol {
				t.Errorf("THD+N %.6g, want %.6g (rel err %.3g > %.3g)", a.THDN, want, e, c.tol)
			}
			t.Logf("%s: THD+N %.6g vs %.6g, rel err %.3g (tol %.3g)", c.name, a.THDN, want, relErr(a.THDN, want), c.tol)

			if a.Method != MethodBins {
				return
			}
			// Same realization, measured directly with gonum's FFT on the
			// noise alone over the same bins. The analysis also removes
			// the noise in bins 0 and 1000 (2 of ~19980): 1e-3 relative.
			fft := fourier.NewFFT(c.n)
			coef := fft.Coefficients(nil, noise)
			var p float64
			for k := 20; k <= 20000; k++ {
				p += 2 * (real(coef[k])*real(coef[k]) + imag(coef[k])*imag(coef[k]))
			}
			real := math.Sqrt(p/float64(c.n*c.n)) * math.Sqrt2
			if e := relErr(a.THDN, real); e > 1e-3 {
				t.Errorf("THD+N %.8g vs realized in-band noise %.8g (rel %.2g)", a.THDN, real, e)
			}
			t.Logf("vs realized noise: rel err %.2g", relErr(a.THDN, real))
		})
	}
}

// With no noise and every harmonic inside the band, THD+N counts exactly
// the harmonics, so THD+N = THD_F (definitions of AES17 and IEC 61000-2-2).
func TestAnalyzeTHDNEqualsTHDWithoutNoise(t *testing.T) {
	const fs = 48000.0
	cases := []struct {
		name string
		n    int
		// Bins: rounding only. Fit: the windowed residual's power for a
		// tone of amplitude A is A²/2 times 1 + Re(W(2f)·…)/Σw², where
		// W(2f), the window's transform at twice the tone frequency (here
		// ≥ 2000 bins out), is negligible: rounding dominates too.
		tol float64
	}{
		{"coherent", 48000, 1e-9},
		{"non-coherent", 47123, 1e-9},
	}
	for _, c := range cases {
		x := synth(c.n, fs, 1000, 0.1, line{1, 1, 0}, line{2, 0.02, 1}, line{5, 0.004, 2})
		a, err := Analyze(x, fs, 1000, nil)
		if err != nil {
			t.Fatal(err)
		}
		if e := relErr(a.THDN, a.THDF); e > c.tol {
			t.Errorf("%s: THD+N %.10g vs THD_F %.10g (rel %.2g)", c.name, a.THDN, a.THDF, e)
		}
		t.Logf("%s: THD+N/THD_F − 1 = %.2g", c.name, a.THDN/a.THDF-1)
	}
}

// Orders at or above Nyquist are skipped: bins need 2·h·M < N, the fit
// needs h·f0 ≤ fs/2 − fs/N.
func TestAnalyzeNyquistLimit(t *testing.T) {
	cases := []struct {
		name     string
		n        int
		fs, f0   float64
		maxOrder int
		wantTop  int // highest counted order, worked by hand
	}{
		{"bins 1 kHz at 48 kHz", 48000, 48000, 1000, 50, 23}, // 24 kHz is Nyquist: skipped
		{"fit 1 kHz at 48 kHz", 47123, 48000, 1000, 50, 23},  // 23 kHz ≤ 23998.98 Hz
		{"bins 7 kHz at 48 kHz", 48000, 48000, 7000, 10, 3},  // 28 kHz > 24 kHz
		{"fit 6 kHz at 44.1 kHz", 44101, 44100, 6000, 10, 3}, // 18 kHz ≤ 22049 Hz < 24 kHz
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			x := synth(c.n, c.fs, c.f0, 0, line{1, 1, 0}, line{2, 0.1, 0})
			a, err := Analyze(x, c.fs, c.f0, &Options{MaxOrder: c.maxOrder})
			if err != nil {
				t.Fatal(err)
			}
			if got := len(a.Harmonics) + 1; got != c.wantTop {
				t.Errorf("highest order %d, want %d", got, c.wantTop)
			}
			for _, h := range a.Harmonics {
				if h.Frequency >= c.fs/2 {
					t.Errorf("order %d at %g Hz ≥ Nyquist", h.Order, h.Frequency)
				}
			}
		})
	}
}

// Half-wave asymmetric gain: x = sin θ for the negative half, 0.5·sin θ
// for the positive half, i.e. x = 0.75·sin θ − 0.25·|sin θ|. The Fourier
// series of a full-wave rectified sine, |sin θ| = 2/π − (4/π)·Σ_k
// cos(2kθ)/(4k²−1) (handbook series, from memory; it follows from
// integrating |sin θ|·cos 2kθ over a period), gives DC = −1/(2π),
// fundamental 0.75, even harmonics 2k of amplitude 1/(π(4k²−1)) at
// phase +π/2, and no odd ones.
func TestAnalyzeAsymmetricHalfWave(t *testing.T) {
	const (
		fs = 48000.0
		p  = 4096 // samples per cycle
		m  = 4
		n  = p * m
	)
	f0 := fs / p
	x := make([]float64, n)
	for i := range x {
		s := math.Sin(2 * math.Pi * float64(i) / p)
		x[i] = 0.75*s - 0.25*math.Abs(s)
	}
	a, err := Analyze(x, fs, f0, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Tolerance: the sampled series aliases orders near multiples of
	// p = 4096 onto the measured lines; their amplitudes are
	// ≤ 1/(π(4096²−1)) ≈ 2e-8 each and the tail sum is below 1e-7.
	const tol = 1e-7
	dc := -1 / (2 * math.Pi)
	if math.Abs(a.DC-dc) > tol {
		t.Errorf("DC %.10g, want %.10g", a.DC, dc)
	}
	if math.Abs(a.Fundamental.Amplitude-0.75) > tol {
		t.Errorf("fundamental %.10g, want 0.75", a.Fundamental.Amplitude)
	}
	var even float64
	for _, h := range a.Harmonics {
		want := 0.0
		if h.Order%2 == 0 {
			k := float64(h.Order / 2)
			want = 1 / (math.Pi * (4*k*k - 1))
			even += want * want / 2
			if math.Abs(h.Phase-math.Pi/2) > 1e-6 {
				t.Errorf("order %d phase %.8g, want π/2", h.Order, h.Phase)
			}
		}
		if math.Abs(h.Amplitude-want) > tol {
			t.Errorf("order %d amplitude %.10g, want %.10g", h.Order, h.Amplitude, want)
		}
	}
	if relErr(a.EvenEnergy, even) > 1e-5 {
		t.Errorf("even energy %.8g, want %.8g", a.EvenEnergy, even)
	}
	if !(a.EvenOddRatio > 1e6) {
		t.Errorf("even/odd ratio %.3g, want ≫ 1 (no odd harmonics)", a.EvenOddRatio)
	}
	// Samples at θ = π/2 and 3π/2 exist (p divisible by 4): peaks are
	// 0.5 and −1 exactly, up to sin rounding (1e-12).
	if math.Abs(a.PeakPositive-0.5) > 1e-12 || math.Abs(a.PeakNegative+1) > 1e-12 {
		t.Errorf("peaks %.12g, %.12g, want 0.5, -1", a.PeakPositive, a.PeakNegative)
	}
	// About DC: u = 0.5 + 1/(2π), d = 1 − 1/(2π); (u−d)/(u+d) = (1/π − 0.5)/1.5.
	asym := (1/math.Pi - 0.5) / 1.5
	if math.Abs(a.PeakAsymmetry-asym) > 1e-6 {
		t.Errorf("asymmetry %.8g, want %.8g", a.PeakAsymmetry, asym)
	}
	// Mean square of the record: 0.75²·½ + 0.25²·½ − 0 cross term (sin·|sin|
	// averages to 0) = 0.3125 (direct integration).
	if math.Abs(a.TotalRMS-math.Sqrt(0.3125)) > 1e-9 {
		t.Errorf("total RMS %.10g, want %.10g", a.TotalRMS, math.Sqrt(0.3125))
	}
}

// dBV re 1 V rms: a sine of peak A has RMS A/√2 (closed form), so 1 V
// peak reads 20·log10(1/√2) = −3.0103 dBV and 2√2 V peak reads +6.0206 dBV.
func TestAnalyzeLevel(t *testing.T) {
	cases := []struct {
		peak, dc         float64
		wantRMS, wantDBV float64
	}{
		{1, 0, 1 / math.Sqrt2, 20 * math.Log10(1/math.Sqrt2)},
		{2 * math.Sqrt2, 0.5, 2, 20 * math.Log10(2)},
		{1e-3, -0.2, 1e-3 / math.Sqrt2, -60 - 20*math.Log10(math.Sqrt2)},
	}
	for _, c := range cases {
		x := synth(4800, 48000, 1000, c.dc, line{1, c.peak, 0})
		a, err := Analyze(x, 48000, 1000, nil)
		if err != nil {
			t.Fatal(err)
		}
		// Exact line, coherent record: rounding only.
		if relErr(a.RMS, c.wantRMS) > 1e-12 || math.Abs(a.DBV-c.wantDBV) > 1e-10 {
			t.Errorf("peak %g: RMS %.12g dBV %.10g, want %.12g, %.10g", c.peak, a.RMS, a.DBV, c.wantRMS, c.wantDBV)
		}
		if math.Abs(a.DC-c.dc) > 1e-12 {
			t.Errorf("peak %g: DC %.12g, want %g", c.peak, a.DC, c.dc)
		}
		// RMS of DC plus sine: √(dc² + A²/2).
		if tr := math.Sqrt(c.dc*c.dc + c.peak*c.peak/2); relErr(a.TotalRMS, tr) > 1e-12 {
			t.Errorf("peak %g: total RMS %.12g, want %.12g", c.peak, a.TotalRMS, tr)
		}
		// Symmetric sine about its DC: no asymmetry.
		if math.Abs(a.PeakAsymmetry) > 1e-12 {
			t.Errorf("peak %g: asymmetry %.3g", c.peak, a.PeakAsymmetry)
		}
	}
}

func TestAnalyzeErrors(t *testing.T) {
	good := synth(4800, 48000, 1000, 0, line{1, 1, 0})
	nan := append([]float64(nil), good...)
	nan[17] = math.NaN()
	inf := append([]float64(nil), good...)
	inf[4000] = math.Inf(-1)
	cases := []struct {
		name   string
		x      []float64
		fs, f0 float64
		opt    *Options
		want   error
		index  int
	}{
		{"NaN sample", nan, 48000, 1000, nil, ErrNonFinite, 17},
		{"-Inf sample", inf, 48000, 1000, nil, ErrNonFinite, 4000},
		{"zero rate", good, 0, 1000, nil, ErrInvalid, -1},
		{"NaN rate", good, math.NaN(), 1000, nil, ErrInvalid, -1},
		{"f0 at Nyquist", good, 48000, 24000, nil, ErrInvalid, -1},
		{"negative f0", good, 48000, -5, nil, ErrInvalid, -1},
		{"under one cycle", good[:40], 48000, 1000, nil, ErrShort, -1},
		{"empty", nil, 48000, 1000, nil, ErrShort, -1},
		{"bins on non-coherent", good[:4790], 48000, 1000, &Options{Method: MethodBins}, ErrNotCoherent, -1},
		{"negative MaxOrder", good, 48000, 1000, &Options{MaxOrder: -1}, ErrInvalid, -1},
		{"fit MaxOrder too high", good, 48000, 10, &Options{MaxOrder: 999, Method: MethodFit}, ErrInvalid, -1},
		{"band reversed", good, 48000, 1000, &Options{BandLow: 5000, BandHigh: 100}, ErrInvalid, -1},
		{"band above Nyquist", good, 48000, 1000, &Options{BandLow: 30000, BandHigh: 40000}, ErrInvalid, -1},
		{"unknown method", good, 48000, 1000, &Options{Method: 7}, ErrInvalid, -1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Analyze(c.x, c.fs, c.f0, c.opt)
			if !errors.Is(err, c.want) {
				t.Fatalf("error %v, want %v", err, c.want)
			}
			var e *Error
			if !errors.As(err, &e) || e.Index != c.index {
				t.Errorf("error %#v, want *Error with index %d", err, c.index)
			}
			t.Log(err)
		})
	}
}
