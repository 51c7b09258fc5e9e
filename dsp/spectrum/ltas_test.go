package spectrum

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

func sine(n int, fs, f, amp float64) []float64 {
	return synth(n, fs, f, 0, line{1, amp, 0.1})
}

// writeChunked feeds x to l in pseudo-random chunk sizes 1..maxChunk.
func writeChunked(t *testing.T, l *LTAS, x []float64, rng *rand.Rand, maxChunk int) {
	t.Helper()
	for len(x) > 0 {
		c := min(len(x), 1+rng.IntN(maxChunk))
		if err := l.Write(x[:c]); err != nil {
			t.Fatal(err)
		}
		x = x[c:]
	}
}

// The accumulated bins equal Welch's estimate computed independently:
// frames at hops of N/2, periodic Hann w_i = ½(1 − cos(2πi/N)) from its
// formula (Harris 1978, DFT-even form), and the DFT taken both
// from its definition and from gonum's dsp/fourier on the same frames.
func TestLTASBinsMatchReference(t *testing.T) {
	const (
		n  = 256
		fs = 8000.0
	)
	rng := rand.New(rand.NewPCG(11, 12))
	x := make([]float64, 5*n/2+37) // frames at 0, 128, 256, 384: 4 frames
	for i := range x {
		x[i] = 0.3*rng.NormFloat64() + 0.2*math.Sin(0.05*float64(i))
	}
	l, err := NewLTAS(fs, n)
	if err != nil {
		t.Fatal(err)
	}
	writeChunked(t, l, x, rng, 100)
	if l.Frames() != 4 {
		t.Fatalf("%d frames, want 4", l.Frames())
	}
	got := l.PowerSpectrum(nil)

	w := make([]float64, n)
	var sw float64
	for i := range w {
		w[i] = 0.5 * (1 - math.Cos(2*math.Pi*float64(i)/n))
		sw += w[i] * w[i]
	}
	fft := fourier.NewFFT(n)
	refNaive := make([]float64, n/2+1)
	refGonum := make([]float64, n/2+1)
	frame := make([]float64, n)
	frames := 0
	for s := 0; s+n <= len(x); s += n / 2 {
		for i := range frame {
			frame[i] = x[s+i] * w[i]
		}
		cn := naiveDFT(frame)
		cg := fft.Coefficients(nil, frame)
		for k := range refNaive {
			refNaive[k] += real(cn[k])*real(cn[k]) + imag(cn[k])*imag(cn[k])
			refGonum[k] += real(cg[k])*real(cg[k]) + imag(cg[k])*imag(cg[k])
		}
		frames++
	}
	var peak, total, devN, devG float64
	for k := range refNaive {
		c := 2.0
		if k == 0 || k == n/2 {
			c = 1
		}
		s := c / (float64(frames) * n * sw)
		refNaive[k] *= s
		refGonum[k] *= s
		peak = max(peak, refNaive[k])
		total += got[k]
		devN = max(devN, math.Abs(got[k]-refNaive[k]))
		devG = max(devG, math.Abs(got[k]-refGonum[k]))
	}
	// Same arithmetic up to summation order: 1e-12 of the largest bin.
	if devN > 1e-12*peak || devG > 1e-12*peak {
		t.Errorf("bins deviate: %.3g from definition, %.3g from gonum (peak %.3g)", devN, devG, peak)
	}
	t.Logf("max bin deviation / peak: definition %.2g, gonum %.2g", devN/peak, devG/peak)

	// Parseval: Σ P_k = mean over frames of Σ(w·x)²/Σw² (rounding: 1e-12).
	var ms float64
	for s := 0; s+n <= len(x); s += n / 2 {
		for i := range frame {
			v := x[s+i] * w[i]
			ms += v * v
		}
	}
	ms /= float64(frames) * sw
	if relErr(total, ms) > 1e-12 {
		t.Errorf("Σ P_k = %.12g, windowed mean square %.12g", total, ms)
	}
}

