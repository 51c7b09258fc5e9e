package models_test

import (
	"math"
	"strings"
	"testing"
)

// Exact SI defining constants (BIPM SI Brochure, 9th ed., 2019, table 1),
// written out here rather than taken from the package under test.
const (
	siBoltzmann = 1.380649e-23    // J/K
	siCharge    = 1.602176634e-19 // C
	tnom        = 298.15          // K, 25 °C
	eps         = 2.220446049250313e-16
)

// vtRef is k·T/q from the constants above.
func vtRef(t float64) float64 { return siBoltzmann * t / siCharge }

func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

// centralDiff returns (f(x+h) − f(x−h))/(2h) with the step rounded so that
// x±h are exactly representable offsets (the usual trick: h = (x+h) − x).
func centralDiff(f func(float64) float64, x, h float64) float64 {
	xp := x + h
	h = xp - x
	return (f(x+h) - f(x-h)) / (2 * h)
}

// bisect finds x in [lo, hi] with f(x) = 0 for an f that changes sign there,
// to the resolution of float64 (at most 200 halvings).
func bisect(f func(float64) float64, lo, hi float64) float64 {
	flo := f(lo)
	for k := 0; k < 200; k++ {
		mid := 0.5 * (lo + hi)
		if mid == lo || mid == hi {
			break
		}
		fm := f(mid)
		if (fm < 0) == (flo < 0) {
			lo, flo = mid, fm
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

// oneLine fails the test if an error message spans lines (house rule: one
// line naming what and where).
func oneLine(t *testing.T, err error) {
	t.Helper()
	if err == nil {
		return
	}
	if strings.ContainsAny(err.Error(), "\n\r") {
		t.Errorf("error message spans lines: %q", err.Error())
	}
}

// mustNotPanic runs f and reports a panic as a test failure value.
func mustNotPanic(f func()) (panicked any) {
	defer func() { panicked = recover() }()
	f()
	return nil
}
