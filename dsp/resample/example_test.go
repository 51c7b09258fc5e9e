package resample_test

import (
	"fmt"
	"math"

	"renderchain/dsp/resample"
)

// softClip is a memoryless nonlinearity standing in for a circuit solver;
// it must run at the oversampled rate because it creates harmonics.
type softClip struct{ drive float64 }

func (s softClip) Process(dst, src []float64) {
	for i, v := range src {
		dst[i] = math.Tanh(s.drive*v) / s.drive
	}
}

func ExampleOversampler() {
	const fs = 48000.0
	o, err := resample.NewOversampler(4, fs, softClip{drive: 1}, 256)
	if err != nil {
		fmt.Println(err)
		return
	}
	// The Aligner removes the filters' delay and flushes the tail, so the
	// output has as many frames as the input and lines up with it.
	a, err := resample.NewAligner(o, o.Latency(), 256)
	if err != nil {
		fmt.Println(err)
		return
	}
	in := make([]float64, 1000)
	for i := range in {
		in[i] = 0.5 * math.Sin(2*math.Pi*440*float64(i)/fs)
	}
	out := make([]float64, 0, len(in))
	buf := make([]float64, 300)
	for lo := 0; lo < len(in); lo += len(buf) {
		n := a.Process(buf, in[lo:min(len(in), lo+len(buf))])
		out = append(out, buf[:n]...)
	}
	for n := a.Flush(buf); n > 0; n = a.Flush(buf) {
		out = append(out, buf[:n]...)
	}
	fmt.Printf("latency %d samples, %d frames in, %d frames out\n", o.Latency(), len(in), len(out))
	// The harmonics of a 440 Hz tone that matter lie in the passband, so
	// the aligned output is the clipped input, sample for sample.
	fmt.Printf("sample 500: in %.4f, out %.4f, tanh(in) %.4f\n", in[500], out[500], math.Tanh(in[500]))
	// Output:
	// latency 80 samples, 1000 frames in, 1000 frames out
	// sample 500: in -0.2500, out -0.2449, tanh(in) -0.2449
}

func ExampleDesign() {
	f, err := resample.Design(4, 44100)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d taps at %g Hz, delay %d base samples, β = %.3f\n",
		len(f.Taps), float64(f.Factor)*f.SampleRate, f.Delay(), f.Beta)
	_, err = resample.Design(32, 44100)
	fmt.Println(err)
	// Output:
	// 577 taps at 176400 Hz, delay 72 base samples, β = 10.392
	// resample: Design: factor = 32 out of range, want 1 to 16
}
