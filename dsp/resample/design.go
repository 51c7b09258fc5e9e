package resample

import "math"

// Design targets, shared by every factor and base rate.
const (
	// PassbandEdge is the upper edge of the protected band in Hz for base
	// rates of 44.1 kHz and above. Below 44.1 kHz the edge scales with the
	// rate, fp = fs·(20000/44100), so that the relative transition band never
	// gets narrower than at 44.1 kHz.
	PassbandEdge = 20000.0

	// StopbandAttenuation is the guaranteed attenuation in dB of the
	// prototype from the base-rate Nyquist frequency fs/2 up to the
	// oversampled Nyquist frequency N·fs/2.
	StopbandAttenuation = 100.0

	// PassbandRipple is the guaranteed bound in dB on |20·log10|H(f)|| of the
	// prototype (normalised to unity DC gain, i.e. after the factor N of Up)
	// over 0 ≤ f ≤ PassbandEdge.
	PassbandRipple = 0.01

	// designAttenuation is the A handed to the Kaiser formulas. It sits above
	// StopbandAttenuation because the formulas are fits, good to a couple of
	// dB; the margin is checked on a dense grid by the package tests.
	designAttenuation = StopbandAttenuation + 3
)

// Filter is a linear-phase lowpass prototype for oversampling by Factor. It
// runs at the oversampled rate Factor·SampleRate and has
// len(Taps) = 2·HalfLength·Factor + 1 taps, so its group delay is exactly
// HalfLength base-rate samples. The taps are symmetric and sum to one (unity
// DC gain); Up multiplies by Factor on top of that.
type Filter struct {
	Factor       int     // oversampling factor N
	SampleRate   float64 // base rate fs in Hz
	PassbandEdge float64 // fp in Hz
	StopbandEdge float64 // fs/2 in Hz
	Attenuation  float64 // A in dB handed to the Kaiser formulas
	Beta         float64 // Kaiser window shape parameter β
	HalfLength   int     // K: delay in base-rate samples
	Taps         []float64
}

// Delay is the group delay of the prototype in base-rate samples.
func (f *Filter) Delay() int { return f.HalfLength }

// Design returns the Kaiser-windowed sinc prototype for oversampling a
// signal at base rate fs by factor.
//
// In normalised angular frequency at the oversampled rate N·fs the
// passband edge is ωp = 2π·fp/(N·fs) and the stopband edge is ωs = π/N
// (the base-rate Nyquist). The ideal lowpass is cut at the middle of the
// transition band, ωc = (ωp+ωs)/2, and windowed by a Kaiser window whose
// β and order M come from Kaiser's formulas for A = 103 dB:
//
//	β = 0.1102·(A − 8.7)                              A > 50
//	M = (A − 8) / (2.285·(ωs − ωp))
//
// (Kaiser 1974; Kaiser & Schafer 1980; Oppenheim & Schafer, Discrete-Time
// Signal Processing, 3rd ed., Sec. 7.5.3). M is then rounded up to a multiple of
// 2N so that the delay is an integer number of base-rate samples. A Kaiser
// design has roughly equal peak errors δ in both bands, so the 100 dB
// stopband (δ = 1e-5) implies a passband ripple of about 1e-4 dB, far
// inside the 0.01 dB requirement.
//
// Factor 1 yields the one-tap identity filter with zero delay.
func Design(factor int, fs float64) (*Filter, error) {
	return design("Design", factor, fs)
}

// design is Design with the name of the exported caller for error messages.
func design(op string, factor int, fs float64) (*Filter, error) {
	if err := checkFactor(op, factor); err != nil {
		return nil, err
	}
	if err := checkRate(op, fs); err != nil {
		return nil, err
	}
	fp := math.Min(PassbandEdge, fs*PassbandEdge/44100)
	f := &Filter{
		Factor:       factor,
		SampleRate:   fs,
		PassbandEdge: fp,
		StopbandEdge: fs / 2,
	}
	if factor == 1 {
		f.Taps = []float64{1}
		return f, nil
	}

	n := float64(factor)
	wp := 2 * math.Pi * fp / (n * fs)
	ws := math.Pi / n
	wc := (wp + ws) / 2
	a := designAttenuation
	beta := kaiserBeta(a)
	m0 := kaiserOrder(a, ws-wp)
	k := (m0 + 2*factor - 1) / (2 * factor)
	m := 2 * k * factor

	taps := make([]float64, m+1)
	half := float64(m) / 2
	i0b := besselI0(beta)
	// Fill the left half and the centre, mirror the rest, so the taps are
	// exactly symmetric and the phase exactly linear.
	for i := 0; i <= m/2; i++ {
		t := float64(i) - half // ≤ 0
		r := t / half
		w := besselI0(beta*math.Sqrt(1-r*r)) / i0b
		var s float64
		if i == m/2 {
			s = wc / math.Pi
		} else {
			s = math.Sin(wc*t) / (math.Pi * t)
		}
		taps[i] = s * w
		taps[m-i] = taps[i]
	}
	var sum float64
	for _, v := range taps {
		sum += v
	}
	for i := range taps {
		taps[i] /= sum
	}

	f.Attenuation = a
	f.Beta = beta
	f.HalfLength = k
	f.Taps = taps
	return f, nil
}

// kaiserBeta returns the Kaiser window parameter β for a stopband
// attenuation of a dB (Oppenheim & Schafer, DTSP 3rd ed., eq. 7.62;
// equation number from memory).
func kaiserBeta(a float64) float64 {
	switch {
	case a > 50:
		return 0.1102 * (a - 8.7)
	case a >= 21:
		return 0.5842*math.Pow(a-21, 0.4) + 0.07886*(a-21)
	default:
		return 0
	}
}

// kaiserOrder returns the filter order M (length M+1), rounded up, that a
// Kaiser window needs for attenuation a dB and transition width dw rad/sample
// (Oppenheim & Schafer, DTSP 3rd ed., eq. 7.63; equation number from
// memory).
func kaiserOrder(a, dw float64) int {
	return int(math.Ceil((a - 8) / (2.285 * dw)))
}

// besselI0 is the modified Bessel function of the first kind of order zero,
// summed from its power series I0(x) = Σ ((x/2)^k / k!)² (Abramowitz &
// Stegun 9.6.10). All terms are positive, so the sum is accurate to a few
// ulps for the arguments a Kaiser window needs (0 ≤ x ≲ 20).
func besselI0(x float64) float64 {
	q := x * x / 4
	sum, term := 1.0, 1.0
	for k := 1; k < 500; k++ {
		term *= q / float64(k*k)
		sum += term
		if term < sum*1e-17 {
			break
		}
	}
	return sum
}
