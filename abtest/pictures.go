package abtest

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"

	"renderchain/analyze"
	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/wavio"
	"renderchain/measure"
	"renderchain/models"
	"renderchain/parallel"
	"renderchain/plotting"
)

// Picture files of a set, in the order the page shows them.
const (
	PictureResponse  = "fig-response.png"
	PictureHarmonics = "fig-harmonics.png"
	PictureWaveform  = "fig-waveform.png"
	PictureBands     = "fig-bands.png"
)

// Defaults of PictureOptions and the stretches the pictures show.
const (
	// DefaultSineHz is the test sine of the harmonics picture: 220 Hz,
	// the A on the G string, in the middle of a guitar's fundamentals.
	DefaultSineHz = 220.0
	// DefaultSineV is its amplitude at the source, 100 mV peak, the
	// measure command's default: a firmly picked single-coil note (a
	// figure from memory; the builder can change it).
	DefaultSineV = 0.1
	// WaveSeconds is the stretch of the take the waveform picture shows:
	// 40 ms, over four cycles of the open A string.
	WaveSeconds = 0.04
	// loudWindow and loudHop find the take's loudest half second on a
	// 0.1 s grid.
	loudWindow, loudHop = 0.5, 0.1
)

// PictureOptions ask Build for the set's pictures: every variant in one
// figure each, in the colours of the page's players (plotting.Hex of the
// clip's position):
//
//   - the small-signal response, source to output, at each variant's DC
//     operating point (measure.SmallSignal, 48 points a decade, 20 Hz to
//     20 kHz), before loudness matching;
//   - the harmonics of a test sine of SineHz at SineV peak at the source
//     (measure.Sine at the take's rate and the set's oversampling), side
//     by side;
//   - WaveSeconds of every clip as written (loudness-matched, channel
//     mean) from the middle of the dry take's loudest half second: the
//     same note through each variant, stacked on one scale;
//   - the long-term third-octave spectrum of every clip as written
//     (spectrum.LTAS of the channel mean), overlaid.
//
// The dry bypass clip has no circuit: it has no response or harmonics,
// and is drawn in the other two. A blind set gets no pictures: they would
// tell the clips apart before the listener has chosen.
type PictureOptions struct {
	On bool
	// SineHz and SineV set the harmonics picture's test sine (0: the
	// defaults DefaultSineHz and DefaultSineV).
	SineHz, SineV float64
}

// checkPictures fills in the defaults and refuses a test sine the take's
// rate cannot carry, as *models.FieldError on sine_freq or sine_level.
func checkPictures(p PictureOptions, fs float64) (PictureOptions, error) {
	if p.SineHz == 0 {
		p.SineHz = DefaultSineHz
	}
	if p.SineV == 0 {
		p.SineV = DefaultSineV
	}
	if !(p.SineHz >= measure.MinFrequency && p.SineHz < fs/2) {
		return p, models.Fieldf("sine_freq", models.FormatValue(p.SineHz, "Hz"), "must lie between %g Hz and half the take's rate (%s)",
			measure.MinFrequency, models.FormatValue(fs/2, "Hz"))
	}
	if !models.SignalRange.Contains(p.SineV) {
		return p, models.Fieldf("sine_level", models.FormatValue(p.SineV, "V"), "must be %s", models.SignalRange.Describe())
	}
	return p, nil
}

// picClip is one clip as the pictures see it: its place on the page, its
// label, its chain (nil for the bypass) and its file as written.
type picClip struct {
	style int
	label string
	ch    *chains.Chain
	file  string
}

// pictureData are the numbers behind a set's pictures, clip by clip in
// page order (nil where a clip has none: the bypass's response and
// harmonics).
type pictureData struct {
	opt       PictureOptions
	rate      float64
	chain     string
	clips     []picClip
	response  [][]measure.Point
	harmonics []*measure.Result
	waveStart float64 // s into the take
	waves     [][]float64
	bands     [][]spectrum.Band // nil when the take is shorter than one frame
	// notes say which pictures are left out and why.
	notes []string
}

