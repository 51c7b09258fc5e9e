package wdf_test

import (
	"fmt"
	"slices"
	"sync"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/dsp/resample"
	"renderchain/dsp/synth"
	"renderchain/dsp/wdf"
	"renderchain/models"
)

// Whole-chain benchmarks: a chain file flattened to one circuit, its DC
// operating point, the wave digital solver at factor·48 kHz inside the
// polyphase oversampler, driven by the first 2 s of the demo's synthesized
// phrase (chords, single notes and a decaying note: music-like material
// with many switching edges in a fuzz). Each reports
//
//	ns/sample    wall time per input (48 kHz) sample, oversampler included
//	x-realtime   input seconds rendered per second on one core
//	ns/tick      wall time per internal sample
//	newton/tick  mean Newton iterations per internal sample (wdf.Stats)

const benchRate = 48000.0

// benchBlock is the number of base-rate samples per Process call, the
// block size the renderer uses.
const benchBlock = 4096

var phrase = sync.OnceValues(func() ([]float64, error) {
	x, err := synth.DemoPhrase(benchRate, 1)
	if err != nil {
		return nil, err
	}
	return x[:2*int(benchRate)], nil
})

// rig is one channel of a chain: solver and oversampler.
type rig struct {
	s  *wdf.Solver
	os *resample.Oversampler
}

// loadChain reads a chain file and applies edit (nil for none).
func loadChain(tb testing.TB, path string, edit func(*chains.Chain)) *chains.Chain {
	tb.Helper()
	ch, err := chains.Load(path)
	if err != nil {
		tb.Fatal(err)
	}
	if edit != nil {
		edit(ch)
	}
	return ch
}

// newRig compiles ch at factor× the benchmark rate.
func newRig(tb testing.TB, ch *chains.Chain, factor int) *rig {
	tb.Helper()
	return newRigEdited(tb, ch, factor, nil)
}

// newRigEdited is newRig with edit (nil for none) applied to the flat
// circuit before its operating point is solved.
func newRigEdited(tb testing.TB, ch *chains.Chain, factor int, edit func(*models.Circuit)) *rig {
	tb.Helper()
	c, err := ch.Build()
	if err != nil {
		tb.Fatal(err)
	}
	if edit != nil {
		edit(c)
	}
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		tb.Fatal(err)
	}
	s, err := wdf.Compile(c, op, wdf.Options{SampleRate: benchRate * float64(factor)})
	if err != nil {
		tb.Fatal(err)
	}
	s.InputGain = ch.InputPeak
	s.OutputGain = 1 / ch.FullScale
	os, err := resample.NewOversampler(factor, benchRate, s, benchBlock)
	if err != nil {
		tb.Fatal(err)
	}
	return &rig{s, os}
}

// run renders x from rest.
func (r *rig) run(x, dst []float64) {
	r.s.Reset()
	r.os.Reset()
	for k := 0; k < len(x); k += benchBlock {
		n := min(benchBlock, len(x)-k)
		r.os.Process(dst[:n], x[k:k+n])
	}
}

// benchRig renders the phrase b.N times and reports the metrics above.
func benchRig(b *testing.B, r *rig, factor int) {
	x, err := phrase()
	if err != nil {
		b.Fatal(err)
	}
	dst := make([]float64, benchBlock)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		r.run(x, dst)
	}
	ns := float64(b.Elapsed().Nanoseconds()) / float64(b.N*len(x))
	b.ReportMetric(ns, "ns/sample")
	b.ReportMetric(1e9/ns/benchRate, "x-realtime")
	b.ReportMetric(ns/float64(factor), "ns/tick")
	b.ReportMetric(r.s.Stats().MeanIterations(), "newton/tick")
}

// BenchmarkChainDemo is chains/demo.toml (pickup, two-transistor fuzz at
// its chain setting, blend tone, volume, amplifier input; 4 root ports) at
// the oversampling factors 2, 4, 8, 12 and 16.
func BenchmarkChainDemo(b *testing.B) {
	ch := loadChain(b, "../../chains/demo.toml", nil)
	for _, f := range []int{2, 4, 8, 12, 16} {
		b.Run(fmt.Sprintf("x%d", f), func(b *testing.B) {
			benchRig(b, newRig(b, ch, f), f)
		})
	}
}