// A full-scale sine reads 0 dB in its band (AES17 full-scale convention,
// as defined by FullScaleMeanSquare); a sine of peak A reads 20·log10(A).
func TestLTASSineBands(t *testing.T) {
	cases := []struct {
		fs, f, amp float64
		band       int // band number holding f
	}{
		{48000, 1000, 1, 0},
		{48000, 1000, 0.1, 0},
		{44100, 997, 1, 0},
		{48000, 10000, 0.5, 10},
		{96000, 250, 1, -6},
	}
	for _, c := range cases {
		l, err := NewLTAS(c.fs, 0)
		if err != nil {
			t.Fatal(err)
		}
		if err := l.Write(sine(int(3*c.fs), c.fs, c.f, c.amp)); err != nil {
			t.Fatal(err)
		}
		want := 20 * math.Log10(c.amp)
		var next float64 = math.Inf(-1)
		for _, b := range l.Bands() {
			if b.Index == c.band {
				// The Hann main lobe (±2 bins of ≤ 1.5 Hz) lies wholly
				// inside the band and Welch's power sum is unbiased for
				// a stationary tone: 0.01 dB covers the sidelobe energy
				// outside the band (Hann, > 50 bins from the edge).
				t.Logf("%g Hz at %g: band level error %.2g dB", c.f, c.amp, b.Level-want)
				if math.Abs(b.Level-want) > 0.01 {
					t.Errorf("%g Hz at %g: band %g Hz reads %.4f dB, want %.4f", c.f, c.amp, b.Nominal, b.Level, want)
				}
				continue
			}
			next = max(next, b.Level)
			// Every other band, neighbours included, holds only Hann
			// sidelobe leakage (≤ −31.5 dB and falling 18 dB/octave);
			// at ≥ 50 bins it is below −100 dB: require 60 dB below.
			if b.Level > want-60 {
				t.Errorf("%g Hz: band %g Hz reads %.1f dB, want < %.1f", c.f, b.Nominal, b.Level, want-60)
			}
		}
		t.Logf("%g Hz at fs %g: loudest other band %.1f dB below", c.f, c.fs, want-next)
	}
}

// White Gaussian noise of variance σ² has one-sided density σ²/(fs/2), so
// band x holds σ²·(f2−f1)/(fs/2) (Parseval; common practice).
func TestLTASWhiteNoiseBands(t *testing.T) {
	const (
		fs    = 48000.0
		sigma = 0.1
		n     = 4096
	)
	rng := rand.New(rand.NewPCG(21, 22))
	l, err := NewLTAS(fs, n)
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]float64, 4800)
	for range 100 { // 10 s
		for i := range buf {
			buf[i] = sigma * rng.NormFloat64()
		}
		if err := l.Write(buf); err != nil {
			t.Fatal(err)
		}
	}
	df := l.BinWidth()
	var worst float64
	defer func() { t.Logf("largest |error|/tolerance over bands ≥ 500 Hz: %.2f", worst) }()
	for _, b := range l.Bands() {
		if b.Centre < 500 {
			continue // too few bins for a tight statistical bound
		}
		bw := math.Min(b.Upper, fs/2) - b.Lower
		want := 10 * math.Log10(sigma*sigma*bw/(fs/2)/FullScaleMeanSquare)
		// Statistical tolerance: a band spans B/Δf bins, each of
		// effective noise bandwidth 1.5 bins (Hann); counting only half
		// of the 50 %-overlapped frames as independent, the band power
		// has relative s.d. ≤ √(1.5·Δf/(B·frames/2)); allow 4 s.d.
		sd := math.Sqrt(1.5 * df / (bw * float64(l.Frames()) / 2))
		tol := 4 * 10 * math.Log10(1+sd)
		d := b.Level - want
		if math.Abs(d) > tol {
			t.Errorf("band %g Hz: %.3f dB, want %.3f ± %.3f", b.Nominal, b.Level, want, tol)
		}
		worst = max(worst, math.Abs(d)/tol)
	}
}

