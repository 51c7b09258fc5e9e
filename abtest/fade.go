package abtest

import (
	"fmt"
	"math"
)

// FadeGain returns the gain of frame j (0 ≤ j < frames) of one half of an
// equal-power crossfade of the given length: sin θ for the clip fading in
// and cos θ for the clip fading out, θ = (π/2)·(j + ½)/frames. At every j
// the two gains satisfy sin²θ + cos²θ = 1, so two uncorrelated signals keep
// their summed power through the fade; the curves are mirror images,
// in(j) = out(frames−1−j), and neither reaches exactly 0 or 1 inside the fade.
func FadeGain(j, frames int64, out bool) float64 {
	s, c := math.Sincos(math.Pi / 2 * (float64(j) + 0.5) / float64(frames))
	if out {
		return c
	}
	return s
}

// Fade applies one half of an equal-power crossfade (see FadeGain) to an
// interleaved stream: frame j of the stream is multiplied by FadeGain(j,
// Frames, Out) for j < Frames and by the curve's end value (1 fading in,
// 0 fading out) after that. The zero value is not usable; use NewFade.
type Fade struct {
	frames   int64
	channels int
	out      bool
	pos      int64 // frames processed
}

// NewFade returns a fade of the given length in frames (≥ 1) for a stream of
// channels interleaved channels (1…8).
func NewFade(frames int64, channels int, out bool) (*Fade, error) {
	if frames < 1 {
		return nil, paramErr("fade_length", fmt.Sprint(frames), "at least 1 frame")
	}
	if channels < 1 || channels > 8 {
		return nil, paramErr("fade_channels", fmt.Sprint(channels), "1…8")
	}
	return &Fade{frames: frames, channels: channels, out: out}, nil
}

// Process writes the faded src into dst (len(dst) ≥ len(src); src holds
// whole frames; dst and src may be the same slice) and advances the fade.
// It does not allocate.
func (f *Fade) Process(dst, src []float64) {
	nc := f.channels
	for i := 0; i+nc <= len(src); i += nc {
		var g float64
		switch {
		case f.pos < f.frames:
			g = FadeGain(f.pos, f.frames, f.out)
		case f.out:
			g = 0
		default:
			g = 1
		}
		for c := 0; c < nc; c++ {
			dst[i+c] = g * src[i+c]
		}
		f.pos++
	}
}

// Reset restarts the fade at frame 0.
func (f *Fade) Reset() { f.pos = 0 }

// Gain multiplies a stream by a fixed factor; for PCM output it also rounds
// every sample to the output's step, so that what it returns is what the
// file will hold (and meters measure the file, not an ideal).
type Gain struct {
	// Factor is the linear gain, 10^(dB/20).
	Factor float64
	// Bits is the PCM word length (16, 24, 32) to round to, 0 for none, or
	// -32 for float32 rounding.
	Bits int
}

// Process writes Factor·src, rounded, into dst (len(dst) ≥ len(src); the
// slices may be the same). Rounding matches wavio.Writer: round half away
// from zero to a multiple of 2^-(Bits-1), clamped to the PCM code range.
// It does not allocate.
func (g Gain) Process(dst, src []float64) {
	switch {
	case g.Bits > 0:
		s := math.Ldexp(1, g.Bits-1)
		lo, hi := -s, s-1
		for i, v := range src {
			q := math.Round(g.Factor * v * s)
			if q > hi {
				q = hi
			} else if q < lo {
				q = lo
			}
			dst[i] = q / s
		}
	case g.Bits == -32:
		for i, v := range src {
			dst[i] = float64(float32(g.Factor * v))
		}
	default:
		for i, v := range src {
			dst[i] = g.Factor * v
		}
	}
}
