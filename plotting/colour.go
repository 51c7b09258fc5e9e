package plotting

import (
	"image/color"
	"math"
)

// Colour arithmetic behind the palette checks and the colour map: sRGB
// decoding and encoding (IEC 61966-2-1), CIE 1976 L*a*b* under D65
// (CIE 15:2004), and the dichromat simulation of Machado, Oliveira &
// Fernandes (2009).

// SRGBToLinear decodes one sRGB component in [0, 1] to linear light
// (IEC 61966-2-1:1999, §5.2, inverse of the encoding transfer function).
func SRGBToLinear(c float64) float64 {
	if c <= 0.04045 {
		return c / 12.92
	}
	return math.Pow((c+0.055)/1.055, 2.4)
}

// LinearToSRGB encodes linear light in [0, 1] (clipped) to an sRGB
// component (IEC 61966-2-1:1999, §5.2).
func LinearToSRGB(c float64) float64 {
	c = math.Max(0, math.Min(1, c))
	if c <= 0.0031308 {
		return 12.92 * c
	}
	return 1.055*math.Pow(c, 1/2.4) - 0.055
}

// linearRGB returns the linear-light components of an 8-bit sRGB colour.
func linearRGB(c color.RGBA) [3]float64 {
	return [3]float64{
		SRGBToLinear(float64(c.R) / 255),
		SRGBToLinear(float64(c.G) / 255),
		SRGBToLinear(float64(c.B) / 255),
	}
}

// RelativeLuminance returns Y of an sRGB colour relative to white
// (IEC 61966-2-1 primaries with the D65 white: Y = 0.2126 R + 0.7152 G +
// 0.0722 B on linear components).
func RelativeLuminance(c color.RGBA) float64 {
	l := linearRGB(c)
	return 0.2126*l[0] + 0.7152*l[1] + 0.0722*l[2]
}

// ContrastRatio returns (L1 + 0.05)/(L2 + 0.05) of two colours, L1 the
// lighter relative luminance (W3C WCAG 2.1, definition "contrast
// ratio").
func ContrastRatio(a, b color.RGBA) float64 {
	la, lb := RelativeLuminance(a), RelativeLuminance(b)
	if la < lb {
		la, lb = lb, la
	}
	return (la + 0.05) / (lb + 0.05)
}

// Lab is a colour in CIE 1976 L*a*b* (D65 white).
type Lab struct{ L, A, B float64 }

// DeltaE returns the CIE 1976 colour difference ΔE*ab, the Euclidean
// distance in L*a*b*.
func (p Lab) DeltaE(q Lab) float64 {
	return math.Sqrt((p.L-q.L)*(p.L-q.L) + (p.A-q.A)*(p.A-q.A) + (p.B-q.B)*(p.B-q.B))
}

// LabOf converts an sRGB colour to CIE L*a*b*: linear sRGB to XYZ with the
// matrix of IEC 61966-2-1 (§5.2), then the CIE 1976 formulas of
// CIE 15:2004 (§8.2.1) with the D65 white point X_n = 0.95047, Z_n =
// 1.08883 (Y_n = 1).
func LabOf(c color.RGBA) Lab { return labOfLinear(linearRGB(c)) }

func labOfLinear(l [3]float64) Lab {
	x := 0.4124*l[0] + 0.3576*l[1] + 0.1805*l[2]
	y := 0.2126*l[0] + 0.7152*l[1] + 0.0722*l[2]
	z := 0.0193*l[0] + 0.1192*l[1] + 0.9505*l[2]
	f := func(t float64) float64 {
		const eps = 216.0 / 24389 // (6/29)³
		if t > eps {
			return math.Cbrt(t)
		}
		return (24389.0/27*t + 16) / 116
	}
	fx, fy, fz := f(x/0.95047), f(y), f(z/1.08883)
	return Lab{L: 116*fy - 16, A: 500 * (fx - fy), B: 200 * (fy - fz)}
}

// Deficiency names a dichromacy simulated by Simulate.
type Deficiency int

// The dichromacies of Machado et al. (2009) at severity 1.
const (
	Protanopia Deficiency = iota
	Deuteranopia
	Tritanopia
)

