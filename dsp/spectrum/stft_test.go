package spectrum

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// peakBin returns the bin of the highest level in a frame.
func peakBin(fr []float32) int {
	best := 0
	for k, v := range fr {
		if v > fr[best] {
			best = k
		}
	}
	return best
}

// A sine centred on a bin reads its peak amplitude (the coherent gain is
// divided out; the periodic Hann window leaks an on-bin tone into no
// other bin than its neighbours, so the level is exact to rounding,
// tolerance 1e-9 dB). Half-way between bins it reads the Hann window's
// scalloping loss low: 1.42 dB in Harris (1978), Table 1; closed form for
// a long frame |W(½)|/|W(0)| = sinc(½)/(1 − ¼) = 8/(3π), −1.4236 dB.
// Tolerance 0.001 dB: the finite frame's departure from the long-frame
// form is of order 1/N² (N = 4096).
func TestSTFTLevels(t *testing.T) {
	const fs, n = 48000.0, 4096
	for _, tc := range []struct {
		name        string
		bin, amp    float64
		wantDB, tol float64
	}{
		{"on bin, full scale", 100, 1, 0, 1e-9},
		{"on bin, −20 dB", 437, 0.1, -20, 1e-9},
		{"half-way between bins", 100.5, 1, 20 * math.Log10(8/(3*math.Pi)), 1e-3},
	} {
		x := make([]float64, 3*n)
		f := tc.bin * fs / n
		for i := range x {
			x[i] = tc.amp * math.Sin(2*math.Pi*f*float64(i)/fs+0.3)
		}
		s, err := NewSpectrogram(x, fs, n, n/4)
		if err != nil {
			t.Fatal(err)
		}
		for fr := range s.Level {
			k := peakBin(s.Level[fr])
			if got := float64(s.Level[fr][k]); math.Abs(got-tc.wantDB) > tc.tol+1e-6 {
				// float32 storage: 1e-6 dB of rounding on top.
				t.Errorf("%s, frame %d: peak %.6f dB at bin %d, want %.6f dB", tc.name, fr, got, k, tc.wantDB)
			}
		}
	}
}

// A linear chirp x(t) = sin(2π(f0·t + k·t²/2)) has instantaneous
// frequency f0 + k·t (closed form). A symmetric window centred at t_c
// sees a spectrum symmetric about f0 + k·t_c, so each frame's peak bin is
// the bin nearest that frequency: tolerance half a bin spacing.
func TestSTFTChirp(t *testing.T) {
	const fs = 48000.0
	const f0, k, dur = 200.0, 450.0, 4.0 // 200 Hz → 2 kHz in 4 s
	x := make([]float64, int(dur*fs))
	for i := range x {
		tt := float64(i) / fs
		x[i] = 0.5 * math.Sin(2*math.Pi*(f0*tt+k*tt*tt/2))
	}
	s, err := NewSpectrogram(x, fs, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if s.FrameLen != 4096 || s.Hop != 1024 {
		t.Fatalf("defaults: frame %d hop %d, want 4096 and 1024", s.FrameLen, s.Hop)
	}
	df := fs / float64(s.FrameLen)
	for fr := range s.Level {
		want := f0 + k*s.Time(fr)
		got := s.BinHz(peakBin(s.Level[fr]))
		if math.Abs(got-want) > df/2+1e-9 {
			t.Errorf("frame %d at %.4f s: peak %.2f Hz, instantaneous frequency %.2f Hz (bin spacing %.2f Hz)",
				fr, s.Time(fr), got, want, df)
		}
	}
}

// Stepped tones: 1 kHz until 1.5 s, then 3 kHz. A frame lying wholly
// before the step peaks at 1 kHz, one wholly after at 3 kHz; this checks
// Time against the frames' true positions. Both frequencies are whole
// bins (k·fs/N), so the peak bin is exactly the tone's.
func TestSTFTSteppedTones(t *testing.T) {
	const fs, n, hop = 48000.0, 2048, 700
	fa, fb := 43*fs/n, 128*fs/n // 1007.8 Hz and 3000 Hz
	const step = 1.5
	x := make([]float64, int(3*fs))
	for i := range x {
		tt := float64(i) / fs
		f := fa
		if tt >= step {
			f = fb
		}
		x[i] = 0.25 * math.Sin(2*math.Pi*f*tt)
	}
	s, err := NewSpectrogram(x, fs, n, hop)
	if err != nil {
		t.Fatal(err)
	}
	half := float64(n) / 2 / fs
	checked := 0
	for fr := range s.Level {
		c := s.Time(fr)
		var want float64
		switch {
		case c+half <= step:
			want = fa
		case c-half >= step:
			want = fb
		default:
			continue
		}
		checked++
		if got := s.BinHz(peakBin(s.Level[fr])); got != want {
			t.Errorf("frame %d centred at %.4f s: peak %.1f Hz, want %.1f Hz", fr, c, got, want)
		}
	}
	// Frames: ⌊(3·48000 − 2048)/700⌋ + 1 = 203.
	if s.Frames() != 203 || checked < 190 {
		t.Errorf("%d frames, %d checked; want 203 frames", s.Frames(), checked)
	}
}

// Writing in chunks of any size gives the frames of one write; a hop
// longer than the frame skips the samples between frames.
func TestSTFTChunksAndLongHop(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 9))
	x := make([]float64, 20000)
	for i := range x {
		x[i] = rng.NormFloat64() * 0.1
	}
	for _, hop := range []int{64, 256, 700} {
		whole, err := NewSpectrogram(x, 8000, 256, hop)
		if err != nil {
			t.Fatal(err)
		}
		st, _ := NewSTFT(8000, 256, hop)
		for rest := x; len(rest) > 0; {
			c := min(len(rest), 1+rng.IntN(900))
			if err := st.Write(rest[:c]); err != nil {
				t.Fatal(err)
			}
			rest = rest[c:]
		}
		parts := st.Spectrogram()
		if parts.Frames() != whole.Frames() || whole.Frames() != (len(x)-256)/hop+1 {
			t.Fatalf("hop %d: %d frames in chunks, %d whole, want %d", hop, parts.Frames(), whole.Frames(), (len(x)-256)/hop+1)
		}
		for f := range whole.Level {
			for k := range whole.Level[f] {
				if parts.Level[f][k] != whole.Level[f][k] {
					t.Fatalf("hop %d frame %d bin %d differs", hop, f, k)
				}
			}
		}
		// The last frame starts at (frames−1)·hop: its level matches a
		// direct analysis of those samples.
		f := whole.Frames() - 1
		one, _ := NewSpectrogram(x[f*hop:f*hop+256], 8000, 256, 256)
		for k := range one.Level[0] {
			if one.Level[0][k] != whole.Level[f][k] {
				t.Fatalf("hop %d: last frame is not the samples at %d", hop, f*hop)
			}
		}
	}
}

