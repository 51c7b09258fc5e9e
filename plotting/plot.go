package plotting

import (
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"image/png"
	"io"
	"math"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"

	"renderchain/dsp/wavio"
)

// Axis describes one axis of a panel.
type Axis struct {
	// Label names the quantity, e.g. "frequency"; with Unit empty it also
	// carries the unit in parentheses, e.g. "frequency (Hz)".
	Label string
	// Unit, when set, is the SI unit of the values ("V", "s", "Hz"). A
	// linear axis then labels its ticks in one engineering prefix chosen
	// for its range, and its label becomes "Label (mV)"; a logarithmic
	// axis labels each tick with its own prefix (20, 200, 2k).
	Unit string
	// Log selects a logarithmic scale; only positive values are drawn.
	Log bool
	// Min and Max fix the range when Min < Max; otherwise the range
	// follows the data, rounded out to whole tick steps on a linear axis
	// unless Tight is set.
	Min, Max float64
	// Ticks picks the tick steps of a linear axis.
	Ticks TickKind
	// Tight keeps a range that follows the data at the data's extent.
	Tight bool
}

// Line is one labelled curve. Non-finite Y values split it into pieces.
type Line struct {
	Label string
	X, Y  []float64
	// Dash picks a dash pattern: 0 solid, 1 dashed, 2 dotted, 3 and up
	// further patterns (secondary quantities in one colour family).
	Dash int
	// Markers puts a glyph on every point (every MarkEvery-th point when
	// that is set); NoLine draws the markers only.
	Markers, NoLine bool
	// Group, when positive, picks the colour (and glyph) so that lines of
	// one group share it; zero gives each line its own by position.
	Group int
	// Style, when positive, gives the line every attribute of style
	// Style−1 (colour, dash pattern and glyph), the way a figure of
	// several variants tells them apart in colour and in grey; Group and
	// Dash are then ignored.
	Style int
	// MarkEvery, when positive, draws markers on every MarkEvery-th point
	// only (staggered by style so curves do not hide each other's).
	MarkEvery int
	// Colour, when set, overrides the palette.
	Colour color.Color
	// Width is the line width in points; zero picks the default.
	Width float64
}

// Mark is a horizontal reference line across a panel (a supply rail,
// say), labelled at its right end. It is drawn only where it lies
// inside the panel's Y range; it does not widen the range.
type Mark struct {
	Y     float64
	Label string
}

// BarGroup is one labelled series of a bar chart: one value per category.
type BarGroup struct {
	Label  string
	Values []float64
	// Style, when positive, draws the group in style Style−1; zero takes
	// the group's position.
	Style int
}

// Heat is a heat map filling a panel's axes: cell values mapped to the
// colour scheme of HeatColour, with a colour bar beside the axes.
type Heat struct {
	// Values[r][c] is the cell in row r (counted from the bottom) and
	// column c (from the left). Rows are spaced evenly in the Y axis's
	// scale (logarithmically when Y.Log), columns evenly in X.
	Values [][]float64
	// X0, X1, Y0, Y1 are the outer edges of the cells in data units.
	X0, X1, Y0, Y1 float64
	// Lo and Hi are the ends of the colour scale; values beyond take the
	// end colours, non-finite values the bottom one.
	Lo, Hi float64
	// Label names the colour bar's quantity and unit.
	Label string
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
	// Marks are horizontal reference lines.
	Marks []Mark
	// Heat, when set, fills the axes with a heat map.
	Heat *Heat

	// include holds Y values an automatic range must reach, with a
	// little room beyond (rails a builder put in view).
	include []float64
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
	// NoLegend leaves the panel without a legend.
	NoLegend
)

// Figure is one or two columns of panels under an optional title and key.
type Figure struct {
	// Title is drawn over the whole figure, wrapped to its width.
	Title string
	// Panels is the first (or only) column, top to bottom.
	Panels []Panel
	// Beside, when set, is a second column to the right of Panels.
	// The taller column sets the height; each column's panels share it.
	Beside []Panel
	// BesideWidth is Beside's share of the width; zero picks one half.
	BesideWidth float64
	// Width and PanelHeight are in centimetres; zero picks 18 cm and
	// 9 cm. The figure is PanelHeight times the longer column's panel
	// count high, plus its title and key.
	Width, PanelHeight float64
	// Key draws one legend for the whole figure under its title, with an
	// entry for every labelled line and bar group (the first of each
	// label), instead of one legend per panel.
	Key bool
}

