package synth

import (
	"math"
	"math/rand/v2"
)

// Pick-direction low-pass coefficients (Jaffe & Smith's Hp(z) =
// (1−p)/(1−p·z⁻¹), p between 0 and 0.9 for the two directions). The values
// are this package's choice: downstrokes bright, upstrokes softer.
const (
	pickDown = 0.1
	pickUp   = 0.6
)

// voice is one plucked note: an extended Karplus–Strong loop
//
//	y[n] = e[n] + ρ · Hc(z) · Hd(z) · z^(−N) · y[n]
//
// with Hd(z) = (1−S) + S·z⁻¹ the loss / decay-stretch filter and
// Hc(z) = (c + z⁻¹)/(1 + c·z⁻¹) the fractional-delay allpass, tuned so that
// N + τd(ω0) + τc(ω0) = fs/f0 exactly at the fundamental ω0.
type voice struct {
	buf    []float64 // ring of past loop outputs y, length N+4
	n      int       // integer loop delay N
	s, c   float64   // loss weight S, allpass coefficient c
	rho    float64   // per-period loss factor while ringing
	rhoD   float64   // per-period loss factor once fully damped
	exc    []float64 // excitation e[n]
	pickup bool      // apply the pickup comb 1 − z^(−γP)
	pi     int       // integer part of γP
	pf     float64   // fractional part of γP
}

// loopTuning returns the integer delay N and allpass coefficient c that make
// the loop's phase delay at ω0 = 2π/period equal period samples. The allpass
// share Δ is kept in [0.5, 1.5), so |c| ≤ 1/3.
//
// Jaffe & Smith give the first-order design c = (1−Δ)/(1+Δ); here the
// coefficient is solved exactly at ω0: the allpass has phase delay Δ at ω0
// when c = sin(ω0(1−Δ)/2) / sin(ω0(1+Δ)/2).
func loopTuning(period, s float64) (n int, c float64) {
	w := 2 * math.Pi / period
	rest := period - lossPhaseDelay(s, w)
	n = int(math.Floor(rest - 0.5))
	d := rest - float64(n)
	c = math.Sin(w*(1-d)/2) / math.Sin(w*(1+d)/2)
	return n, c
}

func newVoice(p *params, f0, vel float64, up bool, rng *rand.Rand) *voice {
	period := p.fs / f0
	n, c := loopTuning(period, p.stretch)
	v := &voice{
		buf: make([]float64, n+4),
		n:   n, s: p.stretch, c: c, rho: p.rho,
		// ρd alone gives a 60 dB decay in half the damping time.
		rhoD: math.Exp(-3 * math.Ln10 / (f0 * p.dampTime / 2)),
		exc:  excitation(period, f0, p.fs, vel, p.pick, up, rng),
	}
	if p.pickup > 0 {
		d := p.pickup * period
		v.pickup = true
		v.pi = int(d)
		v.pf = d - float64(v.pi)
	}
	return v
}

// excitation builds the pluck signal: one period of seeded white noise,
// shaped by the pick-direction low-pass, the dynamic-level low-pass, and the
// pick-position comb 1 − z^(−βP) (fractional delay by linear interpolation),
// scaled so that its pre-comb RMS equals vel.
func excitation(period, f0, fs, vel, beta float64, up bool, rng *rand.Rand) []float64 {
	L := int(math.Ceil(period))
	x := make([]float64, 2*L+2) // noise then room for the low-pass tails
	for i := range L {
		x[i] = 2*rng.Float64() - 1
	}
	// Pick direction: Hp(z) = (1−p)/(1−p·z⁻¹).
	pd := pickDown
	if up {
		pd = pickUp
	}
	onePole(x, pd)
	// Dynamic level: softer plucks are darker. One-pole low-pass with cutoff
	// f0·2^(1+5·vel), at most 0.45·fs.
	fc := math.Min(f0*math.Exp2(1+5*vel), 0.45*fs)
	onePole(x, math.Exp(-2*math.Pi*fc/fs))
	rms := 0.0
	for _, s := range x {
		rms += s * s
	}
	rms = math.Sqrt(rms / float64(L))
	if rms > 0 {
		g := vel / rms
		for i := range x {
			x[i] *= g
		}
	}
	return pickComb(x, beta*period)
}

// onePole filters x in place by y[n] = (1−a)·x[n] + a·y[n−1].
func onePole(x []float64, a float64) {
	y := 0.0
	for i, v := range x {
		y = (1-a)*v + a*y
		x[i] = y
	}
}

// pickComb returns e[n] = x[n] − x[n−D] for a fractional delay D ≥ 0,
// x[n−D] taken by linear interpolation; len(e) = len(x) + ⌊D⌋ + 1.
func pickComb(x []float64, d float64) []float64 {
	i := int(d)
	f := d - float64(i)
	e := make([]float64, len(x)+i+1)
	copy(e, x)
	for k, v := range x {
		e[k+i] -= (1 - f) * v
		e[k+i+1] -= f * v
	}
	return e
}

// render adds the voice into dst, whose index 0 is the note's onset. From
// index dampStart on (if dampStart ≥ 0) the loop loss ramps geometrically
// from ρ to ρd over dampLen/4 samples, which lowers the vibration by more
// than 60 dB within dampLen samples; dst should end no later than
// dampStart+dampLen.
func (v *voice) render(dst []float64, dampStart, dampLen int) {
	buf := v.buf
	L := len(buf)
	w := 0
	r0 := (w - v.n + L) % L // y[n−N]
	r1 := (r0 - 1 + L) % L  // y[n−N−1]
	q0 := (w - v.pi + L) % L
	q1 := (q0 - 1 + L) % L
	s0, s1 := 1-v.s, v.s
	c := v.c
	rho := v.rho
	rampLen := max(dampLen/4, 1)
	step := math.Exp(math.Log(v.rhoD/v.rho) / float64(rampLen))
	var x1, y1 float64 // allpass state
	for k := range dst {
		if dampStart >= 0 && k >= dampStart && rho > v.rhoD {
			rho = math.Max(rho*step, v.rhoD)
		}
		d := s0*buf[r0] + s1*buf[r1]
		a := c*d + x1 - c*y1
		x1, y1 = d, a
		y := rho * a
		if k < len(v.exc) {
			y += v.exc[k]
		}
		buf[w] = y
		out := y
		if v.pickup {
			out -= (1-v.pf)*buf[q0] + v.pf*buf[q1]
		}
		dst[k] += out
		if w++; w == L {
			w = 0
		}
		if r0++; r0 == L {
			r0 = 0
		}
		if r1++; r1 == L {
			r1 = 0
		}
		if q0++; q0 == L {
			q0 = 0
		}
		if q1++; q1 == L {
			q1 = 0
		}
	}
}
