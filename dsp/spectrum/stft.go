package spectrum

import (
	"math"
	"strconv"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/dsp/window"
)

// MinLevel is the floor of short-time spectrum levels, in dB re a
// full-scale sine: a bin of exact silence reads MinLevel, not −∞.
const MinLevel = -300

// Spectrogram is a short-time spectrum: the level of every frequency bin
// in every frame of a signal.
type Spectrogram struct {
	// SampleRate is the signal's rate in Hz.
	SampleRate float64
	// FrameLen is the frame (and DFT) length in samples; Hop the step
	// between the starts of consecutive frames.
	FrameLen, Hop int
	// Level[f][k] is the level of bin k (k·SampleRate/FrameLen Hz,
	// k = 0..FrameLen/2) in frame f, in dB re a full-scale sine: a sine
	// of peak amplitude A centred on bin k reads 20·log10(A), so a
	// full-scale sine reads 0 dB. Floored at MinLevel.
	Level [][]float32
}

// Frames returns the number of frames.
func (s *Spectrogram) Frames() int { return len(s.Level) }

// Bins returns the number of bins per frame, FrameLen/2 + 1.
func (s *Spectrogram) Bins() int { return s.FrameLen/2 + 1 }

// BinHz returns the centre frequency of bin k in Hz.
func (s *Spectrogram) BinHz(k int) float64 { return float64(k) * s.SampleRate / float64(s.FrameLen) }

// Time returns the time of the centre of frame f, in seconds from the
// first sample: (f·Hop + FrameLen/2)/SampleRate.
func (s *Spectrogram) Time(f int) float64 {
	return (float64(f)*float64(s.Hop) + float64(s.FrameLen)/2) / s.SampleRate
}

// MaxLevel returns the highest level of any bin in any frame, or
// MinLevel when there are no frames.
func (s *Spectrogram) MaxLevel() float64 {
	m := float32(MinLevel)
	for _, fr := range s.Level {
		for _, v := range fr {
			m = max(m, v)
		}
	}
	return float64(m)
}

// Frame lengths accepted by NewSTFT.
const (
	MinSTFTFrame = 16
	MaxSTFTFrame = 1 << 20
)

// DefaultSTFTFrame returns the frame length NewSTFT picks for frameLen 0:
// the smallest power of two not shorter than 85 ms (4096 samples at
// 44.1 and 48 kHz: bins 11.7 Hz apart at 48 kHz, a third of the spacing
// of the lowest semitones of a guitar's bottom string).
func DefaultSTFTFrame(sampleRate float64) int {
	n := MinSTFTFrame
	for n < MaxSTFTFrame && float64(n) < 0.085*sampleRate {
		n <<= 1
	}
	return n
}

// HopFor returns a hop that keeps a signal of the given length within
// maxFrames frames of frameLen samples: a quarter frame (75 % overlap)
// when that fits, else the smallest hop that does.
func HopFor(samples, frameLen, maxFrames int) int {
	hop := max(frameLen/4, 1)
	if maxFrames < 2 || samples <= frameLen {
		return hop
	}
	need := (samples - frameLen + maxFrames - 2) / (maxFrames - 1)
	return max(hop, need)
}

// STFT accumulates a Spectrogram from a stream: frames of FrameLen
// samples weighted by a periodic Hann window (Harris 1978, §III), one
// every Hop samples (a hop longer than the frame skips the samples
// between frames). A trailing partial frame is not analysed.
//
// Levels are 20·log10(c_k·|X_k|/Σw) with c_k = 2 except at DC and Nyquist
// (where it is 1), X_k the DFT of the windowed frame: the window's
// coherent gain Σw/N is divided out, so an on-bin sine reads its peak
// amplitude. A sine half-way between bins reads 1.42 dB low, the Hann
// window's scalloping loss (Harris 1978, Table 1).
type STFT struct {
	fs     float64
	n, hop int
	win    []float64
	scale  float64 // 1/Σw
	buf    []float64
	fill   int
	skip   int // samples to discard before the next frame (hop > n)
	frame  []float64
	coef   []complex128
	fft    *fourier.FFT
	levels [][]float32
}

