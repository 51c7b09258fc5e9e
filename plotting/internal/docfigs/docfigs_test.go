package docfigs

import (
	"context"
	"flag"
	"math"
	"os"
	"path/filepath"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/loudness"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/synth"
	"renderchain/engine"
	"renderchain/measure"
	"renderchain/plotting"
)

var out = flag.String("out", "", "folder to write the documentation's example figures into")

const fs = 48000.0

// TestWriteDocFigures is a generator, not a check: it writes the
// documentation's figures from real renders of chains/demo.toml,
//
//	go test ./plotting/internal/docfigs -run WriteDocFigures -out docs/figures
//
// and stops if one comes out at 150 KiB or more. Without -out it does
// nothing (the renders take a while on a shared machine); the figures'
// own tests are package plotting's.
func TestWriteDocFigures(t *testing.T) {
	if *out == "" {
		t.Skip("generator: give -out DIR to write the figures")
	}
	ch, err := chains.Load(filepath.Join("..", "..", "..", "chains", "demo.toml"))
	if err != nil {
		t.Fatal(err)
	}
	figs := map[string]func(*testing.T, *chains.Chain) *plotting.Figure{
		"response-tone": responseFigure,
		"scope-fuzz-c2": scopeFigure,
		"set-harmonics": harmonicsFigure,
		"set-waveform":  waveformFigure,
		"set-bands":     bandsFigure,
		"spectrogram":   spectrogramFigure,
	}
	for name, build := range figs {
		t.Run(name, func(t *testing.T) {
			defer func() {
				if r := recover(); r != nil {
					t.Fatal(r)
				}
			}()
			f := build(t, ch)
			path := filepath.Join(*out, name+".png")
			if err := plotting.Save(path, f); err != nil {
				t.Fatal(err)
			}
			st, err := os.Stat(path)
			if err != nil {
				t.Fatal(err)
			}
			if st.Size() > 150<<10 {
				t.Errorf("%s is %d KiB, want under 150 KiB", path, st.Size()>>10)
			}
		})
	}
}

// must returns v, or stops the figure's subtest (which recovers the
// panic into t.Fatal) on an error.
func must[T any](v T, err error) T {
	if err != nil {
		panic(err)
	}
	return v
}

// responseFigure: the tone knob's five settings, 48 points a decade.
func responseFigure(t *testing.T, ch *chains.Chain) *plotting.Figure {
	vs := must(measure.Expand([]string{"tone.tone=0,0.25,0.5,0.75,1"}))
	grid := must(spectrum.DecadeGrid(20, 20000, spectrum.PointsPerDecade))
	rep := must(measure.RunResponse(context.Background(), ch, vs, grid, measure.ResponseOptions{}))
	spec := plotting.ResponseSpec{Title: "Small-signal response", Chain: ch.Name, Path: "source → out",
		Settings: []string{"fuzz.fuzz=0.7", "volume.level=0.75"}}
	for i, c := range rep.Curves {
		rc := plotting.ResponseCurve{Label: c.Label, Style: i}
		for _, p := range c.Points {
			rc.Hz, rc.DB, rc.Deg = append(rc.Hz, p.Hz), append(rc.DB, float64(p.DB)), append(rc.Deg, float64(p.Deg))
		}
		spec.Curves = append(spec.Curves, rc)
	}
	return must(plotting.ResponseFigure(spec))
}

// run passes src through a channel and returns the aligned output.
func run(t *testing.T, c *engine.Channel, src []float64) []float64 {
	t.Helper()
	out := make([]float64, 0, len(src))
	buf := make([]float64, engine.MaxBlock)
	for len(src) > 0 {
		n := min(len(src), engine.MaxBlock)
		k := c.Process(buf, src[:n])
		out = append(out, buf[:k]...)
		src = src[n:]
	}
	for {
		k := c.Flush(buf)
		if k == 0 {
			break
		}
		out = append(out, buf[:k]...)
	}
	return out
}

// scopeFigure: a 220 Hz sine of 100 mV peak at the source, settled for
// half a second, then three cycles at the source and at Q2's collector.
func scopeFigure(t *testing.T, ch *chains.Chain) *plotting.Figure {
	const f0, amp = 220.0, 0.1
	eng := must(engine.Prepare(ch, 0))
	node := must(eng.Node("fuzz.c2"))
	probe := must(eng.Channel(fs, node))
	n := int(0.5*fs) + int(math.Ceil(3*fs/f0))
	src := make([]float64, n)
	for i := range src {
		src[i] = amp / ch.InputPeak * math.Sin(2*math.Pi*f0*float64(i)/fs)
	}
	v := run(t, probe, src)
	keep := int(math.Ceil(3*fs/f0)) + 1
	in := make([]float64, keep)
	for i := range in {
		in[i] = src[n-keep+i] * ch.InputPeak
	}
	return must(plotting.ScopeFigure(plotting.ScopeSpec{
		Title: "Scope view: 220 Hz sine, 100 mV peak at the source", Chain: ch.Name,
		Settings: []string{"fuzz.fuzz=0.7", "fuzz.trim2=0.5"}, SampleRate: fs, FrequencyHz: f0,
		In: plotting.Trace{Label: "source", V: in}, Out: plotting.Trace{Label: "fuzz.c2", V: v[n-keep:]},
		Rails: []plotting.Rail{{Label: "v+", V: ch.Supply}, {Label: "gnd", V: 0}},
	}))
}