// Formats a figure can be written in.
const (
	PNG = "png"
	SVG = "svg"
)

// DPI is the resolution of PNG output in pixels per inch.
const DPI = 120

// Default sizes in centimetres.
const (
	DefaultWidth       = 18
	DefaultPanelHeight = 9
)

// ErrFormat reports a file name whose extension is neither .png nor .svg.
var ErrFormat = errors.New("plot file must end in .png or .svg")

// ErrFigure reports a figure that cannot be drawn as described.
var ErrFigure = errors.New("figure cannot be drawn")

// FigureError says which part of a figure is wrong and why.
type FigureError struct {
	Where  string // e.g. `panel 2 "Phase"` or "heat map"
	Reason string
}

func (e *FigureError) Error() string {
	return "plotting: " + e.Where + ": " + e.Reason
}

// Unwrap returns ErrFigure.
func (e *FigureError) Unwrap() error { return ErrFigure }

func figErr(where, format string, a ...any) error {
	return &FigureError{Where: where, Reason: fmt.Sprintf(format, a...)}
}

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
	_, err := f.render(w, format)
	return err
}

// drawn records where a figure's parts landed, in points from the
// canvas's bottom-left corner (for the tests).
type drawn struct {
	size      vg.Point
	data      []vg.Rectangle // data area of every panel, column by column
	ranges    [][4]float64   // X min, X max, Y min, Y max of every panel as drawn
	legends   []vg.Rectangle
	colorBars []vg.Rectangle
	key       vg.Rectangle
}

const (
	margin       = 0.25 // cm around the figure
	colorBarCm   = 2.4  // width kept for a colour bar beside a heat map
	titleGapCm   = 0.15
	keyRowGapCm  = 0.12
	keyEntryGap  = 0.6 // cm between key entries on a row
	thumbWidthPt = 24
)

func (f *Figure) render(w io.Writer, format string) (d *drawn, err error) {
	// The drawing library panics on a few impossible layouts (a figure
	// too small for its labels, say); report them as errors.
	defer func() {
		if r := recover(); r != nil {
			d, err = nil, figErr("figure", "cannot be laid out: %v", r)
		}
	}()
	if len(f.Panels) == 0 {
		return nil, figErr("figure", "it has no panels")
	}
	if format != PNG && format != SVG {
		return nil, fmt.Errorf("%w (got format %q)", ErrFormat, format)
	}
	width, ph := f.Width, f.PanelHeight
	if math.IsNaN(width) || math.IsInf(width, 0) || math.IsNaN(ph) || math.IsInf(ph, 0) || width > 500 || ph > 500 {
		return nil, figErr("figure", "size %g × %g cm: want finite sizes up to 500 cm", width, ph)
	}
	if width <= 0 {
		width = DefaultWidth
	}
	if ph <= 0 {
		ph = DefaultPanelHeight
	}
	cm := vg.Centimeter
	wl := vg.Length(width) * cm
	inner := wl - 2*vg.Length(margin)*cm

	// Title and key sizes decide the height.
	titleSty := textStyle(FigureTitleSize, true)
	titleSty.XAlign, titleSty.YAlign = draw.XCenter, draw.YTop
	title := wrapText(f.Title, titleSty, inner*0.92)
	var titleH vg.Length
	if title != "" {
		titleH = titleSty.Height(title) + vg.Length(titleGapCm)*cm
	}
	var key keyLayout
	if f.Key {
		key = layoutKey(f.keyEntries(), inner)
	}
	rows := max(len(f.Panels), len(f.Beside))
	panelsH := vg.Length(ph*float64(rows)) * cm
	hl := titleH + key.height + panelsH

	var canvas vg.CanvasSizer
	var raster *vgimg.Canvas
	var svg *vgsvg.Canvas
	switch format {
	case PNG:
		raster = vgimg.NewWith(vgimg.UseWH(wl, hl), vgimg.UseDPI(DPI), vgimg.UseBackgroundColor(color.White))
		canvas = raster
	case SVG:
		svg = vgsvg.New(wl, hl)
		canvas = svg
	}
	dc := draw.New(canvas)
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	out := &drawn{size: vg.Point{X: wl, Y: hl}}

	top := hl - vg.Length(margin)*cm
	left := vg.Length(margin) * cm
	if title != "" {
		dc.FillText(titleSty, vg.Point{X: wl / 2, Y: top}, title)
		top -= titleH
	}
	if f.Key {
		out.key = vg.Rectangle{Min: vg.Point{X: left, Y: top - key.height}, Max: vg.Point{X: left + inner, Y: top}}
		key.draw(dc, out.key)
		top -= key.height
	}
	area := draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{
		Min: vg.Point{X: left, Y: vg.Length(margin) * cm}, Max: vg.Point{X: left + inner, Y: top}}}

	cols := [][]Panel{f.Panels}
	shares := []float64{1}
	if len(f.Beside) > 0 {
		bw := f.BesideWidth
		if !(bw > 0 && bw < 1) {
			bw = 0.5
		}
		cols = append(cols, f.Beside)
		shares = []float64{1 - bw, bw}
	}
	x := area.Min.X
	for ci, col := range cols {
		cw := vg.Length(shares[ci]) * inner
		cc := area
		cc.Min.X, cc.Max.X = x, x+cw
		x += cw
		if err := f.drawColumn(cc, col, ci, out); err != nil {
			return nil, err
		}
	}
	if raster != nil {
		// A palette (see quantize) and best compression: figures are
		// mostly flat colour, and the files go into pages and folders
		// people keep.
		enc := png.Encoder{CompressionLevel: png.BestCompression}
		err = enc.Encode(w, quantize(raster.Image()))
	} else {
		var b bytes.Buffer
		if _, err = svg.WriteTo(&b); err == nil {
			_, err = w.Write(svgFixups(b.Bytes()))
		}
	}
	if err != nil {
		return nil, err
	}
	return out, nil
}