// withCharges gives every transistor of a circuit base–emitter and
// base–collector depletion capacitances and a forward transit time, round
// values of the order of a small-signal silicon transistor's (from
// memory: a few pF, a few hundred ps), so that the solver's charge work is
// counted whatever the chain file's parts carry.
func withCharges(c *models.Circuit) {
	for i := range c.Elements {
		if e := &c.Elements[i]; e.Kind == models.BJTKind {
			e.BJT.BE = models.Depletion{C0: 8e-12, Potential: 0.75, Grading: 0.33}
			e.BJT.BC = models.Depletion{C0: 4e-12, Potential: 0.75, Grading: 0.33}
			e.BJT.TransitTime = 400e-12
		}
	}
}

// BenchmarkChainDemoCharged is BenchmarkChainDemo at 4× with junction
// capacitances and transit times on both transistors (withCharges):
// against it, the cost of the charge terms in the Newton solve.
func BenchmarkChainDemoCharged(b *testing.B) {
	r := newRigEdited(b, loadChain(b, "../../chains/demo.toml", nil), 4, withCharges)
	benchRig(b, r, 4)
}

// BenchmarkChainCascade12 is testdata/cascade12.toml: four transistors and
// four diodes, twelve root ports, at 4×.
func BenchmarkChainCascade12(b *testing.B) {
	r := newRig(b, loadChain(b, "testdata/cascade12.toml", nil), 4)
	if _, k := r.s.States(); k != 12 {
		b.Fatalf("%d root ports, want 12", k)
	}
	benchRig(b, r, 4)
}

// BenchmarkChainLinear is testdata/linear.toml: pickup, cable and
// amplifier input, no devices, at 4×.
func BenchmarkChainLinear(b *testing.B) {
	r := newRig(b, loadChain(b, "testdata/linear.toml", nil), 4)
	if _, k := r.s.States(); k != 0 {
		b.Fatalf("%d root ports, want 0", k)
	}
	benchRig(b, r, 4)
}

// cascadeSubset keeps the first n stages of the cascade, without diodes
// unless diodes is set (and without a part left hanging on a local node
// that only a diode also touched).
func cascadeSubset(n int, diodes bool) func(*chains.Chain) {
	return func(ch *chains.Chain) {
		ch.Stages = ch.Stages[:n]
		if diodes {
			return
		}
		for _, st := range ch.Stages {
			st.Parts = slices.DeleteFunc(st.Parts, func(p *chains.Part) bool { return p.Kind == chains.Diode })
			uses := map[string]int{}
			for _, p := range st.Parts {
				for _, node := range p.Pins {
					uses[node]++
				}
			}
			st.Parts = slices.DeleteFunc(st.Parts, func(p *chains.Part) bool {
				for _, node := range p.Pins {
					switch node {
					case "in", "out", "gnd", "v+":
					default:
						if uses[node] == 1 {
							return true
						}
					}
				}
				return false
			})
		}
	}
}

// BenchmarkRootPorts is the cost against the number of nonlinear root
// ports, at 4× on the phrase: the cascade's first one to four stages
// without diodes (2, 4, 6, 8 ports: one to four transistors) and the whole
// cascade (12 ports).
func BenchmarkRootPorts(b *testing.B) {
	cases := []struct {
		ports int
		edit  func(*chains.Chain)
	}{
		{2, cascadeSubset(1, false)},
		{4, cascadeSubset(2, false)},
		{6, cascadeSubset(3, false)},
		{8, cascadeSubset(4, false)},
		{12, nil},
	}
	for _, tc := range cases {
		b.Run(fmt.Sprintf("ports=%d", tc.ports), func(b *testing.B) {
			r := newRig(b, loadChain(b, "testdata/cascade12.toml", tc.edit), 4)
			if _, k := r.s.States(); k != tc.ports {
				b.Fatalf("%d root ports, want %d", k, tc.ports)
			}
			benchRig(b, r, 4)
		})
	}
}
