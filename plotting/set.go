package plotting

import (
	"fmt"
	"math"
)

// Figures of a listening set: every variant in one picture, each in the
// palette style of its position on the listening page (Style), so the
// figure and the page's players share colours. The small-signal response
// of the variants is ResponseFigure with one curve per variant.

// HarmonicSet is one variant's harmonics of a test sine.
type HarmonicSet struct {
	// Label names the variant; Style is its position on the page.
	Label string
	Style int
	// DBc[i] is harmonic i+2 relative to the fundamental, in dB; −∞ or
	// NaN for one that is absent.
	DBc []float64
	// THDPercent, when finite, is added to the label ("THD_F 12.3 %").
	THDPercent float64
}

// HarmonicsSpec describes a harmonics figure.
type HarmonicsSpec struct {
	// Stimulus states the test signal, e.g. "1 kHz sine, 100 mV peak at
	// the source"; it is required, since harmonics mean nothing without
	// the level that made them.
	Stimulus string
	Chain    string
	Settings []string
	Sets     []HarmonicSet
	// Floor is the lowest level drawn, in dBc; zero picks the lowest
	// finite harmonic rounded down to 10 dB, at least −160 dBc.
	Floor float64
}

// HarmonicsFigure draws the harmonics of every variant as bars side by
// side in each harmonic's slot (an overlay would hide them), in the
// variants' colours and hatchings, rising from the floor.
func HarmonicsFigure(s HarmonicsSpec) (*Figure, error) {
	const where = "harmonics figure"
	if s.Stimulus == "" {
		return nil, figErr(where, "no stimulus: state the test signal and its level")
	}
	if len(s.Sets) == 0 {
		return nil, figErr(where, "no variants")
	}
	orders := 0
	low := 0.0
	for _, h := range s.Sets {
		orders = max(orders, len(h.DBc))
		for _, v := range h.DBc {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				low = math.Min(low, v)
			}
		}
	}
	if orders == 0 {
		return nil, figErr(where, "no harmonics in any variant")
	}
	floor := s.Floor
	if floor == 0 {
		floor = math.Max(10*math.Floor(low/10)-10, -160)
	}
	p := Panel{Title: "Harmonics relative to the fundamental", X: Axis{Label: "harmonic"},
		Y:     Axis{Label: "level (dBc)", Ticks: TicksDB},
		Floor: floor, Legend: NoLegend}
	for h := 2; h < orders+2; h++ {
		p.Categories = append(p.Categories, fmt.Sprintf("H%d", h))
	}
	for _, h := range s.Sets {
		label := h.Label
		if !math.IsNaN(h.THDPercent) && !math.IsInf(h.THDPercent, 0) {
			label += fmt.Sprintf(" (THD_F %.3g %%)", h.THDPercent)
		}
		vals := make([]float64, orders)
		for i := range vals {
			vals[i] = math.Inf(-1)
		}
		copy(vals, h.DBc)
		p.Bars = append(p.Bars, BarGroup{Label: label, Values: vals, Style: h.Style + 1})
	}
	return &Figure{Title: heading("Harmonics of a "+s.Stimulus, s.Chain, s.Settings...), Panels: []Panel{p},
		Key: true}, nil
}

// Wave is one variant's waveform.
type Wave struct {
	Label   string
	Style   int
	Samples []float64
}

// WaveSpec describes a waveform figure: the same stretch of the take
// through every variant.
type WaveSpec struct {
	// Title says what is shown, e.g. "One note, 2.10–2.16 s of the take".
	Title    string
	Chain    string
	Settings []string
	// SampleRate is the samples' rate in Hz; Start the time of the first
	// sample within the take, in seconds (the time axis shows take time).
	SampleRate, Start float64
	// Unit is the samples' unit: "V" for volts, empty for full-scale
	// units (1 = digital full scale).
	Unit  string
	Waves []Wave
	// Overlay draws every wave on one set of axes; otherwise each gets
	// its own panel, all on the same voltage scale.
	Overlay bool
}

