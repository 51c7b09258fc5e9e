package measure

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"slices"
	"strconv"
	"strings"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/models"
	"renderchain/plotting"
	"renderchain/report"
)

// FigureFloorDB returns the lowest level, in dB relative to the
// fundamental (harmonics, THD_F), that the figures of these measurements
// draw: their analysis floor (Result.AnalysisFloorDB, the highest of
// them), under which the tables print "< floor" too. A circuit simulated
// in double precision puts the harmonics it does not make (H2 of a
// symmetric clipper, every harmonic of a linear stage) near −300 dBc,
// which would squeeze everything that matters into the top of the axes
// and draw residue as if it were the circuit's. Sweep curves under the
// floor are drawn on it, bars under it are left out, and the panel says
// so.
func FigureFloorDB(ms []*Result) float64 {
	floor := math.Inf(-1)
	for _, m := range ms {
		if v := float64(m.AnalysisFloorDB); report.Finite(v) {
			floor = math.Max(floor, v)
		}
	}
	if math.IsInf(floor, -1) {
		return report.DB(AnalysisFloor(DefaultSettleTolerance))
	}
	return floor
}

// SpectrumFloorDBV is the lowest level the spectrum panel reaches, in
// dBV: 100 pV RMS, below the thermal noise of any resistor in a bin of
// the analysis (4kTRB: 1 kΩ in 10 Hz at 25 °C is 13 nV, −158 dBV;
// Johnson–Nyquist, a textbook formula). Lower bins are rounding residue
// of the simulation; a probe whose whole spectrum lies below (a supply
// rail) shows as having no signal.
const SpectrumFloorDBV = -200

// ErrNothingToPlot reports a report without measurements or curves.
var ErrNothingToPlot = errors.New("measure: nothing to plot")

// conditionNames splits the settings of a list of measurements (or
// curves) into those all share, for the figure's title, and a name for
// each: its label, else the settings it does not share, else "as
// written" (the chain as the file has it). A lone condition, whose
// settings are all in the title, is named lone.
func conditionNames(labels []string, settings [][]string, lone string) (shared []string, names []string) {
	if len(settings) > 0 {
		for _, s := range settings[0] {
			all := true
			for _, o := range settings[1:] {
				all = all && slices.Contains(o, s)
			}
			if all && !slices.Contains(shared, s) {
				shared = append(shared, s)
			}
		}
	}
	names = make([]string, len(labels))
	for i, l := range labels {
		var own []string
		for _, s := range settings[i] {
			if !slices.Contains(shared, s) {
				own = append(own, s)
			}
		}
		switch {
		case l != "":
			names[i] = l
		case len(labels) == 1:
			names[i] = lone
		case len(own) > 0:
			names[i] = strings.Join(own, " ")
		default:
			names[i] = "as written"
		}
	}
	return shared, names
}

// Knobs lists a chain's knob positions as overrides write them
// ("fuzz.fuzz=0.7"), stage by stage in chain order, by name within a
// stage.
func Knobs(ch *chains.Chain) []string {
	var out []string
	for _, st := range ch.Stages {
		for _, k := range slices.Sorted(maps.Keys(st.Knobs)) {
			out = append(out, st.ID+"."+k+"="+strconv.FormatFloat(st.Knobs[k], 'g', 4, 64))
		}
	}
	return out
}

// titleSettings lists what a figure's title states of its conditions:
// the chain's knob positions that no condition overrides, then the
// overrides every condition shares. A knob some condition sets to its
// own value is left out: the key names it per condition.
func titleSettings(knobs []string, settings [][]string, shared []string) []string {
	set := map[string]bool{}
	for _, ss := range settings {
		for _, s := range ss {
			k, _, _ := strings.Cut(s, "=")
			set[strings.TrimSpace(k)] = true
		}
	}
	var out []string
	for _, kv := range knobs {
		if k, _, _ := strings.Cut(kv, "="); !set[k] {
			out = append(out, kv)
		}
	}
	return append(out, shared...)
}

// resultNames names the measurements (conditionNames) and lists the
// settings their figure's title states (titleSettings).
func resultNames(ms []*Result, knobs []string) (title, names []string) {
	if len(ms) == 0 {
		return nil, nil
	}
	labels := make([]string, len(ms))
	settings := make([][]string, len(ms))
	for i, m := range ms {
		labels[i], settings[i] = m.Label, m.Settings
	}
	shared, names := conditionNames(labels, settings, "probe "+ms[0].Probe)
	return titleSettings(knobs, settings, shared), names
}

