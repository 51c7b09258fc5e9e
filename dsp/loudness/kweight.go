package loudness

import "math"

// biquad holds the coefficients of a second-order section
//
//	H(z) = (b0 + b1 z⁻¹ + b2 z⁻²) / (1 + a1 z⁻¹ + a2 z⁻²)
//
// with the leading denominator coefficient normalised to 1, as in
// BS.1770-4 Tables 1 and 2.
type biquad struct {
	b0, b1, b2, a1, a2 float64
}

// BS.1770-4 Annex 1, Table 1: the pre-filter (high-frequency shelf) at 48 kHz.
var preFilter48k = biquad{
	b0: 1.53512485958697,
	b1: -2.69169618940638,
	b2: 1.19839281085285,
	a1: -1.69065929318241,
	a2: 0.73248077421585,
}

// BS.1770-4 Annex 1, Table 2: the RLB high-pass at 48 kHz.
var rlbFilter48k = biquad{
	b0: 1.0,
	b1: -2.0,
	b2: 1.0,
	a1: -1.99004745483398,
	a2: 0.99007225036621,
}

// tableRate is the sample rate at which BS.1770-4 tabulates the K-weighting
// coefficients.
const tableRate = 48000

// prototype is a second-order analog section in the variable u = s/ω0,
// ω0 = 2π·f0:
//
//	H(u) = (n2·u² + n1·u + n0) / (u² + u/q + 1)
//
// n0 is the gain at DC and n2 the gain at infinite frequency. The
// pre-filter is a shelf (n0 = 1, n2 ≈ +4 dB); the RLB stage is a high-pass
// (n0 = n1 = 0).
type prototype struct {
	f0, q      float64
	n0, n1, n2 float64
}

// invertBilinear recovers the analog prototype of a digital biquad that was
// obtained by the bilinear transform prewarped at its own pole frequency f0,
//
//	u = (1/K)·(1 − z⁻¹)/(1 + z⁻¹),  K = tan(π·f0/fs).
//
// Substituting u and multiplying through by K²(1 + z⁻¹)² gives the
// unnormalised denominator (1 + K/q + K²) + 2(K² − 1)z⁻¹ + (1 − K/q + K²)z⁻²
// and numerator B0 = n2 + n1K + n0K², B1 = 2(n0K² − n2),
// B2 = n2 − n1K + n0K². Solving these for K, q, n0, n1, n2 is exact: the
// bilinear map is a bijection between analog and digital biquads.
func invertBilinear(c biquad, fs float64) prototype {
	k2 := (1 + c.a1 + c.a2) / (1 - c.a1 + c.a2)
	k := math.Sqrt(k2)
	kq := 2 * (1 - c.a2) / (1 - c.a1 + c.a2) // K/q
	a0 := 1 + kq + k2
	b0, b1, b2 := c.b0*a0, c.b1*a0, c.b2*a0
	return prototype{
		f0: fs / math.Pi * math.Atan(k),
		q:  k / kq,
		n0: (b0 + b1 + b2) / (4 * k2),
		n1: (b0 - b2) / (2 * k),
		n2: (b0 - b1 + b2) / 4,
	}
}

// at discretises the prototype at sample rate fs by the bilinear transform
// prewarped at f0, so that the pole frequency and q are the same at every
// rate.
func (p prototype) at(fs float64) biquad {
	k := math.Tan(math.Pi * p.f0 / fs)
	k2 := k * k
	a0 := 1 + k/p.q + k2
	return biquad{
		b0: (p.n2 + p.n1*k + p.n0*k2) / a0,
		b1: 2 * (p.n0*k2 - p.n2) / a0,
		b2: (p.n2 - p.n1*k + p.n0*k2) / a0,
		a1: 2 * (k2 - 1) / a0,
		a2: (1 - k/p.q + k2) / a0,
	}
}

// Analog prototypes of the two K-weighting stages, recovered once from the
// 48 kHz table.
var (
	preProto = invertBilinear(preFilter48k, tableRate)
	rlbProto = invertBilinear(rlbFilter48k, tableRate)
)

// kWeighting returns the pre-filter and RLB stages for sample rate fs: the
// tabulated coefficients verbatim at 48 kHz, the re-discretised prototypes
// otherwise.
func kWeighting(fs float64) (pre, rlb biquad) {
	if fs == tableRate {
		return preFilter48k, rlbFilter48k
	}
	return preProto.at(fs), rlbProto.at(fs)
}
