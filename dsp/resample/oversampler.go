package resample

import "errors"

// Inner is a block processor: Process fills dst from src, with
// len(dst) == len(src). Oversampler runs one at the oversampled rate and
// never passes it overlapping slices; Aligner wraps one at its own rate.
type Inner interface {
	Process(dst, src []float64)
}

// ErrNilInner is returned by NewOversampler and NewAligner when the wrapped
// processor is nil.
var ErrNilInner = errors.New("resample: inner processor is nil")

// Oversampler runs an Inner processor at factor·fs between an Up and a Down
// built from the same prototype. For an identity Inner its output is its
// input delayed by Latency() base-rate samples and band-limited to the
// passband; Aligner removes the delay. It is not safe for concurrent use.
type Oversampler struct {
	up     *Up
	down   *Down
	inner  Inner
	factor int
	block  int
	hi     []float64 // upsampled block, input of inner
	hiOut  []float64 // output of inner
}

// NewOversampler wraps inner, which must run at factor·fs. maxBlock is the
// number of base-rate samples handled per inner call; inner sees at most
// factor·maxBlock samples at a time. The buffers are allocated here, once.
func NewOversampler(factor int, fs float64, inner Inner, maxBlock int) (*Oversampler, error) {
	const op = "NewOversampler"
	f, err := design(op, factor, fs)
	if err != nil {
		return nil, err
	}
	if inner == nil {
		return nil, ErrNilInner
	}
	if err := checkBlock(op, "maxBlock", maxBlock); err != nil {
		return nil, err
	}
	return &Oversampler{
		up:     newUp(f),
		down:   newDown(f),
		inner:  inner,
		factor: factor,
		block:  maxBlock,
		hi:     make([]float64, factor*maxBlock),
		hiOut:  make([]float64, factor*maxBlock),
	}, nil
}

// Process fills dst from src; len(dst) must equal len(src), otherwise
// Process panics as a caller's programming error. Inputs longer than
// maxBlock are processed in maxBlock pieces. dst and src may be the same
// slice. Process does not allocate unless inner does.
func (o *Oversampler) Process(dst, src []float64) {
	if len(dst) != len(src) {
		lengthPanic("Oversampler.Process", "len(dst)", len(dst), "len(src)", len(src))
	}
	for off := 0; off < len(src); off += o.block {
		c := min(o.block, len(src)-off)
		hi, hiOut := o.hi[:c*o.factor], o.hiOut[:c*o.factor]
		o.up.Process(hi, src[off:off+c])
		o.inner.Process(hiOut, hi)
		o.down.Process(dst[off:off+c], hiOut)
	}
}

// Factor returns the oversampling factor.
func (o *Oversampler) Factor() int { return o.factor }

// Latency returns the total delay of Up and Down in base-rate samples. It
// does not include any delay of the inner processor.
func (o *Oversampler) Latency() int { return o.up.Latency() + o.down.Latency() }

// Reset clears the filter histories. The inner processor is not touched;
// reset its state separately.
func (o *Oversampler) Reset() {
	o.up.Reset()
	o.down.Reset()
}
