package plotting

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"io"
	"math"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"

	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
	"renderchain/dsp/wavio"
)

// Axis describes one axis of a panel.
type Axis struct {
	// Label names the quantity and its unit, e.g. "frequency (Hz)".
	Label string
	// Log selects a logarithmic scale; only positive values are drawn.
	Log bool
	// Min and Max fix the range when Min < Max; otherwise the range
	// follows the data.
	Min, Max float64
}

// Line is one labelled curve. Non-finite Y values split it into pieces.
type Line struct {
	Label string
	X, Y  []float64
	// Dash picks a dash pattern: 0 solid, 1 dashed, 2 dotted, 3 and up
	// further patterns (secondary quantities in one colour family).
	Dash int
	// Markers puts a glyph on every point; NoLine draws the markers only.
	Markers, NoLine bool
	// Group, when positive, picks the colour (and glyph) so that lines of
	// one group share it; zero gives each line its own by position.
	Group int
}

// BarGroup is one labelled series of a bar chart: one value per category.
type BarGroup struct {
	Label  string
	Values []float64
}

// Panel is one set of axes.
type Panel struct {
	Title string
	X, Y  Axis
	Lines []Line
	// Categories, when set, makes the X axis nominal (one slot per
	// category) and draws Bars, one bar per group in each slot, from
	// Floor up to the value (values below Floor or non-finite are drawn
	// as nothing).
	Categories []string
	Bars       []BarGroup
	Floor      float64
	// Legend places the legend inside the axes: LegendAuto (the zero
	// value) picks the corner where the lines have the fewest points.
	Legend Corner
}

// Corner is where a panel's legend goes.
type Corner int

// Legend corners.
const (
	LegendAuto Corner = iota
	TopRight
	TopLeft
	BottomRight
	BottomLeft
)

// Figure is a column of panels.
type Figure struct {
	Panels []Panel
	// Width and PanelHeight are in centimetres; zero picks 18 cm and
	// 9 cm.
	Width, PanelHeight float64
}

// Formats a figure can be written in.
const (
	PNG = "png"
	SVG = "svg"
)

// ErrFormat reports a file name whose extension is neither .png nor .svg.
var ErrFormat = errors.New("plot file must end in .png or .svg")

// FormatOf returns the format named by path's extension.
func FormatOf(path string) (string, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".png":
		return PNG, nil
	case ".svg":
		return SVG, nil
	}
	return "", fmt.Errorf("%w (got %q)", ErrFormat, path)
}

// Save writes the figure to path in the format its extension names,
// under a temporary name that is renamed on success.
func Save(path string, f *Figure) error {
	format, err := FormatOf(path)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := f.Render(&buf, format); err != nil {
		return err
	}
	return wavio.WriteFileAtomic(path, buf.Bytes())
}

// Render draws the figure and writes it to w as PNG or SVG.
func (f *Figure) Render(w io.Writer, format string) error {
	if len(f.Panels) == 0 {
		return errors.New("plotting: figure has no panels")
	}
	width, ph := f.Width, f.PanelHeight
	if width <= 0 {
		width = 18
	}
	if ph <= 0 {
		ph = 9
	}
	wl := vg.Length(width) * vg.Centimeter
	hl := vg.Length(ph*float64(len(f.Panels))) * vg.Centimeter
	var canvas vg.CanvasWriterTo
	switch format {
	case PNG:
		canvas = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(wl, hl), vgimg.UseDPI(120))}
	case SVG:
		canvas = vgsvg.New(wl, hl)
	default:
		return fmt.Errorf("%w (got format %q)", ErrFormat, format)
	}
	plots := make([][]*plot.Plot, len(f.Panels))
	for i := range f.Panels {
		p, err := f.Panels[i].build()
		if err != nil {
			return err
		}
		plots[i] = []*plot.Plot{p}
	}
	dc := draw.New(canvas)
	tiles := draw.Tiles{Rows: len(plots), Cols: 1, PadX: vg.Millimeter, PadY: 4 * vg.Millimeter,
		PadTop: 2 * vg.Millimeter, PadBottom: 2 * vg.Millimeter, PadLeft: 2 * vg.Millimeter, PadRight: 4 * vg.Millimeter}
	cs := plot.Align(plots, tiles, dc)
	for i := range plots {
		plots[i][0].Draw(cs[i][0])
	}
	_, err := canvas.WriteTo(w)
	return err
}

