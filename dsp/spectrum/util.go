package spectrum

import (
	"math"

	"gonum.org/v1/gonum/floats"
)

// DB returns 20·log10(ratio), the level in decibels of an amplitude
// ratio (peak or RMS). DB(0) is -Inf.
func DB(ratio float64) float64 { return 20 * math.Log10(ratio) }

// RMS returns the root-mean-square value of x, sqrt(Σx²/len(x)), using
// gonum's overflow-safe Euclidean norm. RMS of an empty slice is 0.
func RMS(x []float64) float64 {
	if len(x) == 0 {
		return 0
	}
	return floats.Norm(x, 2) / math.Sqrt(float64(len(x)))
}