// WaveformFigure draws the waves against time, stacked one panel each
// (same scale) or overlaid.
func WaveformFigure(s WaveSpec) (*Figure, error) {
	const where = "waveform figure"
	if !(s.SampleRate > 0) || math.IsInf(s.SampleRate, 0) || math.IsNaN(s.Start) || math.IsInf(s.Start, 0) {
		return nil, figErr(where, "sample rate %g Hz, start %g s: want a finite rate > 0 and a finite start", s.SampleRate, s.Start)
	}
	if len(s.Waves) == 0 {
		return nil, figErr(where, "no waves")
	}
	peak := 0.0
	for _, w := range s.Waves {
		if len(w.Samples) < 2 {
			return nil, figErr(where, "wave %q has %d samples, want at least 2", w.Label, len(w.Samples))
		}
		for i, v := range w.Samples {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, figErr(where, "wave %q sample %d is %g", w.Label, i, v)
			}
			peak = math.Max(peak, math.Abs(v))
		}
	}
	if peak == 0 {
		peak = 1
	}
	y := Axis{Label: "level (full scale)"}
	if s.Unit != "" {
		y = Axis{Label: "voltage", Unit: s.Unit}
	}
	// One symmetric range for all: the largest peak rounded out to a tick.
	c := chooseStep(-peak, peak, TicksPlain, 6)
	y.Max = c.step * math.Ceil(peak/c.step+1e-9)
	y.Min = -y.Max
	x := Axis{Label: "time", Unit: "s", Tight: true}
	line := func(w Wave) Line {
		t := make([]float64, len(w.Samples))
		for i := range t {
			t[i] = s.Start + float64(i)/s.SampleRate
		}
		return Line{Label: w.Label, X: t, Y: w.Samples, Style: w.Style + 1, Width: 1.2}
	}
	f := &Figure{Title: heading(s.Title, s.Chain, s.Settings...)}
	if s.Overlay {
		p := Panel{X: x, Y: y, Legend: NoLegend}
		for _, w := range s.Waves {
			p.Lines = append(p.Lines, line(w))
		}
		f.Panels, f.Key = []Panel{p}, true
		return f, nil
	}
	for _, w := range s.Waves {
		// Alone in its panel a wave needs no dash pattern to be told
		// apart (its title names it), and a dashed waveform reads badly.
		ln := line(w)
		ln.Label, ln.Style, ln.Colour = "", 0, Colour(w.Style)
		f.Panels = append(f.Panels, Panel{Title: w.Label, X: x, Y: y, Lines: []Line{ln}, Legend: NoLegend})
	}
	f.PanelHeight = 4.5
	return f, nil
}

// BandSet is one variant's long-term third-octave spectrum.
type BandSet struct {
	Label string
	Style int
	// Hz are the bands' midband frequencies, DB their levels.
	Hz, DB []float64
}

// BandsSpec describes a third-octave spectrum figure.
type BandsSpec struct {
	Title    string
	Chain    string
	Settings []string
	// Reference names the level's reference for the axis label, e.g.
	// "dB re full-scale sine".
	Reference string
	Sets      []BandSet
	// SpanDB is how far below the highest band the axis reaches at most;
	// zero picks 60 dB.
	SpanDB float64
}

// ThirdOctaveFigure overlays the variants' band levels as lines with a
// glyph on every band, on a logarithmic frequency axis.
func ThirdOctaveFigure(s BandsSpec) (*Figure, error) {
	const where = "third-octave figure"
	if len(s.Sets) == 0 {
		return nil, figErr(where, "no variants")
	}
	ref := s.Reference
	if ref == "" {
		ref = "dB"
	}
	p := Panel{X: Axis{Label: "frequency", Unit: "Hz", Log: true}, Y: Axis{Label: "band level (" + ref + ")", Ticks: TicksDB},
		Legend: NoLegend}
	top, bottom := math.Inf(-1), math.Inf(1)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, b := range s.Sets {
		if len(b.Hz) == 0 || len(b.DB) != len(b.Hz) {
			return nil, figErr(where, "variant %q: %d bands and %d levels, want the same number, at least one", b.Label, len(b.Hz), len(b.DB))
		}
		for i, f := range b.Hz {
			if !(f > 0) || math.IsInf(f, 0) || (i > 0 && f <= b.Hz[i-1]) {
				return nil, figErr(where, "variant %q band %d at %g Hz: want finite, positive, increasing frequencies", b.Label, i+1, f)
			}
			if v := b.DB[i]; !math.IsNaN(v) && !math.IsInf(v, 0) {
				top, bottom = math.Max(top, v), math.Min(bottom, v)
			}
		}
		lo, hi = math.Min(lo, b.Hz[0]), math.Max(hi, b.Hz[len(b.Hz)-1])
		p.Lines = append(p.Lines, Line{Label: b.Label, X: b.Hz, Y: b.DB, Style: b.Style + 1, Markers: true})
	}
	if math.IsInf(top, 0) {
		return nil, figErr(where, "no finite band level")
	}
	// Half a band of room at each end.
	p.X.Min, p.X.Max = lo/math.Pow(2, 1.0/6), hi*math.Pow(2, 1.0/6)
	dbWindow(&p.Y, top, bottom, s.SpanDB)
	return &Figure{Title: heading(s.Title, s.Chain, s.Settings...), Panels: []Panel{p}, Key: true}, nil
}