// computePictures works out everything the pictures show.
func computePictures(ctx context.Context, o Options, take Take, clips []picClip) (*pictureData, error) {
	d := &pictureData{opt: o.Pictures, rate: float64(take.SampleRate), chain: o.Chain.Name, clips: clips,
		response: make([][]measure.Point, len(clips)), harmonics: make([]*measure.Result, len(clips)),
		waves: make([][]float64, len(clips)), bands: make([][]spectrum.Band, len(clips))}
	grid, err := measure.DefaultGrid(20, 20000)
	if err != nil {
		return nil, err
	}
	start, err := loudestStart(o.Dry, loudWindow, loudHop)
	if err != nil {
		return nil, err
	}
	n := int(math.Round(WaveSeconds * d.rate))
	first := max(0, min(start+int64(loudWindow*d.rate)/2-int64(n/2), take.Frames-int64(n)))
	d.waveStart = float64(first) / d.rate
	err = parallel.For(ctx, len(clips), o.Jobs, func(ctx context.Context, i int) error {
		c := clips[i]
		fail := func(err error) error { return &VariantError{Label: c.label, Err: fmt.Errorf("pictures: %w", err)} }
		if c.ch != nil {
			pts, err := measure.SmallSignal(c.ch, grid, measure.ResponseOptions{SampleRate: d.rate, Oversample: o.Oversample})
			if err != nil {
				return fail(err)
			}
			d.response[i] = pts
			r, err := measure.Sine(ctx, c.ch, d.opt.SineHz, d.opt.SineV, measure.Options{SampleRate: d.rate, Oversample: o.Oversample})
			if err != nil {
				return fail(err)
			}
			d.harmonics[i] = r
		}
		w, bands, err := readClip(ctx, c.file, first, n)
		if err != nil {
			return fail(err)
		}
		d.waves[i], d.bands[i] = w, bands
		return nil
	})
	if err != nil {
		return nil, err
	}
	if slices.ContainsFunc(d.bands, func(b []spectrum.Band) bool { return b == nil }) {
		l, _ := spectrum.NewLTAS(d.rate, 0)
		d.bands = nil
		d.notes = append(d.notes, fmt.Sprintf("pictures: no third-octave spectrum, the take is shorter than one %.2f s analysis frame",
			float64(l.FrameLen())/d.rate))
	}
	return d, nil
}

// loudestStart returns the first frame of the window seconds of the
// take whose channel mean holds the most energy, looked for in steps of
// hop seconds (0 for a take shorter than the window).
func loudestStart(path string, window, hop float64) (int64, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return 0, err
	}
	defer f.Close()
	fs := float64(f.Format().SampleRate)
	step := max(int(math.Round(hop*fs)), 1)
	per := max(int(math.Round(window/hop)), 1)
	var blocks []float64 // energy of each step
	var acc float64
	var inBlock int
	err = analyze.StreamMono(context.Background(), f, func(x []float64) error {
		for _, v := range x {
			acc += v * v
			if inBlock++; inBlock == step {
				blocks = append(blocks, acc)
				acc, inBlock = 0, 0
			}
		}
		return nil
	})
	if err != nil || len(blocks) < per {
		return 0, err
	}
	best, bestAt, sum := -1.0, 0, 0.0
	for i, e := range blocks {
		sum += e
		if i >= per {
			sum -= blocks[i-per]
		}
		if i >= per-1 && sum > best {
			best, bestAt = sum, i-per+1
		}
	}
	return int64(bestAt) * int64(step), nil
}

// readClip reads a written clip's channel mean once: frames first …
// first+n−1 of it, and its long-term third-octave spectrum.
func readClip(ctx context.Context, path string, first int64, n int) ([]float64, []spectrum.Band, error) {
	f, err := wavio.Open(path)
	if err != nil {
		return nil, nil, err
	}
	defer f.Close()
	ltas, err := spectrum.NewLTAS(float64(f.Format().SampleRate), 0)
	if err != nil {
		return nil, nil, err
	}
	wave := make([]float64, 0, n)
	var pos int64
	err = analyze.StreamMono(ctx, f, func(x []float64) error {
		for i, v := range x {
			if k := pos + int64(i); k >= first && k < first+int64(n) {
				wave = append(wave, v)
			}
		}
		pos += int64(len(x))
		return ltas.Write(x)
	})
	if ltas.Frames() == 0 {
		return wave, nil, err
	}
	return wave, ltas.Bands(), err
}

// namedFigure is a picture and its file name and caption.
type namedFigure struct {
	file, title string
	fig         *plotting.Figure
}

// bypassNote is said in the titles of the pictures the bypass is not in.
const bypassNote = "the bypass clip has no circuit and is not drawn"