func (pn *Panel) build() (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = pn.Title
	p.X.Label.Text = pn.X.Label
	p.Y.Label.Text = pn.Y.Label
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Add(plotter.NewGrid())
	if len(pn.Categories) > 0 {
		bars := &floorBars{groups: pn.Bars, n: len(pn.Categories), floor: pn.Floor}
		p.Add(bars)
		for g := range pn.Bars {
			p.Legend.Add(pn.Bars[g].Label, barThumb{color: plotutil.Color(g)})
		}
		p.NominalX(pn.Categories...)
		p.X.Min, p.X.Max = -0.6, float64(len(pn.Categories))-0.4
		if pn.Y.Log {
			return nil, errors.New("plotting: bar charts take a linear Y axis")
		}
	}
	for i, ln := range pn.Lines {
		style := i
		if ln.Group > 0 {
			style = ln.Group - 1
		}
		pieces := pieces(ln, pn.X.Log, pn.Y.Log)
		var thumbs []plot.Thumbnailer
		for k, xy := range pieces {
			if !ln.NoLine {
				l, err := plotter.NewLine(xy)
				if err != nil {
					return nil, fmt.Errorf("plotting: line %q: %w", ln.Label, err)
				}
				l.LineStyle.Width = vg.Points(1.2)
				l.LineStyle.Color = plotutil.Color(style)
				l.LineStyle.Dashes = dashes(ln.Dash)
				p.Add(l)
				if k == 0 {
					thumbs = append(thumbs, l)
				}
			}
			if ln.Markers || ln.NoLine {
				s, err := plotter.NewScatter(xy)
				if err != nil {
					return nil, fmt.Errorf("plotting: line %q: %w", ln.Label, err)
				}
				s.GlyphStyle.Color = plotutil.Color(style)
				s.GlyphStyle.Shape = plotutil.Shape(style)
				s.GlyphStyle.Radius = vg.Points(2.5)
				p.Add(s)
				if k == 0 {
					thumbs = append(thumbs, s)
				}
			}
		}
		if ln.Label != "" && len(thumbs) > 0 {
			p.Legend.Add(ln.Label, thumbs...)
		}
	}
	if err := setAxis(&p.X, pn.X, len(pn.Categories) > 0); err != nil {
		return nil, err
	}
	if err := setAxis(&p.Y, pn.Y, false); err != nil {
		return nil, err
	}
	corner := pn.Legend
	if corner == LegendAuto {
		corner = pn.emptiestCorner(p)
	}
	p.Legend.Top = corner == TopRight || corner == TopLeft
	p.Legend.Left = corner == TopLeft || corner == BottomLeft
	return p, nil
}

// emptiestCorner counts the line points falling in each corner box of
// the axes (45 % wide, 35 % high: about a legend's size) and returns the
// corner with the fewest, preferring top right, then top left.
func (pn *Panel) emptiestCorner(p *plot.Plot) Corner {
	if len(pn.Categories) > 0 {
		return TopRight
	}
	norm := func(a plot.Axis, log bool, v float64) float64 {
		if log {
			return math.Log(v/a.Min) / math.Log(a.Max/a.Min)
		}
		return (v - a.Min) / (a.Max - a.Min)
	}
	var count [5]int
	for _, ln := range pn.Lines {
		for _, xy := range pieces(ln, pn.X.Log, pn.Y.Log) {
			for _, pt := range xy {
				x, y := norm(p.X, pn.X.Log, pt.X), norm(p.Y, pn.Y.Log, pt.Y)
				right, left := x >= 0.55, x <= 0.45
				top, bottom := y >= 0.65, y <= 0.35
				switch {
				case top && right:
					count[TopRight]++
				case top && left:
					count[TopLeft]++
				case bottom && right:
					count[BottomRight]++
				case bottom && left:
					count[BottomLeft]++
				}
			}
		}
	}
	best := TopRight
	for _, c := range []Corner{TopLeft, BottomRight, BottomLeft} {
		if count[c] < count[best] {
			best = c
		}
	}
	return best
}

func dashes(k int) []vg.Length {
	switch k {
	case 0:
		return nil
	case 1:
		return []vg.Length{vg.Points(5), vg.Points(2.5)}
	case 2:
		return []vg.Length{vg.Points(1.5), vg.Points(1.5)}
	}
	return plotutil.Dashes(k)
}

func setAxis(a *plot.Axis, spec Axis, nominal bool) error {
	if spec.Min < spec.Max {
		a.Min, a.Max = spec.Min, spec.Max
	}
	if nominal {
		return nil
	}
	if a.Min > a.Max || math.IsInf(a.Min, 0) || math.IsInf(a.Max, 0) {
		// No data: give the axis a range of its own.
		a.Min, a.Max = 1, 10
	}
	if a.Min == a.Max {
		d := math.Max(math.Abs(a.Min)*0.1, 1)
		if spec.Log {
			a.Min, a.Max = a.Min/2, a.Max*2
		} else {
			a.Min, a.Max = a.Min-d, a.Max+d
		}
	}
	if spec.Log {
		if a.Min <= 0 {
			return fmt.Errorf("plotting: axis %q: logarithmic range must be positive", spec.Label)
		}
		a.Scale = plot.LogScale{}
		a.Tick.Marker = LogTicks{}
	}
	return nil
}

