package plotting_test

import (
	"bytes"
	"fmt"
	"math"
	"math/cmplx"

	"renderchain/dsp/spectrum"
	"renderchain/plotting"
)

// A first-order low-pass response on a logarithmic frequency axis,
// written as SVG.
func Example() {
	var hz, db []float64
	for f := 10.0; f <= 100e3; f *= 1.25 {
		hz = append(hz, f)
		db = append(db, -10*math.Log10(1+(f/1000)*(f/1000)))
	}
	fig := &plotting.Figure{Panels: []plotting.Panel{{
		Title: "RC low-pass, 1 kHz corner",
		X:     plotting.Axis{Label: "frequency (Hz)", Log: true},
		Y:     plotting.Axis{Label: "gain (dB)"},
		Lines: []plotting.Line{{Label: "1/(1+jf/1kHz)", X: hz, Y: db}},
	}}}
	var buf bytes.Buffer
	if err := fig.Render(&buf, plotting.SVG); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(bytes.Contains(buf.Bytes(), []byte("<svg")), plotting.SI(20e3))
	// Output: true 20k
}

// Two settings of a tone control, on the dense grid the response
// figures use: the phase of three cascaded first-order sections passes
// −180° in one piece, since the figure unwraps it.
func ExampleResponseFigure() {
	grid, _ := spectrum.DecadeGrid(20, 20000, spectrum.PointsPerDecade)
	spec := plotting.ResponseSpec{Title: "Small-signal response", Chain: "Three-pole low-pass",
		Path: "source → out", Settings: []string{"supply=9V"}}
	for i, fc := range []float64{500, 2000} {
		c := plotting.ResponseCurve{Label: fmt.Sprintf("corner %g Hz", fc), Style: i, Hz: grid}
		for _, f := range grid {
			h := cmplx.Pow(1/complex(1, f/fc), 3)
			c.DB = append(c.DB, 20*math.Log10(cmplx.Abs(h)))
			c.Deg = append(c.Deg, cmplx.Phase(h)*180/math.Pi)
		}
		spec.Curves = append(spec.Curves, c)
	}
	fig, err := plotting.ResponseFigure(spec)
	if err != nil {
		fmt.Println(err)
		return
	}
	phase := fig.Panels[1].Lines[0].Y
	fmt.Printf("%d points; phase at 20 kHz %.1f°\n", len(grid), phase[len(phase)-1])
	// Closed form: −3·atan(20000/500) = −265.7°.
	// Output: 146 points; phase at 20 kHz -265.7°
}

// The listening page gives each player the colour of its curves.
func ExampleHex() {
	fmt.Println(plotting.Palette(3), plotting.Hex(7))
	// Output: [#0072b2 #e69f00 #009e73] #0072b2
}
