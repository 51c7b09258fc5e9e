package analyze_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"

	"renderchain/analyze"
	"renderchain/dsp/wavio"
)

// A 1 kHz sine peaking at −20 dBFS: its RMS is 3.01 dB lower (a sine's
// crest factor, √2), and silence has no levels at all.
func ExampleFile() {
	dir, _ := os.MkdirTemp("", "analyze")
	defer os.RemoveAll(dir)
	x := make([]float64, 48000)
	for i := range x {
		x[i] = 0.1 * math.Sin(2*math.Pi*1000*float64(i)/48000)
	}
	p := filepath.Join(dir, "sine.wav")
	if err := wavio.WriteFile(p, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true}, x); err != nil {
		fmt.Println(err)
		return
	}
	r, err := analyze.File(context.Background(), p)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("peak %.2f dBFS, RMS %.2f dBFS, crest %.2f dB\n", float64(r.PeakDBFS), float64(r.RMSDBFS), float64(r.CrestDB))
	// Output: peak -20.00 dBFS, RMS -23.01 dBFS, crest 3.01 dB
}

// The spectrogram of a file: one second of a half-scale sine centred on
// bin 88 of the 4096-sample frames (88·48000/4096 = 1031.25 Hz) reads
// 20·log10(0.5) = −6.0 dB re a full-scale sine there.
func ExampleSpectrogram() {
	dir, _ := os.MkdirTemp("", "example")
	defer os.RemoveAll(dir)
	p := filepath.Join(dir, "tone.wav")
	x := make([]float64, 48000)
	for i := range x {
		x[i] = 0.5 * math.Sin(2*math.Pi*1031.25*float64(i)/48000)
	}
	if err := wavio.WriteFile(p, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 24}, x); err != nil {
		fmt.Println(err)
		return
	}
	s, err := analyze.Spectrogram(context.Background(), p)
	if err != nil {
		fmt.Println(err)
		return
	}
	k := int(math.Round(1031.25 / s.BinHz(1)))
	fmt.Printf("%d frames of %d samples; bin %d (%.2f Hz) at %.1f dB\n", s.Frames(), s.FrameLen, k, s.BinHz(k), s.Level[5][k])
	// Output: 43 frames of 4096 samples; bin 88 (1031.25 Hz) at -6.0 dB
}
