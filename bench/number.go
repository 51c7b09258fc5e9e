package bench

import (
	"math"
	"strconv"
)

// Number is a float64 that marshals to JSON as null when it is NaN or
// infinite (JSON has neither).
type Number float64

// MarshalJSON implements json.Marshaler.
func (n Number) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

func nan() float64 { return math.NaN() }
