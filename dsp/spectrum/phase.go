package spectrum

import (
	"math"
	"strconv"
)

// PointsPerDecade is the density of DecadeGrid that frequency-response
// figures use by default: 48 points per decade (about 14.5 per octave).
//
// Why 48: drawn as straight segments between grid points (linear in
// log frequency), a curve departs from the true response by at most
// g”·h²/8, h = ln(10)/48 = 0.048 the spacing in natural log frequency
// and g” the curvature of the curve against ln f. For one real pole or
// zero that curvature peaks at 10/ln 10 = 4.34 dB and 0.25 rad (14.3°)
// per neper², giving at most 0.0013 dB and 0.004°. For a second-order
// section of quality factor Q ≥ 0.5 the magnitude's curvature peaks at
// 34.7·Q² dB per neper², giving 0.010·Q² dB, and the phase departs by at
// most 0.045·Q² degrees: 0.09 dB and 0.4° at Q = 3, under a pixel of a
// default-size figure spanning 60 dB. The bound depends on the spacing
// only, not on where a knob puts a corner, so the curves stay smooth at
// every setting. (Passive RC tone networks have real poles only.) A
// 20 Hz – 20 kHz response takes 146 points.
const PointsPerDecade = 48

// DecadeGrid returns frequencies from lo to hi, in hertz, spaced evenly
// on a logarithmic axis at perDecade points per decade. The points are
// the exact values 10^(k/perDecade), so round frequencies (100 Hz, 1 kHz,
// 10 kHz) lie on the grid; lo and hi are added at the ends when they do
// not.
func DecadeGrid(lo, hi float64, perDecade int) ([]float64, error) {
	const op = "DecadeGrid"
	if !finitePositive(lo) {
		return nil, argError(op, "lo", ErrInvalid, "want a finite frequency > 0 Hz, got "+ftoa(lo))
	}
	if !finitePositive(hi) || hi <= lo {
		return nil, argError(op, "hi", ErrInvalid, "want a finite frequency above lo = "+ftoa(lo)+" Hz, got "+ftoa(hi))
	}
	if perDecade < 1 || perDecade > 10000 {
		return nil, argError(op, "perDecade", ErrInvalid, "want 1 to 10000, got "+strconv.Itoa(perDecade))
	}
	n := float64(perDecade)
	k0 := math.Ceil(n*math.Log10(lo) - 1e-9)
	k1 := math.Floor(n*math.Log10(hi) + 1e-9)
	if k1-k0 > 1e6 {
		return nil, argError(op, "perDecade", ErrInvalid, "grid of more than a million points")
	}
	out := make([]float64, 0, int(k1-k0)+3)
	for k := k0; k <= k1; k++ {
		out = append(out, math.Pow(10, k/n))
	}
	const rel = 1e-9
	switch {
	case len(out) == 0 || out[0] > lo*(1+rel):
		out = append([]float64{lo}, out...)
	default:
		out[0] = lo
	}
	if out[len(out)-1] < hi*(1-rel) {
		out = append(out, hi)
	} else {
		out[len(out)-1] = hi
	}
	return out, nil
}

// wrap180 maps an angle in degrees to (−180, 180].
func wrap180(d float64) float64 {
	return d - 360*math.Ceil((d-180)/360)
}

// UnwrapDegrees removes the jumps of ±360° from a sequence of phases in
// degrees sampled along frequency: each value is moved by a whole number
// of turns so that it differs from the previous finite value by at most
// 180° (a step of exactly ±180° is taken as +180°). The first finite
// value is brought into (−180°, 180°]; non-finite values stay as they are
// and are skipped. It writes into dst (reallocated unless its length
// matches) and returns it; dst may be deg itself.
//
// Unwrapping from samples is right only where the true phase moves by
// less than 180° between neighbouring points; on a DecadeGrid of
// PointsPerDecade points a real pole turns the phase by at most 1.4°
// per step (its largest slope, 0.5 rad per neper, times the spacing).
func UnwrapDegrees(dst, deg []float64) []float64 {
	if len(dst) != len(deg) {
		dst = make([]float64, len(deg))
	}
	prev, have := 0.0, false
	for i, d := range deg {
		if math.IsNaN(d) || math.IsInf(d, 0) {
			dst[i] = d
			continue
		}
		if !have {
			dst[i] = wrap180(d)
			have = true
		} else {
			dst[i] = prev + wrap180(d-prev)
		}
		prev = dst[i]
	}
	return dst
}

// GroupDelay returns the group delay τ = −dφ/dω, in seconds, of a phase
// response given in unwrapped degrees at increasing frequencies hz. The
// derivative is taken against u = ln f by the three-point formulas for
// uneven spacing (second-order accurate: central inside, one-sided at
// the ends), then τ = −(dφ/du)/(360·f) with φ in degrees. Interior error
// is at most h²/6·max|d³φ/du³| (φ in radians) divided by ω, h the spacing
// in u; on a DecadeGrid of PointsPerDecade points and one real pole
// (max|φ”'| = 0.5 rad) that is 3.8·10⁻⁴ of the pole's delay at its
// corner. A point next to a non-finite phase gets NaN.
func GroupDelay(hz, deg []float64) ([]float64, error) {
	const op = "GroupDelay"
	if len(hz) != len(deg) {
		return nil, argError(op, "deg", ErrInvalid, "length "+strconv.Itoa(len(deg))+" differs from hz's "+strconv.Itoa(len(hz)))
	}
	if len(hz) < 2 {
		return nil, argError(op, "hz", ErrShort, "need at least 2 points, got "+strconv.Itoa(len(hz)))
	}
	for i, f := range hz {
		if !finitePositive(f) || (i > 0 && f <= hz[i-1]) {
			return nil, &Error{Op: op, Arg: "hz", Index: i, Err: ErrInvalid, Detail: "want finite, positive, increasing frequencies, got " + ftoa(f)}
		}
	}
	n := len(hz)
	u := make([]float64, n)
	for i, f := range hz {
		u[i] = math.Log(f)
	}
	out := make([]float64, n)
	for i := range out {
		var d float64
		switch {
		case n == 2:
			d = (deg[1] - deg[0]) / (u[1] - u[0])
		case i == 0:
			d = oneSided(u[0], u[1], u[2], deg[0], deg[1], deg[2])
		case i == n-1:
			d = -oneSided(-u[n-1], -u[n-2], -u[n-3], deg[n-1], deg[n-2], deg[n-3])
		default:
			h0, h1 := u[i]-u[i-1], u[i+1]-u[i]
			d = (h0*h0*deg[i+1] - h1*h1*deg[i-1] + (h1*h1-h0*h0)*deg[i]) / (h0 * h1 * (h0 + h1))
		}
		out[i] = -d / (360 * hz[i])
		if math.IsInf(out[i], 0) {
			out[i] = math.NaN()
		}
	}
	return out, nil
}

// oneSided is the second-order forward difference f'(x0) on uneven
// points x0 < x1 < x2.
func oneSided(x0, x1, x2, f0, f1, f2 float64) float64 {
	h0, h1 := x1-x0, x2-x1
	return -(2*h0+h1)/(h0*(h0+h1))*f0 + (h0+h1)/(h0*h1)*f1 - h0/(h1*(h0+h1))*f2
}
