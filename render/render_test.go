package render

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/wavio"
	"renderchain/engine"
	"renderchain/internal/testchains"
)

const dividerChain = testchains.Divider // the output is exactly half the source

func prepared(t testing.TB, src string, oversample int) *engine.Prepared {
	t.Helper()
	ch, err := chains.Parse("t.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	e, err := engine.Prepare(ch, oversample)
	if err != nil {
		t.Fatal(err)
	}
	return e
}

func writeTestWAV(t testing.TB, path string, f wavio.Format, x []float64) {
	t.Helper()
	if err := wavio.WriteFile(path, f, x); err != nil {
		t.Fatal(err)
	}
}

// sineWAV writes n samples of a sine of amplitude a and f Hz, 48 kHz
// mono 24-bit, as in.wav in dir, and returns its path and samples.
func sineWAV(t testing.TB, dir string, n int, a, f float64) (string, []float64) {
	t.Helper()
	x := make([]float64, n)
	for i := range x {
		x[i] = a * math.Sin(2*math.Pi*f*float64(i)/48000)
	}
	in := filepath.Join(dir, "in.wav")
	writeTestWAV(t, in, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 24}, x)
	return in, x
}

func readWAV(t testing.TB, path string) ([]float64, wavio.Format) {
	t.Helper()
	r, err := wavio.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	var out []float64
	buf := make([]float64, 4096)
	for {
		n, err := r.Read(buf)
		out = append(out, buf[:n]...)
		if err != nil {
			break
		}
	}
	return out, r.Format()
}

// Output sample n lines up with input sample n and the file has exactly as
// many frames as the input, at every oversampling factor, for an odd
// length, in stereo with independent channels. Tolerance: at factor 1 the
// path is exact (1e-12); oversampled, the two filters' passband ripple of
// 0.01 dB each bounds the error by (10^(0.02/20) − 1) of the amplitude
// (the resampler's specification), while a one-sample slip would be ~0.2.
func TestRenderAlignment(t *testing.T) {
	dir := t.TempDir()
	const fs, frames = 48000, 12345
	x := make([]float64, 2*frames)
	for n := 0; n < frames; n++ {
		tt := float64(n) / fs
		x[2*n] = 0.4*math.Sin(2*math.Pi*1000*tt) + 0.3*math.Sin(2*math.Pi*7000*tt+1)
		x[2*n+1] = 0.5 * math.Sin(2*math.Pi*300*tt)
	}
	// Fade in and out over 10 ms (raised cosine) so the test signal itself
	// has no wide-band edge for the band-limited path to smooth.
	for n := 0; n < 480; n++ {
		g := 0.5 - 0.5*math.Cos(math.Pi*float64(n)/480)
		for c := 0; c < 2; c++ {
			x[2*n+c] *= g
			x[2*(frames-1-n)+c] *= g
		}
	}
	in := filepath.Join(dir, "in.wav")
	writeTestWAV(t, in, wavio.Format{SampleRate: fs, Channels: 2, BitDepth: 32, Float: true}, x)
	for _, os := range []int{1, 2, 4} {
		out := filepath.Join(dir, "out.wav")
		rep, err := RenderFile(context.Background(), prepared(t, dividerChain, os), in, out, FileOptions{Format: FormatFloat32})
		if err != nil {
			t.Fatal(err)
		}
		y, f := readWAV(t, out)
		if len(y) != len(x) || f.Channels != 2 || f.SampleRate != fs {
			t.Fatalf("oversample %d: %d samples (%+v), want %d", os, len(y), f, len(x))
		}
		tol := 1e-6 // float32 output rounding
		if os > 1 {
			tol = (math.Pow(10, 0.02/20) - 1) * 0.7
		}
		worst := 0.0
		for i := range x {
			worst = math.Max(worst, math.Abs(y[i]-0.5*float64(float32(x[i]))))
		}
		if worst > tol {
			t.Errorf("oversample %d: worst |y − x/2| = %.3g > %.3g", os, worst, tol)
		}
		if rep.Output.Frames != frames || rep.Solver.NonConverged != 0 {
			t.Errorf("report frames %d nonconverged %d", rep.Output.Frames, rep.Solver.NonConverged)
		}
		t.Logf("oversample %d: worst deviation %.3g", os, worst)
	}
}

