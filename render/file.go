package render

import (
	"context"
	"errors"
	"fmt"
	"time"

	"renderchain/bias"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/wavio"
	"renderchain/engine"
	"renderchain/models"
	"renderchain/outputs"
	"renderchain/report"
)

// Output sample formats.
const (
	FormatPCM16   = "pcm16"
	FormatPCM24   = "pcm24"
	FormatFloat32 = "float32"
)

// OutputFormat returns the WAV format of an output sample format name at
// the given rate and channels: pcm24 ("" too), pcm16 or float32. Another
// name is a *models.FieldError on the field "format".
func OutputFormat(name string, rate, channels int) (wavio.Format, error) {
	f := wavio.Format{SampleRate: rate, Channels: channels, BitDepth: 24}
	switch name {
	case "", FormatPCM24:
	case FormatPCM16:
		f.BitDepth = 16
	case FormatFloat32:
		f.BitDepth, f.Float = 32, true
	default:
		return f, models.Fieldf("format", name, "not one of %s, %s, %s", FormatPCM16, FormatPCM24, FormatFloat32)
	}
	return f, nil
}

// FileOptions tune RenderFile.
type FileOptions struct {
	Format string // pcm24 (default), pcm16, float32
	// Workers bounds the cores a mono render is cut across
	// (engine.PlanSegments): 0 one per core, 1 serial. A caller that runs
	// several renders at once on a pool passes 1.
	Workers int
	// Progress, if set, is called now and then with frames done and total.
	Progress func(done, total int64)
}

// Input limits of a file render.
const (
	MinRate     = 44100
	MaxRate     = engine.MaxRate
	MaxChannels = 2
)

// CheckInput opens the WAV file at path and checks it is one a render
// takes: MinRate…MaxRate, mono or stereo, not empty.
func CheckInput(path string) (*wavio.File, error) {
	r, err := wavio.Open(path)
	if err != nil {
		return nil, err
	}
	f := r.Format()
	switch {
	case f.SampleRate < MinRate || f.SampleRate > MaxRate:
		err = fmt.Errorf("%s: sample rate %d Hz is outside %d–%d Hz", path, f.SampleRate, MinRate, MaxRate)
	case f.Channels < 1 || f.Channels > MaxChannels:
		err = fmt.Errorf("%s: %d channels; renders take mono or stereo", path, f.Channels)
	case r.Frames() == 0:
		err = fmt.Errorf("%s: no audio frames", path)
	}
	if err != nil {
		r.Close()
		return nil, err
	}
	return r, nil
}

// RenderFile renders the WAV file in through the prepared chain into the
// WAV file out, a one-file outputs.Set: out is checked before any work
// (not the input by device and inode, not a folder, its folder writable),
// written under a temporary name and put in place on success; on any error
// or cancellation nothing is left at out and a file already there is kept.
// A character device or FIFO at out is written in place. Memory stays
// bounded whatever the file's length. A command writing more than one
// file declares them all in one outputs.Set and calls Render.
//
// The oversampling factor is the prepared chain's when the caller or the
// chain named one, else chosen for this chain at the file's rate
// (engine.ChooseOversample); the report says which and why. A mono file
// long enough is cut into segments rendered on several cores
// (engine.StreamWith).
func RenderFile(ctx context.Context, p *engine.Prepared, in, out string, opt FileOptions) (*Report, error) {
	set := outputs.New()
	set.Input("input", in)
	f := set.File("output", out)
	if err := set.Check(); err != nil {
		return nil, err
	}
	defer set.Abort()
	rep, err := Render(ctx, p, in, f, opt)
	if err != nil {
		return nil, err
	}
	if err := set.Commit(); err != nil {
		return nil, err
	}
	return rep, nil
}

// Render renders the WAV file in through the prepared chain into out, a
// file of an outputs.Set that the caller has checked and commits when all
// its outputs are written (or aborts). A target that cannot seek (a FIFO,
// a character device: out.InPlace) gets a stream whose header needs no
// patching (wavio.NewStreamWriter; the output has exactly the input's
// frames). Float input samples beyond the reader's bound (+24 dBFS) stop
// the render with the file, frame and channel before the solver sees them;
// smaller overs, and whatever the reader tolerated in the file's header,
// are listed in the report's warnings.
func Render(ctx context.Context, p *engine.Prepared, in string, out *outputs.File, opt FileOptions) (*Report, error) {
	r, err := CheckInput(in)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	f := r.Format()
	of, err := OutputFormat(opt.Format, f.SampleRate, f.Channels)
	if err != nil {
		return nil, err
	}
	var w *wavio.Writer
	if out.InPlace() {
		w, err = wavio.NewStreamWriter(out, of, r.Frames())
	} else {
		w, err = wavio.NewWriter(out, of)
	}
	if err != nil {
		return nil, err
	}
	rep := newReport(p, in, out.Path(), f, of, r.Frames())
	if rep.Warnings, err = bias.Warnings(ctx, p); err != nil {
		return nil, err
	}
	start := time.Now()
	choice, err := p.ChooseOversample(ctx, float64(f.SampleRate), float64(r.Frames())/float64(f.SampleRate)*float64(f.Channels))
	if err != nil {
		if ctx.Err() != nil {
			return nil, fmt.Errorf("render interrupted: no output written (%w)", ctx.Err())
		}
		return nil, err
	}
	rep.setFactor(choice, float64(f.SampleRate), time.Since(start))
	lastProgress := time.Now()
	prog := func(done int64) {
		if opt.Progress != nil && time.Since(lastProgress) > 100*time.Millisecond {
			opt.Progress(done, r.Frames())
			lastProgress = time.Now()
		}
	}
	st, err := p.StreamWith(ctx, r, float64(f.SampleRate), f.Channels, engine.StreamOptions{
		Oversample: choice.Factor, Frames: r.Frames(), Workers: opt.Workers,
		In:       func(x []float64) error { rep.dry.add(x); return nil },
		Sink:     func(y []float64) error { rep.wet.add(y); return w.Write(y) },
		Progress: prog})
	if err != nil {
		if errors.Is(err, engine.ErrInterrupted) {
			return nil, fmt.Errorf("render interrupted: no output written (%w)", err)
		}
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
	rep.setPlan(st)
	rep.finish(st.Stats, w.Clipped(), elapsed)
	rep.Warnings.Merge(report.InputNotes(in, r.Overs(), r.Warnings()))
	return rep, nil
}

// levels accumulates peak and RMS of an interleaved stream (samples at
// digital full scale count as over), and the long-term-average
// third-octave spectrum of its channels' mean.
type levels struct {
	report.PeakRMS
	channels int
	ltas     *spectrum.LTAS
	mono     []float64
}

func newLevels(fs float64, channels int) *levels {
	l := &levels{PeakRMS: report.PeakRMS{Threshold: 1}, channels: channels, mono: make([]float64, engine.MaxBlock)}
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
	l.Add(x)
}