// stimulus states a measurement's test signal.
func stimulus(m *Result) string {
	return fmt.Sprintf("%s sine, %s peak at the source", models.FormatValue(m.FrequencyHz, "Hz"), models.FormatValue(m.AmplitudeV, "V"))
}

// Figure draws a measure report. For single measurements (one or several
// conditions): the output spectrum of each, its harmonics marked, over a
// bar chart of the harmonics in dBc, the conditions side by side in each
// harmonic's slot (bars below DisplayFloorDB are left out); one key under
// the title names each condition with its THD_F. For a sweep: the output
// level and the distortion (THD_F, H2, H3) against the swept level or
// knob, one colour per condition, values below DisplayFloorDB drawn on
// the floor.
func (r *Report) Figure() (*plotting.Figure, error) {
	if len(r.Measurements) == 0 {
		return nil, ErrNothingToPlot
	}
	if r.Sweep != nil {
		return r.sweepFigure(), nil
	}
	m0 := r.Measurements[0]
	shared, names := resultNames(r.Measurements, r.Knobs)
	spec := plotting.Panel{
		Title:  "Spectrum at " + m0.Probe + ", harmonics marked",
		X:      plotting.Axis{Label: "frequency", Unit: "Hz", Log: true, Min: 10, Max: m0.SampleRate / 2},
		Y:      plotting.Axis{Label: "level (dBV, RMS per bin)", Ticks: plotting.TicksDB},
		Legend: plotting.NoLegend,
	}
	bars := plotting.Panel{Title: "Harmonics relative to the fundamental", X: plotting.Axis{Label: "harmonic"},
		Y: plotting.Axis{Label: "level (dBc)", Ticks: plotting.TicksDB}, Legend: plotting.NoLegend}
	maxOrder := 1
	low := 0.0
	for _, m := range r.Measurements {
		for _, h := range m.Harmonics {
			maxOrder = max(maxOrder, h.Order)
			if v := float64(h.DBc); !math.IsInf(v, 0) && !math.IsNaN(v) {
				low = math.Min(low, v)
			}
		}
	}
	for h := 2; h <= maxOrder; h++ {
		bars.Categories = append(bars.Categories, fmt.Sprintf("H%d", h))
	}
	floor := FigureFloorDB(r.Measurements)
	bars.Floor = math.Max(10*math.Floor(low/10)-10, floor)
	if low < floor {
		bars.Title += fmt.Sprintf(" (under the %s dBc analysis floor: not drawn)", minus(floor))
	}
	top := math.Inf(-1)
	several := len(r.Measurements) > 1
	for i, m := range r.Measurements {
		label := names[i] + fmt.Sprintf(" (THD_F %.3g %%)", float64(m.THDPercent))
		if !report.Finite(float64(m.THDPercent)) {
			label = names[i] + " (no signal at the probe)"
		}
		top = math.Max(top, float64(m.Fundamental.DBV))
		if m.Spectrum != nil {
			ln := plotting.Line{X: m.Spectrum.Hz[1:], Y: m.Spectrum.DBV[1:], Group: i + 1}
			if several {
				ln.Width = 1
			}
			spec.Lines = append(spec.Lines, ln)
		}
		var hx, hy []float64
		vals := make([]float64, maxOrder-1)
		for k := range vals {
			vals[k] = math.Inf(-1)
		}
		for _, h := range append([]Line{m.Fundamental}, m.Harmonics...) {
			hx = append(hx, h.Hz)
			hy = append(hy, float64(h.DBV))
			if h.Order >= 2 {
				vals[h.Order-2] = float64(h.DBc)
			}
		}
		spec.Lines = append(spec.Lines, plotting.Line{X: hx, Y: hy, NoLine: true, Group: i + 1})
		bars.Bars = append(bars.Bars, plotting.BarGroup{Label: label, Values: vals, Style: i + 1})
	}
	if report.Finite(top) && top > SpectrumFloorDBV+10 {
		spec.Y.Max = 10 * math.Ceil(top/10+0.2)
		spec.Y.Min = math.Max(spec.Y.Max-spectrumSpanDB, SpectrumFloorDBV)
	} else {
		spec.Y.Min, spec.Y.Max = SpectrumFloorDBV, SpectrumFloorDBV+100
		spec.Title += fmt.Sprintf(" (no signal above %s dBV)", minus(float64(SpectrumFloorDBV)))
	}
	panels := []plotting.Panel{spec}
	if len(bars.Categories) > 0 {
		panels = append(panels, bars)
	}
	title := plotting.Heading("Sine test: "+stimulus(m0), r.Chain, append([]string{"probe " + m0.Probe}, shared...)...)
	return &plotting.Figure{Title: title, Panels: panels, Key: true}, nil
}

