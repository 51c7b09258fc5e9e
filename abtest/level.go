package abtest

import (
	"math"
	"strconv"
)

// DB is a level or ratio in decibels (or LUFS, LU, dBTP, hertz for the
// centroid) that marshals a non-finite value as JSON null: JSON has no
// infinities, and −∞ is what silence measures.
type DB float64

// MarshalJSON implements json.Marshaler: null for ±Inf and NaN, otherwise
// the value rounded to six decimals.
func (d DB) MarshalJSON() ([]byte, error) {
	v := float64(d)
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, math.Round(v*1e6)/1e6, 'f', -1, 64), nil
}

// finite reports whether v is neither infinite nor NaN.
func finite(v float64) bool { return !math.IsInf(v, 0) && !math.IsNaN(v) }

// dbOf returns 20·log10(a), −∞ for a ≤ 0.
func dbOf(a float64) float64 {
	if a <= 0 {
		return math.Inf(-1)
	}
	return 20 * math.Log10(a)
}

// fromDB returns the amplitude ratio 10^(g/20).
func fromDB(g float64) float64 { return math.Pow(10, g/20) }
