package render

import (
	"context"
	"fmt"
	"math"
	"time"

	"renderchain/dsp/spectrum"
	"renderchain/dsp/wavio"
)

// Output sample formats.
const (
	FormatPCM16   = "pcm16"
	FormatPCM24   = "pcm24"
	FormatFloat32 = "float32"
)

// FileOptions tune RenderFile.
type FileOptions struct {
	Format string // pcm24 (default), pcm16, float32
	// Progress, if set, is called now and then with frames done and total.
	Progress func(done, total int64)
}

// Input limits of a render (the stated range).
const (
	MinRate     = 44100
	MaxRate     = 192000
	MaxChannels = 2
)

// RenderFile renders the WAV file in through the engine's circuit into the
// WAV file out (written under a temporary name and renamed on success; on
// any error or cancellation nothing is left at out). Memory stays constant
// whatever the file's length.
func RenderFile(ctx context.Context, e *Engine, in, out string, opt FileOptions) (*Report, error) {
	if same, err := wavio.SameFile(in, out); err == nil && same {
		return nil, fmt.Errorf("--out %s is the input file: refusing to write over it", out)
	}
	r, err := wavio.Open(in)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	f := r.Format()
	if f.SampleRate < MinRate || f.SampleRate > MaxRate {
		return nil, fmt.Errorf("%s: sample rate %d Hz is outside %d–%d Hz", in, f.SampleRate, MinRate, MaxRate)
	}
	if f.Channels < 1 || f.Channels > MaxChannels {
		return nil, fmt.Errorf("%s: %d channels; renders take mono or stereo", in, f.Channels)
	}
	if r.Frames() == 0 {
		return nil, fmt.Errorf("%s: no audio frames", in)
	}
	of := wavio.Format{SampleRate: f.SampleRate, Channels: f.Channels, BitDepth: 24}
	switch opt.Format {
	case "", FormatPCM24:
	case FormatPCM16:
		of.BitDepth = 16
	case FormatFloat32:
		of.BitDepth, of.Float = 32, true
	default:
		return nil, fmt.Errorf("--format %q is not one of pcm16, pcm24, float32", opt.Format)
	}
	fs := float64(f.SampleRate)
	o, err := wavio.CreateTemp(out)
	if err != nil {
		return nil, err
	}
	committed := false
	defer func() {
		if !committed {
			o.Abort()
		}
	}()
	w, err := wavio.NewWriter(o, of)
	if err != nil {
		return nil, err
	}
	rep := newReport(e, in, out, f, of, r.Frames())
	start := time.Now()
	lastProgress := time.Now()
	prog := func(done int64) {
		if opt.Progress != nil && time.Since(lastProgress) > 100*time.Millisecond {
			opt.Progress(done, r.Frames())
			lastProgress = time.Now()
		}
	}
	st, err := Stream(ctx, e, r, fs, f.Channels,
		func(x []float64) error { rep.dry.add(x); return nil },
		func(y []float64) error { rep.wet.add(y); return w.Write(y) },
		prog)
	if err != nil {
		return nil, err
	}
	if opt.Progress != nil {
		opt.Progress(r.Frames(), r.Frames())
	}
	elapsed := time.Since(start)
	if err := w.Close(); err != nil {
		return nil, err
	}
	rep.Solver.States, rep.Solver.NonlinearPorts = st.States, st.NonlinearPorts
	rep.finish(st.Stats, w.Clipped(), elapsed)
	if err := o.Commit(); err != nil {
		return nil, err
	}
	committed = true
	return rep, nil
}

// levels accumulates peak and RMS of an interleaved stream, and the
// long-term-average third-octave spectrum of its channels' mean.
type levels struct {
	peak     float64
	sumSq    float64
	n        int64
	over     int64 // samples beyond full scale
	channels int
	ltas     *spectrum.LTAS
	mono     []float64
}

func newLevels(fs float64, channels int) *levels {
	l := &levels{channels: channels, mono: make([]float64, MaxBlock)}
	l.ltas, _ = spectrum.NewLTAS(fs, 0) // fs is checked already; a nil LTAS only skips the spectrum
	return l
}

func (l *levels) add(x []float64) {
	if l.ltas != nil {
		nc := l.channels
		frames := len(x) / nc
		for i := 0; i < frames; i++ {
			s := 0.0
			for c := 0; c < nc; c++ {
				s += x[i*nc+c]
			}
			l.mono[i] = s / float64(nc)
		}
		_ = l.ltas.Write(l.mono[:frames]) // samples are finite here
	}
	for _, v := range x {
		a := math.Abs(v)
		if a > l.peak {
			l.peak = a
		}
		if a >= 1 {
			l.over++
		}
		l.sumSq += v * v
	}
	l.n += int64(len(x))
}

func dbfs(x float64) float64 {
	if x <= 0 {
		return math.Inf(-1)
	}
	return 20 * math.Log10(x)
}

func (l *levels) rms() float64 {
	if l.n == 0 {
		return 0
	}
	return math.Sqrt(l.sumSq / float64(l.n))
}
