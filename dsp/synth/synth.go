package synth

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
)

// Strings is the number of strings on the modelled instrument.
const Strings = 6

// MaxFret is the highest fret Render and StringFrequency accept.
const MaxFret = 24

// Default option values, used where the corresponding Options field is zero.
const (
	DefaultSampleRate   = 48000.0 // Hz
	DefaultPickPosition = 0.15    // fraction of the string length from the bridge
	DefaultSustain      = 8.0     // s, T60 of the open low string's fundamental
	DefaultStretch      = 0.5     // loss-filter weight S (Jaffe & Smith)
	DefaultDampTime     = 0.05    // s
	DefaultPeak         = 0.9     // linear full scale
)

// Limits enforced on inputs.
const (
	MinSampleRate = 8000.0   // Hz
	MaxSampleRate = 768000.0 // Hz
	MaxDuration   = 1800.0   // s
	maxSamples    = 1 << 27  // hard cap on the output length (1 GiB of float64)
)

// openMIDI holds the MIDI note numbers of the open strings in standard
// tuning E2 A2 D3 G3 B3 E4 (common practice), lowest string first.
var openMIDI = [Strings]int{40, 45, 50, 55, 59, 64}

// StringFrequency returns the fundamental frequency in hertz of string s
// (0 = lowest, 5 = highest) stopped at fret (0 = open) in standard tuning,
// twelve-tone equal temperament with A4 = 440 Hz:
// f = 440·2^((m−69)/12) with m the MIDI note number.
// It returns NaN when s is outside 0..5 or fret outside 0..MaxFret.
func StringFrequency(s, fret int) float64 {
	if s < 0 || s >= Strings || fret < 0 || fret > MaxFret {
		return math.NaN()
	}
	m := openMIDI[s] + fret
	return 440 * math.Exp2(float64(m-69)/12)
}

// Note is one pluck of one string.
type Note struct {
	Start    float64 // onset time in seconds from the start of the render, ≥ 0
	String   int     // 0 (low E2) … 5 (high E4)
	Fret     int     // 0 (open) … MaxFret
	Velocity float64 // pluck strength 0..1; 0 damps the string without plucking it
}

// Options configures Render. A zero field selects its default.
type Options struct {
	// SampleRate in Hz, MinSampleRate..MaxSampleRate; 0 means DefaultSampleRate.
	SampleRate float64
	// Seed selects the pluck noise; equal seeds give identical output.
	Seed int64
	// PickPosition is where the string is plucked, as a fraction β of its
	// vibrating length measured from the bridge, 0 < β < 1; 0 means
	// DefaultPickPosition. Harmonics that are multiples of 1/β are absent.
	PickPosition float64
	// PickupPosition is where the string is sensed, as a fraction γ of its
	// vibrating length from the bridge, 0 < γ < 1. 0 means no pickup comb:
	// the output is the string's loop signal itself.
	PickupPosition float64
	// Sustain is the 60 dB decay time in seconds of the fundamental of the
	// open low string (E2), 0.1..60; 0 means DefaultSustain. It fixes the
	// per-period loss factor ρ, shared by all notes, so higher notes decay
	// faster as the closed form in doc.go describes.
	Sustain float64
	// Stretch is the loss-filter weight S of Hd(z) = (1−S) + S·z⁻¹,
	// 0 < S < 1; 0 means DefaultStretch (0.5, the shortest decay of the
	// upper harmonics). Values nearer 0 or 1 let upper harmonics ring longer.
	Stretch float64
	// DampTime is how long, in seconds, a string takes to fall silent when it
	// is re-plucked or damped: at least 60 dB within DampTime, after which the
	// old vibration is dropped. 0.001..1; 0 means DefaultDampTime.
	DampTime float64
	// Peak is the absolute peak of the returned signal, 0 < Peak ≤ 1;
	// 0 means DefaultPeak.
	Peak float64
}

// ParamError reports an invalid argument: which parameter, its value, and why.
type ParamError struct {
	Param  string  // e.g. "duration", "Options.SampleRate", "notes[3].Fret"
	Value  float64 // the offending value
	Reason string  // what was expected
}