// figures draws the pictures from the numbers.
func (d *pictureData) figures() ([]namedFigure, error) {
	var out []namedFigure
	add := func(file, title string, f *plotting.Figure, err error) error {
		if err != nil {
			return fmt.Errorf("%s: %w", file, err)
		}
		out = append(out, namedFigure{file, title, f})
		return nil
	}
	var notes []string
	resp := plotting.ResponseSpec{Title: "Small-signal response, before loudness matching", Chain: d.chain, Path: "source → out"}
	harm := plotting.HarmonicsSpec{Stimulus: fmt.Sprintf("%s sine, %s peak at the source", models.FormatValue(d.opt.SineHz, "Hz"),
		models.FormatValue(d.opt.SineV, "V")), Chain: d.chain}
	wave := plotting.WaveSpec{Title: fmt.Sprintf("The same note: %s of the take from %.3f s (the middle of its loudest half second), "+
		"each clip as written, loudness-matched", models.FormatValue(WaveSeconds, "s"), d.waveStart), Chain: d.chain,
		SampleRate: d.rate, Start: d.waveStart}
	bands := plotting.BandsSpec{Title: "Long-term third-octave spectrum of each clip as written, loudness-matched", Chain: d.chain,
		Reference: "dB re full-scale sine"}
	low := 0.0
	for i, c := range d.clips {
		if pts := d.response[i]; pts != nil {
			rc := plotting.ResponseCurve{Label: c.label, Style: c.style}
			for _, p := range pts {
				rc.Hz, rc.DB, rc.Deg = append(rc.Hz, p.Hz), append(rc.DB, float64(p.DB)), append(rc.Deg, float64(p.Deg))
			}
			resp.Curves = append(resp.Curves, rc)
		} else {
			notes = []string{bypassNote}
		}
		if r := d.harmonics[i]; r != nil {
			hs := plotting.HarmonicSet{Label: c.label, Style: c.style, THDPercent: r.THDPercent}
			for _, h := range r.Harmonics {
				for len(hs.DBc) < h.Order-2 {
					hs.DBc = append(hs.DBc, math.Inf(-1))
				}
				hs.DBc = append(hs.DBc, float64(h.DBc))
				if v := float64(h.DBc); !math.IsInf(v, 0) && !math.IsNaN(v) {
					low = math.Min(low, v)
				}
			}
			harm.Sets = append(harm.Sets, hs)
		}
		wave.Waves = append(wave.Waves, plotting.Wave{Label: c.label, Style: c.style, Samples: d.waves[i]})
		if d.bands != nil {
			b := plotting.BandSet{Label: c.label, Style: c.style}
			for _, band := range d.bands[i] {
				b.Hz, b.DB = append(b.Hz, band.Nominal), append(b.DB, band.Level)
			}
			bands.Sets = append(bands.Sets, b)
		}
	}
	resp.Settings, harm.Settings = notes, notes
	// Harmonics under the analysis floor are not drawn (as in measure's
	// figures and tables: measure.FigureFloorDB); a variant with none
	// above it (a linear circuit) says so in the key.
	var measured []*measure.Result
	for _, r := range d.harmonics {
		if r != nil {
			measured = append(measured, r)
		}
	}
	floor := measure.FigureFloorDB(measured)
	harm.Floor = math.Max(10*math.Floor(low/10)-10, floor)
	for k := range harm.Sets {
		if !slices.ContainsFunc(harm.Sets[k].DBc, func(v float64) bool { return v >= floor }) {
			harm.Sets[k].Label += fmt.Sprintf(" — no harmonic above the %.0f dBc analysis floor", floor)
		}
	}
	if len(resp.Curves) > 0 {
		f, err := plotting.ResponseFigure(resp)
		if err := add(PictureResponse, "Small-signal response", f, err); err != nil {
			return nil, err
		}
		f, err = plotting.HarmonicsFigure(harm)
		if err := add(PictureHarmonics, "Harmonics of a test sine", f, err); err != nil {
			return nil, err
		}
	}
	f, err := plotting.WaveformFigure(wave)
	if err := add(PictureWaveform, "The same note, every clip", f, err); err != nil {
		return nil, err
	}
	if d.bands != nil {
		f, err = plotting.ThirdOctaveFigure(bands)
		if err := add(PictureBands, "Long-term third-octave spectrum", f, err); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// addPictures computes and draws the set's pictures into the workspace
// and lists them in the set (Set.Pictures).
func (b *builder) addPictures(ctx context.Context, set *Set) error {
	if !b.o.Pictures.On || b.o.Blind {
		return nil
	}
	clips := make([]picClip, len(b.order))
	for pos, ji := range b.order {
		j := b.jobs[ji]
		clips[pos] = picClip{style: pos, label: j.clip.Shown(), ch: j.ch, file: filepath.Join(b.tmp, j.clip.File)}
		if j.bypass {
			clips[pos].ch = nil
		}
	}
	d, err := computePictures(ctx, b.o, b.take, clips)
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return errors.New("interrupted: nothing written")
	}
	if err != nil {
		return err
	}
	figs, err := d.figures()
	if err != nil {
		return err
	}
	for _, nf := range figs {
		var buf bytes.Buffer
		if err := nf.fig.Render(&buf, plotting.PNG); err != nil {
			return fmt.Errorf("%s: %w", nf.file, err)
		}
		if err := os.WriteFile(filepath.Join(b.tmp, nf.file), buf.Bytes(), 0o644); err != nil {
			return err
		}
		set.Pictures = append(set.Pictures, Plot{Title: nf.title, File: nf.file})
	}
	for _, n := range d.notes {
		set.Warnings.Add("%s", n)
	}
	return nil
}
