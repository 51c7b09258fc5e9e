package wavio_test

import (
	"bytes"
	"fmt"
	"log"

	"renderchain/dsp/wavio"
)

// ExampleNewStreamWriter writes to a destination that cannot seek (here a
// buffer standing for a pipe): the frame count is given up front.
func ExampleNewStreamWriter() {
	var pipe bytes.Buffer
	w, err := wavio.NewStreamWriter(&pipe, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 16}, 3)
	if err != nil {
		log.Fatal(err)
	}
	if err := w.Write([]float64{0, 0.5, -0.5}); err != nil {
		log.Fatal(err)
	}
	if err := w.Close(); err != nil {
		log.Fatal(err)
	}
	r, err := wavio.NewReader(bytes.NewReader(pipe.Bytes()))
	if err != nil {
		log.Fatal(err)
	}
	buf := make([]float64, 3)
	n, _ := r.Read(buf)
	fmt.Println(pipe.Len(), r.Frames(), buf[:n])
	// Output:
	// 50 3 [0 0.5 -0.5]
}
