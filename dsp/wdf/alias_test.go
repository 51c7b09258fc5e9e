package wdf_test

import (
	"fmt"
	"math"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/wdf"
)

// The aliasing harness: the demo chain at full fuzz, a sine at its input,
// the wave digital solver inside the oversampler at factor·48 kHz, and the
// signal-to-alias ratio (spectrum.SignalToAlias) of a coherent window of
// the output after a warm-up. The warm-up, aliasWarmup, is 20 time
// constants of the chain's slowest pole worth hearing (the fuzz's 47 µF
// emitter bypass, about 50 ms); the pickup's and the coupling caps' poles
// are faster.

const aliasWarmup = 1.0 // seconds

// demoAtFullFuzz is chains/demo.toml with its fuzz knob at 1.
func demoAtFullFuzz(tb testing.TB) *chains.Chain {
	return loadChain(tb, "../../chains/demo.toml", func(ch *chains.Chain) {
		if err := ch.Set("fuzz.fuzz=1"); err != nil {
			tb.Fatal(err)
		}
	})
}

// aliasRatio renders amp·sin(2π·f·t) (amp in digital full scale) through
// ch at the given factor and measures a window of the given length (a
// whole number of cycles of f) after the warm-up.
func aliasRatio(tb testing.TB, ch *chains.Chain, factor int, f, amp, window float64) (*spectrum.AliasRatio, wdf.Stats) {
	tb.Helper()
	r := newRig(tb, ch, factor)
	nw := int(math.Round(aliasWarmup * benchRate))
	nm := int(math.Round(window * benchRate))
	src := make([]float64, benchBlock)
	dst := make([]float64, benchBlock)
	out := make([]float64, 0, nm)
	for k := 0; k < nw+nm; k += benchBlock {
		n := min(benchBlock, nw+nm-k)
		for i := range n {
			src[i] = amp * math.Sin(2*math.Pi*f*float64(k+i)/benchRate)
		}
		r.os.Process(dst[:n], src[:n])
		for i := range n {
			if k+i >= nw {
				out = append(out, dst[i])
			}
		}
	}
	a, err := spectrum.SignalToAlias(out, benchRate, f)
	if err != nil {
		tb.Fatal(err)
	}
	return a, r.s.Stats()
}

// Aliasing is made inside the nonlinear solve at the internal rate, so
// raising the rate must push it down: from 2× to 8× the signal-to-alias
// ratio of a 1320 Hz sine at 0.3 of full scale through the demo at full
// fuzz must rise by at least 10 dB. The size of the step is common
// practice for a hard-clipping stage (each doubling of the rate moves the
// folding point an octave up a harmonic spectrum falling at 6–12 dB per
// octave: 12–24 dB over two doublings); 10 dB leaves room for the
// circuit's own roll-off. A 50 ms window holds 66 whole cycles.
func TestAliasingFallsWithOversampling(t *testing.T) {
	ch := demoAtFullFuzz(t)
	a2, st2 := aliasRatio(t, ch, 2, 1320, 0.3, 0.05)
	a8, st8 := aliasRatio(t, ch, 8, 1320, 0.3, 0.05)
	t.Logf("1320 Hz, 0.3 FS: %.1f dB at 2×, %.1f dB at 8×", a2.DB, a8.DB)
	if !(a8.DB >= a2.DB+10) {
		t.Errorf("signal-to-alias %.1f dB at 8× is not 10 dB above %.1f dB at 2×", a8.DB, a2.DB)
	}
	if st2.NonConverged != 0 || st8.NonConverged != 0 {
		t.Errorf("non-converged samples: %d at 2×, %d at 8×", st2.NonConverged, st8.NonConverged)
	}
}

// BenchmarkAliasTable is the table of issue 12: the demo chain at fuzz 1,
// sines of 330 Hz and 1319 Hz at 0.3 of full scale and 3001 Hz at 0.5, at
// the factors 2, 4, 8 and 16, each measured over a 1 s coherent window
// after the warm-up. It reports the signal-to-alias ratio (dB-SAR), the
// mean Newton iterations per internal sample and the render time per input
// sample of warm-up and window together. Run it with
//
//	go test -run XXX -bench AliasTable -benchtime 1x ./dsp/wdf/
func BenchmarkAliasTable(b *testing.B) {
	ch := demoAtFullFuzz(b)
	tones := []struct{ f, amp float64 }{{330, 0.3}, {1319, 0.3}, {3001, 0.5}}
	for _, tone := range tones {
		for _, factor := range []int{2, 4, 8, 16} {
			b.Run(fmt.Sprintf("%gHz-%gFS/x%d", tone.f, tone.amp, factor), func(b *testing.B) {
				var a *spectrum.AliasRatio
				var st wdf.Stats
				for i := 0; i < b.N; i++ {
					a, st = aliasRatio(b, ch, factor, tone.f, tone.amp, 1)
				}
				b.ReportMetric(a.DB, "dB-SAR")
				b.ReportMetric(st.MeanIterations(), "newton/tick")
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/((aliasWarmup+1)*benchRate), "ns/sample")
			})
		}
	}
}
