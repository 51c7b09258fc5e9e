package loudness

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// EBU Tech 3341 (2016), table of minimum requirements, cases 1–5 (from
// memory): stereo 1 kHz sines, identical in both channels, at the given
// peak levels. Expected integrated loudness −23.0 (−33.0 for case 2) with a
// tolerance of ±0.1 LU; cases 1 and 2 also specify the momentary and
// short-term readings of the steady sine with the same tolerance. The
// signals are synthesised here; the −72 dBFS stretches of case 4 fall
// under the absolute gate, the −36 dBFS stretches of cases 3 and 4 under
// the relative gate.
func TestTech3341Cases(t *testing.T) {
	cases := []struct {
		name    string
		fs      float64
		segs    []segment
		want    float64
		steady  bool // also check momentary and short-term maxima
		comment string
	}{
		{name: "case 1", fs: 48000, segs: []segment{{-23, 20}}, want: -23, steady: true},
		{name: "case 2", fs: 48000, segs: []segment{{-33, 20}}, want: -33, steady: true},
		{name: "case 3", fs: 48000, segs: []segment{{-36, 10}, {-23, 60}, {-36, 10}}, want: -23},
		{name: "case 4", fs: 48000, segs: []segment{{-72, 10}, {-36, 10}, {-23, 60}, {-36, 10}, {-72, 10}}, want: -23},
		{name: "case 5", fs: 48000, segs: []segment{{-26, 20}, {-20, 20.1}, {-26, 20}}, want: -23},
		// Tech 3341 is written for 48 kHz; the same signal and limits at
		// other rates exercise the re-discretised K-weighting.
		{name: "case 1 at 44.1 kHz", fs: 44100, segs: []segment{{-23, 20}}, want: -23, steady: true},
		{name: "case 1 at 96 kHz", fs: 96000, segs: []segment{{-23, 20}}, want: -23, steady: true},
	}
	const tol = 0.1 // LU, Tech 3341
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			m := newTestMeter(t, c.fs, 2)
			writeSegments(t, m, 1000, c.segs)
			got := m.Integrated()
			t.Logf("integrated %.4f LUFS (want %.1f), momentary max %.4f, short-term max %.4f",
				got, c.want, m.MomentaryMax(), m.ShortTermMax())
			if math.Abs(got-c.want) > tol {
				t.Errorf("integrated = %.3f LUFS, want %.1f ± %.1f", got, c.want, tol)
			}
			if !c.steady {
				return
			}
			if mm := m.MomentaryMax(); math.Abs(mm-c.want) > tol {
				t.Errorf("momentary max = %.3f LUFS, want %.1f ± %.1f", mm, c.want, tol)
			}
			if st := m.ShortTermMax(); math.Abs(st-c.want) > tol {
				t.Errorf("short-term max = %.3f LUFS, want %.1f ± %.1f", st, c.want, tol)
			}
		})
	}
}

// At 11.025 kHz a 100 ms sub-block is 1102.5 samples, so sub-blocks
// alternate between 1102 and 1103 frames. A steady sine of peak A and
// frequency f must still read its closed-form loudness
// −0.691 + 10·log10(channels·A²/2) + |K(f)|² in dB, with |K(f)| the
// weighting's transfer function evaluated analytically (BS.1770-4
// Annex 1). The 400 ms and 3 s windows span 4410 and 33075 frames, whole
// numbers of cycles, so the only errors are rounding and the filters'
// start-up; tolerance 0.005 LU.
func TestNonIntegerSubBlock(t *testing.T) {
	const fs, f, level = 11025, 1000, -23.0
	m := newTestMeter(t, fs, 2)
	writeSegments(t, m, f, []segment{{level, 20}})
	a := math.Pow(10, level/20)
	want := offsetLU + 10*math.Log10(2*a*a/2) + kResponse(fs, f)
	for _, r := range []struct {
		what string
		got  float64
	}{{"integrated", m.Integrated()}, {"momentary max", m.MomentaryMax()}, {"short-term max", m.ShortTermMax()}} {
		t.Logf("%s %.5f LUFS, closed form %.5f", r.what, r.got, want)
		if math.Abs(r.got-want) > 0.005 {
			t.Errorf("%s = %.4f LUFS, want %.4f ± 0.005", r.what, r.got, want)
		}
	}
}