// floatWAV builds a mono IEEE-float WAV byte by byte (RIFF/WAVE, format
// tag 3), so a test can hold values the writer refuses.
func floatWAV(samples []float32) []byte {
	data := make([]byte, 4*len(samples))
	for i, v := range samples {
		binary.LittleEndian.PutUint32(data[4*i:], math.Float32bits(v))
	}
	b := []byte("RIFF\x00\x00\x00\x00WAVEfmt ")
	b = binary.LittleEndian.AppendUint32(b, 16)
	b = binary.LittleEndian.AppendUint16(b, 3)
	b = binary.LittleEndian.AppendUint16(b, 1)
	b = binary.LittleEndian.AppendUint32(b, 48000)
	b = binary.LittleEndian.AppendUint32(b, 4*48000)
	b = binary.LittleEndian.AppendUint16(b, 4)
	b = binary.LittleEndian.AppendUint16(b, 32)
	b = append(b, "data"...)
	b = binary.LittleEndian.AppendUint32(b, uint32(len(data)))
	b = append(b, data...)
	binary.LittleEndian.PutUint32(b[4:], uint32(len(b)-8))
	return b
}

// Faults leave no output file behind and say what went wrong in one line.
func TestRenderFaultsLeaveNoOutput(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "good.wav")
	writeTestWAV(t, good, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 16}, make([]float64, 4800))
	nan := make([]float32, 4800)
	nan[3000] = float32(math.NaN())
	nanFile := filepath.Join(dir, "nan.wav")
	os.WriteFile(nanFile, floatWAV(nan), 0o644)
	notWAV := filepath.Join(dir, "text.wav")
	os.WriteFile(notWAV, []byte("this is not audio"), 0o644)
	empty := filepath.Join(dir, "empty.wav")
	os.WriteFile(empty, nil, 0o644)
	lowRate := filepath.Join(dir, "8k.wav")
	writeTestWAV(t, lowRate, wavio.Format{SampleRate: 8000, Channels: 1, BitDepth: 16}, make([]float64, 800))
	cases := []struct{ name, in, out, want string }{
		{"NaN sample", nanFile, "o1.wav", "frame 3000"},
		{"not a WAV", notWAV, "o2.wav", "text.wav"},
		{"empty", empty, "o3.wav", "empty.wav"},
		{"missing", filepath.Join(dir, "nope.wav"), "o4.wav", "nope.wav"},
		{"rate", lowRate, "o5.wav", "8000 Hz is outside 44100–192000 Hz"},
		{"out is in", good, "good.wav", "is the same file as an input"},
	}
	e := prepared(t, dividerChain, 2)
	for _, tc := range cases {
		out := filepath.Join(dir, tc.out)
		_, err := RenderFile(context.Background(), e, tc.in, out, FileOptions{})
		if err == nil || !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: error %v, want one line containing %q", tc.name, err, tc.want)
		}
		if tc.out != "good.wav" {
			if _, err := os.Stat(out); err == nil {
				t.Errorf("%s: output file left behind", tc.name)
			}
		}
	}
	// The input survived the refused overwrite, and no temp files remain.
	if x, _ := readWAV(t, good); len(x) != 4800 {
		t.Errorf("input changed: %d samples", len(x))
	}
	ents, _ := os.ReadDir(dir)
	for _, en := range ents {
		if strings.HasSuffix(en.Name(), ".tmp") {
			t.Errorf("temp file %s left", en.Name())
		}
	}
	// Cancellation: no file.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	out := filepath.Join(dir, "cancelled.wav")
	if _, err := RenderFile(ctx, e, good, out, FileOptions{}); err == nil {
		t.Error("cancelled render succeeded")
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("cancelled render left its file")
	}
}

