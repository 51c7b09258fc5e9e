package resample

// Down lowers the sample rate by an integer factor N: it filters with the
// prototype of Design and keeps every N-th output, and it computes only the
// outputs it keeps. The prototype is symmetric, so each kept output costs
// about len(Taps)/2 multiplies and len(Taps) adds. Down is a streaming
// filter: its history carries over between calls. It is not safe for
// concurrent use.
type Down struct {
	factor int
	delay  int
	taps   []float64 // symmetric prototype, so reversed order = natural order
	buf    []float64 // history of hist inputs followed by up to chunk·N new ones
	hist   int
}

// NewDown returns a downsampler by factor for a signal whose base (output)
// rate is fs, using the prototype from Design(factor, fs).
func NewDown(factor int, fs float64) (*Down, error) {
	f, err := design("NewDown", factor, fs)
	if err != nil {
		return nil, err
	}
	return newDown(f), nil
}

func newDown(f *Filter) *Down {
	d := &Down{factor: f.Factor, delay: f.HalfLength}
	if f.Factor == 1 {
		return d
	}
	d.taps = append([]float64(nil), f.Taps...)
	d.hist = len(d.taps) - 1
	d.buf = make([]float64, d.hist+chunk*f.Factor)
	return d
}

// Process decimates src into dst. len(src) must equal Factor()·len(dst);
// otherwise Process panics, as a caller's programming error. Output n is the
// filtered signal at input index n·N, so a signal that enters Up and leaves
// Down is delayed by exactly Up.Latency()+Down.Latency() base-rate samples.
// dst and src must not overlap. Process does not allocate.
func (d *Down) Process(dst, src []float64) {
	if len(src) != d.factor*len(dst) {
		lengthPanic("Down.Process", "len(src)", len(src), "factor·len(dst)", d.factor*len(dst))
	}
	if d.factor == 1 {
		copy(dst, src)
		return
	}
	n := d.factor
	for off := 0; off < len(dst); off += chunk {
		c := min(chunk, len(dst)-off)
		copy(d.buf[d.hist:], src[off*n:(off+c)*n])
		for i := 0; i < c; i++ {
			dst[off+i] = dot(d.taps, d.buf[i*n:i*n+len(d.taps)])
		}
		copy(d.buf, d.buf[c*n:c*n+d.hist])
	}
}

// Factor returns the decimation factor N.
func (d *Down) Factor() int { return d.factor }

// Latency returns the group delay in base-rate samples (the prototype's
// HalfLength; zero for factor 1).
func (d *Down) Latency() int { return d.delay }

// Reset clears the history, as if no input had been seen.
func (d *Down) Reset() { clear(d.buf) }
