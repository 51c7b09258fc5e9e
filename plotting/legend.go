package plotting

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// entry is one legend or key entry: a line sample or a bar swatch and
// its text.
type entry struct {
	label string
	bar   bool
	style int // bar swatch style
	line  *draw.LineStyle
	glyph *draw.GlyphStyle
}

// entries returns the panel's legend entries: labelled lines that have
// something to draw, then labelled bar groups.
func (pn *Panel) entries() []entry {
	var out []entry
	for i := range pn.Lines {
		ln := &pn.Lines[i]
		if ln.Label == "" {
			continue
		}
		n := 0
		for _, xy := range pieces(*ln, pn.X.Log, pn.Y.Log) {
			n += len(xy)
		}
		if n == 0 {
			continue
		}
		col, dash, g, width, _ := ln.style(i)
		e := entry{label: ln.Label}
		if !ln.NoLine {
			e.line = &draw.LineStyle{Color: col, Width: width, Dashes: dash}
		}
		if ln.Markers || ln.NoLine {
			e.glyph = &draw.GlyphStyle{Color: col, Shape: g, Radius: vg.Points(glyphSize)}
		}
		out = append(out, e)
	}
	if len(pn.Categories) > 0 {
		for g, grp := range pn.Bars {
			if grp.Label == "" {
				continue
			}
			idx := g
			if grp.Style > 0 {
				idx = grp.Style - 1
			}
			out = append(out, entry{label: grp.Label, bar: true, style: idx})
		}
	}
	return out
}

// keyEntries gathers the figure's entries, the first of each label.
func (f *Figure) keyEntries() []entry {
	seen := map[string]bool{}
	var out []entry
	for _, col := range [][]Panel{f.Panels, f.Beside} {
		for i := range col {
			for _, e := range col[i].entries() {
				if !seen[e.label] {
					seen[e.label] = true
					out = append(out, e)
				}
			}
		}
	}
	return out
}

// thumb draws an entry's sample into r.
func (e *entry) thumb(c draw.Canvas, r vg.Rectangle) {
	if e.bar {
		h := r.Max.Y - r.Min.Y
		sq := vg.Rectangle{Min: vg.Point{X: r.Min.X + (r.Max.X-r.Min.X-1.6*h)/2, Y: r.Min.Y},
			Max: vg.Point{X: r.Min.X + (r.Max.X-r.Min.X+1.6*h)/2, Y: r.Max.Y}}
		drawSwatch(c, sq, e.style)
		return
	}
	y := (r.Min.Y + r.Max.Y) / 2
	if e.line != nil {
		c.StrokeLine2(*e.line, r.Min.X, y, r.Max.X, y)
	}
	if e.glyph != nil {
		c.DrawGlyphNoClip(*e.glyph, vg.Point{X: (r.Min.X + r.Max.X) / 2, Y: y})
	}
}

// draw draws the entry's sample and text in a row of height rh whose
// left end is x and whose middle is y.
func (e *entry) draw(c draw.Canvas, sty text.Style, x, y, rh vg.Length) {
	th := vg.Rectangle{Min: vg.Point{X: x, Y: y - rh/2 + vg.Points(2.5)},
		Max: vg.Point{X: x + vg.Points(thumbWidthPt), Y: y + rh/2 - vg.Points(2.5)}}
	e.thumb(c, th)
	c.FillText(sty, vg.Point{X: x + vg.Points(thumbWidthPt+4), Y: y}, e.label)
}

func legendText() text.Style {
	s := textStyle(LegendSize, false)
	s.XAlign, s.YAlign = draw.XLeft, draw.YCenter
	return s
}

// rowHeight is the height of one legend row.
func rowHeight() vg.Length {
	s := legendText()
	return s.Height("Hg") + vg.Points(3)
}

// keyLayout places entries in rows across a width.
type keyLayout struct {
	rows   [][]entry
	widths [][]vg.Length
	height vg.Length
}

func entryWidth(e entry) vg.Length {
	return vg.Points(thumbWidthPt) + vg.Points(4) + legendText().Width(e.label)
}

func layoutKey(es []entry, width vg.Length) keyLayout {
	var k keyLayout
	gap := vg.Length(keyEntryGap) * vg.Centimeter
	var row []entry
	var ws []vg.Length
	used := vg.Length(0)
	for _, e := range es {
		w := entryWidth(e)
		if len(row) > 0 && used+gap+w > width {
			k.rows, k.widths = append(k.rows, row), append(k.widths, ws)
			row, ws, used = nil, nil, 0
		}
		if len(row) > 0 {
			used += gap
		}
		row, ws = append(row, e), append(ws, w)
		used += w
	}
	if len(row) > 0 {
		k.rows, k.widths = append(k.rows, row), append(k.widths, ws)
	}
	if len(k.rows) > 0 {
		k.height = vg.Length(len(k.rows))*rowHeight() + vg.Length(keyRowGapCm)*vg.Centimeter
	}
	return k
}

// draw draws the key's rows, centred, from the top of r.
func (k keyLayout) draw(c draw.Canvas, r vg.Rectangle) {
	sty := legendText()
	rh := rowHeight()
	gap := vg.Length(keyEntryGap) * vg.Centimeter
	y := r.Max.Y - rh/2
	for i, row := range k.rows {
		total := vg.Length(0)
		for j, w := range k.widths[i] {
			if j > 0 {
				total += gap
			}
			total += w
		}
		x := r.Min.X + (r.Max.X-r.Min.X-total)/2
		for j, e := range row {
			e.draw(c, sty, x, y, rh)
			x += k.widths[i][j] + gap
		}
		y -= rh
	}
}

