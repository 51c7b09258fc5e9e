package spectrum

import (
	"math"
	"strconv"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/dsp/window"
)

// FullScaleMeanSquare is the reference power of band levels: the mean
// square of a sine whose peak is full scale (1.0). A full-scale sine
// whose power falls in one band reads 0 dB there (the dBFS convention of
// AES17); a full-scale square wave totals +3.01 dB.
const FullScaleMeanSquare = 0.5

// Frame lengths accepted by NewLTAS.
const (
	MinFrameLen = 16
	MaxFrameLen = 1 << 22
)

// Band is one one-third-octave band of a long-term-average spectrum.
type Band struct {
	Index   int     // band number x; 0 is the 1 kHz band
	Nominal float64 // IEC 61260-1 nominal midband frequency, Hz
	Centre  float64 // exact midband frequency 1000·10^(x/10), Hz
	Lower   float64 // lower band edge, Hz
	Upper   float64 // upper band edge, Hz (integration stops at Nyquist)
	// Power is the band's mean-square value in full-scale units².
	Power float64
	// Level is 10·log10(Power/FullScaleMeanSquare), dB re a full-scale
	// sine; -Inf for an empty band or before the first frame.
	Level float64
}

// LTAS accumulates a long-term-average power spectrum of a stream by
// Welch's method (Welch 1967): frames of FrameLen samples with 50 %
// overlap, each weighted by a periodic Hann window, their squared DFT
// magnitudes averaged. Memory is constant; a trailing partial frame is
// not analysed. It also tracks the stream's crest factor over every
// sample written. Samples are in full-scale units (full scale = 1.0).
type LTAS struct {
	fs     float64
	n, hop int
	win    []float64
	norm   float64 // 1/(N·Σw²): one frame's |X|² to mean square
	buf    []float64
	fill   int
	frame  []float64
	coef   []complex128
	fft    *fourier.FFT
	acc    []float64 // Σ over frames of |X_k|², k = 0..N/2
	frames int
	crest  CrestMeter
}

// NewLTAS returns an accumulator for a stream sampled at sampleRate Hz
// using frames of frameLen samples, a power of two in
// [MinFrameLen, MaxFrameLen]. frameLen 0 picks the smallest power of two
// not shorter than half a second, which resolves the 25 Hz band (about
// 5.8 Hz wide) into several bins.
func NewLTAS(sampleRate float64, frameLen int) (*LTAS, error) {
	const op = "NewLTAS"
	if !finitePositive(sampleRate) {
		return nil, argError(op, "sampleRate", ErrInvalid, "want a finite rate > 0 Hz, got "+ftoa(sampleRate))
	}
	if frameLen == 0 {
		frameLen = MinFrameLen
		for frameLen < MaxFrameLen && float64(frameLen) < sampleRate/2 {
			frameLen <<= 1
		}
	}
	if frameLen < MinFrameLen || frameLen > MaxFrameLen || frameLen&(frameLen-1) != 0 {
		return nil, argError(op, "frameLen", ErrInvalid,
			"want a power of two in ["+strconv.Itoa(MinFrameLen)+", "+strconv.Itoa(MaxFrameLen)+"], got "+strconv.Itoa(frameLen))
	}
	l := &LTAS{
		fs:    sampleRate,
		n:     frameLen,
		hop:   frameLen / 2,
		win:   periodicWindow(window.Hann, frameLen),
		buf:   make([]float64, frameLen),
		frame: make([]float64, frameLen),
		coef:  make([]complex128, frameLen/2+1),
		fft:   fourier.NewFFT(frameLen),
		acc:   make([]float64, frameLen/2+1),
	}
	var sw float64
	for _, w := range l.win {
		sw += w * w
	}
	l.norm = 1 / (float64(frameLen) * sw)
	return l, nil
}

// Write adds the samples of x to the stream. A chunk holding a NaN or
// infinite sample is rejected whole with an *Error and leaves the
// accumulator unchanged. Write does not allocate.
func (l *LTAS) Write(x []float64) error {
	if i := checkFinite(x); i >= 0 {
		return sampleError("LTAS.Write", x, i)
	}
	l.crest.add(x)
	for len(x) > 0 {
		c := copy(l.buf[l.fill:], x)
		l.fill += c
		x = x[c:]
		if l.fill == l.n {
			l.frameDone()
			copy(l.buf, l.buf[l.hop:])
			l.fill = l.n - l.hop
		}
	}
	return nil
}