// The centroid Σ f·P/Σ P of a pure tone is its frequency, of two equal
// tones their mean (definition of the spectral centroid; common
// practice). The two-tone case carries a DC offset, which must not move
// the centroid.
func TestLTASCentroid(t *testing.T) {
	const fs = 48000.0
	cases := []struct {
		name string
		x    []float64
		want float64
	}{
		{"1 kHz", sine(96000, fs, 1000, 0.5), 1000},
		{"440 Hz", sine(96000, fs, 440, 0.9), 440},
		{"5.3 kHz", sine(96000, fs, 5300, 0.01), 5300},
		{"1 kHz + 3 kHz", synth(96000, fs, 1000, 0.2, line{1, 0.4, 0}, line{3, 0.4, 1}), 2000},
	}
	for _, c := range cases {
		l, err := NewLTAS(fs, 8192)
		if err != nil {
			t.Fatal(err)
		}
		if err := l.Write(c.x); err != nil {
			t.Fatal(err)
		}
		// Tolerance 1e-3 bin (6 mHz at 5.9 Hz bins): the Hann lobe of an
		// off-bin tone is symmetric about the tone in power; what is left
		// is leakage from the tone's negative-frequency image, ≥ 70 bins
		// away and below −100 dB.
		got := l.Centroid()
		if tol := 1e-3 * l.BinWidth(); math.Abs(got-c.want) > tol {
			t.Errorf("%s: centroid %.4f Hz, want %g ± %.3g", c.name, got, c.want, tol)
		}
		t.Logf("%s: centroid %.4f Hz (error %.2g Hz)", c.name, got, got-c.want)
	}
}

// Crest factor: a sine's peak/RMS is √2 (3.0103 dB), a square's 1
// (0 dB), and one unit impulse among N samples gives √N, 10·log10(N) dB
// (closed forms).
func TestCrestFactor(t *testing.T) {
	square := make([]float64, 4800)
	for i := range square {
		square[i] = 0.7
		if (i/24)%2 == 1 {
			square[i] = -0.7
		}
	}
	impulse := make([]float64, 10000)
	impulse[1234] = -0.25
	cases := []struct {
		name string
		x    []float64
		want float64
	}{
		// 48 samples per cycle: samples hit the peaks exactly.
		{"sine", synth(48000, 48000, 1000, 0, line{1, 0.8, 0}), 20 * math.Log10(math.Sqrt2)},
		{"square", square, 0},
		{"impulse", impulse, 10 * math.Log10(10000)},
	}
	for _, c := range cases {
		var m CrestMeter
		l, err := NewLTAS(48000, 1024)
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(5, 6))
		for x := c.x; len(x) > 0; {
			k := min(len(x), 1+rng.IntN(700))
			if err := m.Write(x[:k]); err != nil {
				t.Fatal(err)
			}
			if err := l.Write(x[:k]); err != nil {
				t.Fatal(err)
			}
			x = x[k:]
		}
		// Sine: the sampled peak is sin(π/2) up to rounding; the
		// sampled mean square over whole cycles is exactly ½: 1e-9 dB.
		if d := m.CrestFactor() - c.want; math.Abs(d) > 1e-9 {
			t.Errorf("%s: crest %.12f dB, want %.12f", c.name, m.CrestFactor(), c.want)
		}
		if l.CrestFactor() != m.CrestFactor() {
			t.Errorf("%s: LTAS crest %v ≠ meter %v", c.name, l.CrestFactor(), m.CrestFactor())
		}
	}
	var empty CrestMeter
	if !math.IsNaN(empty.CrestFactor()) {
		t.Error("crest factor of nothing should be NaN")
	}
}

// Chunking must not change the result: one Write and many give the same
// bins bit for bit.
func TestLTASChunkingInvariance(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	x := make([]float64, 20000)
	for i := range x {
		x[i] = rng.Float64()*2 - 1
	}
	a, _ := NewLTAS(44100, 2048)
	b, _ := NewLTAS(44100, 2048)
	if err := a.Write(x); err != nil {
		t.Fatal(err)
	}
	writeChunked(t, b, x, rng, 3000)
	pa, pb := a.PowerSpectrum(nil), b.PowerSpectrum(nil)
	for k := range pa {
		if pa[k] != pb[k] {
			t.Fatalf("bin %d: %v vs %v", k, pa[k], pb[k])
		}
	}
	// (20000 − 2048)/1024 + 1 = 18 frames (floor).
	if a.Frames() != 18 || b.Frames() != 18 {
		t.Errorf("frames %d, %d, want 18", a.Frames(), b.Frames())
	}
	b.Reset()
	if b.Frames() != 0 || b.PowerSpectrum(nil)[10] != 0 || !math.IsNaN(b.CrestFactor()) {
		t.Error("Reset left state behind")
	}
	for _, band := range b.Bands() {
		if !math.IsInf(band.Level, -1) {
			t.Fatalf("band %g Hz after Reset: %v dB, want -Inf", band.Nominal, band.Level)
		}
	}
}

