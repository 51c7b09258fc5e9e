package abtest

import (
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/loudness"
	"renderchain/dsp/synth"
	"renderchain/dsp/wavio"
)

// writeWAV writes interleaved samples as a 24-bit PCM WAV file.
func writeWAV(t testing.TB, path string, x []float64, channels, rate int) {
	t.Helper()
	if err := wavio.WriteFile(path, wavio.Format{SampleRate: rate, Channels: channels, BitDepth: 24}, x); err != nil {
		t.Fatal(err)
	}
}

// readWAV reads a whole WAV file.
func readWAV(t testing.TB, path string) ([]float64, wavio.Format) {
	t.Helper()
	f, err := wavio.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	x := make([]float64, f.Frames()*int64(f.Format().Channels))
	n, err := f.Read(x)
	if err != nil && !errors.Is(err, io.EOF) {
		t.Fatal(err)
	}
	return x[:n], f.Format()
}

// makeDry writes the first seconds of the synthesised demonstration phrase
// (seeded) as a dry take; for two channels the right one is the left one
// delayed by 1 ms and 3 dB lower, so the channels differ.
func makeDry(t testing.TB, dir string, seconds float64, channels int) string {
	t.Helper()
	const fs = 48000
	x, err := synth.DemoPhrase(fs, 3)
	if err != nil {
		t.Fatal(err)
	}
	n := int(seconds * fs)
	x = x[:n]
	out := x
	if channels == 2 {
		out = make([]float64, 2*n)
		for i := range x {
			out[2*i] = x[i]
			if i >= 48 {
				out[2*i+1] = 0.7071 * x[i-48]
			}
		}
	}
	p := filepath.Join(dir, "dry.wav")
	writeWAV(t, p, out, channels, fs)
	return p
}

// fuzzChain loads the stripped fuzz-only chain shipped with the project.
func fuzzChain(t testing.TB) (*chains.Chain, string) {
	t.Helper()
	p := filepath.Join("..", "chains", "fuzz-only.toml")
	ch, err := chains.Load(p)
	if err != nil {
		t.Fatal(err)
	}
	return ch, p
}

// meterFile measures a WAV file with the project's BS.1770-4 meter
// (checked against EBU Tech 3341 in package loudness).
func meterFile(t testing.TB, path string) (lufs, truePeak float64) {
	t.Helper()
	x, f := readWAV(t, path)
	m, err := loudness.NewMeter(float64(f.SampleRate), f.Channels)
	if err != nil {
		t.Fatal(err)
	}
	m.Write(x)
	return m.Integrated(), m.TruePeak()
}

// entries lists the names in dir.
func entries(t testing.TB, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var n []string
	for _, e := range es {
		n = append(n, e.Name())
	}
	return n
}

func lsb(bits int) float64 { return math.Ldexp(1, -(bits - 1)) }
