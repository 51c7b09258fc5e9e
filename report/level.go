package report

import (
	"bytes"
	"encoding/json"
	"math"
	"strconv"
)

// Level is a ratio in decibels (dBFS, dBV, dBc, LUFS, LU, dBTP, dB of
// gain). It marshals to JSON like a Number: exactly, and a level that
// does not exist (−∞ for silence, NaN) as null.
type Level float64

// Number is a plain value (volts, amperes, seconds, a ratio) that
// marshals to JSON exactly, and as null when it is NaN or infinite.
type Number float64

var null = []byte("null")

// Finite reports whether v is neither NaN nor infinite.
func Finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// MarshalJSON implements json.Marshaler: null when not finite, else the
// shortest decimal that reads back to the same float64.
func (l Level) MarshalJSON() ([]byte, error) { return Number(l).MarshalJSON() }

// UnmarshalJSON implements json.Unmarshaler: null reads as NaN.
func (l *Level) UnmarshalJSON(b []byte) error {
	v, err := unmarshalNumber(b)
	*l = Level(v)
	return err
}

// MarshalJSON implements json.Marshaler: null when not finite, else the
// shortest decimal that reads back to the same float64.
func (n Number) MarshalJSON() ([]byte, error) {
	v := float64(n)
	if !Finite(v) {
		return null, nil
	}
	return strconv.AppendFloat(nil, v, 'g', -1, 64), nil
}

// UnmarshalJSON implements json.Unmarshaler: null reads as NaN.
func (n *Number) UnmarshalJSON(b []byte) error {
	v, err := unmarshalNumber(b)
	*n = Number(v)
	return err
}

func unmarshalNumber(b []byte) (float64, error) {
	if bytes.Equal(bytes.TrimSpace(b), null) {
		return math.NaN(), nil
	}
	var v float64
	err := json.Unmarshal(b, &v)
	return v, err
}

// DB returns the level of an amplitude ratio, 20·log10(r): −∞ for r = 0,
// NaN for a negative or NaN ratio.
func DB(r float64) float64 {
	if r == 0 {
		return math.Inf(-1)
	}
	if !(r > 0) {
		return math.NaN()
	}
	return 20 * math.Log10(r)
}

// PowerDB returns the level of a power ratio, 10·log10(r), with DB's
// rules for 0, negative and NaN ratios.
func PowerDB(r float64) float64 { return DB(r) / 2 }

// FromDB returns the amplitude ratio of a level, 10^(g/20).
func FromDB(g float64) float64 { return math.Pow(10, g/20) }
