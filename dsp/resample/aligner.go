package resample

// Aligner removes a known integer delay from a same-rate stream so that
// output sample n lines up with input sample n, and makes the output exactly
// as long as the input.
//
// Process runs the wrapped processor and drops the first latency samples it
// produces over the life of the stream. Flush then feeds latency zeros
// through the processor and emits the held-back tail. Over a whole stream,
// the samples returned by Process and Flush together number exactly as many
// as were passed to Process, whatever the block sizes, including streams
// shorter than the latency.
//
// Memory is constant: two buffers of maxBlock samples, used only by Flush.
type Aligner struct {
	p       Inner
	latency int
	block   int
	skip    int // outputs still to drop
	zeros   int // zeros still to feed in Flush
	flushed bool
	zbuf    []float64
	out     []float64
}

// NewAligner wraps p, whose output lags its input by latency samples (for
// an Oversampler, its Latency() plus any delay of its inner processor).
// maxBlock is the largest block Flush hands to p.
func NewAligner(p Inner, latency, maxBlock int) (*Aligner, error) {
	const op = "NewAligner"
	if p == nil {
		return nil, ErrNilInner
	}
	if latency < 0 {
		return nil, &ParamError{Op: op, Param: "latency", Value: float64(latency),
			Reason: "is negative"}
	}
	if err := checkBlock(op, "maxBlock", maxBlock); err != nil {
		return nil, err
	}
	a := &Aligner{p: p, latency: latency, block: maxBlock,
		zbuf: make([]float64, maxBlock), out: make([]float64, maxBlock)}
	a.reset()
	return a, nil
}

// Latency returns the delay the Aligner removes.
func (a *Aligner) Latency() int { return a.latency }

// Process runs p on src and writes the aligned samples to the front of dst,
// returning how many it wrote: len(src) less whatever is still being
// dropped at the start of the stream. len(dst) must be at least len(src),
// since p writes len(src) samples there; dst and src may be the same slice
// when p allows it. Process panics if len(dst) < len(src) or if it is called
// after Flush without a Reset, both being caller's programming errors.
func (a *Aligner) Process(dst, src []float64) int {
	if len(dst) < len(src) {
		lengthPanic("Aligner.Process", "len(dst)", len(dst), "at least len(src)", len(src))
	}
	if a.flushed {
		panic("resample: Aligner.Process: called after Flush without Reset")
	}
	n := len(src)
	a.p.Process(dst[:n], src)
	drop := min(a.skip, n)
	if drop > 0 {
		copy(dst, dst[drop:n])
		a.skip -= drop
	}
	return n - drop
}

// Pending returns how many samples the remaining Flush calls will write:
// min(latency, samples passed to Process), less what Flush has written.
func (a *Aligner) Pending() int { return a.zeros - a.skip }

// Flush feeds zeros through p and writes the tail of the stream to dst,
// returning how many samples it wrote. If dst is shorter than Pending(),
// Flush writes what fits and may be called again; it returns 0 once the
// stream is complete. After Flush, only Flush and Reset may be called.
func (a *Aligner) Flush(dst []float64) int {
	a.flushed = true
	w := 0
	for a.zeros > 0 && w < len(dst) {
		c := min(a.zeros, a.block, len(dst)-w+a.skip)
		a.p.Process(a.out[:c], a.zbuf[:c])
		a.zeros -= c
		drop := min(a.skip, c)
		a.skip -= drop
		w += copy(dst[w:], a.out[drop:c])
	}
	return w
}

// Reset starts a new stream. It also calls p.Reset when p has such a
// method, so that the delay line starts empty again.
func (a *Aligner) Reset() {
	if r, ok := a.p.(interface{ Reset() }); ok {
		r.Reset()
	}
	a.reset()
}

func (a *Aligner) reset() {
	a.skip = a.latency
	a.zeros = a.latency
	a.flushed = false
}
