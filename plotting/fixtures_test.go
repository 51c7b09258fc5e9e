package plotting

import (
	"math"
	"math/cmplx"

	"renderchain/dsp/spectrum"
)

// Test data of closed form: what each figure draws is known exactly, so
// the tests can check the figure's numbers against it. None of it stands
// for a circuit; the figures of real renders come from the application.

const chainName = "Workshop bench: two-stage silicon fuzz into blend tone"

// lowPass3HighPass1 is three first-order low-pass sections at fc and one
// first-order high-pass at 30 Hz: gain and phase in closed form,
// h(f) = (1/(1 + jf/fc))³ · (jf/30)/(1 + jf/30).
func lowPass3HighPass1(f, fc float64) complex128 {
	return cmplx.Pow(1/complex(1, f/fc), 3) * complex(0, f/30) / complex(1, f/30)
}

// closedPhaseDeg is the unwrapped phase of lowPass3HighPass1 in degrees:
// 90° − atan(f/30) − 3·atan(f/fc).
func closedPhaseDeg(f, fc float64) float64 {
	return (math.Pi/2 - math.Atan(f/30) - 3*math.Atan(f/fc)) * 180 / math.Pi
}

// closedDelay is its group delay −dφ/dω in seconds: each section's
// phase holds −atan(f/c) (the high-pass's plus a constant 90°), so each
// adds (1/ωc)/(1 + (f/c)²).
func closedDelay(f, fc float64) float64 {
	d := func(c float64) float64 { return 1 / (2 * math.Pi * c) / (1 + (f/c)*(f/c)) }
	return 3*d(fc) + d(30)
}

var responseCorners = []float64{300, 1200, 5000}

func responseSpec() ResponseSpec {
	grid, _ := spectrum.DecadeGrid(20, 20000, spectrum.PointsPerDecade)
	s := ResponseSpec{Title: "Small-signal response", Chain: chainName, Path: "source → out",
		Settings: []string{"supply=9V", "fuzz.fuzz=0.8"}, GroupDelay: true}
	for i, fc := range responseCorners {
		c := ResponseCurve{Label: []string{"tone.tone=0", "tone.tone=0.5", "tone.tone=1"}[i], Style: i, Hz: grid}
		for _, f := range grid {
			h := lowPass3HighPass1(f, fc)
			c.DB = append(c.DB, 20*math.Log10(cmplx.Abs(h)))
			c.Deg = append(c.Deg, cmplx.Phase(h)*180/math.Pi) // wrapped to (−180°, 180°]
		}
		s.Curves = append(s.Curves, c)
	}
	return s
}

// scopeSpec: a 100 mV, 1 kHz input and an output of known extremes,
// 4.5 V + 3 V·sin(ωt − 0.5) + 0.6 V·sin(2ωt), three cycles at 48 kHz.
func scopeSpec() ScopeSpec {
	const fs = 48000.0
	n := 3 * 48
	in, out := make([]float64, n+1), make([]float64, n+1)
	for i := range in {
		w := 2 * math.Pi * 1000 * float64(i) / fs
		in[i] = 0.1 * math.Sin(w)
		out[i] = 4.5 + 3*math.Sin(w-0.5) + 0.6*math.Sin(2*w)
	}
	return ScopeSpec{Title: "Scope view: 1 kHz sine, 100 mV peak at the source", Chain: chainName,
		Settings: []string{"fuzz.trim2=0.5"}, SampleRate: fs, FrequencyHz: 1000,
		In: Trace{"source", in}, Out: Trace{"fuzz.c2", out}, Rails: []Rail{{"v+", 9}, {"gnd", 0}}}
}

var variantLabels = []string{"A: as written", "B: fuzz.C1=2u2", "C: bypass"}

func harmonicsSpec() HarmonicsSpec {
	return HarmonicsSpec{Stimulus: "1 kHz sine, 100 mV peak at the source", Chain: chainName,
		Sets: []HarmonicSet{
			{variantLabels[0], 0, []float64{-20, -12, -30, -25, -40, -38, -60, -55, -70}, 30},
			{variantLabels[1], 1, []float64{-25, -10, -35, -22, -45, -33, -62, -50, -72}, 35},
			{variantLabels[2], 2, []float64{-90, -100, math.Inf(-1), -110, -120}, 0.003},
		}}
}

