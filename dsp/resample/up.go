package resample

import "gonum.org/v1/gonum/floats"

// chunk is the number of base-rate samples Up and Down move through their
// linear history buffers per pass. It bounds their memory; any len(src) is
// accepted and walked in pieces of this size.
const chunk = 256

// Up raises the sample rate by an integer factor N with the polyphase form
// of a Filter: each output sample costs one phase, about len(Taps)/N
// multiply-adds, and the zero samples of the zero-stuffed signal are never
// touched. The gain is N times the prototype's, so a passband signal keeps
// its amplitude. Up is a streaming filter: its history carries over between
// calls. It is not safe for concurrent use.
type Up struct {
	factor int
	delay  int
	phases [][]float64 // phase p holds N·h[p+rN], r = 0, 1, …, in reversed order
	buf    []float64   // history of hist inputs followed by up to chunk new ones
	hist   int
}

// NewUp returns an upsampler by factor for a signal at base rate fs,
// using the prototype from Design(factor, fs).
func NewUp(factor int, fs float64) (*Up, error) {
	f, err := design("NewUp", factor, fs)
	if err != nil {
		return nil, err
	}
	return newUp(f), nil
}

func newUp(f *Filter) *Up {
	n := f.Factor
	u := &Up{factor: n, delay: f.HalfLength}
	if n == 1 {
		return u
	}
	u.phases = make([][]float64, n)
	for p := range u.phases {
		var ph []float64
		for j := p; j < len(f.Taps); j += n {
			ph = append(ph, float64(n)*f.Taps[j])
		}
		for i, j := 0, len(ph)-1; i < j; i, j = i+1, j-1 {
			ph[i], ph[j] = ph[j], ph[i]
		}
		u.phases[p] = ph
	}
	u.hist = len(u.phases[0]) - 1 // phase 0 is the longest: 2K+1 taps
	u.buf = make([]float64, u.hist+chunk)
	return u
}

// Process upsamples src into dst. len(dst) must equal Factor()·len(src);
// otherwise Process panics, as a caller's programming error. dst and src
// must not overlap. Process does not allocate.
func (u *Up) Process(dst, src []float64) {
	if len(dst) != u.factor*len(src) {
		lengthPanic("Up.Process", "len(dst)", len(dst), "factor·len(src)", u.factor*len(src))
	}
	if u.factor == 1 {
		copy(dst, src)
		return
	}
	n := u.factor
	for off := 0; off < len(src); off += chunk {
		c := min(chunk, len(src)-off)
		copy(u.buf[u.hist:], src[off:off+c])
		for i := 0; i < c; i++ {
			end := u.hist + i + 1 // one past the newest input
			out := dst[(off+i)*n : (off+i+1)*n]
			for p, ph := range u.phases {
				out[p] = dot(ph, u.buf[end-len(ph):end])
			}
		}
		copy(u.buf, u.buf[c:c+u.hist])
	}
}

// Factor returns the oversampling factor N.
func (u *Up) Factor() int { return u.factor }

// Latency returns the group delay in base-rate samples (the prototype's
// HalfLength; zero for factor 1).
func (u *Up) Latency() int { return u.delay }

// Reset clears the history, as if no input had been seen.
func (u *Up) Reset() { clear(u.buf) }

// dot returns Σ a[i]·b[i] over len(a); b must be at least as long as a.
// gonum's assembly kernel (SIMD on amd64) does the work.
func dot(a, b []float64) float64 { return floats.Dot(a, b[:len(a)]) }