// spectrumSpanDB is how far the spectrum panel reaches below its top: the
// analysis floor's 100 dB under the fundamental and 40 dB more, so the
// rate converter's residue and the circuit's own low harmonics show.
const spectrumSpanDB = 140

// minus writes a whole number with a true minus sign, as the axes do.
func minus(v float64) string {
	return strings.Replace(strconv.FormatFloat(v, 'f', 0, 64), "-", "−", 1)
}

// floored returns v, or floor when v is below it (−∞ included); NaN stays
// NaN. It reports whether it floored.
func floored(v, floor float64) (float64, bool) {
	if v < floor {
		return floor, true
	}
	return v, false
}

func (r *Report) sweepFigure() *plotting.Figure {
	s := r.Sweep
	x := plotting.Axis{Label: "source amplitude (V peak)", Log: true}
	if s.Kind == KnobSweep {
		x = plotting.Axis{Label: s.Key + " (rotation, 0–1)"}
	}
	m0 := r.Measurements[0]
	level := plotting.Panel{Title: "Output level at " + m0.Probe, X: x,
		Y: plotting.Axis{Label: "output fundamental (dBV)", Ticks: plotting.TicksDB}}
	dist := plotting.Panel{Title: "Distortion", X: x, Y: plotting.Axis{Label: "THD_F (dB), H2 and H3 (dBc)", Ticks: plotting.TicksDB}}
	// Group the measurements by condition, keeping plan order.
	var labels []string
	groups := map[string][]*Result{}
	for _, m := range r.Measurements {
		if _, ok := groups[m.Label]; !ok {
			labels = append(labels, m.Label)
		}
		groups[m.Label] = append(groups[m.Label], m)
	}
	// Settings every step of every condition shares go into the title
	// (the stepped knob's differ from step to step).
	shared, _ := resultNames(r.Measurements, r.Knobs)
	floor := FigureFloorDB(r.Measurements)
	anyFloored := false
	for gi, label := range labels {
		ms := groups[label]
		xs := make([]float64, len(ms))
		out, thd, h2, h3 := make([]float64, len(ms)), make([]float64, len(ms)), make([]float64, len(ms)), make([]float64, len(ms))
		for i, m := range ms {
			var f1, f2, f3 bool
			xs[i] = *m.SweepValue
			out[i] = float64(m.Fundamental.DBV)
			thd[i], f1 = floored(float64(m.THDDB), floor)
			h2[i], f2 = floored(harmonicDBc(m, 2), floor)
			h3[i], f3 = floored(harmonicDBc(m, 3), floor)
			anyFloored = anyFloored || f1 || f2 || f3
		}
		suffix := ""
		if label != "" {
			suffix = " · " + label
		}
		g := gi + 1
		// Each panel has its own legend (a key shared by both would show
		// the output and THD_F lines alike); the level panel needs one
		// only to tell conditions apart.
		level.Lines = append(level.Lines, plotting.Line{Label: label, X: xs, Y: out, Markers: true, Group: g})
		dist.Lines = append(dist.Lines,
			plotting.Line{Label: "THD_F" + suffix, X: xs, Y: thd, Markers: true, Group: g},
			plotting.Line{Label: "H2" + suffix, X: xs, Y: h2, Dash: 1, Group: g},
			plotting.Line{Label: "H3" + suffix, X: xs, Y: h3, Dash: 2, Markers: true, Group: g})
	}
	if anyFloored {
		dist.Title += fmt.Sprintf(" (under the %s dB analysis floor: drawn on it)", minus(floor))
	}
	what := fmt.Sprintf("Level sweep: %s sine", models.FormatValue(m0.FrequencyHz, "Hz"))
	if s.Kind == KnobSweep {
		what = fmt.Sprintf("Knob sweep of %s: %s", s.Key, stimulus(m0))
	}
	title := plotting.Heading(what, r.Chain, append([]string{"probe " + m0.Probe}, shared...)...)
	return &plotting.Figure{Title: title, Panels: []plotting.Panel{level, dist}}
}