func (e *ParamError) Error() string {
	return fmt.Sprintf("synth: %s = %g: %s", e.Param, e.Value, e.Reason)
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// params holds validated options with defaults applied.
type params struct {
	fs, pick, pickup, stretch, dampTime, peak float64
	rho                                       float64 // per-period loss factor
	seed                                      int64
}

func (o Options) resolve() (params, error) {
	p := params{
		fs: o.SampleRate, pick: o.PickPosition, pickup: o.PickupPosition,
		stretch: o.Stretch, dampTime: o.DampTime, peak: o.Peak, seed: o.Seed,
	}
	sustain := o.Sustain
	def := func(x *float64, d float64) {
		if *x == 0 {
			*x = d
		}
	}
	def(&p.fs, DefaultSampleRate)
	def(&p.pick, DefaultPickPosition)
	def(&sustain, DefaultSustain)
	def(&p.stretch, DefaultStretch)
	def(&p.dampTime, DefaultDampTime)
	def(&p.peak, DefaultPeak)
	checks := []struct {
		name           string
		v, lo, hi      float64
		openLo, openHi bool
	}{
		{"Options.SampleRate", p.fs, MinSampleRate, MaxSampleRate, false, false},
		{"Options.PickPosition", p.pick, 0, 1, true, true},
		{"Options.PickupPosition", p.pickup, 0, 1, false, true},
		{"Options.Sustain", sustain, 0.1, 60, false, false},
		{"Options.Stretch", p.stretch, 0, 1, true, true},
		{"Options.DampTime", p.dampTime, 0.001, 1, false, false},
		{"Options.Peak", p.peak, 0, 1, true, false},
	}
	for _, c := range checks {
		bad := !finite(c.v) || c.v < c.lo || c.v > c.hi ||
			(c.openLo && c.v == c.lo) || (c.openHi && c.v == c.hi)
		if bad {
			l, r := "[", "]"
			if c.openLo {
				l = "("
			}
			if c.openHi {
				r = ")"
			}
			return p, &ParamError{c.name, c.v, fmt.Sprintf("want a value in %s%g, %g%s", l, c.lo, c.hi, r)}
		}
	}
	// ρ such that the open low string's fundamental has T60 = sustain:
	// f0·(−ln ρ − ln|Hd(ω0)|) = 3·ln 10 / sustain.
	f0 := StringFrequency(0, 0)
	w0 := 2 * math.Pi * f0 / p.fs
	lnRho := -3*math.Ln10/(sustain*f0) - math.Log(lossGain(p.stretch, w0))
	p.rho = math.Exp(math.Min(lnRho, 0))
	return p, nil
}

// lossGain is |Hd(e^{jω})| for Hd(z) = (1−S) + S·z⁻¹.
func lossGain(s, w float64) float64 {
	return math.Sqrt(1 - 2*s*(1-s)*(1-math.Cos(w)))
}

// lossPhaseDelay is the phase delay in samples of Hd at ω (0 < ω < π).
func lossPhaseDelay(s, w float64) float64 {
	return math.Atan2(s*math.Sin(w), 1-s+s*math.Cos(w)) / w
}

// Render synthesises notes into a mono signal of duration seconds
// (round(duration·SampleRate) samples). Notes starting at or after the end
// are ignored. Each string sounds one note at a time: a later note on the
// same string, or a Velocity-0 note, damps the earlier one over DampTime.
// The result is scaled so its absolute peak is exactly Peak (default 0.9),
// hence every value lies in [−Peak, Peak] ⊂ [−1, 1]; a render in which no
// note sounds is all zeros.
func Render(notes []Note, duration float64, opt Options) ([]float64, error) {
	p, err := opt.resolve()
	if err != nil {
		return nil, err
	}
	if !finite(duration) || duration <= 0 || duration > MaxDuration {
		return nil, &ParamError{"duration", duration, fmt.Sprintf("want seconds in (0, %g]", MaxDuration)}
	}
	total := int(math.Round(duration * p.fs))
	if total > maxSamples {
		return nil, &ParamError{"duration", duration, fmt.Sprintf("more than %d samples at %g Hz", maxSamples, p.fs)}
	}
	for i, n := range notes {
		where := func(f string) string { return fmt.Sprintf("notes[%d].%s", i, f) }
		switch {
		case !finite(n.Start) || n.Start < 0:
			return nil, &ParamError{where("Start"), n.Start, "want finite seconds ≥ 0"}
		case n.String < 0 || n.String >= Strings:
			return nil, &ParamError{where("String"), float64(n.String), "want 0..5"}
		case n.Fret < 0 || n.Fret > MaxFret:
			return nil, &ParamError{where("Fret"), float64(n.Fret), fmt.Sprintf("want 0..%d", MaxFret)}
		case !finite(n.Velocity) || n.Velocity < 0 || n.Velocity > 1:
			return nil, &ParamError{where("Velocity"), n.Velocity, "want 0..1"}
		}
	}

	// Order by onset (ties by input order) so string ownership and pick
	// direction follow time.
	order := make([]int, len(notes))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return notes[order[a]].Start < notes[order[b]].Start })
	starts := make([]int, len(notes))
	for i, n := range notes {
		starts[i] = total // at or past the end: silent (and no int overflow)
		if n.Start < duration {
			starts[i] = min(total, int(math.Round(n.Start*p.fs)))
		}
	}
	up := pickDirections(notes, order)

	// A note's vibration lasts until the next note on its string starts
	// (then it is damped) or the render ends.
	dampAt := make([]int, len(notes))
	last := [Strings]int{-1, -1, -1, -1, -1, -1}
	for _, i := range order {
		dampAt[i] = -1
		s := notes[i].String
		if j := last[s]; j >= 0 {
			dampAt[j] = starts[i]
		}
		last[s] = i
	}

	out := make([]float64, total)
	dampLen := int(math.Ceil(p.dampTime * p.fs))
	for k, i := range order {
		n := notes[i]
		if n.Velocity == 0 || starts[i] >= total {
			continue
		}
		rng := rand.New(rand.NewPCG(uint64(p.seed), uint64(k)+0x9e3779b97f4a7c15))
		v := newVoice(&p, StringFrequency(n.String, n.Fret), n.Velocity, up[i], rng)
		end := total
		if dampAt[i] >= 0 {
			end = min(total, dampAt[i]+dampLen)
		}
		v.render(out[starts[i]:end], dampAt[i]-starts[i], dampLen)
	}

	peak := 0.0
	for _, x := range out {
		peak = math.Max(peak, math.Abs(x))
	}
	if peak > 0 {
		g := p.peak / peak
		for i := range out {
			out[i] *= g
		}
	}
	return out, nil
}

// strokeGap is the longest onset spacing, in seconds, between successive
// plucks of one stroke (a strum).
const strokeGap = 0.05

// pickDirections decides, for each note, whether it was picked upwards
// (from the high string towards the low one). Notes whose onsets follow one
// another within strokeGap form a stroke. A stroke over several strings takes
// the direction its string order shows (rising string index = downstroke);
// a single-note stroke reverses the previous stroke's direction (alternate
// picking); the first stroke is a downstroke.
func pickDirections(notes []Note, order []int) []bool {
	up := make([]bool, len(notes))
	prevUp := true // so the first single note is a downstroke
	var group []int
	flush := func() {
		if len(group) == 0 {
			return
		}
		first, lastS := notes[group[0]].String, notes[group[len(group)-1]].String
		d := !prevUp
		if first != lastS {
			d = first > lastS
		}
		for _, i := range group {
			up[i] = d
		}
		prevUp = d
		group = group[:0]
	}
	prev := math.Inf(-1)
	for _, i := range order {
		n := notes[i]
		if n.Velocity == 0 {
			continue
		}
		if n.Start-prev > strokeGap {
			flush()
		}
		group = append(group, i)
		prev = n.Start
	}
	flush()
	return up
}
