package plotting

import (
	"fmt"
	"math"
	"strings"
)

// Trace is one probed signal of a scope view, in volts against time.
type Trace struct {
	// Label names the node, e.g. "source" or "fuzz.c1".
	Label string
	V     []float64
}

// Rail is a supply rail (or any fixed voltage worth a line), in volts.
type Rail struct {
	Label string
	V     float64
}

// ScopeSpec describes a scope view: a few settled cycles of a test sine
// at the input and at a probed node, the way a builder watches them on a
// two-channel scope while turning a trimmer.
type ScopeSpec struct {
	// Title says what is shown, e.g. "Scope view: 1 kHz sine, 100 mV peak
	// at the source"; Chain and Settings go into the figure's title too.
	Title    string
	Chain    string
	Settings []string
	// SampleRate is the rate of the samples in Hz; FrequencyHz the test
	// sine's frequency (the transfer curve takes the last cycle).
	SampleRate, FrequencyHz float64
	// In and Out are the input and the probed node, sample for sample.
	In, Out Trace
	// Rails are drawn as dashed lines on each voltage axis they fall near.
	Rails []Rail
}

// ScopeFigure draws In and Out against time (milliseconds, volts with an
// engineering prefix) in two stacked panels, and beside them the
// transfer curve (Out against In over the last whole cycle), whose shape
// shows clipping and its symmetry, and whose opening shows phase shift.
//
// A rail is drawn on a voltage axis when it lies within one signal span
// (peak to peak) of the signal there: the axis then reaches to it, so
// the headroom shows; rails further away are named in the panel title as
// off the scale. Every sample must be finite.
func ScopeFigure(s ScopeSpec) (*Figure, error) {
	const where = "scope figure"
	if !(s.SampleRate > 0) || math.IsInf(s.SampleRate, 0) {
		return nil, figErr(where, "sample rate %g Hz: want a finite rate > 0", s.SampleRate)
	}
	if !(s.FrequencyHz > 0) || s.SampleRate/s.FrequencyHz < 4 {
		return nil, figErr(where, "sine frequency %g Hz: want > 0 and at least 4 samples a cycle at %g Hz", s.FrequencyHz, s.SampleRate)
	}
	n := len(s.In.V)
	cycle := int(math.Round(s.SampleRate / s.FrequencyHz))
	if len(s.Out.V) != n || n < cycle+1 {
		return nil, figErr(where, "want input and output of equal length, at least one cycle (%d samples); got %d and %d",
			cycle+1, n, len(s.Out.V))
	}
	for _, tr := range []Trace{s.In, s.Out} {
		for i, v := range tr.V {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, figErr(where, "trace %q sample %d is %g", tr.Label, i, v)
			}
		}
	}
	for _, r := range s.Rails {
		if math.IsNaN(r.V) || math.IsInf(r.V, 0) {
			return nil, figErr(where, "rail %q at %g V", r.Label, r.V)
		}
	}
	t := make([]float64, n)
	for i := range t {
		t[i] = float64(i) / s.SampleRate
	}
	timeAxis := Axis{Label: "time", Unit: "s", Tight: true}
	volts := func(label string) Axis { return Axis{Label: label, Unit: "V"} }
	inName, outName := nameOr(s.In.Label, "input"), nameOr(s.Out.Label, "output")

	in := Panel{Title: "Input: " + inName, X: timeAxis, Y: volts("voltage"), Legend: NoLegend,
		Lines: []Line{{X: t, Y: s.In.V, Colour: Colour(0)}}}
	out := Panel{Title: "Output: " + outName, X: timeAxis, Y: volts("voltage"), Legend: NoLegend,
		Lines: []Line{{X: t, Y: s.Out.V, Colour: Colour(1)}}}
	lastIn, lastOut := s.In.V[n-cycle-1:], s.Out.V[n-cycle-1:]
	tr := Panel{Title: fmt.Sprintf("Transfer: %s against %s, one cycle", outName, inName),
		X: volts(inName), Y: volts(outName), Legend: NoLegend,
		Lines: []Line{{X: lastIn, Y: lastOut, Colour: Colour(1)}}}
	for _, p := range []*Panel{&in, &out, &tr} {
		railsNear(p, s.Rails)
	}
	return &Figure{Title: heading(s.Title, s.Chain, s.Settings...), Panels: []Panel{in, out},
		Beside: []Panel{tr}, BesideWidth: 0.4, Width: 22, PanelHeight: 6.5}, nil
}

func nameOr(s, def string) string {
	if s == "" {
		return def
	}
	return s
}

// railsNear marks the rails within one signal span of the panel's line
// and widens the axis to them; the others are named in the title.
func railsNear(p *Panel, rails []Rail) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, ln := range p.Lines {
		for _, v := range ln.Y {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	span := hi - lo
	if span == 0 {
		span = math.Max(math.Abs(hi)*0.1, 1e-3)
	}
	var off []string
	for _, r := range rails {
		if r.V >= lo-span && r.V <= hi+span {
			p.Marks = append(p.Marks, Mark{Y: r.V, Label: railText(r)})
			p.include = append(p.include, r.V)
			continue
		}
		side := "above"
		if r.V < lo {
			side = "below"
		}
		off = append(off, railText(r)+" "+side)
	}
	if len(off) > 0 {
		p.Title += " (" + strings.Join(off, ", ") + " the scale)"
	}
}

func railText(r Rail) string {
	v := strings.Replace(SI(r.V), "-", "−", 1) + " V" // a true minus, as on the axes
	if r.Label == "" {
		return v
	}
	return r.Label + " " + v
}
