package plotting

import (
	"image"
	"image/color"
)

// PNG files are written with a palette of at most 256 colours, which
// makes them about a third of the size of full-colour ones. Figures use
// few colours: white, black and the greys of antialiased text, the
// style colours and their blends into white at a line's edges, the grid
// and mark greys, and the heat scale in heatLevels steps. The fixed
// palette below holds those; every pixel takes its nearest entry (in
// sRGB, no dithering), so the style colours, white, black and the heat
// scale's own steps come through exactly.
var pngPalette = func() color.Palette {
	var p color.Palette
	add := func(c color.Color) {
		r0, g0, b0, _ := c.RGBA()
		for _, q := range p {
			r1, g1, b1, _ := q.RGBA()
			if r0 == r1 && g0 == g1 && b0 == b1 {
				return
			}
		}
		p = append(p, c)
	}
	add(color.RGBA{255, 255, 255, 255})
	add(color.RGBA{0, 0, 0, 255})
	for _, c := range []color.RGBA{gridGrey, markGrey, frameCol} {
		add(c)
	}
	for i := 0; i < heatLevels; i++ {
		add(HeatColour(float64(i) / (heatLevels - 1)))
	}
	// Greys, then each style colour blended into white and into black.
	for g := 0; g < 256; g += 12 {
		add(color.RGBA{uint8(g), uint8(g), uint8(g), 255})
	}
	for i := 0; i < PaletteSize; i++ {
		c := Colour(i)
		for k := 1; k <= 8; k++ {
			a := float64(k) / 9
			mix := func(v uint8) uint8 { return uint8(float64(v)*a + 255*(1-a) + 0.5) }
			add(color.RGBA{mix(c.R), mix(c.G), mix(c.B), 255})
		}
		add(c)
	}
	if len(p) > 256 {
		p = p[:256]
	}
	return p
}()

// quantize maps img onto pngPalette, nearest colour per pixel.
func quantize(img image.Image) *image.Paletted {
	b := img.Bounds()
	out := image.NewPaletted(b, pngPalette)
	cache := map[uint32]uint8{}
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			key := (r>>8)<<16 | (g>>8)<<8 | bl>>8
			idx, ok := cache[key]
			if !ok {
				idx = uint8(pngPalette.Index(color.RGBA{uint8(r >> 8), uint8(g >> 8), uint8(bl >> 8), 255}))
				cache[key] = idx
			}
			out.SetColorIndex(x, y, idx)
		}
	}
	return out
}
