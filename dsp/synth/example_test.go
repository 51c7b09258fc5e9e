package synth_test

import (
	"fmt"
	"math"

	"renderchain/dsp/synth"
)

func ExampleStringFrequency() {
	fmt.Printf("open A string: %.2f Hz\n", synth.StringFrequency(1, 0))
	fmt.Printf("high string, 5th fret: %.2f Hz\n", synth.StringFrequency(5, 5))
	// Output:
	// open A string: 110.00 Hz
	// high string, 5th fret: 440.00 Hz
}

func ExampleRender() {
	// An E minor chord strummed down, low string first, 8 ms apart.
	frets := []int{0, 2, 2, 0, 0, 0}
	var notes []synth.Note
	for s, f := range frets {
		notes = append(notes, synth.Note{Start: 0.008 * float64(s), String: s, Fret: f, Velocity: 0.8})
	}
	x, err := synth.Render(notes, 2, synth.Options{SampleRate: 44100, Seed: 1, PickupPosition: 0.2})
	if err != nil {
		fmt.Println(err)
		return
	}
	peak := 0.0
	for _, v := range x {
		peak = math.Max(peak, math.Abs(v))
	}
	fmt.Printf("%d samples, peak %.2f\n", len(x), peak)

	_, err = synth.Render([]synth.Note{{String: 6}}, 1, synth.Options{})
	fmt.Println(err)
	// Output:
	// 88200 samples, peak 0.90
	// synth: notes[0].String = 6: want 0..5
}
