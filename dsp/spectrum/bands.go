package spectrum

import "math"

// Band numbers x of the one-third-octave bands returned by
// ThirdOctaveCentres and LTAS.Bands: band x has exact midband frequency
// 1000·G^(x/3) Hz with G = 10^(3/10), so x = 0 is the 1 kHz band.
const (
	FirstBand = -16 // nominal 25 Hz
	LastBand  = 13  // nominal 20 kHz
)

// octaveRatio is the base-10 octave frequency ratio G = 10^(3/10) of
// IEC 61260-1.
var octaveRatio = math.Pow(10, 0.3)

// nominalThirdOctave holds the IEC 61260-1 nominal midband frequencies of
// bands FirstBand..LastBand, in Hz.
var nominalThirdOctave = [LastBand - FirstBand + 1]float64{
	25, 31.5, 40, 50, 63, 80, 100, 125, 160, 200,
	250, 315, 400, 500, 630, 800, 1000, 1250, 1600, 2000,
	2500, 3150, 4000, 5000, 6300, 8000, 10000, 12500, 16000, 20000,
}

// ThirdOctaveCentres returns the nominal midband frequencies, in Hz, of
// the one-third-octave bands 25 Hz … 20 kHz as tabulated in IEC 61260-1.
// Nominal values are labels; computations use MidbandFrequency.
func ThirdOctaveCentres() []float64 {
	out := make([]float64, len(nominalThirdOctave))
	copy(out, nominalThirdOctave[:])
	return out
}

// MidbandFrequency returns the exact base-10 midband frequency of
// one-third-octave band x, fm = 1000·G^(x/3) Hz with G = 10^(3/10)
// (IEC 61260-1, odd bandwidth designator b = 3).
func MidbandFrequency(x int) float64 {
	return 1000 * math.Pow(octaveRatio, float64(x)/3)
}

// BandEdges returns the lower and upper band-edge frequencies of
// one-third-octave band x, fm·G^(−1/6) and fm·G^(1/6) in Hz
// (IEC 61260-1). Adjacent bands share their edges.
func BandEdges(x int) (lower, upper float64) {
	// fm·G^(±1/6) = 1000·G^((2x±1)/6): computed from the edge index so
	// that band x's upper edge equals band x+1's lower edge exactly.
	return 1000 * math.Pow(octaveRatio, float64(2*x-1)/6),
		1000 * math.Pow(octaveRatio, float64(2*x+1)/6)
}