// drawColumn draws one column of panels into c, their data areas aligned.
func (f *Figure) drawColumn(c draw.Canvas, col []Panel, ci int, out *drawn) error {
	heat := false
	for i := range col {
		heat = heat || col[i].Heat != nil
	}
	if heat {
		c.Max.X -= vg.Length(colorBarCm) * vg.Centimeter
	}
	rowH := (c.Max.Y - c.Min.Y) / vg.Length(len(col))
	plots := make([][]*plot.Plot, len(col))
	for i := range col {
		where := fmt.Sprintf("panel %d", i+1)
		if ci > 0 {
			where = fmt.Sprintf("side panel %d", i+1)
		}
		if col[i].Title != "" {
			where += fmt.Sprintf(" %q", col[i].Title)
		}
		p, err := col[i].build(where, c.Max.X-c.Min.X, rowH)
		if err != nil {
			return err
		}
		plots[i] = []*plot.Plot{p}
	}
	tiles := draw.Tiles{Rows: len(col), Cols: 1, PadY: vg.Millimeter * 3, PadTop: vg.Millimeter,
		PadRight: vg.Millimeter * 3}
	cs := plot.Align(plots, tiles, c)
	for i := range col {
		p := plots[i][0]
		p.Draw(cs[i][0])
		da := p.DataCanvas(cs[i][0])
		drawLogLabels(cs[i][0], da, p, col[i])
		out.data = append(out.data, da.Rectangle)
		out.ranges = append(out.ranges, [4]float64{p.X.Min, p.X.Max, p.Y.Min, p.Y.Max})
		pn := &col[i]
		if pn.Heat != nil {
			out.colorBars = append(out.colorBars, drawColorBar(da, pn.Heat))
		}
		if !f.Key && pn.Legend != NoLegend {
			if r, ok := pn.drawLegend(da, p); ok {
				out.legends = append(out.legends, r)
			}
		}
	}
	return nil
}

// svgFixups mends three things in gonum's SVG output: it adds the generic
// sans-serif family after the figure's face, so a viewer without that
// face uses a sans-serif one (on most systems metric-compatible with it)
// rather than its default serif; it labels embedded raster images (heat
// maps, colour bars) with their true type, PNG, where gonum writes
// "image/jpg", which strict viewers refuse to draw; and it lets them fill
// their boxes (SVG keeps an image's aspect ratio unless told not to,
// which would shrink a heat map to a strip). Fonts are not
// embedded: that would add about a megabyte to every file.
func svgFixups(b []byte) []byte {
	b = bytes.ReplaceAll(b, []byte("font-family:Liberation Sans;"), []byte("font-family:Liberation Sans,sans-serif;"))
	b = bytes.ReplaceAll(b, []byte(`xlink:href="data:image/jpg;base64,`), []byte(`xlink:href="data:image/png;base64,`))
	return bytes.ReplaceAll(b, []byte("<image "), []byte(`<image preserveAspectRatio="none" `))
}

