package wavio_test

import (
	"fmt"
	"io"
	"log"
	"os"
	"path/filepath"

	"renderchain/dsp/wavio"
)

// Example writes a short 24-bit stereo file atomically, then streams it back.
func Example() {
	dir, err := os.MkdirTemp("", "wavio-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	path := filepath.Join(dir, "out.wav")

	out, err := wavio.CreateTemp(path)
	if err != nil {
		log.Fatal(err)
	}
	defer out.Abort() // removes the temporary file unless committed
	w, err := wavio.NewWriter(out, wavio.Format{SampleRate: 48000, Channels: 2, BitDepth: 24})
	if err != nil {
		log.Fatal(err)
	}
	// Interleaved left, right. +1.0 is one LSB above positive full scale.
	if err := w.Write([]float64{0.5, -0.5, 0.25, 1.0}); err != nil {
		log.Fatal(err)
	}
	if err := w.Close(); err != nil {
		log.Fatal(err)
	}
	if err := out.Commit(); err != nil {
		log.Fatal(err)
	}
	fmt.Println("clipped:", w.Clipped())

	f, err := wavio.Open(path)
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	fmt.Println(f.Format(), "frames:", f.Frames())
	buf := make([]float64, 2) // one stereo frame per call
	for {
		n, err := f.Read(buf)
		if err == io.EOF {
			break
		}
		if err != nil {
			log.Fatal(err)
		}
		fmt.Printf("%.8f\n", buf[:n])
	}
	// Output:
	// clipped: 1
	// 48000 Hz, 2 ch, 24-bit PCM frames: 2
	// [0.50000000 -0.50000000]
	// [0.25000000 0.99999988]
}
