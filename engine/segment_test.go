package engine

import (
	"context"
	"io"
	"math"
	"os"
	"runtime"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/synth"
)

// sliceSource reads a mono signal in pieces of at most step frames.
type sliceSource struct {
	x    []float64
	step int
}

func (s *sliceSource) Read(dst []float64) (int, error) {
	if len(s.x) == 0 {
		return 0, io.EOF
	}
	n := copy(dst[:min(len(dst), s.step)], s.x)
	s.x = s.x[n:]
	return n, nil
}

// preparedFile loads a chain file, applies the overrides and prepares it
// at the factor given (0: the default).
func preparedFile(tb testing.TB, path string, factor int, sets ...string) *Prepared {
	tb.Helper()
	ch, err := chains.Load(path)
	if err != nil {
		tb.Fatal(err)
	}
	for _, kv := range sets {
		if err := ch.Set(kv); err != nil {
			tb.Fatal(err)
		}
	}
	p, err := Prepare(ch, factor)
	if err != nil {
		tb.Fatal(err)
	}
	return p
}

// phraseSeconds returns the demo's synthesized phrase (10 s a take)
// repeated with new seeds to the given length at 48 kHz.
func phraseSeconds(tb testing.TB, seconds float64) []float64 {
	tb.Helper()
	n := int(seconds * 48000)
	var x []float64
	for seed := int64(1); len(x) < n; seed++ {
		y, err := synth.DemoPhrase(48000, seed)
		if err != nil {
			tb.Fatal(err)
		}
		x = append(x, y...)
	}
	return x[:n]
}

// renderStream runs x through p with the options given and returns the
// output and the stream's report.
func renderStream(t testing.TB, p *Prepared, x []float64, factor, workers int, plan *SegmentPlan) ([]float64, StreamInfo) {
	t.Helper()
	var y []float64
	opt := StreamOptions{Oversample: factor, Frames: int64(len(x)), Workers: workers,
		Sink: func(b []float64) error { y = append(y, b...); return nil }}
	src := &sliceSource{x: x, step: 3000}
	var st StreamInfo
	var err error
	if plan != nil {
		st, err = p.segmented(context.Background(), src, 48000, factor, *plan, opt)
	} else {
		st, err = p.StreamWith(context.Background(), src, 48000, 1, opt)
	}
	if err != nil {
		t.Fatal(err)
	}
	if len(y) != len(x) {
		t.Fatalf("%d frames out for %d in", len(y), len(x))
	}
	return y, st
}

// A segmented render equals the serial one: the demo chain at full fuzz
// (hard clipping, the case that forgets its start most slowly) on 8 s of
// the synthesized phrase at 4×, cut into four segments, each started
// from the operating point a warm-up (PlanSegments) before its start.
// Every output sample must lie within 1e-7 of full scale of the serial
// render's: the bar of issue 12, under the 24-bit step 2^−23 ≈ 1.19e-7
// (common practice), so that a 24-bit file can differ only where a sample
// sits on a rounding boundary. The kept work is counted once: the
// internal samples come to (frames + filter delay)·factor exactly, as in
// the serial render (its flush feeds the delay's worth of zeros).
func TestSegmentsMatchSerial(t *testing.T) {
	p := preparedFile(t, "../chains/demo.toml", 4, "fuzz.fuzz=1")
	x := phraseSeconds(t, 8)
	full, err := p.PlanSegments(48000, 4, 1<<30, 2)
	if err != nil {
		t.Fatal(err)
	}
	if full.Warmup == 0 || full.WarmupSeconds > 2 {
		t.Fatalf("warm-up %d frames (%.2f s): want a warm-up under 2 s for the demo chain", full.Warmup, full.WarmupSeconds)
	}
	serial, sst := renderStream(t, p, x, 4, 1, nil)
	if sst.Plan.Segments != 1 {
		t.Fatalf("one worker: %d segments", sst.Plan.Segments)
	}
	plan := SegmentPlan{Segments: 4, First: len(x) / 4, Length: len(x) / 4, Warmup: full.Warmup}
	seg, st := renderStream(t, p, x, 4, 2, &plan)
	worst, at := 0.0, 0
	for i := range serial {
		if d := math.Abs(seg[i] - serial[i]); d > worst || math.IsNaN(d) {
			worst, at = d, i
		}
	}
	t.Logf("warm-up %.3f s; worst difference %.2e FS at %.3f s; join error %.2e FS", full.WarmupSeconds, worst, float64(at)/48000, st.JoinError)
	if !(st.JoinError <= JoinTolerance) {
		t.Errorf("join error %.3g FS over %g", st.JoinError, JoinTolerance)
	}
	if !(worst <= 1e-7) {
		t.Errorf("segmented render differs from the serial one by %.3g FS at frame %d (%.3f s)", worst, at, float64(at)/48000)
	}
	c, err := p.NewChannel(48000)
	if err != nil {
		t.Fatal(err)
	}
	want := int64(len(x)+c.Latency()) * 4
	if st.Stats.Samples != want || sst.Stats.Samples != want {
		t.Errorf("internal samples: segmented %d, serial %d, want (frames + delay)·factor = %d", st.Stats.Samples, sst.Stats.Samples, want)
	}
	if st.Stats.NonConverged != 0 {
		t.Errorf("%d samples did not converge", st.Stats.NonConverged)
	}
	// A warm-up a twentieth as long leaves the segments far from the
	// serial render (0.4 FS here): the join must show it.
	short := SegmentPlan{Segments: 2, First: 2 * 48000, Length: 2 * 48000, Warmup: full.Warmup / 20}
	_, bad := renderStream(t, p, x[:4*48000], 4, 2, &short)
	if !(bad.JoinError > JoinTolerance) {
		t.Errorf("a warm-up of %d frames joins within %.3g FS", short.Warmup, bad.JoinError)
	}
}