// wrapText breaks s at spaces so that no line is wider than width;
// newlines in s are kept.
func wrapText(s string, sty interface{ Width(string) vg.Length }, width vg.Length) string {
	if s == "" {
		return ""
	}
	var lines []string
	for _, para := range strings.Split(s, "\n") {
		words := strings.Fields(para)
		cur := ""
		for _, w := range words {
			try := w
			if cur != "" {
				try = cur + " " + w
			}
			if cur != "" && sty.Width(try) > width {
				lines = append(lines, cur)
				cur = w
				continue
			}
			cur = try
		}
		lines = append(lines, cur)
	}
	return strings.Join(lines, "\n")
}

// lineStyle resolves a line's colour, dash pattern, glyph and width.
func (ln *Line) style(pos int) (col color.Color, dash []vg.Length, g draw.GlyphDrawer, width vg.Length, stagger int) {
	idx := pos
	switch {
	case ln.Style > 0:
		idx = ln.Style - 1
		dash = dashes(StyleDash(idx))
	case ln.Group > 0:
		idx = ln.Group - 1
		dash = dashes(ln.Dash)
	default:
		dash = dashes(ln.Dash)
	}
	col = Colour(idx)
	if ln.Colour != nil {
		col = ln.Colour
	}
	width = vg.Points(curveWidth)
	if ln.Width > 0 {
		width = vg.Points(ln.Width)
	}
	return col, dash, glyph(idx), width, idx
}

func (pn *Panel) build(where string, colWidth, rowH vg.Length) (*plot.Plot, error) {
	p := plot.New()
	p.Title.TextStyle = textStyle(TitleSize, true)
	p.Title.TextStyle.XAlign, p.Title.TextStyle.YAlign = draw.XCenter, draw.YTop
	p.Title.Text = wrapText(pn.Title, p.Title.TextStyle, colWidth-vg.Centimeter)
	p.Title.Padding = vg.Points(4)
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle = textStyle(LabelSize, false)
		a.Label.TextStyle.XAlign, a.Label.TextStyle.YAlign = draw.XCenter, draw.YBottom
		a.Tick.Label = textStyle(TickSize, false)
		a.LineStyle = draw.LineStyle{Color: color.Black, Width: vg.Points(axisWidth)}
		a.Tick.LineStyle = a.LineStyle
		a.Tick.Length = vg.Points(4)
		a.Padding = 0
		a.Label.Padding = vg.Points(2)
	}
	p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XCenter, draw.YTop
	p.Y.Tick.Label.XAlign, p.Y.Tick.Label.YAlign = draw.XRight, draw.YCenter

	if pn.Heat != nil {
		r, err := pn.Heat.raster(pn.Y.Log)
		if err != nil {
			return nil, figErr(where, "heat map: %v", err)
		}
		p.Add(r)
	} else {
		g := plotter.NewGrid()
		g.Vertical = draw.LineStyle{Color: gridGrey, Width: vg.Points(gridWidth)}
		g.Horizontal = g.Vertical
		p.Add(g)
	}
	nominal := len(pn.Categories) > 0
	if nominal {
		if pn.Y.Log {
			return nil, figErr(where, "bar charts take a linear Y axis")
		}
		p.Add(&floorBars{groups: pn.Bars, n: len(pn.Categories), floor: pn.Floor})
		p.NominalX(pn.Categories...)
		p.X.Min, p.X.Max = -0.6, float64(len(pn.Categories))-0.4
		p.X.Tick.Label = textStyle(TickSize, false)
		p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XCenter, draw.YTop
	}
	for i := range pn.Lines {
		ln := &pn.Lines[i]
		col, dash, g, width, idx := ln.style(i)
		s := &series{pieces: pieces(*ln, pn.X.Log, pn.Y.Log)}
		if !ln.NoLine {
			s.line = &draw.LineStyle{Color: col, Width: width, Dashes: dash}
		}
		if ln.Markers || ln.NoLine {
			s.glyph = &draw.GlyphStyle{Color: col, Shape: g, Radius: vg.Points(glyphSize)}
			s.every = max(ln.MarkEvery, 1)
			s.offset = (idx * 3) % s.every
		}
		p.Add(s)
	}
	if len(pn.Marks) > 0 {
		p.Add(&marks{marks: pn.Marks})
	}
	p.Add(frame{})
	if len(pn.include) > 0 && !(pn.Y.Min < pn.Y.Max) {
		lo, hi := p.Y.Min, p.Y.Max
		for _, v := range pn.include {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		pad := 0.03 * (hi - lo)
		for _, v := range pn.include {
			p.Y.Min, p.Y.Max = math.Min(p.Y.Min, v-pad), math.Max(p.Y.Max, v+pad)
		}
	}
	if err := setAxis(&p.X, pn.X, nominal, colWidth, true); err != nil {
		return nil, figErr(where, "%v", err)
	}
	if err := setAxis(&p.Y, pn.Y, false, rowH, false); err != nil {
		return nil, figErr(where, "%v", err)
	}
	if nominal && !(pn.Y.Min < pn.Y.Max) {
		// Bars stand on the bottom of the axes.
		p.Y.Min = pn.Floor
	}
	// gonum places the room for an axis label at the arithmetic middle
	// of the range, near one end of a logarithmic axis, which pads that
	// end; a blank label keeps the label's room and drawLogLabels writes
	// the text at the middle of the axis.
	if pn.X.Log {
		p.X.Label.Text = " "
	}
	if pn.Y.Log {
		p.Y.Label.Text = " "
	}
	return p, nil
}

