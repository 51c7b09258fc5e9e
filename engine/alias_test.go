package engine

import (
	"math"
	"testing"

	"renderchain/dsp/spectrum"
)

// AliasTone keeps a tone whose folded lines fall between its harmonics
// and moves one whose lines would land on them. The check is a
// synthesized record with a known folded line: the tone at amplitude 1
// and, at 1e-3, a harmonic as a 4× render at 48 kHz folds it: order
// h = round(192000/f) − 2, whose line at h·f lies about two tones under
// the internal rate and folds to |h·f − 192000|, in band. Its
// signal-to-alias ratio is then 20·log10(1/1e-3) = 60 dB exactly
// (Parseval; the line sits on a bin of the coherent record), to 1e-9 dB
// (rounding of the DFT). At 1 kHz, 1/48 of the rate, the same folded line
// lands on the second harmonic and only rounding is left off the lines
// (over 200 dB): why the tone moves.
func TestAliasTone(t *testing.T) {
	const fs = 48000.0
	for _, tc := range []struct {
		f    float64
		kept bool
	}{{1319, true}, {1310, true}, {1000, false}, {330, false}, {82.41, false}, {440, false}, {3001, true}} {
		tone, record, moved := AliasTone(fs, tc.f)
		if (moved == "") != tc.kept || (tc.kept && tone != tc.f) {
			t.Errorf("%g Hz: tone %g, moved %q", tc.f, tone, moved)
			continue
		}
		if math.Abs(tone-tc.f) > 0.012*tc.f {
			t.Errorf("%g Hz moved to %g Hz, over 1.2 %%", tc.f, tone)
		}
		n := int(math.Round(record * fs))
		_, coherent, unitN, unitM := RecordGeometry(fs, tone, n)
		if !coherent || unitM < minAliasCycles || n%unitN != 0 {
			t.Errorf("%g Hz → %g Hz: record %d samples, unit %d samples of %d cycles", tc.f, tone, n, unitN, unitM)
			continue
		}
		a := foldedRatio(t, fs, tone, n)
		if math.Abs(a-60) > 1e-9 {
			t.Errorf("%g Hz → %g Hz: a folded line 60 dB down reads %.12g dB", tc.f, tone, a)
		}
	}
	if a := foldedRatio(t, fs, 1000, 4800); !(a > 200) {
		t.Errorf("at 1 kHz the folded line should land on a harmonic, yet the ratio reads %g dB", a)
	}
}

// foldedRatio is the signal-to-alias ratio of a unit sine at f plus a
// 1e-3 line where a 4× render at fs folds harmonic round(4·fs/f) − 2.
func foldedRatio(t *testing.T, fs, f float64, n int) float64 {
	t.Helper()
	h := math.Round(4*fs/f) - 2
	g := math.Abs(h*f - 4*fs)
	x := make([]float64, n)
	for i := range x {
		x[i] = math.Sin(2*math.Pi*f*float64(i)/fs) + 1e-3*math.Sin(2*math.Pi*g*float64(i)/fs+0.3)
	}
	a, err := spectrum.SignalToAlias(x, fs, f)
	if err != nil {
		t.Fatal(err)
	}
	return a.DB
}
