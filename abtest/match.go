package abtest

import (
	"math"
	"sort"
)

// Defaults of the loudness match.
const (
	DefaultTargetLUFS  = -18.0 // LUFS
	DefaultCeilingDBTP = -1.0  // dBTP
	// CeilingMargin is how far below the ceiling, in dB, the loudest true
	// peak is placed when the ceiling decides the common loudness. It
	// absorbs the rounding of 16- or 24-bit output (a 24-bit step moves a
	// −1 dBTP peak by about 2e-6 dB), so that clips re-measured from their
	// files stay at or under the ceiling.
	CeilingMargin = 0.001
)

// Measured is the loudness and true peak of a clip before any gain.
type Measured struct {
	LUFS         float64 // integrated loudness, BS.1770-4
	TruePeakDBTP float64 // BS.1770-4 Annex 2
}

// Match returns the common integrated loudness every clip is brought to and
// the gain in dB for each clip. A clip of loudness L and true peak P takes
// gain g = common − L and ends with true peak P + g, which must stay at or
// under the ceiling; so every clip can reach at most ceiling − (P − L), and
//
//	common = min(target, min_i(ceiling − CeilingMargin − (P_i − L_i)))
//
// limited reports whether the ceiling, not the target, decided it. Gain is
// the only change: no limiting, no clipping. Every Measured value must be
// finite (a silent clip has no loudness to match).
func Match(m []Measured, targetLUFS, ceilingDBTP float64) (common float64, gains []float64, limited bool) {
	common = targetLUFS
	for _, c := range m {
		if reach := ceilingDBTP - CeilingMargin - (c.TruePeakDBTP - c.LUFS); reach < common {
			common, limited = reach, true
		}
	}
	gains = make([]float64, len(m))
	for i, c := range m {
		gains[i] = common - c.LUFS
	}
	return common, gains, limited
}

// QuieterLimitDB is how much more gain than the other clips a variant may
// need before the set flags it "much quieter than the others: check it".
// Knob and part changes move a fuzz's output by a few dB; 12 dB more gain
// means the circuit gave out about a quarter of the others' level (and,
// at about 10 dB per halving of loudness, less than half as loud; common
// practice, from memory): a dead build, a trimmer at an end, a transistor
// in the wrong way round — or a volume knob turned down on purpose, which
// is why it is a flag to check, not an error.
const QuieterLimitDB = 12.0

// MuchQuieter is the flag of a clip whose match needs more than
// QuieterLimitDB of gain over the others.
const MuchQuieter = "much quieter than the others: check it"

// GainOverOthers returns, for each clip, its gain minus the median gain of
// the clips it is compared with: every other variant, or, for the only
// variant of a set, the bypass (a fuzz is normally louder than its dry
// take, so the bypass is left out while there are other variants). It is
// NaN for the bypass, and for a clip with nothing to compare with. The
// median of an even count is the mean of the two middle values.
func GainOverOthers(gains []float64, bypass []bool) []float64 {
	out := make([]float64, len(gains))
	variants := 0
	for _, b := range bypass {
		if !b {
			variants++
		}
	}
	for i := range gains {
		out[i] = math.NaN()
		if bypass[i] {
			continue
		}
		var ref []float64
		for k := range gains {
			if k != i && (variants == 1 || !bypass[k]) {
				ref = append(ref, gains[k])
			}
		}
		if len(ref) > 0 {
			out[i] = gains[i] - median(ref)
		}
	}
	return out
}

// median returns the median of x (reordered).
func median(x []float64) float64 {
	sort.Float64s(x)
	n := len(x)
	if n%2 == 1 {
		return x[n/2]
	}
	return (x[n/2-1] + x[n/2]) / 2
}