func (l *LTAS) frameDone() {
	for i, w := range l.win {
		l.frame[i] = l.buf[i] * w
	}
	l.fft.Coefficients(l.coef, l.frame)
	for k, c := range l.coef {
		l.acc[k] += real(c)*real(c) + imag(c)*imag(c)
	}
	l.frames++
}

// Reset discards everything written, keeping the configuration.
func (l *LTAS) Reset() {
	clear(l.acc)
	l.fill, l.frames = 0, 0
	l.crest.Reset()
}

// SampleRate returns the sample rate in Hz.
func (l *LTAS) SampleRate() float64 { return l.fs }

// FrameLen returns the frame length in samples.
func (l *LTAS) FrameLen() int { return l.n }

// Frames returns the number of complete frames analysed.
func (l *LTAS) Frames() int { return l.frames }

// BinWidth returns the spacing of the spectrum's bins, fs/FrameLen Hz.
func (l *LTAS) BinWidth() float64 { return l.fs / float64(l.n) }

// PowerSpectrum writes the averaged one-sided power spectrum into dst
// (reallocated unless its length is FrameLen/2+1) and returns it. Bin k,
// at k·BinWidth Hz, holds P_k = c_k·mean(|X_k|²)/(N·Σw²) with c_k = 2
// except at DC and Nyquist where it is 1, so that Σ P_k is the stream's
// mean square (Parseval) for a stationary signal. All zero before the
// first frame.
func (l *LTAS) PowerSpectrum(dst []float64) []float64 {
	if len(dst) != len(l.acc) {
		dst = make([]float64, len(l.acc))
	}
	if l.frames == 0 {
		clear(dst)
		return dst
	}
	s := l.norm / float64(l.frames)
	for k, v := range l.acc {
		dst[k] = oneSidedWeight(k, l.n) * v * s
	}
	return dst
}

// Bands returns the one-third-octave bands 25 Hz … 20 kHz whose lower
// edge lies below Nyquist. Band power integrates the power spectrum with
// fractional bins: bin k spreads P_k uniformly over
// [(k−½)·Δf, (k+½)·Δf] clipped to [0, fs/2], and each band takes the
// share of each bin that overlaps [Lower, Upper].
func (l *LTAS) Bands() []Band {
	p := l.PowerSpectrum(nil)
	df := l.BinWidth()
	nyq := l.fs / 2
	var out []Band
	for x := FirstBand; x <= LastBand; x++ {
		lo, hi := BandEdges(x)
		if lo >= nyq {
			break
		}
		hiC := math.Min(hi, nyq)
		var pw float64
		k0 := max(0, int(math.Floor(lo/df-0.5)))
		k1 := min(len(p)-1, int(math.Ceil(hiC/df+0.5)))
		for k := k0; k <= k1; k++ {
			bl := math.Max(0, (float64(k)-0.5)*df)
			bh := math.Min(nyq, (float64(k)+0.5)*df)
			ov := math.Min(hiC, bh) - math.Max(lo, bl)
			if ov > 0 {
				pw += p[k] * ov / (bh - bl)
			}
		}
		out = append(out, Band{
			Index:   x,
			Nominal: nominalThirdOctave[x-FirstBand],
			Centre:  MidbandFrequency(x),
			Lower:   lo,
			Upper:   hi,
			Power:   pw,
			Level:   10 * math.Log10(pw/FullScaleMeanSquare),
		})
	}
	return out
}

// Centroid returns the spectral centroid Σ f_k·P_k / Σ P_k in Hz over
// bins 2..N/2. Bins 0 and 1 are left out: the periodic Hann window puts a
// DC offset exactly there, so an offset does not pull the centroid down.
// It is NaN before the first frame or for silence.
func (l *LTAS) Centroid() float64 {
	df := l.BinWidth()
	var num, den float64
	for k := 2; k < len(l.acc); k++ {
		p := oneSidedWeight(k, l.n) * l.acc[k]
		num += float64(k) * df * p
		den += p
	}
	return num / den
}

// CrestFactor returns 20·log10(peak/RMS) in dB over every sample written,
// including a trailing partial frame; NaN while the RMS is zero.
func (l *LTAS) CrestFactor() float64 { return l.crest.CrestFactor() }