// waveSpec: 50 ms of 110 Hz with 0, 10 % and 20 % of third harmonic.
func waveSpec(overlay bool) WaveSpec {
	const fs = 48000.0
	s := WaveSpec{Title: "One note (A2), 2.10–2.15 s of the take", Chain: chainName, SampleRate: fs, Start: 2.1, Overlay: overlay}
	for i := range variantLabels {
		x := make([]float64, 2400)
		for k := range x {
			w := 2 * math.Pi * 110 * float64(k) / fs
			x[k] = 0.5*math.Sin(w) + float64(i)*0.1*math.Sin(3*w)
		}
		s.Waves = append(s.Waves, Wave{Label: variantLabels[i], Style: i, Samples: x})
	}
	return s
}

// bandsSpec analyses three synthesized signals with spectrum.LTAS (each
// a sum of sines of known level in known bands) and draws the bands.
func bandsSpec() (BandsSpec, [][]spectrum.Band) {
	const fs = 48000.0
	s := BandsSpec{Title: "Long-term spectrum", Chain: chainName, Reference: "dB re full-scale sine"}
	var all [][]spectrum.Band
	for i := range variantLabels {
		l, _ := spectrum.NewLTAS(fs, 0)
		x := make([]float64, int(fs))
		for k := range x {
			tt := float64(k) / fs
			for h := 1; h <= 12; h++ {
				a := 0.3 / float64(h*h) * float64(1+i*h) / float64(1+i)
				x[k] += a * math.Sin(2*math.Pi*110*float64(h)*tt)
			}
		}
		_ = l.Write(x)
		bands := l.Bands()
		all = append(all, bands)
		b := BandSet{Label: variantLabels[i], Style: i}
		for _, band := range bands {
			b.Hz = append(b.Hz, band.Nominal)
			b.DB = append(b.DB, band.Level)
		}
		s.Sets = append(s.Sets, b)
	}
	return s, all
}

// steppedTones: 1 kHz (on a bin) for the first 1.5 s, then 3 kHz, at
// 0.25 peak, 3 s at 48 kHz; and the same through tanh(4x), which adds odd
// harmonics (a test signal, not a circuit).
func steppedTones() (dry, wet []float64, fa, fb, step float64) {
	const fs = 48000.0
	fa, fb, step = 1000, 3000, 1.5
	dry = make([]float64, int(3*fs))
	wet = make([]float64, len(dry))
	for i := range dry {
		tt := float64(i) / fs
		f := fa
		if tt >= step {
			f = fb
		}
		dry[i] = 0.25 * math.Sin(2*math.Pi*f*tt)
		wet[i] = math.Tanh(4 * dry[i])
	}
	return dry, wet, fa, fb, step
}

func spectrogramSpec() (SpectrogramSpec, *spectrum.Spectrogram, *spectrum.Spectrogram) {
	dry, wet, _, _, _ := steppedTones()
	sd, _ := spectrum.NewSpectrogram(dry, 48000, 0, 0)
	sw, _ := spectrum.NewSpectrogram(wet, 48000, 0, 0)
	return SpectrogramSpec{Title: "Spectrogram — dry against wet",
		Panels: []SpectrogramPanel{{"dry: tones.wav", sd}, {"wet: tones-wet.wav", sw}}}, sd, sw
}

// allFigures builds every kind of figure from the fixtures.
func allFigures() (map[string]*Figure, error) {
	out := map[string]*Figure{"legacy": testFigure()}
	var err error
	add := func(name string, f *Figure, e error) {
		if e != nil && err == nil {
			err = e
		}
		out[name] = f
	}
	f, e := ResponseFigure(responseSpec())
	add("response", f, e)
	f, e = ScopeFigure(scopeSpec())
	add("scope", f, e)
	f, e = HarmonicsFigure(harmonicsSpec())
	add("harmonics", f, e)
	f, e = WaveformFigure(waveSpec(false))
	add("waveform", f, e)
	f, e = WaveformFigure(waveSpec(true))
	add("waveform-overlay", f, e)
	bs, _ := bandsSpec()
	f, e = ThirdOctaveFigure(bs)
	add("third-octave", f, e)
	ss, _, _ := spectrogramSpec()
	f, e = SpectrogramFigure(ss)
	add("spectrogram", f, e)
	return out, err
}