// The plan's rules: one worker or a file under eight warm-ups a piece is
// serial; otherwise as many pieces as workers, more (a multiple of the
// workers) once a piece would pass MaxSegment, the first longer by one
// warm-up, the pieces covering the file exactly.
func TestPlanSegments(t *testing.T) {
	p := preparedFile(t, "../chains/demo.toml", 4)
	ref, err := p.PlanSegments(48000, 4, 1<<30, 2)
	if err != nil {
		t.Fatal(err)
	}
	w := int64(ref.Warmup)
	for _, tc := range []struct {
		frames   int64
		workers  int
		segments int
	}{
		{60 * 48000, 1, 1},
		{2 * MinSegmentWarmups * w, 2, 1},     // the warm-up takes the first piece's margin
		{2*MinSegmentWarmups*w + w + 2, 2, 2}, // just enough for two
		{30 * 48000, 2, 2},                    // half a minute: one piece a core
		{3 * MaxSegment, 2, 4},                // past MaxSegment a piece: two rounds
		{30 * 48000, 3, 3},                    // three cores
	} {
		sp, err := p.PlanSegments(48000, 4, tc.frames, tc.workers)
		if err != nil {
			t.Fatal(err)
		}
		if sp.Segments != tc.segments {
			t.Errorf("%d frames on %d workers: %d segments (%s), want %d", tc.frames, tc.workers, sp.Segments, sp.Reason, tc.segments)
			continue
		}
		if sp.Segments == 1 {
			if sp.Reason == "" {
				t.Errorf("%d frames on %d workers: serial without a reason", tc.frames, tc.workers)
			}
			continue
		}
		last := tc.frames - int64(sp.First) - int64(sp.Segments-2)*int64(sp.Length)
		if sp.First != sp.Length+sp.Warmup || last <= 0 || last > int64(sp.Length) || sp.Length > MaxSegment {
			t.Errorf("%d frames: first %d, length %d, last %d, warm-up %d", tc.frames, sp.First, sp.Length, last, sp.Warmup)
		}
	}
}

// toneSource generates a sine of n frames without holding it.
type toneSource struct{ i, n int }

func (s *toneSource) Read(dst []float64) (int, error) {
	k := min(len(dst), s.n-s.i)
	if k <= 0 {
		return 0, io.EOF
	}
	for j := range dst[:k] {
		dst[j] = 0.5 * math.Sin(2*math.Pi*440*float64(s.i+j)/48000)
	}
	s.i += k
	return k, nil
}

