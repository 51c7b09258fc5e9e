package abtest

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