// NewSTFT returns a short-time spectrum accumulator for a stream sampled
// at sampleRate Hz with frames of frameLen samples (a power of two in
// [MinSTFTFrame, MaxSTFTFrame], or 0 for DefaultSTFTFrame) every hop
// samples (hop ≥ 1, or 0 for a quarter frame).
func NewSTFT(sampleRate float64, frameLen, hop int) (*STFT, error) {
	const op = "NewSTFT"
	if !finitePositive(sampleRate) {
		return nil, argError(op, "sampleRate", ErrInvalid, "want a finite rate > 0 Hz, got "+ftoa(sampleRate))
	}
	if frameLen == 0 {
		frameLen = DefaultSTFTFrame(sampleRate)
	}
	if frameLen < MinSTFTFrame || frameLen > MaxSTFTFrame || frameLen&(frameLen-1) != 0 {
		return nil, argError(op, "frameLen", ErrInvalid,
			"want a power of two in ["+strconv.Itoa(MinSTFTFrame)+", "+strconv.Itoa(MaxSTFTFrame)+"], got "+strconv.Itoa(frameLen))
	}
	if hop == 0 {
		hop = frameLen / 4
	}
	if hop < 1 {
		return nil, argError(op, "hop", ErrInvalid, "want at least 1 sample, got "+strconv.Itoa(hop))
	}
	s := &STFT{
		fs:    sampleRate,
		n:     frameLen,
		hop:   hop,
		win:   periodicWindow(window.Hann, frameLen),
		buf:   make([]float64, frameLen),
		frame: make([]float64, frameLen),
		coef:  make([]complex128, frameLen/2+1),
		fft:   fourier.NewFFT(frameLen),
	}
	var sw float64
	for _, w := range s.win {
		sw += w
	}
	s.scale = 1 / sw
	return s, nil
}

// Write adds the samples of x to the stream. A chunk holding a NaN or
// infinite sample is rejected whole with an *Error and changes nothing.
func (s *STFT) Write(x []float64) error {
	if i := checkFinite(x); i >= 0 {
		return sampleError("STFT.Write", x, i)
	}
	for len(x) > 0 {
		if s.skip > 0 {
			d := min(s.skip, len(x))
			s.skip -= d
			x = x[d:]
			continue
		}
		c := copy(s.buf[s.fill:], x)
		s.fill += c
		x = x[c:]
		if s.fill == s.n {
			s.frameDone()
			if s.hop < s.n {
				copy(s.buf, s.buf[s.hop:])
				s.fill = s.n - s.hop
			} else {
				s.fill = 0
				s.skip = s.hop - s.n
			}
		}
	}
	return nil
}

func (s *STFT) frameDone() {
	for i, w := range s.win {
		s.frame[i] = s.buf[i] * w
	}
	s.fft.Coefficients(s.coef, s.frame)
	lv := make([]float32, len(s.coef))
	for k, c := range s.coef {
		a := oneSidedWeight(k, s.n) * math.Hypot(real(c), imag(c)) * s.scale
		l := float64(MinLevel)
		if a > 0 {
			l = math.Max(MinLevel, 20*math.Log10(a))
		}
		lv[k] = float32(l)
	}
	s.levels = append(s.levels, lv)
}

// Spectrogram returns the frames analysed so far. Later writes append
// frames to the accumulator but never change those returned.
func (s *STFT) Spectrogram() *Spectrogram {
	lv := make([][]float32, len(s.levels))
	copy(lv, s.levels)
	return &Spectrogram{SampleRate: s.fs, FrameLen: s.n, Hop: s.hop, Level: lv}
}

// NewSpectrogram analyses a whole signal: NewSTFT, then Write.
func NewSpectrogram(x []float64, sampleRate float64, frameLen, hop int) (*Spectrogram, error) {
	s, err := NewSTFT(sampleRate, frameLen, hop)
	if err != nil {
		return nil, err
	}
	if err := s.Write(x); err != nil {
		return nil, err
	}
	if len(s.levels) == 0 {
		return nil, argError("NewSpectrogram", "x", ErrShort,
			strconv.Itoa(len(x))+" samples, fewer than one frame of "+strconv.Itoa(s.n))
	}
	return s.Spectrogram(), nil
}
