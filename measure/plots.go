package measure

import (
	"fmt"
	"math"

	"renderchain/plotting"
)

// Figure draws a measure report: for single measurements the spectrum of
// the rendered sine with its harmonics marked, over a bar chart of the
// harmonics in dBc (one bar per condition); for a sweep the output level
// and the distortion (THD_F, H2, H3) against the swept level or knob, one
// colour per condition.
func (r *Report) Figure() (*plotting.Figure, error) {
	if len(r.Measurements) == 0 {
		return nil, fmt.Errorf("nothing to plot")
	}
	if r.Sweep != nil {
		return r.sweepFigure(), nil
	}
	m0 := r.Measurements[0]
	spec := plotting.Panel{
		Title: fmt.Sprintf("Output spectrum: %s sine at %s peak, probe %s", plotting.SI(m0.FrequencyHz)+"Hz",
			plotting.SI(m0.AmplitudeV)+"V", m0.Probe),
		X: plotting.Axis{Label: "frequency (Hz)", Log: true, Min: 10, Max: m0.SampleRate / 2},
		Y: plotting.Axis{Label: "level (dBV, RMS per bin)"},
	}
	top := math.Inf(-1)
	bars := plotting.Panel{Title: "Harmonics relative to the fundamental", Y: plotting.Axis{Label: "level (dBc)"}}
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
	bars.Floor = math.Max(math.Min(-100, 10*math.Floor(low/10)-10), -200)
	for i, m := range r.Measurements {
		label := m.Label
		if label == "" {
			label = fmt.Sprintf("THD_F %.3g %%", m.THDPercent)
		} else {
			label += fmt.Sprintf(" (THD_F %.3g %%)", m.THDPercent)
		}
		top = math.Max(top, float64(m.Fundamental.DBV))
		if m.Spectrum != nil {
			spec.Lines = append(spec.Lines, plotting.Line{Label: label, X: m.Spectrum.Hz[1:], Y: m.Spectrum.DBV[1:], Group: i + 1})
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
		name := curveLabel(Variant{Label: m.Label, Sets: m.Settings})
		bars.Bars = append(bars.Bars, plotting.BarGroup{Label: name, Values: vals})
	}
	if !math.IsInf(top, 0) {
		spec.Y.Min, spec.Y.Max = top-160, top+10
	}
	panels := []plotting.Panel{spec}
	if len(bars.Categories) > 0 {
		panels = append(panels, bars)
	}
	return &plotting.Figure{Panels: panels}, nil
}

func (r *Report) sweepFigure() *plotting.Figure {
	s := r.Sweep
	x := plotting.Axis{Label: "source amplitude (V peak)", Log: true}
	if s.Kind == KnobSweep {
		x = plotting.Axis{Label: s.Key + " (rotation, 0–1)"}
	}
	m0 := r.Measurements[0]
	level := plotting.Panel{Title: fmt.Sprintf("Output level at %sHz, probe %s", plotting.SI(m0.FrequencyHz), m0.Probe),
		X: x, Y: plotting.Axis{Label: "output fundamental (dBV)"}}
	dist := plotting.Panel{Title: "Distortion", X: x, Y: plotting.Axis{Label: "THD_F (dB), H2 and H3 (dBc)"}}
	// Group the measurements by condition, keeping plan order.
	var labels []string
	groups := map[string][]*Result{}
	for _, m := range r.Measurements {
		if _, ok := groups[m.Label]; !ok {
			labels = append(labels, m.Label)
		}
		groups[m.Label] = append(groups[m.Label], m)
	}
	for gi, label := range labels {
		ms := groups[label]
		xs := make([]float64, len(ms))
		out, thd, h2, h3 := make([]float64, len(ms)), make([]float64, len(ms)), make([]float64, len(ms)), make([]float64, len(ms))
		for i, m := range ms {
			xs[i] = *m.SweepValue
			out[i] = float64(m.Fundamental.DBV)
			thd[i] = float64(m.THDDB)
			h2[i] = harmonicDBc(m, 2)
			h3[i] = harmonicDBc(m, 3)
		}
		suffix := ""
		if label != "" {
			suffix = " · " + label
		}
		g := gi + 1
		level.Lines = append(level.Lines, plotting.Line{Label: "output" + suffix, X: xs, Y: out, Markers: true, Group: g})
		dist.Lines = append(dist.Lines,
			plotting.Line{Label: "THD_F" + suffix, X: xs, Y: thd, Markers: true, Group: g},
			plotting.Line{Label: "H2" + suffix, X: xs, Y: h2, Dash: 1, Group: g},
			plotting.Line{Label: "H3" + suffix, X: xs, Y: h3, Dash: 2, Markers: true, Group: g})
	}
	return &plotting.Figure{Panels: []plotting.Panel{level, dist}}
}

// Figure draws response curves: magnitude over phase on a logarithmic
// frequency axis, one line per curve named by its settings; swept
// harmonic curves dashed (H2), dotted (H3), … in their variant's colour.
func (r *ResponseReport) Figure() *plotting.Figure {
	title := "Small-signal response"
	if r.Mode == "swept" && r.Swept != nil {
		title = fmt.Sprintf("Swept-sine response at %sV peak (harmonics against the excitation frequency)", plotting.SI(r.Swept.AmplitudeV))
	}
	x := plotting.Axis{Label: "frequency (Hz)", Log: true}
	mag := plotting.Panel{Title: fmt.Sprintf("%s, %s → %s", title, r.Reference, r.Probe), X: x, Y: plotting.Axis{Label: "gain (dB)"}}
	ph := plotting.Panel{Title: "Phase", X: x, Y: plotting.Axis{Label: "phase (degrees)", Min: -180, Max: 180}}
	group, last := 0, ""
	for _, c := range r.Curves {
		key := fmt.Sprint(c.Settings)
		if c.Harmonic <= 1 || key != last {
			group++
		}
		last = key
		var xs, ys, ds []float64
		for i, p := range c.Points {
			if i > 0 && math.Abs(float64(p.Deg-c.Points[i-1].Deg)) > 180 {
				// A wrap of the phase: break the line there.
				xs, ys, ds = append(xs, p.Hz), append(ys, float64(p.DB)), append(ds, math.NaN())
			}
			xs, ys, ds = append(xs, p.Hz), append(ys, float64(p.DB)), append(ds, float64(p.Deg))
		}
		dash := max(c.Harmonic-1, 0) // H1 solid, H2 dashed, H3 dotted, …
		mag.Lines = append(mag.Lines, plotting.Line{Label: c.Label, X: xs, Y: ys, Dash: dash, Group: group})
		// The phase panel shares the magnitude panel's styles and legend.
		ph.Lines = append(ph.Lines, plotting.Line{X: xs, Y: ds, Dash: dash, Group: group})
	}
	return &plotting.Figure{Panels: []plotting.Panel{mag, ph}}
}
