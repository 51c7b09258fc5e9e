package eseries

import (
	"math"
)

// Series is one preferred-number series: its values in a decade and the
// tolerance IEC 60063 associates with it.
type Series struct {
	Name string
	// Tolerance is the associated tolerance as a fraction (0.10 for E12);
	// 0 for E3, which the standard lists for tolerances wider than ±20 %.
	Tolerance float64
	tenths    []int // decade values ×10, ascending, 10 … 91
}

// The series of IEC 60063, table 1.
var (
	E3  = &Series{Name: "E3", Tolerance: 0, tenths: []int{10, 22, 47}}
	E6  = &Series{Name: "E6", Tolerance: 0.20, tenths: []int{10, 15, 22, 33, 47, 68}}
	E12 = &Series{Name: "E12", Tolerance: 0.10, tenths: []int{10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82}}
	E24 = &Series{Name: "E24", Tolerance: 0.05, tenths: []int{
		10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30,
		33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91}}
)

// All lists the series from the coarsest to the finest.
var All = []*Series{E3, E6, E12, E24}

// ByName returns the series of the given name ("E12"), or nil.
func ByName(name string) *Series {
	for _, s := range All {
		if s.Name == name {
			return s
		}
	}
	return nil
}

// Len returns the number of values per decade.
func (s *Series) Len() int { return len(s.tenths) }

// Values returns the series' values in the decade [1, 10): 1.0, 1.2, … .
func (s *Series) Values() []float64 {
	out := make([]float64, len(s.tenths))
	for i, t := range s.tenths {
		out[i] = scaled(t, 0)
	}
	return out
}

// RelativeMatch is how close, as a fraction, a value must be to a series
// value for Contains to accept it: far finer than any tolerance, coarse
// enough to absorb values parsed from text.
const RelativeMatch = 5e-4

// scaled returns t/10 · 10^e as the float64 nearest to that decimal: t and
// the power of ten are exact, so one correctly rounded operation suffices.
func scaled(t, e int) float64 {
	k := e - 1
	switch {
	case k >= 0 && k <= 22:
		return float64(t) * math.Pow10(k)
	case k < 0 && k >= -22:
		return float64(t) / math.Pow10(-k)
	}
	return float64(t) * math.Pow10(k)
}

// decade returns e with 10^e ≤ v < 10^(e+1) for v > 0, robust to the
// rounding of math.Log10 at decade boundaries.
func decade(v float64) int {
	e := int(math.Floor(math.Log10(v)))
	if scaled(10, e) > v {
		e--
	} else if scaled(10, e+1) <= v {
		e++
	}
	return e
}

func valid(v float64) bool { return v > 0 && !math.IsInf(v, 0) && !math.IsNaN(v) }

// Bracket returns the largest series value ≤ v and the smallest ≥ v (both
// v itself when v is a series value). It returns NaNs for v ≤ 0 or not
// finite.
func (s *Series) Bracket(v float64) (below, above float64) {
	if !valid(v) {
		return math.NaN(), math.NaN()
	}
	e := decade(v)
	below = scaled(s.tenths[len(s.tenths)-1], e-1)
	above = scaled(s.tenths[0], e+1)
	for _, t := range s.tenths {
		x := scaled(t, e)
		if x <= v {
			below = x
		}
		if x >= v && x < above {
			above = x
		}
	}
	return below, above
}

// Nearest returns the series value closest to v on a logarithmic scale
// (on a tie, the lower). It returns NaN for v ≤ 0 or not finite.
func (s *Series) Nearest(v float64) float64 {
	lo, hi := s.Bracket(v)
	if math.IsNaN(lo) {
		return lo
	}
	if hi/v < v/lo {
		return hi
	}
	return lo
}

// Contains reports whether v is a series value to within RelativeMatch.
func (s *Series) Contains(v float64) bool {
	if !valid(v) {
		return false
	}
	n := s.Nearest(v)
	return math.Abs(v/n-1) <= RelativeMatch
}

// Classify returns the coarsest series that holds v (E3 for 4.7 k, E24 for
// 5.1 k), or nil when v is on none of them.
func Classify(v float64) *Series {
	for _, s := range All {
		if s.Contains(v) {
			return s
		}
	}
	return nil
}