// EBU Tech 3342 (2016), minimum requirements, cases 1–4 (from memory):
// stereo 1 kHz sines, 20 s per level, expected loudness range ±1 LU.
func TestTech3342LoudnessRange(t *testing.T) {
	cases := []struct {
		name string
		segs []segment
		want float64
	}{
		{"case 1", []segment{{-20, 20}, {-30, 20}}, 10},
		{"case 2", []segment{{-20, 20}, {-15, 20}}, 5},
		{"case 3", []segment{{-40, 20}, {-20, 20}}, 20},
		{"case 4", []segment{{-50, 20}, {-35, 20}, {-20, 20}, {-35, 20}, {-50, 20}}, 15},
	}
	const tol = 1.0 // LU, Tech 3342
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			m := newTestMeter(t, 48000, 2)
			writeSegments(t, m, 1000, c.segs)
			got := m.LoudnessRange()
			t.Logf("LRA %.4f LU (want %.0f)", got, c.want)
			if math.Abs(got-c.want) > tol {
				t.Errorf("LRA = %.3f LU, want %.0f ± %.0f", got, c.want, tol)
			}
		})
	}
}

// BS.1770-4 Annex 1 (from memory): a 0 dBFS 1 kHz-region sine in one front
// channel alone reads −3.01 LKFS; 997 Hz is the frequency at which the
// −0.691 constant cancels the K-weighting gain. Tolerance ±0.01 LU: the
// figure is given to two decimals; a 400 ms window holds 398.8 cycles, so
// the momentary reading ripples by under 0.002 dB.
func TestFullScaleSineOneChannel(t *testing.T) {
	for _, ch := range []int{1, 2, 3} {
		m := newTestMeter(t, 48000, ch)
		tab := sineTable(t, 48000, 997)
		buf := make([]float64, 4800*ch)
		n := 0
		for range 100 { // 10 s
			for i := range 4800 {
				buf[i*ch] = tab[n%len(tab)] // first channel only, the rest silent
				n++
			}
			m.Write(buf)
		}
		for _, r := range []struct {
			what string
			got  float64
		}{{"integrated", m.Integrated()}, {"momentary max", m.MomentaryMax()}, {"short-term max", m.ShortTermMax()}} {
			t.Logf("%d channel(s): %s %.4f LUFS", ch, r.what, r.got)
			if math.Abs(r.got+3.01) > 0.01 {
				t.Errorf("%d channel(s): %s = %.4f LUFS, want -3.01 ± 0.01", ch, r.what, r.got)
			}
		}
	}
}

// Silence, too-short input and sub-gate input give -Inf, never NaN
// (BS.1770-4: no block passes the absolute gate, so the gated mean is
// empty). Peaks of silence are -Inf; LRA of nothing is 0.
func TestSilenceAndGates(t *testing.T) {
	empty := newTestMeter(t, 48000, 2)

	silent := newTestMeter(t, 48000, 2)
	silent.Write(make([]float64, 2*48000*5))

	short := newTestMeter(t, 48000, 2) // 399 ms of a loud sine: no complete 400 ms block
	writeSegments(t, short, 1000, []segment{{-3, 0.399}})

	quiet := newTestMeter(t, 48000, 2) // −80 dBFS ≈ −80 LUFS, under the −70 LUFS gate
	writeSegments(t, quiet, 1000, []segment{{-80, 5}})

	negInf := math.Inf(-1)
	for _, c := range []struct {
		name string
		m    *Meter
		want [4]float64 // integrated, momentary, short-term, sample peak
	}{
		{"no input", empty, [4]float64{negInf, negInf, negInf, negInf}},
		{"5 s of zeros", silent, [4]float64{negInf, negInf, negInf, negInf}},
		{"399 ms", short, [4]float64{negInf, negInf, negInf, -3}},
		{"-80 dBFS", quiet, [4]float64{negInf, -80, -80, -80}},
	} {
		got := [4]float64{c.m.Integrated(), c.m.MomentaryMax(), c.m.ShortTermMax(), c.m.SamplePeak()}
		for i, what := range []string{"integrated", "momentary max", "short-term max", "sample peak"} {
			ok := got[i] == c.want[i] || math.Abs(got[i]-c.want[i]) < 0.1 // 0.1: Tech 3341
			if math.IsNaN(got[i]) || !ok {
				t.Errorf("%s: %s = %v, want %v", c.name, what, got[i], c.want[i])
			}
		}
		if lra := c.m.LoudnessRange(); lra != 0 {
			t.Errorf("%s: LRA = %v, want 0", c.name, lra)
		}
		if tp := c.m.TruePeak(); math.IsNaN(tp) || tp < c.m.SamplePeak() {
			t.Errorf("%s: true peak %v below sample peak %v", c.name, tp, c.m.SamplePeak())
		}
	}
}

