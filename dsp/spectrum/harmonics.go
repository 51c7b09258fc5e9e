package spectrum

import (
	"math"
	"strconv"

	"gonum.org/v1/gonum/dsp/window"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// Method selects how Analyze estimates the fundamental and harmonics.
type Method int

const (
	// MethodAuto uses MethodBins for a coherent record and MethodFit
	// otherwise.
	MethodAuto Method = iota
	// MethodBins reads exact DFT bins of a coherent record (a whole
	// number of cycles of the fundamental). Fails with ErrNotCoherent
	// otherwise.
	MethodBins
	// MethodFit solves a linear least-squares fit of DC plus sine and
	// cosine terms at every counted harmonic of the known fundamental
	// (the known-frequency sine fit of IEEE Std 1057, extended to
	// harmonics); works for any record of at least one cycle.
	MethodFit
)

func (m Method) String() string {
	switch m {
	case MethodAuto:
		return "auto"
	case MethodBins:
		return "bins"
	case MethodFit:
		return "fit"
	}
	return "Method(" + strconv.Itoa(int(m)) + ")"
}

// Defaults used by Analyze when an Options field is zero.
const (
	DefaultMaxOrder = 10
	DefaultBandLow  = 20.0    // Hz
	DefaultBandHigh = 20000.0 // Hz
	// MaxFitOrder bounds Options.MaxOrder for MethodFit, whose normal
	// equations grow with the square, and their solution with the
	// cube, of the number of fitted terms.
	MaxFitOrder = 200
	// CoherenceTolerance is how far, in cycles, the record's cycle
	// count f0·N/fs may lie from a whole number and still count as
	// coherent. A residual of 1e-6 cycle leaks below -120 dBc.
	CoherenceTolerance = 1e-6
)

// Options tunes Analyze. The zero value selects the defaults.
type Options struct {
	// MaxOrder is the highest harmonic order counted in Harmonics and
	// THD (orders 2..MaxOrder). Zero means DefaultMaxOrder; 1 counts no
	// harmonics.
	MaxOrder int
	// BandLow and BandHigh bound the THD+N measurement band in Hz.
	// Zero means DefaultBandLow and DefaultBandHigh. BandHigh is capped
	// at the Nyquist frequency.
	BandLow, BandHigh float64
	// Method selects the estimator; the zero value is MethodAuto.
	Method Method
}

// Harmonic is one spectral line at a whole multiple of the fundamental.
type Harmonic struct {
	Order     int     // 1 for the fundamental
	Frequency float64 // Hz, Order·f0
	Amplitude float64 // peak amplitude, in the record's unit (V)
	// Phase is φ in Amplitude·sin(2π·Frequency·t + φ) with t = 0 at the
	// first sample, in radians, in (-π, π].
	Phase   float64
	DBc     float64 // 20·log10(Amplitude / fundamental amplitude)
	Percent float64 // 100·Amplitude / fundamental amplitude
}

// Analysis is the result of Analyze. Ratios (THDF, THDR, THDN,
// PeakAsymmetry, EvenOddRatio) are plain fractions: multiply by 100 for
// percent, or pass to DB for decibels. When the fundamental amplitude is
// zero the ratios relative to it are NaN or +Inf.
type Analysis struct {
	SampleRate float64 // Hz
	Samples    int     // record length N
	Cycles     float64 // cycles of the fundamental in the record, f0·N/fs
	Method     Method  // MethodBins or MethodFit, as used

	Fundamental Harmonic // Order 1, DBc 0, Percent 100
	RMS         float64  // RMS of the fundamental, Amplitude/√2
	DBV         float64  // 20·log10(RMS / 1 V): dBV re 1 V rms

	TotalRMS float64 // RMS of the whole record, DC included
	DC       float64 // mean (bins) or fitted constant term (fit)

	// Harmonics lists orders 2..MaxOrder, omitting orders at or above
	// the Nyquist frequency (see Analyze).
	Harmonics []Harmonic
	// THDF is √(Σ A_h²)/A_1 over Harmonics: the distortion factor
	// relative to the fundamental (the IEC 61000-2-2 form).
	THDF float64
	// THDR is √(Σ A_h²)/√(A_1² + Σ A_h²): relative to the RMS of the
	// fundamental and counted harmonics, THDF/√(1+THDF²).
	THDR float64
	// THDN is the RMS of everything except DC and the fundamental in
	// [BandLow, BandHigh], over the fundamental's RMS.
	THDN              float64
	BandLow, BandHigh float64 // THD+N band used, Hz

	// EvenEnergy and OddEnergy are the mean-square values (Σ A_h²/2) of
	// the even and the odd (3, 5, …) counted harmonics; EvenOddRatio is
	// EvenEnergy/OddEnergy (+Inf with no odd content, NaN with none).
	EvenEnergy, OddEnergy, EvenOddRatio float64

	PeakPositive float64 // largest sample
	PeakNegative float64 // smallest sample (negative for a bipolar signal)
	// PeakAsymmetry is (u−d)/(u+d) with u = PeakPositive−DC and
	// d = DC−PeakNegative: 0 for symmetric excursions about the DC level,
	// positive when the positive swing is larger, in [-1, 1].
	PeakAsymmetry float64
}

// Analyze measures the harmonic content of x, a settled record sampled at
// sampleRate Hz that carries a fundamental of known frequency f0 Hz. opt
// may be nil.
//
// With MethodBins (chosen by MethodAuto when x holds a whole number M of
// cycles to within CoherenceTolerance) each harmonic h is read from DFT
// bin h·M; the DFT basis is orthogonal over the record, so this is the
// exact least-squares estimate. Orders with h·M ≥ N/2 (at or above
// Nyquist) are omitted. THD+N sums the power of every bin in the band
// except bins 0 and M, which is the same as subtracting the fitted DC
// and fundamental (an ideal notch in the sense of AES17) and band-limiting
// the residual by whole bins.
//
// With MethodFit DC, the fundamental and every counted harmonic are
// fitted jointly by linear least squares at the known frequencies, so
// amplitudes are exact for a non-coherent record too, as long as the
// signal has no significant content at orders above MaxOrder. Orders
// with h·f0 > fs/2 − fs/N are omitted (a sine that close to Nyquist is
// not determinable from N samples). For THD+N the fitted DC and
// fundamental are subtracted, the residual is weighted by a periodic
// 4-term Blackman–Harris window (92 dB sidelobes; Harris 1978) and its
// power is summed over the band's bins with the window's power gain
// divided out, which is unbiased for noise.
//
// Analyze returns an *Error for non-finite samples, bad parameters, a
// record shorter than one cycle, or (MethodFit) normal equations that are
// not well conditioned.
func Analyze(x []float64, sampleRate, f0 float64, opt *Options) (*Analysis, error) {
	const op = "Analyze"
	var o Options
	if opt != nil {
		o = *opt
	}
	if !finitePositive(sampleRate) {
		return nil, argError(op, "sampleRate", ErrInvalid, "want a finite rate > 0 Hz, got "+ftoa(sampleRate))
	}
	nyq := sampleRate / 2
	if !finitePositive(f0) || f0 >= nyq {
		return nil, argError(op, "f0", ErrInvalid, "want 0 < f0 < "+ftoa(nyq)+" Hz, got "+ftoa(f0))
	}
	if o.MaxOrder < 0 {
		return nil, argError(op, "Options.MaxOrder", ErrInvalid, "negative: "+strconv.Itoa(o.MaxOrder))
	}
	if o.MaxOrder == 0 {
		o.MaxOrder = DefaultMaxOrder
	}
	if o.BandLow == 0 {
		o.BandLow = DefaultBandLow
	}
	if o.BandHigh == 0 {
		o.BandHigh = DefaultBandHigh
	}
	if !(o.BandLow >= 0) || o.BandLow-o.BandLow != 0 || !(o.BandHigh > o.BandLow) || o.BandHigh-o.BandHigh != 0 {
		return nil, argError(op, "Options.BandLow/BandHigh", ErrInvalid,
			"want finite 0 ≤ low < high, got "+ftoa(o.BandLow)+", "+ftoa(o.BandHigh))
	}
	bandHigh := math.Min(o.BandHigh, nyq)
	if o.BandLow >= bandHigh {
		return nil, argError(op, "Options.BandLow", ErrInvalid, "band starts at or above Nyquist "+ftoa(nyq)+" Hz")
	}
	if o.Method < MethodAuto || o.Method > MethodFit {
		return nil, argError(op, "Options.Method", ErrInvalid, o.Method.String())
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
	coherent := math.Abs(cycles-whole) <= CoherenceTolerance
	method := o.Method
	if method == MethodAuto {
		method = MethodFit
		if coherent {
			method = MethodBins
		}
	}
	if method == MethodBins && !coherent {
		return nil, argError(op, "x", ErrNotCoherent, "record holds "+ftoa(cycles)+" cycles")
	}
	if method == MethodFit && o.MaxOrder > MaxFitOrder {
		return nil, argError(op, "Options.MaxOrder", ErrInvalid,
			strconv.Itoa(o.MaxOrder)+" exceeds "+strconv.Itoa(MaxFitOrder)+" for the fit method")
	}

	a := &Analysis{
		SampleRate: sampleRate,
		Samples:    n,
		Cycles:     cycles,
		Method:     method,
		BandLow:    o.BandLow,
		BandHigh:   bandHigh,
	}

	// Highest order that can be resolved (order 1 included).
	var top int
	if method == MethodBins {
		m := int(whole)
		top = (n - 1) / (2 * m) // largest h with 2·h·M < N
	} else {
		top = int(math.Floor((nyq - sampleRate/float64(n)) / f0 * (1 + 1e-12)))
	}
	if top < 1 {
		return nil, argError(op, "f0", ErrInvalid, "fundamental "+ftoa(f0)+" Hz is within one bin of Nyquist")
	}
	top = min(top, max(o.MaxOrder, 1))

	var (
		amp, phase []float64 // index h-1
		noisePower float64   // mean-square in band, excluding DC and fundamental
	)
	if method == MethodBins {
		a.DC, amp, phase, noisePower = analyzeBins(x, int(whole), top, sampleRate, o.BandLow, bandHigh)
	} else {
		var err error
		a.DC, amp, phase, noisePower, err = analyzeFit(x, f0/sampleRate, top, sampleRate, o.BandLow, bandHigh)
		if err != nil {
			return nil, err
		}
	}

	a1 := amp[0]
	line := func(h int) Harmonic {
		return Harmonic{
			Order:     h,
			Frequency: float64(h) * f0,
			Amplitude: amp[h-1],
			Phase:     phase[h-1],
			DBc:       DB(amp[h-1] / a1),
			Percent:   100 * amp[h-1] / a1,
		}
	}
	a.Fundamental = line(1)
	a.RMS = a1 / math.Sqrt2
	a.DBV = DB(a.RMS / 1.0)
	var sumH, even, odd float64
	for h := 2; h <= top; h++ {
		a.Harmonics = append(a.Harmonics, line(h))
		p := amp[h-1] * amp[h-1]
		sumH += p
		if h%2 == 0 {
			even += p
		} else {
			odd += p
		}
	}
	a.THDF = math.Sqrt(sumH) / a1
	a.THDR = math.Sqrt(sumH) / math.Sqrt(a1*a1+sumH)
	a.THDN = math.Sqrt(noisePower) / a.RMS
	a.EvenEnergy, a.OddEnergy = even/2, odd/2
	a.EvenOddRatio = even / odd

	a.TotalRMS = RMS(x)
	a.PeakPositive = floats.Max(x)
	a.PeakNegative = floats.Min(x)
	up, down := a.PeakPositive-a.DC, a.DC-a.PeakNegative
	if up+down > 0 {
		a.PeakAsymmetry = (up - down) / (up + down)
	}
	return a, nil
}

// analyzeBins reads DC and orders 1..top from the exact DFT bins of a
// record holding m whole cycles, and the in-band residual power.
func analyzeBins(x []float64, m, top int, fs, lo, hi float64) (dc float64, amp, phase []float64, noise float64) {
	n := len(x)
	coef := newRealDFT(n).transform(make([]complex128, n/2+1), x)
	nf := float64(n)
	dc = real(coef[0]) / nf
	amp = make([]float64, top)
	phase = make([]float64, top)
	for h := 1; h <= top; h++ {
		c := coef[h*m]
		ca, sb := 2*real(c)/nf, -2*imag(c)/nf // x ≈ ca·cos + sb·sin
		amp[h-1] = math.Hypot(ca, sb)
		phase[h-1] = math.Atan2(ca, sb)
	}
	df := fs / nf
	for k := 1; k < len(coef); k++ {
		f := float64(k) * df
		if k == m || f < lo || f > hi {
			continue
		}
		c := coef[k]
		noise += oneSidedWeight(k, n) * (real(c)*real(c) + imag(c)*imag(c))
	}
	noise /= nf * nf
	return dc, amp, phase, noise
}

// analyzeFit fits DC and orders 1..top at normalized frequency nu = f0/fs
// by linear least squares and measures the in-band power of the residual
// left by DC and the fundamental.
func analyzeFit(x []float64, nu float64, top int, fs, lo, hi float64) (dc float64, amp, phase []float64, noise float64, err error) {
	n := len(x)
	nf := float64(n)
	theta := 2 * math.Pi * nu
	k := 2*top + 1 // columns: 1, cos(hθn), sin(hθn) for h = 1..top

	// Normal-equation matrix in closed form from the Dirichlet kernel.
	g := mat.NewSymDense(k, nil)
	g.SetSym(0, 0, nf)
	for i := 1; i <= top; i++ {
		ci, si := dirichlet(float64(i)*theta, n)
		g.SetSym(0, 2*i-1, ci)
		g.SetSym(0, 2*i, si)
		for j := i; j <= top; j++ {
			cm, sm := dirichlet(float64(j-i)*theta, n) // (j−i)θ
			cp, sp := dirichlet(float64(j+i)*theta, n) // (j+i)θ
			g.SetSym(2*i-1, 2*j-1, (cm+cp)/2)          // Σ cos iθn · cos jθn
			g.SetSym(2*i, 2*j, (cm-cp)/2)              // Σ sin iθn · sin jθn
			g.SetSym(2*i-1, 2*j, (sp+sm)/2)            // Σ cos iθn · sin jθn
			if j != i {
				g.SetSym(2*j-1, 2*i, (sp-sm)/2) // Σ cos jθn · sin iθn
			}
		}
	}

	// Right-hand side: projections of x on each column.
	b := make([]float64, k)
	for t, v := range x {
		b[0] += v
		s1, c1 := math.Sincos(theta * float64(t))
		c, s := c1, s1
		for h := 1; h <= top; h++ {
			b[2*h-1] += v * c
			b[2*h] += v * s
			c, s = c*c1-s*s1, s*c1+c*s1
		}
	}

	var chol mat.Cholesky
	if ok := chol.Factorize(g); !ok || chol.Cond() > 1e10 {
		return 0, nil, nil, 0, argError("Analyze", "x", ErrIllConditioned,
			"normal equations for "+strconv.Itoa(k)+" terms over "+strconv.Itoa(n)+" samples")
	}
	var beta mat.VecDense
	if err := chol.SolveVecTo(&beta, mat.NewVecDense(k, b)); err != nil {
		return 0, nil, nil, 0, argError("Analyze", "x", ErrIllConditioned, err.Error())
	}
	dc = beta.AtVec(0)
	amp = make([]float64, top)
	phase = make([]float64, top)
	for h := 1; h <= top; h++ {
		ca, sb := beta.AtVec(2*h-1), beta.AtVec(2*h)
		amp[h-1] = math.Hypot(ca, sb)
		phase[h-1] = math.Atan2(ca, sb)
	}

	// Residual after removing DC and the fundamental, windowed.
	ca1, sb1 := beta.AtVec(1), beta.AtVec(2)
	w := periodicWindow(window.BlackmanHarris, n)
	r := make([]float64, n)
	for t, v := range x {
		s, c := math.Sincos(theta * float64(t))
		r[t] = (v - dc - ca1*c - sb1*s) * w[t]
	}
	coef := newRealDFT(n).transform(make([]complex128, n/2+1), r)
	df := fs / nf
	for q := 1; q < len(coef); q++ {
		f := float64(q) * df
		if f < lo || f > hi {
			continue
		}
		c := coef[q]
		noise += oneSidedWeight(q, n) * (real(c)*real(c) + imag(c)*imag(c))
	}
	noise /= nf * floats.Dot(w, w)
	return dc, amp, phase, noise, nil
}

// dirichlet returns Σ_{t=0}^{n-1} cos(φt) and Σ sin(φt) in closed form:
// Σ exp(iφt) = exp(iφ(n−1)/2)·sin(nφ/2)/sin(φ/2).
func dirichlet(phi float64, n int) (c, s float64) {
	phi = math.Remainder(phi, 2*math.Pi)
	if phi == 0 {
		return float64(n), 0
	}
	d := math.Sin(float64(n)*phi/2) / math.Sin(phi/2)
	si, co := math.Sincos(phi * float64(n-1) / 2)
	return d * co, d * si
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }
