package plotting

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// rasterPlot draws a heat map's cells between the data coordinates of
// their outer edges. The rows are already spaced evenly in the axis's
// scale, so the cells are placed, not warped.
type rasterPlot struct {
	h              *Heat
	x0, x1, y0, y1 float64
}

// heatLevels is the number of colour steps a heat map is drawn in: fine
// enough that neighbouring steps cannot be told apart (1.3 dB on an
// 80 dB scale), coarse enough that the PNG compresses.
const heatLevels = 64

// raster checks the heat map.
func (h *Heat) raster(logY bool) (*rasterPlot, error) {
	rows := len(h.Values)
	if rows == 0 || len(h.Values[0]) == 0 {
		return nil, errors.New("no cells")
	}
	cols := len(h.Values[0])
	for r, row := range h.Values {
		if len(row) != cols {
			return nil, fmt.Errorf("row %d has %d cells, row 0 has %d", r, len(row), cols)
		}
	}
	finite := func(v ...float64) bool {
		for _, x := range v {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return false
			}
		}
		return true
	}
	if !finite(h.X0, h.X1, h.Y0, h.Y1) || !(h.X0 < h.X1) || !(h.Y0 < h.Y1) {
		return nil, fmt.Errorf("cell edges X %g..%g, Y %g..%g: want finite, increasing edges", h.X0, h.X1, h.Y0, h.Y1)
	}
	if logY && h.Y0 <= 0 {
		return nil, fmt.Errorf("lower Y edge %g on a logarithmic axis: want > 0", h.Y0)
	}
	if !finite(h.Lo, h.Hi) || !(h.Lo < h.Hi) {
		return nil, fmt.Errorf("colour scale %g..%g: want finite, increasing ends", h.Lo, h.Hi)
	}
	return &rasterPlot{h: h, x0: h.X0, x1: h.X1, y0: h.Y0, y1: h.Y1}, nil
}

// colourOf returns a cell value's colour, in heatLevels steps.
func (h *Heat) colourOf(v float64) color.RGBA {
	f := 0.0
	if !math.IsNaN(v) && !math.IsInf(v, 0) {
		f = (v - h.Lo) / (h.Hi - h.Lo)
	}
	f = math.Max(0, math.Min(1, f))
	return HeatColour(math.Round(f*(heatLevels-1)) / (heatLevels - 1))
}

// image paints the part of the cells inside the fractions [u0, u1] of
// the width and [v0, v1] of the height (v from the top) into a w×h
// image, nearest cell per pixel.
func (h *Heat) image(w, ht int, u0, u1, v0, v1 float64) *image.RGBA {
	rows, cols := len(h.Values), len(h.Values[0])
	img := image.NewRGBA(image.Rect(0, 0, w, ht))
	cache := map[float64]color.RGBA{}
	for y := 0; y < ht; y++ {
		v := v0 + (float64(y)+0.5)/float64(ht)*(v1-v0)
		r := rows - 1 - min(int(v*float64(rows)), rows-1)
		for x := 0; x < w; x++ {
			u := u0 + (float64(x)+0.5)/float64(w)*(u1-u0)
			val := h.Values[r][min(int(u*float64(cols)), cols-1)]
			c, ok := cache[val]
			if !ok {
				c = h.colourOf(val)
				cache[val] = c
			}
			img.SetRGBA(x, y, c)
		}
	}
	return img
}

func (r *rasterPlot) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	rect := vg.Rectangle{Min: vg.Point{X: trX(r.x0), Y: trY(r.y0)}, Max: vg.Point{X: trX(r.x1), Y: trY(r.y1)}}
	// Only the part inside the axes.
	vis := clipRect(rect, c.Rectangle)
	if vis.Max.X <= vis.Min.X || vis.Max.Y <= vis.Min.Y {
		return
	}
	w, ht := rect.Max.X-rect.Min.X, rect.Max.Y-rect.Min.Y
	u0, u1 := float64((vis.Min.X-rect.Min.X)/w), float64((vis.Max.X-rect.Min.X)/w)
	v0, v1 := float64((rect.Max.Y-vis.Max.Y)/ht), float64((rect.Max.Y-vis.Min.Y)/ht)
	// A raster canvas gets one image pixel per device pixel, so the
	// cells are not smoothed into each other; a vector canvas gets the
	// cells at their own resolution.
	pw, ph := len(r.h.Values[0]), len(r.h.Values)
	if dc, ok := c.Canvas.(interface{ DPI() float64 }); ok {
		dpi := dc.DPI()
		pw = max(1, int(math.Round((vis.Max.X - vis.Min.X).Dots(dpi))))
		ph = max(1, int(math.Round((vis.Max.Y - vis.Min.Y).Dots(dpi))))
	} else {
		pw = max(1, int(math.Round(float64(pw)*(u1-u0))))
		ph = max(1, int(math.Round(float64(ph)*(v1-v0))))
	}
	c.DrawImage(vis, r.h.image(pw, ph, u0, u1, v0, v1))
}

// DataRange implements plot.DataRanger.
func (r *rasterPlot) DataRange() (xmin, xmax, ymin, ymax float64) {
	return r.x0, r.x1, r.y0, r.y1
}

// drawColorBar draws the heat map's colour scale to the right of the
// data area da, with ticks and its label, and returns the space it took.
func drawColorBar(da draw.Canvas, h *Heat) vg.Rectangle {
	cm := vg.Centimeter
	bar := vg.Rectangle{
		Min: vg.Point{X: da.Max.X + 0.3*cm, Y: da.Min.Y},
		Max: vg.Point{X: da.Max.X + 0.75*cm, Y: da.Max.Y},
	}
	const steps = 256
	img := image.NewRGBA(image.Rect(0, 0, 1, steps))
	for i := 0; i < steps; i++ {
		img.SetRGBA(0, steps-1-i, HeatColour((float64(i)+0.5)/steps))
	}
	da.DrawImage(bar, img)
	ls := draw.LineStyle{Color: frameCol, Width: vg.Points(gridWidth)}
	da.StrokeLines(ls, []vg.Point{bar.Min, {X: bar.Max.X, Y: bar.Min.Y}, bar.Max, {X: bar.Min.X, Y: bar.Max.Y}, bar.Min})

	kind := TicksPlain
	if strings.Contains(strings.ToLower(h.Label), "(db") {
		kind = TicksDB
	}
	height := float64((bar.Max.Y - bar.Min.Y) / cm)
	sc := chooseStep(h.Lo, h.Hi, kind, min(max(int(height/0.6), 3), 10))
	ticks := linearTicks{stepChoice: sc, scale: 1}.Ticks(h.Lo, h.Hi)
	sty := textStyle(TickSize, false)
	sty.XAlign, sty.YAlign = draw.XLeft, draw.YCenter
	tl := draw.LineStyle{Color: color.Black, Width: vg.Points(axisWidth)}
	right := bar.Max.X
	for _, t := range ticks {
		y := bar.Min.Y + vg.Length((t.Value-h.Lo)/(h.Hi-h.Lo))*(bar.Max.Y-bar.Min.Y)
		n := vg.Points(2)
		if t.Label != "" {
			n = vg.Points(4)
		}
		da.StrokeLine2(tl, bar.Max.X, y, bar.Max.X+n, y)
		if t.Label != "" {
			da.FillText(sty, vg.Point{X: bar.Max.X + vg.Points(6), Y: y}, t.Label)
			right = max(right, bar.Max.X+vg.Points(6)+sty.Width(t.Label))
		}
	}
	if h.Label != "" {
		ls := textStyle(LabelSize, false)
		ls.Rotation = math.Pi / 2
		ls.XAlign, ls.YAlign = draw.XCenter, draw.YTop
		x := right + vg.Points(4)
		da.FillText(ls, vg.Point{X: x, Y: (bar.Min.Y + bar.Max.Y) / 2}, h.Label)
		right = x + ls.Height(h.Label)
	}
	return vg.Rectangle{Min: bar.Min, Max: vg.Point{X: right, Y: bar.Max.Y}}
}
