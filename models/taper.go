package models

import (
	"fmt"
	"math"
	"strings"
)

// Taper maps a knob's rotation x (0 fully counter-clockwise, 1 fully
// clockwise) to the fraction t(x) of the track resistance that lies between
// the ccw end and the wiper.
type Taper int

// The tapers a pot or trimmer can have.
const (
	Linear Taper = iota
	// Audio is the logarithmic ("A") taper: 10 % of the track at
	// mid-rotation (common practice). Modelled by the exponential
	// t(x) = (B^x − 1)/(B − 1) with B = 81, the base for which t(0.5) = 0.1
	// exactly: with s = √B, s − 1 = 0.1(s² − 1) gives s = 9.
	Audio
	// ReverseAudio mirrors Audio: t(x) = 1 − tA(1 − x), 90 % at mid-rotation.
	ReverseAudio
)

const audioBase = 81.0

// ParseTaper reads a taper name as written in a chain file.
func ParseTaper(s string) (Taper, error) {
	switch s {
	case "", "linear", "lin":
		return Linear, nil
	case "audio", "log":
		return Audio, nil
	case "reverse-audio", "reverse-log":
		return ReverseAudio, nil
	}
	switch strings.ToUpper(strings.TrimSpace(s)) {
	case "A", "B", "C":
		// The letter codes on pot bodies differ by maker and era (common
		// practice: A audio, B linear, C reverse-audio on most pots made
		// today; A linear on many older European ones): a letter alone
		// cannot say which.
		return 0, fmt.Errorf("taper %q is a marking that means different curves on different makers' pots (on most pots sold today A is audio, B linear, C reverse-audio; on older European ones A is linear): write linear, audio or reverse-audio", s)
	}
	return 0, fmt.Errorf("taper %q is not one of linear, audio, reverse-audio", s)
}

func (t Taper) String() string {
	switch t {
	case Audio:
		return "audio"
	case ReverseAudio:
		return "reverse-audio"
	}
	return "linear"
}

// Fraction returns t(x) for a rotation x in [0, 1].
func (t Taper) Fraction(x float64) float64 {
	x = math.Min(1, math.Max(0, x))
	switch t {
	case Audio:
		return (math.Pow(audioBase, x) - 1) / (audioBase - 1)
	case ReverseAudio:
		return 1 - (math.Pow(audioBase, 1-x)-1)/(audioBase-1)
	}
	return x
}

// PotEndResistance is the least resistance either section of a pot or
// trimmer takes at an end stop. Carbon and cermet tracks measure a few ohms
// there (from memory); it also keeps every section a proper resistor for
// the solvers.
const PotEndResistance = 1.0

// PotSections returns the ccw–wiper and wiper–cw resistances of a pot of
// track resistance r at rotation x.
func PotSections(r float64, t Taper, x float64) (lower, upper float64) {
	f := t.Fraction(x)
	return math.Max(r*f, PotEndResistance), math.Max(r*(1-f), PotEndResistance)
}