var variants = []struct{ label, set string }{
	{"A: as written", ""},
	{"B: fuzz.fuzz=0.2", "fuzz.fuzz=0.2"},
	{"C: tone.tone=1", "tone.tone=1"},
}

func variant(t *testing.T, ch *chains.Chain, set string) *chains.Chain {
	t.Helper()
	if set == "" {
		return ch
	}
	v := measure.Variant{Sets: []string{set}}
	return must(v.Apply(ch))
}

// harmonicsFigure: each variant's harmonics at 220 Hz, 10 mV peak (a
// light touch, where the variants differ; harder playing saturates all).
func harmonicsFigure(t *testing.T, ch *chains.Chain) *plotting.Figure {
	spec := plotting.HarmonicsSpec{Stimulus: "220 Hz sine, 10 mV peak at the source", Chain: ch.Name}
	for i, v := range variants {
		r := must(measure.Sine(context.Background(), variant(t, ch, v.set), 220, 0.01, measure.Options{}))
		hs := plotting.HarmonicSet{Label: v.label, Style: i, THDPercent: r.THDPercent}
		for _, h := range r.Harmonics {
			for len(hs.DBc) < h.Order-2 {
				hs.DBc = append(hs.DBc, math.Inf(-1))
			}
			hs.DBc = append(hs.DBc, float64(h.DBc))
		}
		spec.Sets = append(spec.Sets, hs)
	}
	return must(plotting.HarmonicsFigure(spec))
}

// spectrogramFigure: the first four seconds of the demo phrase, dry and
// through the chain as written.
func spectrogramFigure(t *testing.T, ch *chains.Chain) *plotting.Figure {
	dry := phrase()[:int(4*fs)]
	eng := must(engine.Prepare(ch, 0))
	c := must(eng.NewChannel(fs))
	wet := run(t, c, dry)
	sd := must(spectrum.NewSpectrogram(dry, fs, 0, 0))
	sw := must(spectrum.NewSpectrogram(wet, fs, 0, 0))
	return must(plotting.SpectrogramFigure(plotting.SpectrogramSpec{
		Title:  "Spectrogram — the demo phrase, dry against wet (" + ch.Name + ")",
		Panels: []plotting.SpectrogramPanel{{Title: "dry: synthesized phrase", S: sd}, {Title: "wet: through the chain as written", S: sw}},
	}))
}

// phrase is the first eight seconds of the demo phrase, dry (the last
// note starts at 7.5 s).
func phrase() []float64 {
	dry := must(synth.DemoPhrase(fs, 1))
	return dry[:int(8*fs)]
}

// setRenders renders the phrase through each variant and brings each to
// −23 LUFS (ITU-R BS.1770 integrated, dsp/loudness), as the listening
// page's clips are brought to one loudness.
func setRenders(t *testing.T, ch *chains.Chain) [][]float64 {
	dry := phrase()
	var outs [][]float64
	for _, v := range variants {
		eng := must(engine.Prepare(variant(t, ch, v.set), 0))
		wet := run(t, must(eng.NewChannel(fs)), dry)
		m := must(loudness.NewMeter(fs, 1))
		m.Write(wet)
		g := math.Pow(10, (-23-m.Integrated())/20)
		for i := range wet {
			wet[i] *= g
		}
		outs = append(outs, wet)
	}
	return outs
}

var setCache [][]float64

func renders(t *testing.T, ch *chains.Chain) [][]float64 {
	if setCache == nil {
		setCache = setRenders(t, ch)
	}
	return setCache
}

// waveformFigure: 30 ms of the held A3 near the phrase's end (string 2,
// fret 7 of the demo phrase: 220 Hz, so six and a half cycles), in every
// variant, stacked.
func waveformFigure(t *testing.T, ch *chains.Chain) *plotting.Figure {
	const start, dur = 7.6, 0.03
	spec := plotting.WaveSpec{Title: "One note: the held A3, 30 ms from 7.6 s, loudness-matched", Chain: ch.Name,
		SampleRate: fs, Start: start}
	for i, w := range renders(t, ch) {
		spec.Waves = append(spec.Waves, plotting.Wave{Label: variants[i].label, Style: i,
			Samples: w[int(start*fs):int((start+dur)*fs)]})
	}
	return must(plotting.WaveformFigure(spec))
}

// bandsFigure: the long-term third-octave spectrum of each variant.
func bandsFigure(t *testing.T, ch *chains.Chain) *plotting.Figure {
	spec := plotting.BandsSpec{Title: "Long-term third-octave spectrum, loudness-matched", Chain: ch.Name,
		Reference: "dB re full-scale sine"}
	for i, w := range renders(t, ch) {
		l := must(spectrum.NewLTAS(fs, 0))
		if err := l.Write(w); err != nil {
			t.Fatal(err)
		}
		b := plotting.BandSet{Label: variants[i].label, Style: i}
		for _, band := range l.Bands() {
			b.Hz, b.DB = append(b.Hz, band.Nominal), append(b.DB, band.Level)
		}
		spec.Sets = append(spec.Sets, b)
	}
	return must(plotting.ThirdOctaveFigure(spec))
}
