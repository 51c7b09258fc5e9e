package spectrum

import (
	"math"
	"strconv"
)

// AliasRatio is the result of SignalToAlias: how the power of a sine's
// response divides between its harmonic lines and everything else.
type AliasRatio struct {
	Cycles int // whole cycles of the fundamental in the record (its bin)
	// Orders is the number of harmonic lines counted: orders 1..Orders, all
	// strictly below the Nyquist frequency.
	Orders int
	// Harmonic is the mean-square power in the harmonic bins, the
	// fundamental's included; Other the mean-square power in every other
	// bin except DC (the Nyquist bin included). Units: the input's, squared.
	Harmonic, Other float64
	// Ratio is Harmonic/Other (+Inf when Other is 0) and DB its level,
	// 10·log10(Ratio).
	Ratio, DB float64
}

// SignalToAlias measures the signal-to-alias ratio of x, the response of
// a nonlinear system to a sine of frequency f0 sampled at sampleRate, over
// a coherent record (a whole number m of cycles, within
// CoherenceTolerance): the power in the harmonic bins h·m (h ≥ 1, h·m below
// N/2) over the power in all other bins except DC.
//
// Why it measures aliasing: a memoryless or dynamic nonlinearity driven by
// a sine produces only harmonics of f0, so in continuous time every bin off
// the harmonic lines would be empty. A system that generates harmonics at
// a finite internal rate folds those above its Nyquist frequency back into
// the band; with a coherent record each folded line lands exactly on a bin,
// in general between the harmonic lines, where this ratio counts it. What
// else lands there (noise, a settling transient, hum) counts as alias too,
// so the record should hold the settled response of a clean sine; a folded
// line that happens to fall on a harmonic bin cannot be told from the
// harmonic and is counted as signal. DC is excluded: it is neither a
// harmonic nor an alias.
//
// The powers come from the one-sided DFT by Parseval's relation, mean
// square = (1/N²)·Σ_k w_k·|X_k|² (w_k = 2 except at DC and Nyquist, 1),
// so Harmonic + Other + DC² equals the mean square of x to rounding.
//
// SignalToAlias returns an *Error for non-finite samples, a sample rate or
// frequency out of range, a record shorter than one cycle, or a record that
// is not coherent (ErrNotCoherent).
func SignalToAlias(x []float64, sampleRate, f0 float64) (*AliasRatio, error) {
	const op = "SignalToAlias"
	if !finitePositive(sampleRate) {
		return nil, argError(op, "sampleRate", ErrInvalid, "want a finite rate > 0 Hz, got "+ftoa(sampleRate))
	}
	nyq := sampleRate / 2
	if !finitePositive(f0) || f0 >= nyq {
		return nil, argError(op, "f0", ErrInvalid, "want 0 < f0 < "+ftoa(nyq)+" Hz, got "+ftoa(f0))
	}
	if i := checkFinite(x); i >= 0 {
		return nil, sampleError(op, x, i)
	}
	n := len(x)
	cycles := f0 * float64(n) / sampleRate
	if cycles < 1 {
		return nil, argError(op, "x", ErrShort, strconv.Itoa(n)+" samples hold "+ftoa(cycles)+" cycles, need ≥ 1")
	}
	whole := math.Round(cycles)
	if math.Abs(cycles-whole) > CoherenceTolerance {
		return nil, argError(op, "x", ErrNotCoherent, "record holds "+ftoa(cycles)+" cycles")
	}
	m := int(whole)
	if 2*m >= n {
		return nil, argError(op, "f0", ErrInvalid, "fundamental "+ftoa(f0)+" Hz falls on the Nyquist bin")
	}
	coef := newRealDFT(n).transform(make([]complex128, n/2+1), x)
	r := &AliasRatio{Cycles: m}
	for k := 1; k < len(coef); k++ {
		c := coef[k]
		p := oneSidedWeight(k, n) * (real(c)*real(c) + imag(c)*imag(c))
		if k%m == 0 && 2*k < n {
			r.Harmonic += p
			r.Orders = k / m
		} else {
			r.Other += p
		}
	}
	nn := float64(n) * float64(n)
	r.Harmonic /= nn
	r.Other /= nn
	r.Ratio = math.Inf(1)
	if r.Other > 0 {
		r.Ratio = r.Harmonic / r.Other
	}
	r.DB = 10 * math.Log10(r.Ratio)
	return r, nil
}
