package loudness_test

import (
	"fmt"
	"math"

	"renderchain/dsp/loudness"
)

// Measure 10 s of a stereo 1 kHz sine at −23 dBFS, the alignment signal of
// EBU Tech 3341, written in 100 ms chunks.
func ExampleMeter() {
	const fs = 48000
	m, err := loudness.NewMeter(fs, 2)
	if err != nil {
		fmt.Println(err)
		return
	}
	a := math.Pow(10, -23.0/20)
	buf := make([]float64, 2*fs/10)
	n := 0
	for range 100 {
		for i := 0; i < len(buf); i += 2 {
			v := a * math.Sin(2*math.Pi*float64(n%48)/48) // 1 kHz: 48 samples a cycle
			buf[i], buf[i+1] = v, v
			n++
		}
		m.Write(buf)
	}
	fmt.Printf("integrated %.1f LUFS, range %.1f LU\n", m.Integrated(), m.LoudnessRange())
	fmt.Printf("momentary max %.1f LUFS, short-term max %.1f LUFS\n", m.MomentaryMax(), m.ShortTermMax())
	fmt.Printf("sample peak %.1f dBFS, true peak %.1f dBTP\n", m.SamplePeak(), m.TruePeak())
	// Output:
	// integrated -23.0 LUFS, range 0.0 LU
	// momentary max -23.0 LUFS, short-term max -23.0 LUFS
	// sample peak -23.0 dBFS, true peak -23.0 dBTP
}