// The stream is continuous across Write calls: splitting the same samples
// at arbitrary points, including inside frames, must give bit-identical
// results (common practice for streaming meters).
func TestWriteSplitInvariance(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 2*48000*4) // 4 s of stereo noise, peak 0.5
	for i := range x {
		x[i] = rng.Float64() - 0.5
	}
	whole := newTestMeter(t, 48000, 2)
	whole.Write(x)
	split := newTestMeter(t, 48000, 2)
	for rest := x; len(rest) > 0; {
		k := min(len(rest), 1+rng.IntN(9999))
		split.Write(rest[:k])
		rest = rest[k:]
	}
	for _, r := range []struct {
		what string
		a, b float64
	}{
		{"integrated", whole.Integrated(), split.Integrated()},
		{"momentary", whole.MomentaryMax(), split.MomentaryMax()},
		{"short-term", whole.ShortTermMax(), split.ShortTermMax()},
		{"LRA", whole.LoudnessRange(), split.LoudnessRange()},
		{"true peak", whole.TruePeak(), split.TruePeak()},
		{"sample peak", whole.SamplePeak(), split.SamplePeak()},
	} {
		if r.a != r.b {
			t.Errorf("%s: one call %v, split calls %v", r.what, r.a, r.b)
		}
	}
}

// Write allocates nothing per call while the reserved sub-block storage
// lasts (the rules' hot-path requirement, checked with AllocsPerRun).
func TestWriteAllocations(t *testing.T) {
	m := newTestMeter(t, 48000, 2)
	buf := make([]float64, 2*4800)
	for i := range buf {
		buf[i] = 0.1 * math.Sin(float64(i))
	}
	allocs := testing.AllocsPerRun(200, func() { m.Write(buf) }) // 20 s < 10 min reserved
	if allocs != 0 {
		t.Errorf("Write: %v allocations per call, want 0", allocs)
	}
}

// A non-finite sample is reported once, with its position, and measured as
// 0, so the results stay finite.
func TestNonFiniteSample(t *testing.T) {
	m := newTestMeter(t, 48000, 2)
	writeSegments(t, m, 1000, []segment{{-23, 2}})
	m.Write([]float64{0.1, math.NaN(), math.Inf(1), 0.1})
	writeSegments(t, m, 1000, []segment{{-23, 2}})
	var se *SampleError
	if err := m.Err(); !errors.As(err, &se) {
		t.Fatalf("Err() = %v, want *SampleError", err)
	}
	if se.Frame != 96000 || se.Channel != 1 || !math.IsNaN(se.Value) {
		t.Errorf("SampleError = %+v, want frame 96000, channel 1, NaN", *se)
	}
	if !strings.Contains(se.Error(), "frame 96000, channel 1") {
		t.Errorf("message %q does not name the position", se.Error())
	}
	for _, v := range []float64{m.Integrated(), m.TruePeak(), m.SamplePeak(), m.LoudnessRange()} {
		if math.IsNaN(v) || math.IsInf(v, 1) {
			t.Errorf("result %v after a non-finite sample, want finite", v)
		}
	}
	if ok := newTestMeter(t, 48000, 1); ok.Err() != nil {
		t.Errorf("fresh meter Err() = %v, want nil", ok.Err())
	}
}