// drawLegend draws the panel's legend in a white box at its corner of the
// data area da, and returns the box.
func (pn *Panel) drawLegend(da draw.Canvas, p *plot.Plot) (vg.Rectangle, bool) {
	es := pn.entries()
	if len(es) == 0 {
		return vg.Rectangle{}, false
	}
	pad := vg.Points(4)
	rh := rowHeight()
	w := vg.Length(0)
	for _, e := range es {
		w = max(w, entryWidth(e))
	}
	size := vg.Point{X: w + 2*pad, Y: vg.Length(len(es))*rh + pad}
	corner := pn.Legend
	if corner == LegendAuto {
		corner = pn.emptiestCorner(da, p, size)
	}
	box := cornerBox(da.Rectangle, corner, size)
	white := color.RGBA{255, 255, 255, 255}
	da.FillPolygon(white, []vg.Point{box.Min, {X: box.Max.X, Y: box.Min.Y}, box.Max, {X: box.Min.X, Y: box.Max.Y}})
	da.StrokeLines(draw.LineStyle{Color: frameCol, Width: vg.Points(gridWidth)},
		[]vg.Point{box.Min, {X: box.Max.X, Y: box.Min.Y}, box.Max, {X: box.Min.X, Y: box.Max.Y}, box.Min})
	sty := legendText()
	y := box.Max.Y - pad/2 - rh/2
	for _, e := range es {
		e.draw(da, sty, box.Min.X+pad, y, rh)
		y -= rh
	}
	return box, true
}

// cornerBox returns a box of the given size in a corner of r, inset a
// little from its edges.
func cornerBox(r vg.Rectangle, c Corner, size vg.Point) vg.Rectangle {
	in := vg.Points(4)
	var b vg.Rectangle
	switch c {
	case TopLeft, BottomLeft:
		b.Min.X = r.Min.X + in
	default:
		b.Min.X = r.Max.X - in - size.X
	}
	switch c {
	case BottomLeft, BottomRight:
		b.Min.Y = r.Min.Y + in
	default:
		b.Min.Y = r.Max.Y - in - size.Y
	}
	b.Max = vg.Point{X: b.Min.X + size.X, Y: b.Min.Y + size.Y}
	return b
}

// emptiestCorner returns the corner whose legend box would cover the
// fewest drawn points (for bars: the least bar area), preferring top
// right, then top left, bottom right, bottom left.
func (pn *Panel) emptiestCorner(da draw.Canvas, p *plot.Plot, size vg.Point) Corner {
	trX, trY := p.Transforms(&da)
	order := []Corner{TopRight, TopLeft, BottomRight, BottomLeft}
	var cost [5]float64
	for _, c := range order {
		// The box and a margin round it: a curve grazing its edge hides
		// behind it as well as one running through it.
		box := cornerBox(da.Rectangle, c, size)
		m := vg.Points(5)
		box.Min, box.Max = vg.Point{X: box.Min.X - m, Y: box.Min.Y - m}, vg.Point{X: box.Max.X + m, Y: box.Max.Y + m}
		inside := func(pt vg.Point) bool {
			return pt.X >= box.Min.X && pt.X <= box.Max.X && pt.Y >= box.Min.Y && pt.Y <= box.Max.Y
		}
		for _, ln := range pn.Lines {
			for _, xy := range pieces(ln, pn.X.Log, pn.Y.Log) {
				for i, q := range xy {
					pt := vg.Point{X: trX(q.X), Y: trY(q.Y)}
					if inside(pt) {
						cost[c]++
					}
					if i == 0 {
						continue
					}
					// Points along the segment, every 3 points of length,
					// catch a long segment crossing the box.
					prev := vg.Point{X: trX(xy[i-1].X), Y: trY(xy[i-1].Y)}
					n := min(int(math.Hypot(float64(pt.X-prev.X), float64(pt.Y-prev.Y))/3), 200)
					for k := 1; k < n; k++ {
						a := vg.Length(float64(k) / float64(n))
						if inside(vg.Point{X: prev.X + a*(pt.X-prev.X), Y: prev.Y + a*(pt.Y-prev.Y)}) {
							cost[c]++
						}
					}
				}
			}
		}
		if len(pn.Categories) > 0 {
			ng := float64(max(len(pn.Bars), 1))
			for g, grp := range pn.Bars {
				for k, v := range grp.Values {
					if math.IsNaN(v) || math.IsInf(v, 0) || v <= pn.Floor {
						continue
					}
					x0 := float64(k) - groupWidth/2 + float64(g)*groupWidth/ng
					r := vg.Rectangle{Min: vg.Point{X: trX(x0), Y: trY(pn.Floor)}, Max: vg.Point{X: trX(x0 + groupWidth/ng), Y: trY(v)}}
					r = clipRect(r, box)
					if r.Max.X > r.Min.X && r.Max.Y > r.Min.Y {
						cost[c] += float64((r.Max.X - r.Min.X) * (r.Max.Y - r.Min.Y))
					}
				}
			}
		}
	}
	best := order[0]
	for _, c := range order[1:] {
		if cost[c] < cost[best] {
			best = c
		}
	}
	return best
}