// Output beyond full scale is counted and warned about, never wrapped:
// the PCM writer clamps and the report says how many samples and how far.
func TestRenderReportsClipping(t *testing.T) {
	dir := t.TempDir()
	in, x := sineWAV(t, dir, 4800, 0.9, 500)
	hot := strings.Replace(dividerChain, `full_scale = "1V"`, `full_scale = "0.25V"`, 1)
	rep, err := RenderFile(context.Background(), prepared(t, hot, 1), in, filepath.Join(dir, "out.wav"), FileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// 0.45 V peak over 0.25 V full scale: +5.1 dBFS (20·log10(1.8)).
	if rep.Output.ClippedSamples == 0 || math.Abs(float64(rep.Output.PeakDBFS)-20*math.Log10(1.8)) > 0.01 || len(rep.Warnings) == 0 {
		t.Errorf("clipped %d peak %.3f dBFS warnings %v", rep.Output.ClippedSamples, float64(rep.Output.PeakDBFS), rep.Warnings)
	}
	y, _ := readWAV(t, filepath.Join(dir, "out.wav"))
	for i, v := range y {
		if math.Abs(v) > 1 {
			t.Fatalf("sample %d = %g beyond full scale", i, v)
		}
		if x[i] > 0.6 && v < 0.99 {
			t.Fatalf("sample %d wrapped: %g", i, v)
		}
	}
}

// Streaming: the memory a serial render allocates does not grow with the
// file's length (an 8 s file allocates what a 1 s file does, within 64
// KiB: the blocks, the filters and the spectrum accumulators are all
// fixed-size). A render cut across cores holds a bounded number of
// segment buffers instead (engine's TestSegmentMemoryIsBounded).
func TestRenderMemoryIsFlat(t *testing.T) {
	dir := t.TempDir()
	alloc := func(seconds int) uint64 {
		in := filepath.Join(dir, "in.wav")
		x := make([]float64, seconds*48000)
		for i := range x {
			x[i] = 0.3 * math.Sin(2*math.Pi*440*float64(i)/48000)
		}
		writeTestWAV(t, in, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 16}, x)
		e := prepared(t, dividerChain, 1)
		var before, after runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&before)
		if _, err := RenderFile(context.Background(), e, in, filepath.Join(dir, "out.wav"), FileOptions{Workers: 1}); err != nil {
			t.Fatal(err)
		}
		runtime.ReadMemStats(&after)
		return after.TotalAlloc - before.TotalAlloc
	}
	short, long := alloc(1), alloc(8)
	t.Logf("1 s: %d B, 8 s: %d B", short, long)
	if long > short+64<<10 {
		t.Errorf("an 8 s render allocates %d B, a 1 s render %d B", long, short)
	}
}

