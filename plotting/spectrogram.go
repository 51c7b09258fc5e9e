package plotting

import (
	"math"

	"renderchain/dsp/spectrum"
)

// SpectrogramPanel is one spectrogram of a figure.
type SpectrogramPanel struct {
	// Title names the signal, e.g. "dry: take.wav".
	Title string
	S     *spectrum.Spectrogram
}

// SpectrogramSpec describes a spectrogram figure: one file alone, or
// several (dry above wet) on one colour scale.
type SpectrogramSpec struct {
	Title  string
	Panels []SpectrogramPanel
	// RangeDB is the span of the colour scale below its top (the highest
	// level of any panel rounded up to 10 dB); zero picks 80 dB.
	RangeDB float64
	// MinHz and MaxHz bound the frequency axis; zero picks 40 Hz and the
	// lower of 20 kHz and the lowest Nyquist frequency of the panels.
	MinHz, MaxHz float64
}

// Heat-map raster size: rows evenly spaced in log frequency, and at most
// this many columns (about the pixels across the data area of a
// default-size figure).
const (
	spectrogramRows    = 300
	spectrogramMaxCols = 640
)

// SpectrogramFigure draws each spectrogram as a heat map, time across
// and log frequency up, stacked so the time axes line up, on one colour
// scale with a colour bar in dB (Green's cubehelix scheme, whose grey
// level rises steadily with the level, so it reads in grey print too).
//
// Each cell of the picture shows the highest level among the frames and
// bins it covers (where a row is narrower than a bin, the level is
// interpolated along frequency between the two nearest bins), so a short
// or narrow event is not averaged away when many frames share a column.
func SpectrogramFigure(s SpectrogramSpec) (*Figure, error) {
	const where = "spectrogram figure"
	if len(s.Panels) == 0 {
		return nil, figErr(where, "no spectrograms")
	}
	top := math.Inf(-1)
	nyq := math.Inf(1)
	for _, p := range s.Panels {
		if p.S == nil || p.S.Frames() == 0 || !(p.S.SampleRate > 0) || p.S.FrameLen < 2 || p.S.Hop < 1 {
			return nil, figErr(where, "panel %q has no frames", p.Title)
		}
		for _, fr := range p.S.Level {
			if len(fr) != p.S.Bins() {
				return nil, figErr(where, "panel %q: a frame of %d bins, want %d", p.Title, len(fr), p.S.Bins())
			}
		}
		top = math.Max(top, p.S.MaxLevel())
		nyq = math.Min(nyq, p.S.SampleRate/2)
	}
	lo, hi := s.MinHz, s.MaxHz
	if lo == 0 {
		lo = 40
	}
	if hi == 0 {
		hi = math.Min(20000, nyq)
	}
	if !(lo > 0) || !(hi > lo) || hi > nyq || math.IsInf(hi, 0) {
		return nil, figErr(where, "frequency range %g–%g Hz: want 0 < low < high ≤ %g Hz (Nyquist)", lo, hi, nyq)
	}
	span := s.RangeDB
	if !(span > 0) {
		span = 80
	}
	hiDB := 10 * math.Ceil(top/10-1e-9)
	f := &Figure{Title: s.Title, PanelHeight: 6.5}
	for _, p := range s.Panels {
		h := spectrogramHeat(p.S, lo, hi, spectrogramRows, spectrogramMaxCols)
		h.Lo, h.Hi = hiDB-span, hiDB
		h.Label = "level (dB re full-scale sine)"
		f.Panels = append(f.Panels, Panel{
			Title: p.Title,
			X:     Axis{Label: "time", Unit: "s", Tight: true, Min: h.X0, Max: h.X1},
			Y:     Axis{Label: "frequency", Unit: "Hz", Log: true, Min: lo, Max: hi},
			Heat:  h, Legend: NoLegend,
		})
	}
	return f, nil
}

// spectrogramHeat resamples a spectrogram onto rows evenly spaced in log
// frequency between lo and hi and at most maxCols columns of frames.
func spectrogramHeat(s *spectrum.Spectrogram, lo, hi float64, rows, maxCols int) *Heat {
	nf := s.Frames()
	cols := min(nf, maxCols)
	hop := float64(s.Hop) / s.SampleRate
	h := &Heat{
		X0: s.Time(0) - hop/2, X1: s.Time(nf-1) + hop/2,
		Y0: lo, Y1: hi,
		Values: make([][]float64, rows),
	}
	df := s.SampleRate / float64(s.FrameLen)
	bins := s.Bins()
	ratio := math.Log(hi / lo)
	// Column c takes frames [c·nf/cols, (c+1)·nf/cols).
	colFrames := func(c int) (int, int) { return c * nf / cols, max((c+1)*nf/cols, c*nf/cols+1) }
	for r := range h.Values {
		row := make([]float64, cols)
		fLo := lo * math.Exp(ratio*float64(r)/float64(rows))
		fHi := lo * math.Exp(ratio*float64(r+1)/float64(rows))
		k0 := int(math.Ceil(fLo / df))
		k1 := min(int(math.Floor(fHi/df)), bins-1)
		for c := range row {
			a, b := colFrames(c)
			best := math.Inf(-1)
			for fr := a; fr < b; fr++ {
				lv := s.Level[fr]
				if k0 <= k1 {
					for k := k0; k <= k1; k++ {
						best = math.Max(best, float64(lv[k]))
					}
					continue
				}
				// No bin centre inside the row: interpolate at its
				// geometric centre.
				fc := math.Sqrt(fLo*fHi) / df
				k := min(int(math.Floor(fc)), bins-2)
				t := fc - float64(k)
				best = math.Max(best, (1-t)*float64(lv[k])+t*float64(lv[k+1]))
			}
			row[c] = best
		}
		h.Values[r] = row
	}
	return h
}
