package synth

import "math/rand/v2"

// DemoDuration is the length in seconds of the signal DemoPhrase returns.
const DemoDuration = 10.0

// Settings DemoPhrase renders with: a pickup a tenth of the string length
// from the bridge, plucked at 0.15 of the length.
const (
	demoPickPosition   = 0.15
	demoPickupPosition = 0.10
)

const mute = -1 // in a chord shape: string not played

// chordShape is the fret per string, lowest string first; mute = not played.
type chordShape [Strings]int

var (
	shapeE5 = chordShape{0, 2, 2, mute, mute, mute}
	shapeA5 = chordShape{mute, 0, 2, 2, mute, mute}
	shapeG5 = chordShape{3, 5, 5, mute, mute, mute}
	shapeG  = chordShape{3, 2, 0, 0, 0, 3}
	shapeC  = chordShape{mute, 3, 2, 0, 1, 0}
	shapeD  = chordShape{mute, mute, 0, 2, 3, 2}
	shapeEm = chordShape{0, 2, 2, 0, 0, 0}
)

// phrase collects notes with seeded timing and level variation.
type phrase struct {
	notes []Note
	rng   *rand.Rand
}

func (ph *phrase) jitter(t, v float64) (float64, float64) {
	t += 0.003 * (2*ph.rng.Float64() - 1)
	v *= 1 + 0.08*(2*ph.rng.Float64()-1)
	return max(t, 0), min(max(v, 0.05), 1)
}

// strum plays shape as one stroke starting at t: downstrokes go from the low
// string up, 8 ms apart; upstrokes the other way, 6 ms apart, a little
// softer. Strings marked mute are damped, so nothing from an earlier chord
// keeps ringing on them.
func (ph *phrase) strum(t float64, shape chordShape, v float64, down bool) {
	order := []int{0, 1, 2, 3, 4, 5}
	gap := 0.008
	if !down {
		order = []int{5, 4, 3, 2, 1, 0}
		gap = 0.006
	}
	k := 0
	for _, s := range order {
		if shape[s] == mute {
			ph.notes = append(ph.notes, Note{Start: t, String: s, Velocity: 0})
			continue
		}
		tt, vv := ph.jitter(t+float64(k)*gap, v*(1-0.04*float64(k)))
		ph.notes = append(ph.notes, Note{Start: tt, String: s, Fret: shape[s], Velocity: vv})
		k++
	}
}

func (ph *phrase) pluck(t float64, s, fret int, v float64) {
	tt, vv := ph.jitter(t, v)
	ph.notes = append(ph.notes, Note{Start: tt, String: s, Fret: fret, Velocity: vv})
}

// damp mutes the given strings at t.
func (ph *phrase) damp(t float64, strings ...int) {
	for _, s := range strings {
		ph.notes = append(ph.notes, Note{Start: t, String: s, Velocity: 0})
	}
}

// demoNotes is the score of DemoPhrase, at 120 beats per minute.
func demoNotes(seed int64) []Note {
	ph := &phrase{rng: rand.New(rand.NewPCG(uint64(seed), 0x5d1b7a3c))}
	// Power chords, down-down-up.
	ph.strum(0.00, shapeE5, 0.90, true)
	ph.strum(0.50, shapeE5, 0.80, true)
	ph.strum(0.75, shapeE5, 0.60, false)
	ph.strum(1.00, shapeA5, 0.90, true)
	ph.strum(1.50, shapeG5, 0.90, true)
	ph.strum(1.75, shapeG5, 0.60, false)
	// Open-position chords, left ringing.
	ph.strum(2.00, shapeG, 0.85, true)
	ph.strum(2.75, shapeG, 0.55, false)
	ph.strum(3.00, shapeC, 0.85, true)
	ph.strum(3.50, shapeD, 0.80, true)
	ph.strum(3.75, shapeD, 0.50, false)
	ph.strum(4.00, shapeEm, 0.95, true)
	ph.damp(4.95, 0, 1, 2, 3, 4, 5)
	// A single-note line in E minor pentatonic: eighths, then sixteenths.
	line := []struct {
		t       float64
		s, fret int
		v       float64
	}{
		{5.000, 0, 0, 0.90}, {5.250, 0, 3, 0.80}, {5.500, 1, 0, 0.85}, {5.750, 1, 2, 0.80},
		{6.000, 1, 5, 0.85}, {6.250, 2, 2, 0.80}, {6.500, 2, 5, 0.85}, {6.625, 3, 2, 0.75},
		{6.750, 3, 4, 0.80}, {6.875, 3, 2, 0.70}, {7.000, 3, 0, 0.80}, {7.250, 2, 2, 0.75},
	}
	for _, n := range line {
		ph.pluck(n.t, n.s, n.fret, n.v)
	}
	// A held A3 on its own, to hear the sustain and decay.
	ph.damp(7.48, 0, 1, 3, 4, 5)
	ph.pluck(7.50, 2, 7, 1.0)
	return ph.notes
}

// DemoPhrase renders the built-in demonstration: DemoDuration seconds of a
// dry, undistorted plucked-string phrase at sampleRate (Hz): power chords,
// strummed open-position chords, a single-note line and a held note left to
// decay. The seed varies pluck noise, timing and level; equal seeds give
// identical samples. The peak is DefaultPeak.
func DemoPhrase(sampleRate float64, seed int64) ([]float64, error) {
	return Render(demoNotes(seed), DemoDuration, Options{
		SampleRate:     sampleRate,
		Seed:           seed,
		PickPosition:   demoPickPosition,
		PickupPosition: demoPickupPosition,
	})
}