// Bands stop where the lower edge passes Nyquist; the top band is
// integrated only up to Nyquist.
func TestLTASBandCount(t *testing.T) {
	cases := []struct {
		fs float64
		// 30 bands 25 Hz–20 kHz. The 20 kHz band starts at 17.78 kHz,
		// so at 32 kHz it drops (29 left); the 10 kHz band starts at
		// 8.91 kHz and the 8 kHz band at 7.08 kHz, so at 16 kHz the top
		// band is 8 kHz (26 left).
		want int
	}{
		{48000, 30}, {44100, 30}, {32000, 29}, {16000, 26},
	}
	for _, c := range cases {
		l, err := NewLTAS(c.fs, 1024)
		if err != nil {
			t.Fatal(err)
		}
		if got := len(l.Bands()); got != c.want {
			t.Errorf("fs %g: %d bands, want %d", c.fs, got, c.want)
		}
	}
}

func TestLTASErrors(t *testing.T) {
	for _, c := range []struct {
		fs float64
		n  int
	}{{0, 1024}, {math.Inf(1), 1024}, {48000, 1000}, {48000, 8}, {48000, -4}, {48000, 1 << 23}} {
		if _, err := NewLTAS(c.fs, c.n); !errors.Is(err, ErrInvalid) {
			t.Errorf("NewLTAS(%g, %d): %v, want ErrInvalid", c.fs, c.n, err)
		}
	}
	l, _ := NewLTAS(48000, 64)
	if err := l.Write(make([]float64, 100)); err != nil {
		t.Fatal(err)
	}
	before := l.PowerSpectrum(nil)
	bad := make([]float64, 200)
	bad[150] = math.NaN()
	err := l.Write(bad)
	var e *Error
	if !errors.Is(err, ErrNonFinite) || !errors.As(err, &e) || e.Index != 150 {
		t.Fatalf("Write NaN: %v, want ErrNonFinite at 150", err)
	}
	t.Log(err)
	after := l.PowerSpectrum(nil)
	for k := range before {
		if before[k] != after[k] {
			t.Fatal("rejected chunk changed the spectrum")
		}
	}
	var m CrestMeter
	if err := m.Write([]float64{1, math.Inf(1)}); !errors.Is(err, ErrNonFinite) {
		t.Errorf("CrestMeter.Write Inf: %v", err)
	}
}

func TestLTASWriteAllocs(t *testing.T) {
	l, _ := NewLTAS(48000, 4096)
	x := sine(1500, 48000, 1000, 0.5) // crosses frame boundaries
	var m CrestMeter
	if a := testing.AllocsPerRun(200, func() { _ = l.Write(x) }); a != 0 {
		t.Errorf("LTAS.Write: %v allocs per call, want 0", a)
	}
	if a := testing.AllocsPerRun(200, func() { _ = m.Write(x) }); a != 0 {
		t.Errorf("CrestMeter.Write: %v allocs per call, want 0", a)
	}
}

func BenchmarkLTASWrite(b *testing.B) {
	l, _ := NewLTAS(48000, 8192)
	x := sine(512, 48000, 1000, 0.5)
	b.SetBytes(int64(8 * len(x)))
	b.ReportAllocs()
	for b.Loop() {
		_ = l.Write(x)
	}
}

func BenchmarkAnalyze(b *testing.B) {
	for _, c := range []struct {
		name string
		n    int
	}{{"bins-48000", 48000}, {"fit-47123", 47123}} {
		x := synth(c.n, 48000, 1000, 0, line{1, 1, 0}, line{2, 0.01, 0}, line{3, 0.005, 0})
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Analyze(x, 48000, 1000, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