// axisLabel returns the label text setAxis would give an axis.
func axisLabel(spec Axis) string {
	if spec.Unit != "" {
		return spec.Label + " (" + spec.Unit + ")"
	}
	return spec.Label
}

// drawLogLabels draws the labels of logarithmic axes (see build) centred
// on the data area da inside the panel canvas c.
func drawLogLabels(c, da draw.Canvas, p *plot.Plot, pn Panel) {
	if pn.X.Log {
		sty := p.X.Label.TextStyle
		sty.XAlign, sty.YAlign = draw.XCenter, draw.YBottom
		c.FillText(sty, vg.Point{X: (da.Min.X + da.Max.X) / 2, Y: c.Min.Y}, axisLabel(pn.X))
	}
	if pn.Y.Log {
		sty := p.Y.Label.TextStyle
		sty.Rotation = math.Pi / 2
		sty.XAlign, sty.YAlign = draw.XCenter, draw.YTop
		c.FillText(sty, vg.Point{X: c.Min.X, Y: (da.Min.Y + da.Max.Y) / 2}, axisLabel(pn.Y))
	}
}

// setAxis fixes an axis's range, scale, ticks and label. length is the
// room the axis has, which bounds how many labelled ticks fit.
func setAxis(a *plot.Axis, spec Axis, nominal bool, length vg.Length, horizontal bool) error {
	if spec.Min < spec.Max {
		a.Min, a.Max = spec.Min, spec.Max
	}
	a.Label.Text = spec.Label
	if nominal {
		return nil
	}
	auto := !(spec.Min < spec.Max)
	if a.Min > a.Max || math.IsInf(a.Min, 0) || math.IsInf(a.Max, 0) || math.IsNaN(a.Min) || math.IsNaN(a.Max) {
		// No data: give the axis a range of its own.
		a.Min, a.Max = 1, 10
	}
	// A range narrower than a billionth of its values (a flat trace,
	// a supply node, rounding noise on a constant) counts as one value:
	// ticks at a step of its width would magnify rounding into a curve.
	if a.Max-a.Min <= 1e-9*math.Max(math.Abs(a.Min), math.Abs(a.Max)) {
		a.Min = (a.Min + a.Max) / 2
		a.Max = a.Min
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
			return fmt.Errorf("axis %q: logarithmic range must be positive", spec.Label)
		}
		a.Scale = plot.LogScale{}
		a.Tick.Marker = LogTicks{}
		if spec.Unit != "" {
			a.Label.Text = spec.Label + " (" + spec.Unit + ")"
		}
		return nil
	}
	// One labelled tick per 1.4 cm across, per 0.9 cm up.
	per := 0.9
	if horizontal {
		per = 1.4
	}
	maxIntervals := min(max(int(float64(length/vg.Centimeter)/per), 3), 10)
	kind := kindOf(spec.Ticks, spec.Label+" ("+spec.Unit+")")
	c := chooseStep(a.Min, a.Max, kind, maxIntervals)
	if auto && !spec.Tight {
		// Round out to the minor ticks: the frame ends on a tick, with
		// at most a minor step of room beyond the data.
		m := c.step / float64(c.minor)
		lo, hi := a.Min, a.Max
		a.Min = m * math.Floor(a.Min/m+1e-9)
		a.Max = m * math.Ceil(a.Max/m-1e-9)
		// Data within 2 % of the frame get one more minor step, so a
		// glyph or a thick line is not cut by the frame; zero, the
		// natural end of many quantities, stays the end.
		if hi > lo {
			if a.Max-hi < 0.02*(hi-lo) && hi != 0 {
				a.Max += m
			}
			if lo-a.Min < 0.02*(hi-lo) && lo != 0 {
				a.Min -= m
			}
		}
	}
	scale := 1.0
	if spec.Unit != "" {
		var prefix string
		scale, prefix = engineering(a.Min, a.Max)
		a.Label.Text = spec.Label + " (" + prefix + spec.Unit + ")"
	}
	a.Tick.Marker = linearTicks{stepChoice: c, scale: scale}
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