// ScopeFigures draws the scope view (plotting.ScopeFigure) of every
// measurement that kept its scope (Options.Scope), in report order: a
// few settled cycles at the source and at the probed node with the
// supply rails (v+ at the measurement's supply, gnd at 0 V), and the
// transfer curve over the last cycle. The title states the test signal,
// the chain, and the measurement's settings.
func (r *Report) ScopeFigures() ([]*plotting.Figure, error) {
	var out []*plotting.Figure
	for i, m := range r.Measurements {
		if m.Scope == nil {
			continue
		}
		sc := m.Scope
		rate := "at the internal rate"
		if !sc.Internal {
			rate = "band-limited to the analysis rate"
		}
		settings := append([]string{fmt.Sprintf("%.3g ms shown from %.3g s, settled, %s", 1000*float64(len(sc.In)-1)/sc.SampleRate, sc.Start, rate)},
			titleSettings(r.Knobs, [][]string{m.Settings}, m.Settings)...)
		if !m.Settle.Settled {
			settings[0] = fmt.Sprintf("from %.3g s, NOT settled, %s", sc.Start, rate)
		}
		f, err := plotting.ScopeFigure(plotting.ScopeSpec{
			Title: "Scope view: " + stimulus(m), Chain: r.Chain, Settings: settings,
			SampleRate: sc.SampleRate, FrequencyHz: sc.FrequencyHz,
			In: plotting.Trace{Label: "source", V: sc.In}, Out: plotting.Trace{Label: m.Probe, V: sc.Out},
			Rails: []plotting.Rail{{Label: "v+", V: m.SupplyV}, {Label: "gnd", V: 0}},
		})
		if err != nil {
			return nil, fmt.Errorf("scope view of measurement %d: %w", i+1, err)
		}
		out = append(out, f)
	}
	return out, nil
}

// Figure draws response curves with plotting.ResponseFigure: gain over
// unwrapped phase (and the group delay when asked) on a logarithmic
// frequency axis, one style per variant (its position), the chain's name,
// the measured path and the settings every curve shares in the title. A
// swept measurement draws each variant's linear response solid and its
// harmonic responses H2, H3, … dashed, dotted, … in the variant's colour.
//
// The phase is unwrapped from the points given, so the grid must be dense
// enough that it moves less than 180° between points: the command's
// default grid (spectrum.DecadeGrid at spectrum.PointsPerDecade) is.
func (r *ResponseReport) Figure(groupDelay bool) (*plotting.Figure, error) {
	if len(r.Curves) == 0 {
		return nil, ErrNothingToPlot
	}
	title := "Small-signal response"
	if r.Mode == "swept" && r.Swept != nil {
		title = fmt.Sprintf("Swept-sine response at %s peak (harmonics against the excitation frequency)", models.FormatValue(r.Swept.AmplitudeV, "V"))
	}
	labels := make([]string, len(r.Curves))
	settings := make([][]string, len(r.Curves))
	for i, c := range r.Curves {
		settings[i] = c.Settings
	}
	shared, names := conditionNames(labels, settings, r.Reference+" → "+r.Probe)
	spec := plotting.ResponseSpec{Title: title, Chain: r.Chain, Path: r.Reference + " → " + r.Probe,
		Settings:   titleSettings(r.Knobs, settings, shared),
		GroupDelay: groupDelay}
	group, last := -1, ""
	for i, c := range r.Curves {
		key := strings.Join(c.Settings, "\x00")
		if c.Harmonic <= 1 || key != last || i == 0 {
			group++
		}
		last = key
		rc := plotting.ResponseCurve{Label: names[i], Style: group}
		if c.Harmonic >= 1 {
			// Swept: the curve's own label ("H2 tone.tone=0").
			rc.Label = c.Label
			rc.Dash = c.Harmonic - 1 // H2 dashed, H3 dotted, …
			if c.Harmonic == 1 {
				rc.Dash = -1 // solid
			}
		}
		for _, p := range c.Points {
			rc.Hz = append(rc.Hz, p.Hz)
			rc.DB = append(rc.DB, float64(p.DB))
			rc.Deg = append(rc.Deg, float64(p.Deg))
		}
		spec.Curves = append(spec.Curves, rc)
	}
	return plotting.ResponseFigure(spec)
}

// DefaultGrid is the frequency grid of a response when none is given:
// spectrum.PointsPerDecade points a decade from lo to hi, both included
// (146 points from 20 Hz to 20 kHz), dense enough that the curves are
// smooth at every knob setting and the phase can be unwrapped.
func DefaultGrid(lo, hi float64) ([]float64, error) {
	return spectrum.DecadeGrid(lo, hi, spectrum.PointsPerDecade)
}