func TestSTFTErrors(t *testing.T) {
	for _, tc := range []struct {
		name   string
		fs     float64
		n, hop int
		arg    string
	}{
		{"rate", 0, 0, 0, "sampleRate"},
		{"not a power of two", 48000, 1000, 0, "frameLen"},
		{"too short", 48000, 8, 0, "frameLen"},
		{"negative hop", 48000, 1024, -1, "hop"},
	} {
		_, err := NewSTFT(tc.fs, tc.n, tc.hop)
		var e *Error
		if !errors.As(err, &e) || e.Arg != tc.arg || !errors.Is(err, ErrInvalid) {
			t.Errorf("%s: %v, want ErrInvalid on %s", tc.name, err, tc.arg)
		}
	}
	st, _ := NewSTFT(48000, 16, 0)
	err := st.Write([]float64{0, math.NaN()})
	var e *Error
	if !errors.As(err, &e) || e.Index != 1 || !errors.Is(err, ErrNonFinite) {
		t.Errorf("NaN sample: %v", err)
	}
	if _, err := NewSpectrogram(make([]float64, 10), 48000, 16, 0); !errors.Is(err, ErrShort) {
		t.Errorf("short signal: %v, want ErrShort", err)
	}
	// Silence reads the floor, never −Inf.
	s, _ := NewSpectrogram(make([]float64, 64), 48000, 16, 0)
	if s.MaxLevel() != MinLevel {
		t.Errorf("silence: max level %g, want %d", s.MaxLevel(), MinLevel)
	}
}

func TestHopFor(t *testing.T) {
	for _, tc := range []struct{ samples, n, maxFrames, want int }{
		{48000, 4096, 2000, 1024},        // short: a quarter frame
		{48000 * 600, 4096, 2000, 14406}, // ten minutes: ⌈(28.8e6 − 4096)/1999⌉
		{100, 4096, 2000, 1024},          // shorter than a frame
	} {
		got := HopFor(tc.samples, tc.n, tc.maxFrames)
		if got != tc.want {
			t.Errorf("HopFor(%d, %d, %d) = %d, want %d", tc.samples, tc.n, tc.maxFrames, got, tc.want)
		}
		if tc.samples > tc.n && (tc.samples-tc.n)/got+1 > tc.maxFrames {
			t.Errorf("HopFor(%d, %d, %d) = %d gives %d frames", tc.samples, tc.n, tc.maxFrames, got, (tc.samples-tc.n)/got+1)
		}
	}
}