// series draws one Line: its pieces as a polyline clipped to the axes,
// and glyphs on every k-th point inside them.
type series struct {
	pieces        []plotter.XYs
	line          *draw.LineStyle
	glyph         *draw.GlyphStyle
	every, offset int
}

func (s *series) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	if s.line != nil {
		// One path for all pieces would join them; stroke each alone but
		// keep the dash phase continuous within a piece.
		for _, xy := range s.pieces {
			pts := make([]vg.Point, len(xy))
			for i, q := range xy {
				pts[i] = vg.Point{X: trX(q.X), Y: trY(q.Y)}
			}
			if len(pts) == 1 {
				pts = append(pts, pts[0])
			}
			c.StrokeLines(*s.line, c.ClipLinesXY(pts)...)
		}
	}
	if s.glyph != nil {
		k := 0
		for _, xy := range s.pieces {
			for _, q := range xy {
				if k%s.every == s.offset || s.every == 1 {
					pt := vg.Point{X: trX(q.X), Y: trY(q.Y)}
					if c.Contains(pt) {
						c.DrawGlyph(*s.glyph, pt)
					}
				}
				k++
			}
		}
	}
}

// DataRange implements plot.DataRanger.
func (s *series) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, ymin = math.Inf(1), math.Inf(1)
	xmax, ymax = math.Inf(-1), math.Inf(-1)
	for _, xy := range s.pieces {
		for _, q := range xy {
			xmin, xmax = math.Min(xmin, q.X), math.Max(xmax, q.X)
			ymin, ymax = math.Min(ymin, q.Y), math.Max(ymax, q.Y)
		}
	}
	return
}

// marks draws horizontal reference lines inside the Y range.
type marks struct{ marks []Mark }

func (m *marks) Plot(c draw.Canvas, p *plot.Plot) {
	_, trY := p.Transforms(&c)
	sty := textStyle(TickSize, false)
	sty.Color = markGrey
	sty.XAlign, sty.YAlign = draw.XRight, draw.YBottom
	ls := draw.LineStyle{Color: markGrey, Width: vg.Points(markWidth), Dashes: []vg.Length{vg.Points(4), vg.Points(2)}}
	for _, mk := range m.marks {
		if !(mk.Y >= p.Y.Min && mk.Y <= p.Y.Max) {
			continue
		}
		y := trY(mk.Y)
		c.StrokeLine2(ls, c.Min.X, y, c.Max.X, y)
		if mk.Label != "" {
			ty := y + vg.Points(1.5)
			if y+sty.Height(mk.Label)+vg.Points(2) > c.Max.Y {
				sty.YAlign = draw.YTop
				ty = y - vg.Points(1.5)
			}
			c.FillText(sty, vg.Point{X: c.Max.X - vg.Points(3), Y: ty}, mk.Label)
			sty.YAlign = draw.YBottom
		}
	}
}

