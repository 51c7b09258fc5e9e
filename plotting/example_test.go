package plotting_test

import (
	"bytes"
	"fmt"
	"math"

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
