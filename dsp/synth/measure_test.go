package synth

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// Measurement helpers shared by the tests. Spectra come from gonum's FFT
// (gonum.org/v1/gonum/dsp/fourier), a reference implementation outside
// this package.

const padLen = 1 << 18 // zero-padded FFT length for peak estimates

// hann returns x multiplied by a Hann window (Harris, Proc. IEEE 66(1), 1978).
func hann(x []float64) []float64 {
	y := make([]float64, len(x))
	n := float64(len(x) - 1)
	for i, v := range x {
		y[i] = v * 0.5 * (1 - math.Cos(2*math.Pi*float64(i)/n))
	}
	return y
}

// paddedSpectrum returns |FFT| of hann(x) zero-padded to padLen points.
func paddedSpectrum(x []float64) []float64 {
	seq := make([]float64, padLen)
	copy(seq, hann(x))
	c := fourier.NewFFT(padLen).Coefficients(nil, seq)
	m := make([]float64, len(c))
	for i, v := range c {
		m[i] = cmplx.Abs(v)
	}
	return m
}

// peakIn returns the frequency (Hz) and magnitude of the largest spectral
// peak of x between lo and hi Hz, refined by fitting a parabola to the log
// magnitudes of the three bins around the maximum (Gaussian interpolation,
// whose bias on a Hann-windowed sinusoid padded this finely is far below
// 0.01 bin).
func peakIn(mag []float64, fs, lo, hi float64) (freq, amp float64) {
	bin := fs / padLen
	a, b := int(math.Ceil(lo/bin)), int(math.Floor(hi/bin))
	k := a
	for i := a; i <= b; i++ {
		if mag[i] > mag[k] {
			k = i
		}
	}
	l, c, r := math.Log(mag[k-1]), math.Log(mag[k]), math.Log(mag[k+1])
	d := 0.5 * (l - r) / (l - 2*c + r)
	return (float64(k) + d) * bin, mag[k]
}

// tone returns |Σ w[n]·x[n]·e^{−jωn}| for a Hann window w, at f Hz: the
// windowed amplitude of one known component.
func tone(x []float64, fs, f float64) float64 {
	return cmplx.Abs(dtft(hann(x), 2*math.Pi*f/fs))
}

// dtft returns X(e^{jω}) = Σ x[n]·e^{−jωn}.
func dtft(x []float64, w float64) complex128 {
	var s complex128
	for n, v := range x {
		s += complex(v, 0) * cmplx.Exp(complex(0, -w*float64(n)))
	}
	return s
}

// cents returns the interval from ref to f in cents.
func cents(f, ref float64) float64 { return 1200 * math.Log2(f/ref) }

// tet returns the 12-TET frequency of MIDI note m with A4 = 440 Hz
// (ISO 16:1975 standard pitch; MIDI note numbering, common practice).
func tet(m int) float64 { return 440 * math.Pow(2, float64(m-69)/12) }

func energy(x []float64) float64 {
	e := 0.0
	for _, v := range x {
		e += v * v
	}
	return e
}

func peakAbs(x []float64) float64 {
	p := 0.0
	for _, v := range x {
		p = math.Max(p, math.Abs(v))
	}
	return p
}