// pieces splits a line at non-finite values and drops points a log axis
// cannot show.
func pieces(ln Line, logX, logY bool) []plotter.XYs {
	var out []plotter.XYs
	var cur plotter.XYs
	n := min(len(ln.X), len(ln.Y))
	for i := 0; i < n; i++ {
		x, y := ln.X[i], ln.Y[i]
		ok := !math.IsNaN(x) && !math.IsInf(x, 0) && !math.IsNaN(y) && !math.IsInf(y, 0) &&
			(!logX || x > 0) && (!logY || y > 0)
		if !ok {
			if len(cur) > 0 {
				out = append(out, cur)
				cur = nil
			}
			continue
		}
		cur = append(cur, plotter.XY{X: x, Y: y})
	}
	if len(cur) > 0 {
		out = append(out, cur)
	}
	return out
}

// LogTicks marks a logarithmic axis at every 1..9 times a power of ten,
// labelling 1, 2 and 5 with SI prefixes when the range spans at most four
// decades and the powers of ten alone otherwise. A range too narrow for
// two labels gets linear steps.
type LogTicks struct{}

// Ticks implements plot.Ticker.
func (LogTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi > lo) {
		return nil
	}
	dense := math.Log10(hi/lo) <= 4
	var ticks []plot.Tick
	for e := math.Floor(math.Log10(lo)); e <= math.Ceil(math.Log10(hi)); e++ {
		base := math.Pow(10, e)
		for m := 1; m <= 9; m++ {
			v := float64(m) * base
			if v < lo*(1-1e-9) || v > hi*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 || (dense && (m == 2 || m == 5)) {
				t.Label = SI(v)
			}
			ticks = append(ticks, t)
		}
	}
	labelled := 0
	for _, t := range ticks {
		if t.Label != "" {
			labelled++
		}
	}
	if labelled < 2 {
		// A range inside one decade: fall back to linear steps.
		ticks = plot.DefaultTicks{}.Ticks(lo, hi)
		for i := range ticks {
			if ticks[i].Label != "" {
				ticks[i].Label = SI(ticks[i].Value)
			}
		}
	}
	return ticks
}

// SI formats v with an SI prefix and at most three significant digits:
// SI(20000) = "20k", SI(0.001) = "1m", SI(1.5) = "1.5".
func SI(v float64) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprint(v)
	}
	prefixes := []struct {
		exp int
		s   string
	}{{-12, "p"}, {-9, "n"}, {-6, "µ"}, {-3, "m"}, {0, ""}, {3, "k"}, {6, "M"}, {9, "G"}}
	a := math.Abs(v)
	pick := prefixes[0]
	for _, p := range prefixes {
		if a >= math.Pow10(p.exp)*(1-1e-9) {
			pick = p
		}
	}
	m := v / math.Pow10(pick.exp)
	s := fmt.Sprintf("%.3g", m)
	return s + pick.s
}

// floorBars draws grouped bars from a floor value upward.
type floorBars struct {
	groups []BarGroup
	n      int
	floor  float64
}

const groupWidth = 0.8

func (b *floorBars) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	ng := len(b.groups)
	if ng == 0 {
		return
	}
	w := groupWidth / float64(ng)
	for g, grp := range b.groups {
		col := plotutil.Color(g)
		for k := 0; k < b.n && k < len(grp.Values); k++ {
			v := grp.Values[k]
			if math.IsNaN(v) || math.IsInf(v, 0) || v <= b.floor {
				continue
			}
			x0 := float64(k) - groupWidth/2 + float64(g)*w
			pts := []vg.Point{
				{X: trX(x0), Y: trY(b.floor)}, {X: trX(x0 + w*0.9), Y: trY(b.floor)},
				{X: trX(x0 + w*0.9), Y: trY(v)}, {X: trX(x0), Y: trY(v)},
			}
			poly := c.ClipPolygonY(pts)
			c.FillPolygon(col, poly)
			c.StrokeLines(draw.LineStyle{Color: color.Black, Width: vg.Points(0.5)}, c.ClipLinesY(append(pts, pts[0]))...)
		}
	}
}

// DataRange implements plot.DataRanger.
func (b *floorBars) DataRange() (xmin, xmax, ymin, ymax float64) {
	ymin, ymax = b.floor, b.floor
	for _, g := range b.groups {
		for _, v := range g.Values {
			if !math.IsNaN(v) && !math.IsInf(v, 0) {
				ymax = math.Max(ymax, v)
			}
		}
	}
	if ymax == ymin {
		ymax = ymin + 10
	}
	ymax += 0.05 * (ymax - ymin) // headroom above the tallest bar
	return -0.5, float64(b.n) - 0.5, ymin, ymax
}

type barThumb struct{ color color.Color }

func (t barThumb) Thumbnail(c *draw.Canvas) {
	pts := []vg.Point{{X: c.Min.X, Y: c.Min.Y}, {X: c.Min.X, Y: c.Max.Y}, {X: c.Max.X, Y: c.Max.Y}, {X: c.Max.X, Y: c.Min.Y}}
	c.FillPolygon(t.color, c.ClipPolygonY(pts))
}
