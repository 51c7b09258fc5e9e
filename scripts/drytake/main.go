// Command drytake writes a music-like dry take for speed measurements:
// the demo's synthesized plucked-string phrase (package dsp/synth, 10 s a
// take), repeated with new seeds to the length asked, mono 24-bit.
//
//	go run ./scripts/drytake -seconds 60 -out dry60.wav
package main

import (
	"flag"
	"fmt"
	"os"

	"renderchain/dsp/synth"
	"renderchain/dsp/wavio"
)

func main() {
	seconds := flag.Float64("seconds", 20, "length of the take in seconds (1–3600)")
	rate := flag.Int("rate", 48000, "sample rate in Hz (44100–192000)")
	out := flag.String("out", "", "WAV file to write, required")
	flag.Parse()
	if err := run(*seconds, *rate, *out); err != nil {
		fmt.Fprintln(os.Stderr, "drytake:", err)
		os.Exit(1)
	}
}

func run(seconds float64, rate int, out string) error {
	switch {
	case out == "":
		return fmt.Errorf("-out is required")
	case !(seconds >= 1 && seconds <= 3600):
		return fmt.Errorf("-seconds %g is outside 1–3600", seconds)
	case rate < 44100 || rate > 192000:
		return fmt.Errorf("-rate %d is outside 44100–192000", rate)
	}
	n := int(seconds * float64(rate))
	x := make([]float64, 0, n)
	for seed := int64(1); len(x) < n; seed++ {
		y, err := synth.DemoPhrase(float64(rate), seed)
		if err != nil {
			return err
		}
		x = append(x, y...)
	}
	return wavio.WriteFile(out, wavio.Format{SampleRate: rate, Channels: 1, BitDepth: 24}, x[:n])
}