// A segmented stream's memory is bounded whatever its length: ten
// segments of MaxSegment frames on two workers allocate at most the
// workers + 3 reused segment buffers (8 bytes a frame) and 1 MiB for the
// channels and blocks, not ten buffers.
func TestSegmentMemoryIsBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("streams 21 M frames")
	}
	p := engine(t, rcChain, 1)
	frames := 10 * MaxSegment
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	out := 0
	st, err := p.StreamWith(context.Background(), &toneSource{n: frames}, 48000, 1, StreamOptions{Frames: int64(frames), Workers: 2,
		Sink: func(b []float64) error { out += len(b); return nil }})
	runtime.ReadMemStats(&after)
	if err != nil {
		t.Fatal(err)
	}
	alloc := after.TotalAlloc - before.TotalAlloc
	bound := uint64(2+3)*uint64(st.Plan.First+st.Plan.Warmup+64)*8 + 1<<20
	t.Logf("%d segments of %d frames: %d MiB allocated, bound %d MiB", st.Plan.Segments, st.Plan.Length, alloc>>20, bound>>20)
	if st.Plan.Segments != 10 || out != frames {
		t.Fatalf("%d segments, %d frames out of %d", st.Plan.Segments, out, frames)
	}
	if alloc > bound {
		t.Errorf("allocated %d B, bound %d B", alloc, bound)
	}
}

// A chain with a switch segments like any other: the unselected
// position's capacitor, held by its 1 TΩ leak, is a mode the input cannot
// reach, so it asks for no warm-up (wdf.Solver.SlowestDecay leaves it
// out) where it used to make the render serial. The demo with a
// tone-cap toggle in front, four seconds in two segments with the planned
// warm-up, stays within 1e-7 of full scale of the serial render (the
// bound of TestSegmentsMatchSerial) at every sample.
func TestSegmentsWithASwitch(t *testing.T) {
	demo, err := os.ReadFile("../chains/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	src := string(demo)
	i := strings.Index(src, "[[stage]]")
	src = src[:i] + `[[stage]]
id = "voice"
parts = [
  { ref = "R1",  kind = "resistor",  value = "1k", pins = ["in", "out"] },
  { ref = "C1",  kind = "capacitor", value = "2n2", pins = ["d1", "gnd"] },
  { ref = "C2",  kind = "capacitor", value = "6n8", pins = ["d2", "gnd"] },
  { ref = "SW1", kind = "switch", value = "dark", positions = [
      { name = "flat", connect = [] },
      { name = "dark", connect = [["out", "d1"]] },
      { name = "darker", connect = [["out", "d2"]] },
    ] },
]

` + src[i:]
	ch, err := chains.Parse("demo-switch.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	p, err := Prepare(ch, 4)
	if err != nil {
		t.Fatal(err)
	}
	x := phraseSeconds(t, 4)
	full, err := p.PlanSegments(48000, 4, 1<<30, 2)
	if err != nil || full.Warmup == 0 {
		t.Fatalf("plan %+v, %v: want a finite warm-up", full, err)
	}
	serial, _ := renderStream(t, p, x, 4, 1, nil)
	plan := SegmentPlan{Segments: 2, First: len(x) / 2, Length: len(x) / 2, Warmup: full.Warmup}
	seg, st := renderStream(t, p, x, 4, 2, &plan)
	worst := 0.0
	for i := range serial {
		if d := math.Abs(seg[i] - serial[i]); d > worst || math.IsNaN(d) {
			worst = d
		}
	}
	t.Logf("warm-up %.3f s; worst difference %.2e FS; join error %.2e FS", full.WarmupSeconds, worst, st.JoinError)
	if !(worst <= 1e-7) || !(st.JoinError <= JoinTolerance) {
		t.Errorf("segmented render %.3g FS from the serial one, join error %.3g FS", worst, st.JoinError)
	}
}

// A slow circuit segments on a long file and stays serial on a short one:
// the octave rectifier example needs a warm-up of several seconds (its
// slowest linearised mode, four times over), under MaxWarmup, so a
// 3-minute file is cut in two (each piece at least MinSegmentWarmups
// warm-ups long) and a 20 s one is not.
func TestPlanSegmentsSlowCircuit(t *testing.T) {
	p := preparedFile(t, "../chains/examples/octave-transformer.toml", 4)
	long, err := p.PlanSegments(48000, 4, 180*48000, 2)
	if err != nil {
		t.Fatal(err)
	}
	if long.Segments != 2 || long.WarmupSeconds < 1 || long.WarmupSeconds > MaxWarmup || long.Length < MinSegmentWarmups*long.Warmup {
		t.Errorf("180 s: %+v; want 2 segments, each at least %d warm-ups", long, MinSegmentWarmups)
	}
	short, err := p.PlanSegments(48000, 4, 20*48000, 2)
	if err != nil {
		t.Fatal(err)
	}
	if short.Segments != 1 || !strings.Contains(short.Reason, "too short to cut") {
		t.Errorf("20 s: %+v; want serial, too short", short)
	}
	t.Logf("warm-up %.2f s; 180 s: %d segments; 20 s: %s", long.WarmupSeconds, long.Segments, short.Reason)
}
