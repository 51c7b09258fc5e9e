package analyze

import (
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"

	"renderchain/dsp/spectrum"
	"renderchain/dsp/wavio"
	"renderchain/models"
	"renderchain/plotting"
)

// MaxSpectrogramFrames bounds the frames of a file's spectrogram, and so
// its memory: 2000 frames of 2049 levels (4 bytes each) at 44.1 and
// 48 kHz, 16 MB, whatever the file's length. Longer files are analysed
// with a longer hop (spectrum.HopFor); every sample still falls in a
// frame up to a hop of a quarter frame, and a column of the picture shows
// the highest level of the frames it covers.
const MaxSpectrogramFrames = 2000

// ErrNothingToDraw reports a file that has no picture: shorter than one
// frame, or silent.
var ErrNothingToDraw = errors.New("nothing to draw")

// Spectrogram returns the short-time spectrum of a WAV file's channel
// mean (the signal the band levels of File are taken of), read in one
// streaming pass: frames of spectrum.DefaultSTFTFrame samples (85 ms or
// more), periodic Hann window, a quarter-frame hop or the longer one
// that keeps the frames within MaxSpectrogramFrames. Levels are in dB re
// a full-scale sine (package spectrum). A file shorter than one frame,
// or silent, is ErrNothingToDraw.
func Spectrogram(ctx context.Context, path string) (*spectrum.Spectrogram, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	fs := float64(f.Format().SampleRate)
	frame := spectrum.DefaultSTFTFrame(fs)
	st, err := spectrum.NewSTFT(fs, frame, spectrum.HopFor(int(f.Frames()), frame, MaxSpectrogramFrames))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if err := StreamMono(ctx, f, st.Write); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	s := st.Spectrogram()
	switch {
	case s.Frames() == 0:
		return nil, fmt.Errorf("%s: %w: shorter than one %d-sample spectrum frame (%.0f ms)", path, ErrNothingToDraw, frame, 1000*float64(frame)/fs)
	case s.MaxLevel() <= spectrum.MinLevel:
		return nil, fmt.Errorf("%s: %w: the file is silent", path, ErrNothingToDraw)
	}
	return s, nil
}

// StreamMono reads the rest of a WAV file and hands its channel mean to
// fn in blocks of at most 4096 frames (the slice is reused); it stops at
// the end of the file, at fn's first error, or when ctx is done.
func StreamMono(ctx context.Context, f *wavio.File, fn func(mono []float64) error) error {
	const block = 4096
	nc := f.Format().Channels
	buf := make([]float64, block*nc)
	mono := make([]float64, block)
	for {
		if err := ctx.Err(); err != nil {
			return err
		}
		k, rerr := f.Read(buf)
		if k > 0 {
			frames := k / nc
			downmix(mono[:frames], buf[:k], nc)
			if err := fn(mono[:frames]); err != nil {
				return err
			}
		}
		if rerr == io.EOF {
			return nil
		}
		if rerr != nil {
			return rerr
		}
	}
}

// SpectrogramFigure draws the spectrogram of a file (dry empty), or of a
// dry take above its wet render on one colour scale (dB re a full-scale
// sine, the top 80 dB, plotting.SpectrogramFigure), time across and log
// frequency up from 40 Hz: where a circuit's fizz sits, and what it adds
// to the take. The files are named by their base names.
func SpectrogramFigure(wetPath string, wet *spectrum.Spectrogram, dryPath string, dry *spectrum.Spectrogram) (*plotting.Figure, error) {
	wetName := filepath.Base(wetPath)
	spec := plotting.SpectrogramSpec{Title: "Spectrogram — " + wetName + " (channel mean)",
		Panels: []plotting.SpectrogramPanel{{Title: describe(wetName, wet), S: wet}}}
	if dry != nil {
		dryName := filepath.Base(dryPath)
		spec.Title = "Spectrogram — " + dryName + " (dry) against " + wetName + " (wet), channel means"
		spec.Panels = []plotting.SpectrogramPanel{
			{Title: "dry: " + describe(dryName, dry), S: dry},
			{Title: "wet: " + describe(wetName, wet), S: wet},
		}
	}
	return plotting.SpectrogramFigure(spec)
}

// describe names a panel: the file, its rate and the analysis frame.
func describe(name string, s *spectrum.Spectrogram) string {
	return fmt.Sprintf("%s (%s; %d-sample frames, %.3g Hz bins)", name, models.FormatValue(s.SampleRate, "Hz"), s.FrameLen,
		s.SampleRate/float64(s.FrameLen))
}