func TestConstructorErrors(t *testing.T) {
	cases := []struct {
		name    string
		make    func() (*Meter, error)
		param   string
		wantErr bool
	}{
		{"fs 0", func() (*Meter, error) { return NewMeter(0, 2) }, "fs", true},
		{"fs NaN", func() (*Meter, error) { return NewMeter(math.NaN(), 2) }, "fs", true},
		{"fs +Inf", func() (*Meter, error) { return NewMeter(math.Inf(1), 2) }, "fs", true},
		{"fs 7999", func() (*Meter, error) { return NewMeter(7999, 1) }, "fs", true},
		{"fs 1 MHz", func() (*Meter, error) { return NewMeter(1e6, 1) }, "fs", true},
		{"channels 0", func() (*Meter, error) { return NewMeter(48000, 0) }, "channels", true},
		{"channels 6", func() (*Meter, error) { return NewMeter(48000, 6) }, "channels", true},
		{"no weights", func() (*Meter, error) { return NewMeterWeights(48000, nil) }, "len(weights)", true},
		{"negative weight", func() (*Meter, error) { return NewMeterWeights(48000, []float64{1, -1}) }, "weights[1]", true},
		{"NaN weight", func() (*Meter, error) { return NewMeterWeights(48000, []float64{math.NaN()}) }, "weights[0]", true},
		{"all zero", func() (*Meter, error) { return NewMeterWeights(48000, []float64{0, 0}) }, "weights", true},
		{"weights fs", func() (*Meter, error) { return NewMeterWeights(-1, []float64{1}) }, "fs", true},
		{"mono 8 kHz", func() (*Meter, error) { return NewMeter(8000, 1) }, "", false},
		{"5.1 weights", func() (*Meter, error) { return NewMeterWeights(48000, []float64{1, 1, 1, 0, 1.41, 1.41}) }, "", false},
	}
	for _, c := range cases {
		m, err := c.make()
		if !c.wantErr {
			if err != nil || m == nil {
				t.Errorf("%s: got %v, want a meter", c.name, err)
			}
			continue
		}
		var pe *ParamError
		if !errors.As(err, &pe) || m != nil {
			t.Errorf("%s: got (%v, %v), want nil and *ParamError", c.name, m, err)
			continue
		}
		if pe.Param != c.param || !strings.Contains(err.Error(), c.param) {
			t.Errorf("%s: error %q, want it to name %q", c.name, err, c.param)
		}
	}
}

// Surround weighting, BS.1770-4 Table 3 (from memory): 1.41 on a surround
// channel adds 10·log10(1.41) = 1.49 dB to that channel's contribution. A
// −23 dBFS sine in one surround channel alone therefore reads −26.01 + 1.49
// = −24.52 LUFS; in the excluded LFE position it reads nothing.
// Tolerance 0.1 LU (Tech 3341).
func TestChannelWeights(t *testing.T) {
	w := []float64{1, 1, 1, 0, 1.41, 1.41} // L R C LFE Ls Rs
	for _, c := range []struct {
		ch   int
		want float64
	}{{0, -26.01}, {3, math.Inf(-1)}, {4, -26.01 + 10*math.Log10(1.41)}} {
		m, err := NewMeterWeights(48000, w)
		if err != nil {
			t.Fatal(err)
		}
		tab := sineTable(t, 48000, 1000)
		a := math.Pow(10, -23.0/20)
		buf := make([]float64, 4800*len(w))
		for range 100 {
			for i := range 4800 {
				buf[i*len(w)+c.ch] = a * tab[i%len(tab)]
			}
			m.Write(buf)
		}
		got := m.Integrated()
		t.Logf("channel %d: %.4f LUFS", c.ch, got)
		if !(got == c.want || math.Abs(got-c.want) <= 0.1) {
			t.Errorf("sine in channel %d: %.3f LUFS, want %.2f ± 0.1", c.ch, got, c.want)
		}
	}
}

func BenchmarkWrite(b *testing.B) {
	for _, ch := range []int{1, 2} {
		b.Run([]string{"", "mono", "stereo"}[ch], func(b *testing.B) {
			m := newTestMeter(b, 48000, ch)
			buf := make([]float64, 4800*ch)
			rng := rand.New(rand.NewPCG(3, 4))
			for i := range buf {
				buf[i] = rng.Float64() - 0.5
			}
			b.ResetTimer()
			for b.Loop() {
				m.Write(buf)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(buf)), "ns/sample")
		})
	}
}