func (d Deficiency) String() string {
	switch d {
	case Protanopia:
		return "protanopia"
	case Deuteranopia:
		return "deuteranopia"
	case Tritanopia:
		return "tritanopia"
	}
	return "unknown deficiency"
}

// machado holds the severity-1.0 simulation matrices of G. M. Machado,
// M. M. Oliveira, L. A. F. Fernandes, "A physiologically-based model for
// simulation of color vision deficiency", IEEE Trans. Vis. Comput.
// Graphics 15(6), 2009, pp. 1291–1298, supplementary table of matrices
// (protanopia and deuteranopia rows checked against a published copy of
// the table; tritanopia from memory). They act on linear RGB.
var machado = [3][3][3]float64{
	Protanopia: {
		{0.152286, 1.052583, -0.204868},
		{0.114503, 0.786281, 0.099216},
		{-0.003882, -0.048116, 1.051998},
	},
	Deuteranopia: {
		{0.367322, 0.860646, -0.227968},
		{0.280085, 0.672501, 0.047413},
		{-0.011820, 0.042940, 0.968881},
	},
	Tritanopia: {
		{1.255528, -0.076749, -0.178779},
		{-0.078411, 0.930809, 0.147602},
		{0.004733, 0.691367, 0.303900},
	},
}

// Simulate returns how an sRGB colour appears to a dichromat, by the
// severity-1 matrix of Machado et al. (2009) applied to linear RGB and
// clipped to the sRGB gamut.
func Simulate(c color.RGBA, d Deficiency) color.RGBA {
	l := linearRGB(c)
	m := machado[d]
	var out [3]uint8
	for i := range out {
		v := m[i][0]*l[0] + m[i][1]*l[1] + m[i][2]*l[2]
		out[i] = uint8(math.Round(255 * LinearToSRGB(v)))
	}
	return color.RGBA{R: out[0], G: out[1], B: out[2], A: 255}
}

// Cubehelix returns the colour at fraction λ ∈ [0, 1] of D. A. Green's
// cubehelix scheme ("A colour scheme for the display of astronomical
// intensity images", Bull. Astr. Soc. India 39, 2011, pp. 289–295, eq. 2)
// with start colour s, r rotations, hue (saturation) h and γ = 1:
//
//	a = h·λ(1 − λ)/2, φ = 2π(s/3 + r·λ)
//	R = λ + a(−0.14861 cos φ + 1.78277 sin φ)
//	G = λ + a(−0.29227 cos φ − 0.90649 sin φ)
//	B = λ + a(1.97294 cos φ)
//
// The two direction vectors have no component along the grey-level
// weights (0.30, 0.59, 0.11) Green uses, so the grey level of the colour is
// λ itself: the scheme reads as a plain ramp when printed in grey.
// Components are clipped to [0, 1] (which only lightens or darkens).
func Cubehelix(lambda, s, r, h float64) color.RGBA {
	lambda = math.Max(0, math.Min(1, lambda))
	a := h * lambda * (1 - lambda) / 2
	phi := 2 * math.Pi * (s/3 + r*lambda)
	sn, cs := math.Sincos(phi)
	rgb := [3]float64{
		lambda + a*(-0.14861*cs+1.78277*sn),
		lambda + a*(-0.29227*cs-0.90649*sn),
		lambda + a*(1.97294*cs),
	}
	var out [3]uint8
	for i, v := range rgb {
		out[i] = uint8(math.Round(255 * math.Max(0, math.Min(1, v))))
	}
	return color.RGBA{R: out[0], G: out[1], B: out[2], A: 255}
}

// Heat-map colour scheme: Green's defaults (start 0.5, −1.5 rotations,
// hue 1) over λ ∈ [heatLow, heatHigh]. The top is kept below white so the
// loudest cells stay distinct from the page, the bottom above black so
// the quietest stay distinct from the axes.
const (
	heatStart, heatRotations, heatHue = 0.5, -1.5, 1.0
	heatLow, heatHigh                 = 0.0, 0.92
)

// HeatColour returns the heat-map colour for a fraction v ∈ [0, 1] of the
// colour scale (0 the bottom of the scale, 1 its top); values outside are
// clipped.
func HeatColour(v float64) color.RGBA {
	v = math.Max(0, math.Min(1, v))
	return Cubehelix(heatLow+(heatHigh-heatLow)*v, heatStart, heatRotations, heatHue)
}
