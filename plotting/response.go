package plotting

import (
	"fmt"
	"math"
	"strings"

	"renderchain/dsp/spectrum"
)

// Heading composes a figure title the way the builders do: what it shows
// and the chain's name, joined by a dash, on the first line, then the
// details (path, shared settings), separated by " · ", on the second.
// Empty details are left out.
func Heading(what, chain string, details ...string) string { return heading(what, chain, details...) }

// heading composes a figure title: what it shows and the chain's name,
// joined by a dash, on the first line, then the details (path, shared settings), separated by
// " · ", on the second.
func heading(what, chain string, details ...string) string {
	first := what
	if chain != "" {
		if first != "" {
			first += " — "
		}
		first += chain
	}
	var rest []string
	for _, d := range details {
		if d = strings.TrimSpace(d); d != "" {
			rest = append(rest, d)
		}
	}
	if len(rest) == 0 {
		return first
	}
	return first + "\n" + strings.Join(rest, " · ")
}

// ResponseCurve is one curve of a frequency-response figure.
type ResponseCurve struct {
	// Label names the curve in the key, e.g. "tone.tone=0.25".
	Label string
	// Style is the curve's palette position (0 first): the variant's
	// index on the listening page, so figure and players share colours.
	Style int
	// Dash, when not zero, replaces the style's dash pattern: a positive
	// value picks that pattern (Line.Dash), a negative one draws solid
	// (harmonic responses of a swept measurement drawn in their variant's
	// colour, its linear response solid).
	Dash int
	// Hz are increasing frequencies; DB the gain and Deg the phase at
	// each, the phase wrapped or not (the figure unwraps it).
	Hz, DB, Deg []float64
}

// ResponseSpec describes a frequency-response figure.
type ResponseSpec struct {
	// Title says what was measured, e.g. "Small-signal response".
	Title string
	// Chain is the chain's name; Path the measured path, e.g.
	// "source → out"; Settings the settings every curve shares
	// ("supply=9V", "fuzz.fuzz=0.8"). All go into the figure's title.
	Chain    string
	Path     string
	Settings []string
	Curves   []ResponseCurve
	// GroupDelay adds a panel of the group delay −dφ/dω.
	GroupDelay bool
	// SpanDB is how far below the highest gain the magnitude axis
	// reaches at most; zero picks 60 dB. Lower parts of a curve run off
	// the bottom of the axes.
	SpanDB float64
}

// Response panels' marker spacing: four glyphs per decade on a
// spectrum.PointsPerDecade grid, so curves stay apart in grey.
const responseMarkEvery = spectrum.PointsPerDecade / 4

// ResponseFigure draws gain over unwrapped phase (and, when asked, group
// delay) against log frequency, one curve per ResponseCurve in its
// style's colour, dash pattern and glyph, under a title that carries the
// chain's name, the measured path and the shared settings, with one key
// for all panels. Phases are unwrapped with spectrum.UnwrapDegrees, so a
// curve passes ±180° without a break; the grid must be dense enough that
// the phase moves less than 180° between points (spectrum.DecadeGrid at
// spectrum.PointsPerDecade is).
func ResponseFigure(s ResponseSpec) (*Figure, error) {
	if len(s.Curves) == 0 {
		return nil, figErr("response figure", "no curves")
	}
	x := Axis{Label: "frequency", Unit: "Hz", Log: true}
	mag := Panel{Title: "Gain", X: x, Y: Axis{Label: "gain (dB)", Ticks: TicksDB}, Legend: NoLegend}
	ph := Panel{Title: "Phase (unwrapped)", X: x, Y: Axis{Label: "phase (degrees)", Ticks: TicksDegrees}, Legend: NoLegend}
	gd := Panel{Title: "Group delay", X: x, Y: Axis{Label: "group delay", Unit: "s"}, Legend: NoLegend}
	top, bottom := math.Inf(-1), math.Inf(1)
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, c := range s.Curves {
		where := fmt.Sprintf("response curve %d %q", i+1, c.Label)
		if len(c.Hz) < 2 || len(c.DB) != len(c.Hz) || len(c.Deg) != len(c.Hz) {
			return nil, figErr(where, "want at least 2 frequencies and one gain and phase per frequency (got %d, %d, %d)",
				len(c.Hz), len(c.DB), len(c.Deg))
		}
		for k, f := range c.Hz {
			if !(f > 0) || math.IsInf(f, 0) || (k > 0 && f <= c.Hz[k-1]) {
				return nil, figErr(where, "frequency %d (%g Hz): want finite, positive, increasing frequencies", k+1, f)
			}
		}
		lo, hi = math.Min(lo, c.Hz[0]), math.Max(hi, c.Hz[len(c.Hz)-1])
		for _, v := range c.DB {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				top, bottom = math.Max(top, v), math.Min(bottom, v)
			}
		}
		deg := spectrum.UnwrapDegrees(nil, c.Deg)
		line := func(y []float64, label string) Line {
			ln := Line{Label: label, X: c.Hz, Y: y, Style: c.Style + 1}
			if len(s.Curves) > 1 {
				ln.Markers, ln.MarkEvery = true, responseMarkEvery
			}
			if c.Dash != 0 {
				ln.Style, ln.Group, ln.Dash = 0, c.Style+1, max(c.Dash, 0)
			}
			return ln
		}
		mag.Lines = append(mag.Lines, line(c.DB, c.Label))
		ph.Lines = append(ph.Lines, line(deg, ""))
		if s.GroupDelay {
			tau, err := spectrum.GroupDelay(c.Hz, deg)
			if err != nil {
				return nil, figErr(where, "group delay: %v", err)
			}
			gd.Lines = append(gd.Lines, line(tau, ""))
		}
	}
	if math.IsInf(top, 0) {
		return nil, figErr("response figure", "no finite gain in any curve")
	}
	mag.X.Min, mag.X.Max = lo, hi
	ph.X.Min, ph.X.Max, gd.X.Min, gd.X.Max = lo, hi, lo, hi
	dbWindow(&mag.Y, top, bottom, s.SpanDB)
	panels := []Panel{mag, ph}
	if s.GroupDelay {
		panels = append(panels, gd)
	}
	details := append([]string{s.Path}, s.Settings...)
	return &Figure{Title: heading(s.Title, s.Chain, details...), Panels: panels, Key: true,
		PanelHeight: map[bool]float64{true: 6.5, false: 8}[s.GroupDelay]}, nil
}

// dbWindow fixes a decibel axis to [top − span, top] rounded out to
// 10 dB (span zero picks 60 dB) when the data reach further down than
// that, so a deep notch does not squeeze the part that matters; parts
// below run off the bottom of the axes. Otherwise the range follows the
// data.
func dbWindow(a *Axis, top, bottom, span float64) {
	if !(span > 0) {
		span = 60
	}
	if top-bottom <= span {
		return
	}
	a.Min = 10 * math.Floor((top-span)/10)
	a.Max = 10 * math.Ceil(top/10+1e-9)
	if a.Max-top < 2 {
		a.Max += 10
	}
}
