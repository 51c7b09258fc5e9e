package spectrum

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/dsp/window"
)

// maxDirectFactor is the largest prime factor of a transform length that
// is handed to gonum's mixed-radix FFT directly. Its generic pass costs
// O(N·p) for a prime factor p, so lengths with a larger factor go
// through Bluestein's chirp transform built on a power-of-two FFT.
const maxDirectFactor = 127

// realDFT computes the one-sided DFT X_k = Σ_n x_n·exp(-2πi·k·n/N),
// k = 0..N/2, of a real sequence of any length N ≥ 1, unnormalized, in
// O(N log N).
type realDFT struct {
	n      int
	direct *fourier.FFT

	// Bluestein (chirp-z) state, used when N has a large prime factor.
	// Rabiner, Schafer & Rader (1969); Bluestein (1970).
	cfft   *fourier.CmplxFFT
	chirp  []complex128 // w_n = exp(-iπ·n²/N)
	kernel []complex128 // FFT of conj(w) laid out circularly, length M
	work   []complex128 // length M
}

func newRealDFT(n int) *realDFT {
	d := &realDFT{n: n}
	if largestPrimeFactor(n) <= maxDirectFactor {
		d.direct = fourier.NewFFT(n)
		return d
	}
	m := 1
	for m < 2*n-1 {
		m <<= 1
	}
	d.cfft = fourier.NewCmplxFFT(m)
	d.chirp = make([]complex128, n)
	twoN := int64(2 * n)
	for i := range d.chirp {
		// n² mod 2N keeps the angle small and exact.
		q := (int64(i) * int64(i)) % twoN
		s, c := math.Sincos(-math.Pi * float64(q) / float64(n))
		d.chirp[i] = complex(c, s)
	}
	b := make([]complex128, m)
	b[0] = cmplx.Conj(d.chirp[0])
	for i := 1; i < n; i++ {
		v := cmplx.Conj(d.chirp[i])
		b[i] = v
		b[m-i] = v
	}
	d.kernel = d.cfft.Coefficients(b, b)
	d.work = make([]complex128, m)
	return d
}

// transform writes X_0..X_{N/2} into dst, which must have length N/2+1.
func (d *realDFT) transform(dst []complex128, x []float64) []complex128 {
	if d.direct != nil {
		return d.direct.Coefficients(dst, x)
	}
	m := len(d.work)
	for i, v := range x {
		d.work[i] = complex(v, 0) * d.chirp[i]
	}
	for i := d.n; i < m; i++ {
		d.work[i] = 0
	}
	d.cfft.Coefficients(d.work, d.work)
	for i := range d.work {
		d.work[i] *= d.kernel[i]
	}
	d.cfft.Sequence(d.work, d.work)
	scale := complex(1/float64(m), 0)
	for k := range dst {
		dst[k] = d.work[k] * scale * d.chirp[k]
	}
	return dst
}

func largestPrimeFactor(n int) int {
	p := 1
	for f := 2; f*f <= n; f++ {
		for n%f == 0 {
			p = f
			n /= f
		}
	}
	if n > 1 {
		p = max(p, n)
	}
	return p
}

// periodicWindow returns the DFT-even (periodic) form of one of gonum's
// symmetric windows: the first n points of its n+1-point form, as
// recommended for spectral analysis by Harris (1978), §III.
func periodicWindow(fn func([]float64) []float64, n int) []float64 {
	return window.NewValues(fn, n+1)[:n]
}

// oneSidedWeight is the factor that folds the negative-frequency half of
// a real signal's DFT into bin k of an N-point one-sided spectrum.
func oneSidedWeight(k, n int) float64 {
	if k == 0 || 2*k == n {
		return 1
	}
	return 2
}
