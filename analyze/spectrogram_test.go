package analyze

import (
	"context"
	"errors"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"renderchain/dsp/spectrum"
	"renderchain/plotting"
)

// steppedTones is 1 s of a sine centred on bin 40 of a 4096-point frame
// at 48 kHz (468.75 Hz), then 1 s centred on bin 160 (1875 Hz), both of
// peak amp.
func steppedTones(amp float64, channels int) []float64 {
	const fs = 48000
	a := sine(amp, 40*fs/4096.0, fs, fs, channels)
	b := sine(amp, 160*fs/4096.0, fs, fs, channels)
	return append(a, b...)
}

// A file's spectrogram is that of its channel mean: a stereo file with
// equal channels gives the mono file's levels. Every frame wholly inside
// the first second peaks at bin 40, wholly inside the second at bin 160,
// at 20·log10(0.5) = −6.0206 dB re a full-scale sine: a sine centred on
// a bin reads its peak amplitude through the periodic Hann window, whose
// coherent gain is divided out (Harris 1978; the level's definition in
// package spectrum). Tolerance 0.001 dB: 24-bit rounding and the far
// tone's side lobes moves it by far less.
func TestSpectrogramOfFile(t *testing.T) {
	dir := t.TempDir()
	mono, stereo := filepath.Join(dir, "mono.wav"), filepath.Join(dir, "stereo.wav")
	writeWAV(t, mono, steppedTones(0.5, 1), 1, 48000)
	writeWAV(t, stereo, steppedTones(0.5, 2), 2, 48000)
	sm, err := Spectrogram(context.Background(), mono)
	if err != nil {
		t.Fatal(err)
	}
	ss, err := Spectrogram(context.Background(), stereo)
	if err != nil {
		t.Fatal(err)
	}
	if sm.FrameLen != 4096 || sm.Hop != 1024 || sm.Frames() != ss.Frames() {
		t.Fatalf("frames of %d, hop %d, %d and %d frames", sm.FrameLen, sm.Hop, sm.Frames(), ss.Frames())
	}
	for f := range sm.Frames() {
		if !slices.Equal(sm.Level[f], ss.Level[f]) {
			t.Fatalf("frame %d: stereo levels differ from mono", f)
		}
	}
	want := 20 * math.Log10(0.5)
	checked := 0
	for f := range sm.Frames() {
		start, end := f*sm.Hop, f*sm.Hop+sm.FrameLen
		bin := -1
		switch {
		case end <= 48000:
			bin = 40
		case start >= 48000:
			bin = 160
		default:
			continue
		}
		lv := sm.Level[f]
		top := 0
		for k := range lv {
			if lv[k] > lv[top] {
				top = k
			}
		}
		if top != bin || math.Abs(float64(lv[bin])-want) > 0.001 {
			t.Errorf("frame %d: peak at bin %d (%.4f dB), want bin %d at %.4f dB", f, top, lv[top], bin, want)
		}
		checked++
	}
	if checked < 70 {
		t.Errorf("only %d frames checked", checked)
	}
}

// A long file keeps at most MaxSpectrogramFrames frames, with the
// shortest hop that does, and its frames still reach within a hop of the
// end: 100 s at 8 kHz is 800 000 samples, over 3000 frames at a quarter
// frame.
func TestSpectrogramLongFile(t *testing.T) {
	p := filepath.Join(t.TempDir(), "long.wav")
	writeWAV(t, p, sine(0.25, 440, 8000, 800000, 1), 1, 8000)
	s, err := Spectrogram(context.Background(), p)
	if err != nil {
		t.Fatal(err)
	}
	covered := (s.Frames()-1)*s.Hop + s.FrameLen
	if s.Frames() > MaxSpectrogramFrames || s.Frames() < MaxSpectrogramFrames*9/10 || covered > 800000 || 800000-covered >= s.Hop {
		t.Errorf("%d frames of %d with hop %d cover %d of 800000 samples", s.Frames(), s.FrameLen, s.Hop, covered)
	}
}

// Nothing to draw: a file shorter than one frame, or silent.
func TestSpectrogramNothingToDraw(t *testing.T) {
	dir := t.TempDir()
	short, silent := filepath.Join(dir, "short.wav"), filepath.Join(dir, "silent.wav")
	writeWAV(t, short, sine(0.5, 1000, 48000, 1000, 1), 1, 48000)
	writeWAV(t, silent, make([]float64, 48000), 1, 48000)
	for _, p := range []string{short, silent} {
		_, err := Spectrogram(context.Background(), p)
		if !errors.Is(err, ErrNothingToDraw) || !strings.Contains(err.Error(), filepath.Base(p)) {
			t.Errorf("%s: %v, want ErrNothingToDraw naming the file", p, err)
		}
	}
}

// The figure holds the file's spectrogram, or the dry take's above it,
// on one colour scale whose top is the highest level rounded up to 10 dB;
// its panels name the files; it passes the picture checks.
func TestSpectrogramFigure(t *testing.T) {
	dir := t.TempDir()
	dryP, wetP := filepath.Join(dir, "take.wav"), filepath.Join(dir, "take-wet.wav")
	writeWAV(t, dryP, steppedTones(0.1, 1), 1, 48000)
	wet := steppedTones(0.1, 1)
	for i, v := range wet {
		wet[i] = math.Tanh(8 * v) // a symmetric clipper: odd harmonics
	}
	writeWAV(t, wetP, wet, 1, 48000)
	ctx := context.Background()
	sd, err := Spectrogram(ctx, dryP)
	if err != nil {
		t.Fatal(err)
	}
	sw, err := Spectrogram(ctx, wetP)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name   string
		dry    *spectrum.Spectrogram
		panels []string
	}{
		{"alone", nil, []string{"take-wet.wav"}},
		{"dry against wet", sd, []string{"dry: take.wav", "wet: take-wet.wav"}},
	} {
		f, err := SpectrogramFigure(wetP, sw, dryP, tc.dry)
		if err != nil {
			t.Fatal(err)
		}
		if len(f.Panels) != len(tc.panels) {
			t.Fatalf("%s: %d panels", tc.name, len(f.Panels))
		}
		top := sw.MaxLevel()
		if tc.dry != nil {
			top = math.Max(top, sd.MaxLevel())
		}
		for i, p := range f.Panels {
			if !strings.HasPrefix(p.Title, tc.panels[i]) || p.Heat == nil || p.Heat.Hi != 10*math.Ceil(top/10) || p.Heat.Hi-p.Heat.Lo != 80 {
				t.Errorf("%s panel %d: %q, heat %v", tc.name, i, p.Title, p.Heat != nil)
			}
		}
		in, err := plotting.Inspect(f)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range in.Problems() {
			t.Errorf("%s: %s", tc.name, p)
		}
	}
}