// Silence renders (issue: "json: unsupported value: NaN" and no WAV): the
// levels that do not exist — the dry take's peak, RMS, crest factor and
// spectrum — are null in the report (JSON has no NaN or infinities, RFC
// 8259 section 6), and the file is written.
func TestSilenceRenders(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "silence.wav")
	writeTestWAV(t, in, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 16}, make([]float64, 9600))
	rep, err := RenderFile(context.Background(), prepared(t, dividerChain, 1), in, filepath.Join(dir, "out.wav"), FileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(rep)
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		Input map[string]any `json:"input"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"peak_dbfs", "rms_dbfs", "crest_db", "centroid_hz"} {
		if v, ok := m.Input[k]; !ok || v != nil {
			t.Errorf("input.%s = %v, want null", k, v)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "out.wav")); err != nil {
		t.Error(err)
	}
	// The models make no noise: a silent input says so (a builder checks
	// idle noise with silence).
	if len(rep.Warnings) == 0 || !strings.HasPrefix(rep.Warnings[0], "the input is silence: the device models make no noise") {
		t.Errorf("warnings %q", rep.Warnings)
	}
}

// Warnings travel: a render of the cascade with overall feedback carries
// the stability warning and the rendered check's line in its report,
// before the render's own (the output clips the file: the motorboat swings
// several volts into a 1 V full scale); a render of the same cascade
// without the feedback path carries neither.
func TestRenderCarriesTheChainsWarnings(t *testing.T) {
	dir := t.TempDir()
	in, _ := sineWAV(t, dir, 24000, 0.1, 220)
	for _, loop := range []bool{true, false} {
		p, err := engine.Prepare(testchains.Cascade(t, loop), 1)
		if err != nil {
			t.Fatal(err)
		}
		rep, err := RenderFile(context.Background(), p, in, filepath.Join(dir, "wet.wav"), FileOptions{})
		if err != nil {
			t.Fatal(err)
		}
		all := strings.Join(rep.Warnings, "\n")
		osc := strings.HasPrefix(all, "self-oscillates near ") && len(rep.Warnings) > 1 && strings.HasPrefix(rep.Warnings[1], "rendered check ")
		if loop != osc || (!loop && strings.Contains(all, "oscillat")) {
			t.Errorf("loop %v: warnings %q", loop, rep.Warnings)
		}
	}
}

// A render with no factor given runs at the one chosen for the chain and
// rate, says so, and cuts a mono file across the cores it is given. For
// the RC low-pass (no devices) the choice is the warping floor, 2× (the
// closed form is engine's TestAutoFactorLinear), with no alias probe. The
// file cut in two equals the serial render's within one 24-bit step
// (2^−23 of full scale): the segments differ from the serial render by
// under 1e-7 of full scale, so quantisation can move a sample by one step
// at most. A factor given is kept and reported as asked.
func TestRenderChoosesFactorAndCuts(t *testing.T) {
	dir := t.TempDir()
	in, _ := sineWAV(t, dir, 48000, 0.5, 440)
	render := func(oversample, workers int, name string) (*Report, []float64) {
		rep, err := RenderFile(context.Background(), prepared(t, testchains.RCLowpass, oversample), in, filepath.Join(dir, name), FileOptions{Workers: workers})
		if err != nil {
			t.Fatal(err)
		}
		y, _ := readWAV(t, filepath.Join(dir, name))
		return rep, y
	}
	cut, y2 := render(0, 2, "cut.wav")
	serial, y1 := render(0, 1, "serial.wav")
	s := cut.Solver
	if s.Oversample != 2 || s.OversampleFrom != engine.FactorAuto || s.OversampleReason == "" || s.AliasProbe != nil || s.InternalRate != 96000 {
		t.Errorf("factor %d from %q (%q), probe %v, internal rate %g", s.Oversample, s.OversampleFrom, s.OversampleReason, s.AliasProbe, s.InternalRate)
	}
	if s.Segments != 2 || serial.Solver.Segments != 1 || serial.Solver.SegmentNote == "" {
		t.Errorf("segments %d (serial: %d, %q)", s.Segments, serial.Solver.Segments, serial.Solver.SegmentNote)
	}
	for i := range y1 {
		if d := math.Abs(y1[i] - y2[i]); d > math.Ldexp(1, -23) {
			t.Fatalf("sample %d: cut %g, serial %g", i, y2[i], y1[i])
		}
	}
	if s.Samples != serial.Solver.Samples {
		t.Errorf("internal samples: cut %d, serial %d", s.Samples, serial.Solver.Samples)
	}
	asked, _ := render(3, 2, "asked.wav")
	if asked.Solver.Oversample != 3 || asked.Solver.OversampleFrom != engine.FactorRequested {
		t.Errorf("asked for 3×: %d× from %q", asked.Solver.Oversample, asked.Solver.OversampleFrom)
	}
}
