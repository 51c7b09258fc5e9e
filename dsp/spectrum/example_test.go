package spectrum_test

import (
	"fmt"
	"math"

	"renderchain/dsp/spectrum"
)

// A 1 kHz, 1 V peak sine with 1 % second and 0.5 % third harmonic, one
// second at 48 kHz: a coherent record of exactly 1000 cycles.
func ExampleAnalyze() {
	const fs, f0 = 48000.0, 1000.0
	x := make([]float64, 48000)
	for i := range x {
		p := 2 * math.Pi * f0 * float64(i) / fs
		x[i] = math.Sin(p) + 0.01*math.Sin(2*p) + 0.005*math.Sin(3*p)
	}
	a, err := spectrum.Analyze(x, fs, f0, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("method %v, fundamental %.4f V peak, %.2f dBV\n", a.Method, a.Fundamental.Amplitude, a.DBV)
	for _, h := range a.Harmonics[:2] {
		fmt.Printf("H%d %5.0f Hz %6.2f dBc %.3f %%\n", h.Order, h.Frequency, h.DBc, h.Percent)
	}
	fmt.Printf("THD_F %.4f %%, THD_R %.4f %%, THD+N %.4f %%\n", 100*a.THDF, 100*a.THDR, 100*a.THDN)
	// Output:
	// method bins, fundamental 1.0000 V peak, -3.01 dBV
	// H2  2000 Hz -40.00 dBc 1.000 %
	// H3  3000 Hz -46.02 dBc 0.500 %
	// THD_F 1.1180 %, THD_R 1.1180 %, THD+N 1.1180 %
}

// Band levels, centroid and crest factor of a half-scale 1 kHz sine
// streamed in 480-sample blocks; no other band comes within 100 dB.
func ExampleLTAS() {
	const fs = 48000.0
	l, err := spectrum.NewLTAS(fs, 0)
	if err != nil {
		fmt.Println(err)
		return
	}
	block := make([]float64, 480)
	for b := 0; b < 300; b++ { // 3 s
		for i := range block {
			t := float64(b*len(block)+i) / fs
			block[i] = 0.5 * math.Sin(2*math.Pi*1000*t)
		}
		if err := l.Write(block); err != nil {
			fmt.Println(err)
			return
		}
	}
	for _, band := range l.Bands() {
		switch {
		case band.Nominal == 1000:
			fmt.Printf("%4.0f Hz band [%.1f, %.1f] Hz: %.2f dB re full-scale sine\n",
				band.Nominal, band.Lower, band.Upper, band.Level)
		case band.Level > -100:
			fmt.Printf("%4.0f Hz band: %.2f dB\n", band.Nominal, band.Level)
		}
	}
	fmt.Printf("centroid %.1f Hz, crest factor %.2f dB\n", l.Centroid(), l.CrestFactor())
	// Output:
	// 1000 Hz band [891.3, 1122.0] Hz: -6.02 dB re full-scale sine
	// centroid 1000.0 Hz, crest factor 3.01 dB
}

// A fuzz-like response: a 1319 Hz sine with odd harmonics, and a folded
// line at 3 kHz, 60 dB under the fundamental. One second at 48 kHz holds
// exactly 1319 cycles, so every line sits on its own bin.
func ExampleSignalToAlias() {
	const fs, f0 = 48000.0, 1319.0
	x := make([]float64, 48000)
	for i := range x {
		p := 2 * math.Pi * f0 * float64(i) / fs
		x[i] = math.Sin(p) + 0.3*math.Sin(3*p) + 0.1*math.Sin(5*p) +
			1e-3*math.Sin(2*math.Pi*3000*float64(i)/fs)
	}
	r, err := spectrum.SignalToAlias(x, fs, f0)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d cycles, %d orders below Nyquist, signal-to-alias %.2f dB\n", r.Cycles, r.Orders, r.DB)
	// Output:
	// 1319 cycles, 18 orders below Nyquist, signal-to-alias 60.41 dB
}
