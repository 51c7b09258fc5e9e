package docfigs

import (
	"context"
	"flag"
	"math"
	"os"
	"path/filepath"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/synth"
	"renderchain/measure"
	"renderchain/plotting"
	"renderchain/render"
)

var out = flag.String("out", "", "folder to write the documentation's example figures into")

const fs = 48000.0

// TestDocFigures writes the documentation's figures from real renders of
// chains/demo.toml:
//
//	go test ./plotting/internal/docfigs -run DocFigures -out docs/figures
//
// Without -out it only builds them (the same code path, no files). Each
// figure must come out under 150 KiB.
func TestDocFigures(t *testing.T) {
	if testing.Short() {
		t.Skip("renders the demo chain; skipped with -short")
	}
	ch, err := chains.Load(filepath.Join("..", "..", "..", "chains", "demo.toml"))
	if err != nil {
		t.Fatal(err)
	}
	figs := map[string]func(*testing.T, *chains.Chain) *plotting.Figure{
		"response-tone": responseFigure,
		"scope-fuzz-c2": scopeFigure,
		"set-harmonics": harmonicsFigure,
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
			if *out == "" {
				return
			}
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
func run(t *testing.T, c *render.Channel, src []float64) []float64 {
	t.Helper()
	out := make([]float64, 0, len(src))
	buf := make([]float64, render.MaxBlock)
	for len(src) > 0 {
		n := min(len(src), render.MaxBlock)
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
	eng := must(render.Prepare(ch, 0))
	node := must(measure.ResolveNode(ch, eng.Circuit, "fuzz.c2"))
	probe := must(eng.NewProbeChannel(fs, node))
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
	{"B: fuzz.fuzz=1", "fuzz.fuzz=1"},
	{"C: fuzz.trim2=0.3", "fuzz.trim2=0.3"},
}

func variant(t *testing.T, ch *chains.Chain, set string) *chains.Chain {
	t.Helper()
	if set == "" {
		return ch
	}
	v := measure.Variant{Sets: []string{set}}
	return must(v.Apply(ch))
}

// harmonicsFigure: each variant's harmonics at 220 Hz, 100 mV peak.
func harmonicsFigure(t *testing.T, ch *chains.Chain) *plotting.Figure {
	spec := plotting.HarmonicsSpec{Stimulus: "220 Hz sine, 100 mV peak at the source", Chain: ch.Name}
	for i, v := range variants {
		r := must(measure.Sine(context.Background(), variant(t, ch, v.set), 220, 0.1, measure.Options{}))
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
	dry := must(synth.DemoPhrase(fs, 1))
	dry = dry[:int(4*fs)]
	eng := must(render.Prepare(ch, 0))
	c := must(eng.NewChannel(fs))
	wet := run(t, c, dry)
	sd := must(spectrum.NewSpectrogram(dry, fs, 0, 0))
	sw := must(spectrum.NewSpectrogram(wet, fs, 0, 0))
	return must(plotting.SpectrogramFigure(plotting.SpectrogramSpec{
		Title:  "Spectrogram — the demo phrase, dry against wet (" + ch.Name + ")",
		Panels: []plotting.SpectrogramPanel{{Title: "dry: synthesized phrase", S: sd}, {Title: "wet: through the chain as written", S: sw}},
	}))
}
