package abtest

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"renderchain/analyze"
	"renderchain/bias"
	"renderchain/chains"
	"renderchain/dsp/wavio"
	"renderchain/dsp/wdf"
	"renderchain/engine"
	"renderchain/report"
)

// job is one clip on its way through Build.
type job struct {
	label  string
	bypass bool
	ch     *chains.Chain
	raw    string // pass 1 output (float64 WAV) or the dry take
	before analyze.Levels
	stats  wdf.Stats
	clip   Clip
	// chainWarnings are the variant's prepared chain's (bias.Warnings).
	chainWarnings report.Warnings

	// What the reader of the take let pass (pass 1 of a rendered clip):
	// float samples beyond full scale, and header faults it tolerated.
	overs    int64
	readWarn []string
}

// render runs the variant's chain over the dry take into a float64 WAV and
// measures it.
func (j *job) render(ctx context.Context, dry string, oversample int, pr *progress) error {
	fail := func(err error) error { return &VariantError{Label: j.label, Err: err} }
	eng, err := engine.PrepareContext(ctx, j.ch, oversample)
	if err != nil {
		return fail(err)
	}
	if j.chainWarnings, err = bias.Warnings(ctx, eng); err != nil {
		if ctx.Err() != nil {
			return ctx.Err()
		}
		return fail(err)
	}
	in, err := wavio.Open(dry)
	if err != nil {
		return err
	}
	defer in.Close()
	fm := in.Format()
	nc, fs := fm.Channels, float64(fm.SampleRate)
	f, err := os.Create(j.raw)
	if err != nil {
		return err
	}
	defer f.Close()
	w, err := wavio.NewWriter(f, wavio.Format{SampleRate: fm.SampleRate, Channels: nc, BitDepth: 64, Float: true})
	if err != nil {
		return err
	}
	meter, err := analyze.NewMeter(fs, nc)
	if err != nil {
		return err
	}
	var last int64
	info, err := eng.Stream(ctx, in, fs, nc, nil, func(y []float64) error {
		meter.Write(y)
		if err := w.Write(y); err != nil {
			return fail(fmt.Errorf("the circuit's output: %w", err))
		}
		return nil
	}, func(done int64) {
		pr.add(done - last)
		last = done
	})
	if err != nil {
		if errors.Is(err, engine.ErrInterrupted) {
			return ctx.Err()
		}
		var ve *VariantError
		if errors.As(err, &ve) {
			return err
		}
		return fail(err)
	}
	if err := w.Close(); err != nil {
		return err
	}
	if err := meter.Err(); err != nil {
		return fail(err)
	}
	j.overs, j.readWarn = in.Overs(), in.Warnings()
	j.stats.Add(info.Stats)
	j.before = analyze.LevelsOf(meter)
	sv := report.SolverOf(j.stats)
	j.clip.Solver = &sv
	return f.Close()
}

// measureSource measures the bypass clip's source, the dry take.
func (j *job) measureSource() error {
	lv, _, err := analyze.Loudness(j.raw)
	j.before = lv
	return err
}

// matchTolerance is how close, in LU, a written clip must come to the
// common loudness before writeClip stops correcting its gain. A gain moves
// every block's loudness by the same amount, so one pass suffices unless a
// block crosses the −70 LUFS absolute gate.
const matchTolerance = 0.001

// writeClip applies the gain to the clip's source and writes the clip.
//
// short marks a take too short for two 3 s short-term windows (3.1 s),
// whose loudness range is undefined.
func (j *job) writeClip(ctx context.Context, common, gain float64, path string, f wavio.Format, bits int, short bool, pr *progress) error {
	var lv analyze.Levels
	var lra float64
	for try := 0; try < 3; try++ {
		var err error
		if lv, lra, err = gainFile(ctx, j.raw, path, f, Gain{Factor: report.FromDB(gain), Bits: bits}, pr); err != nil {
			return err
		}
		miss := common - float64(lv.LUFS)
		if !report.Finite(miss) || math.Abs(miss) <= matchTolerance {
			break
		}
		gain += miss
	}
	j.clip.GainDB, j.clip.Before = report.Level(gain), j.before
	j.clip.LUFS, j.clip.TruePeakDBTP, j.clip.PeakDBFS = lv.LUFS, lv.TruePeakDBTP, lv.PeakDBFS
	j.clip.LRA = report.Level(lra)
	if short {
		j.clip.LRA = report.Level(math.NaN())
	}
	return nil
}

// gainFile streams src through g into a new WAV file at dst and measures
// what it wrote.
func gainFile(ctx context.Context, src, dst string, f wavio.Format, g Gain, pr *progress) (analyze.Levels, float64, error) {
	in, err := wavio.Open(src)
	if err != nil {
		return analyze.Levels{}, 0, err
	}
	defer in.Close()
	out, err := os.Create(dst)
	if err != nil {
		return analyze.Levels{}, 0, err
	}
	defer out.Close()
	w, err := wavio.NewWriter(out, f)
	if err != nil {
		return analyze.Levels{}, 0, err
	}
	m, err := analyze.NewMeter(float64(f.SampleRate), f.Channels)
	if err != nil {
		return analyze.Levels{}, 0, err
	}
	buf := make([]float64, 4096*f.Channels)
	for {
		if err := ctx.Err(); err != nil {
			return analyze.Levels{}, 0, err
		}
		n, rerr := in.Read(buf)
		if n > 0 {
			g.Process(buf[:n], buf[:n])
			m.Write(buf[:n])
			if err := w.Write(buf[:n]); err != nil {
				return analyze.Levels{}, 0, err
			}
			pr.add(int64(n / f.Channels))
		}
		if rerr == io.EOF {
			break
		}
		if rerr != nil {
			return analyze.Levels{}, 0, rerr
		}
	}
	if err := w.Close(); err != nil {
		return analyze.Levels{}, 0, err
	}
	if w.Clipped() > 0 {
		return analyze.Levels{}, 0, fmt.Errorf("%s: %d samples clipped after the gain (internal error: the ceiling should prevent this)", filepath.Base(dst), w.Clipped())
	}
	return analyze.LevelsOf(m), m.LoudnessRange(), out.Close()
}