// frame outlines the data area, so the axes read as a box.
type frame struct{}

func (frame) Plot(c draw.Canvas, _ *plot.Plot) {
	r := c.Rectangle
	c.StrokeLines(draw.LineStyle{Color: frameCol, Width: vg.Points(gridWidth)}, []vg.Point{
		r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
}

// floorBars draws grouped bars from a floor value upward, each group in
// its style's colour and hatching.
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
		idx := g
		if grp.Style > 0 {
			idx = grp.Style - 1
		}
		for k := 0; k < b.n && k < len(grp.Values); k++ {
			v := grp.Values[k]
			if math.IsNaN(v) || math.IsInf(v, 0) || v <= b.floor {
				continue
			}
			x0 := float64(k) - groupWidth/2 + float64(g)*w
			top := math.Min(v, plt.Y.Max)
			r := vg.Rectangle{Min: vg.Point{X: trX(x0), Y: trY(b.floor)}, Max: vg.Point{X: trX(x0 + w*0.9), Y: trY(top)}}
			r = clipRect(r, c.Rectangle)
			if r.Max.X <= r.Min.X || r.Max.Y <= r.Min.Y {
				continue
			}
			drawSwatch(c, r, idx)
		}
	}
}

func clipRect(r, to vg.Rectangle) vg.Rectangle {
	r.Min.X, r.Min.Y = max(r.Min.X, to.Min.X), max(r.Min.Y, to.Min.Y)
	r.Max.X, r.Max.Y = min(r.Max.X, to.Max.X), min(r.Max.Y, to.Max.Y)
	return r
}

// drawSwatch fills r in style idx's colour, hatches it and outlines it.
func drawSwatch(c draw.Canvas, r vg.Rectangle, idx int) {
	col := Colour(idx)
	c.FillPolygon(col, []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}})
	hatchCol := color.Color(color.White)
	if LabOf(col).L > 60 {
		hatchCol = color.Black
	}
	ls := draw.LineStyle{Color: hatchCol, Width: vg.Points(0.8)}
	for _, seg := range hatchLines(r, hatchOf(idx), vg.Points(4)) {
		c.StrokeLines(ls, seg)
	}
	c.StrokeLines(draw.LineStyle{Color: color.Black, Width: vg.Points(0.5)},
		[]vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}, r.Min})
}

// hatchLines returns the segments of hatch pattern h inside r, spaced s
// apart.
func hatchLines(r vg.Rectangle, h hatch, s vg.Length) [][]vg.Point {
	var out [][]vg.Point
	horiz := func() {
		for y := r.Min.Y + s/2; y < r.Max.Y; y += s {
			out = append(out, []vg.Point{{X: r.Min.X, Y: y}, {X: r.Max.X, Y: y}})
		}
	}
	vert := func() {
		for x := r.Min.X + s/2; x < r.Max.X; x += s {
			out = append(out, []vg.Point{{X: x, Y: r.Min.Y}, {X: x, Y: r.Max.Y}})
		}
	}
	// Diagonals y − y0 = ±(x − x0) + k, clipped to r.
	diag := func(rise bool) {
		w, hgt := r.Max.X-r.Min.X, r.Max.Y-r.Min.Y
		for k := -w + s/2; k < hgt; k += s * 1.4142 {
			// In local coordinates u = x − Min.X ∈ [0, w], v ∈ [0, hgt]:
			// rising v = u + k, falling v = (w − u) + k.
			u0, u1 := max(0, -k), min(w, hgt-k)
			if u1 <= u0 {
				continue
			}
			p0 := vg.Point{X: r.Min.X + u0, Y: r.Min.Y + u0 + k}
			p1 := vg.Point{X: r.Min.X + u1, Y: r.Min.Y + u1 + k}
			if !rise {
				p0.X, p1.X = r.Max.X-u0, r.Max.X-u1
			}
			out = append(out, []vg.Point{p0, p1})
		}
	}
	switch h {
	case hatchRise:
		diag(true)
	case hatchFall:
		diag(false)
	case hatchHorizontal:
		horiz()
	case hatchVertical:
		vert()
	case hatchCross:
		diag(true)
		diag(false)
	case hatchGrid:
		horiz()
		vert()
	}
	return out
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
