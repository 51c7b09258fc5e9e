package engine

import (
	"context"
	"fmt"
	"math"

	"renderchain/dsp/resample"
	"renderchain/dsp/spectrum"
	"renderchain/models"
)

// minAliasCycles is the fewest cycles of a tone's coherent unit for which
// its folded lines fall between its harmonics: a line folded from
// harmonic h about r times the internal rate F·fs lands on bin
// h·m − r·F·N of a record of m cycles in N samples (m and N coprime),
// which is a harmonic's bin only when m divides r·F. With m above
// 2·resample.MaxFactor that needs r ≥ m/gcd(m, F), a fold from near m
// times the internal rate, where a circuit's harmonics are long gone.
const minAliasCycles = 2*resample.MaxFactor + 1

// aliasRecordCycles is the fewest cycles of a moved tone's record: with
// that many the nearest usable m is within about 1 % of the tone asked.
const aliasRecordCycles = 100

// AliasTone returns the frequency at which to measure the aliasing of a
// sine near f Hz at base rate fs (below fs/2), the shortest record for it
// in seconds, and, when it is not f, why. f is kept when its coherent unit
// at fs (RecordGeometry) holds at least minAliasCycles cycles in at most a
// second. Otherwise (f a simple fraction of the rate, as 1 kHz is 1/48 of
// 48 kHz, whose folded lines all land on its own harmonics and would count
// as signal; or f with no coherent unit within a second) the tone moves to
// the nearest m·fs/N with N samples a whole number of tenths of a second,
// long enough for aliasRecordCycles cycles, and m prime to N (and at
// least minAliasCycles).
func AliasTone(fs, f float64) (tone, record float64, moved string) {
	_, coherent, unitN, unitM := RecordGeometry(fs, f, 1)
	if coherent && unitM >= minAliasCycles && float64(unitN) <= fs {
		return f, math.Max(DefaultMinRecord, float64(unitN)/fs), ""
	}
	t := math.Max(0.1, math.Ceil(10*aliasRecordCycles/f)/10)
	n := int(math.Round(fs * t))
	m0 := int(math.Round(f * float64(n) / fs))
	m := m0
	for d := 0; ; d++ {
		if c := m0 + d; c >= minAliasCycles && 2*c < n && gcd(c, n) == 1 {
			m = c
			break
		}
		if c := m0 - d; d > 0 && c >= minAliasCycles && gcd(c, n) == 1 {
			m = c
			break
		}
	}
	tone = float64(m) * fs / float64(n)
	why := fmt.Sprintf("%s has no coherent record within a second at %s", formatHz(f), formatHz(fs))
	if coherent {
		cycles := "cycles"
		if unitM == 1 {
			cycles = "cycle"
		}
		why = fmt.Sprintf("%s makes %d %s in %d samples at %s, so its folded lines would land on its own harmonics and count as signal",
			formatHz(f), unitM, cycles, unitN, formatHz(fs))
	}
	return tone, t, why + "; measured at " + models.FormatValue(roundSignificant(tone, 6), "Hz") + " instead"
}

// AliasRatio runs the test sine of opt (Sine; opt.Oversample picks the
// factor) and returns the signal-to-alias ratio of its settled, coherent
// record (spectrum.SignalToAlias) with the record. The frequency should
// come from AliasTone: at another one folded lines can hide on the
// harmonics. A record that is not coherent is an error.
func (p *Prepared) AliasRatio(ctx context.Context, opt SineOptions) (*spectrum.AliasRatio, *SineRecord, error) {
	rec, err := p.Sine(ctx, opt)
	if err != nil {
		return nil, nil, err
	}
	if !rec.Coherent {
		return nil, rec, fmt.Errorf("no coherent record of %s at %s: the signal-to-alias ratio needs one", formatHz(opt.Freq), formatHz(opt.SampleRate))
	}
	a, err := spectrum.SignalToAlias(rec.Samples, opt.SampleRate, rec.Sine.Frequency())
	if err != nil {
		return nil, rec, err
	}
	return a, rec, nil
}
