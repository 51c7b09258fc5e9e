package measure

import (
	"context"
	"fmt"
	"math"
	"math/bits"

	"gonum.org/v1/gonum/dsp/fourier"

	"renderchain/chains"
	"renderchain/dsp/resample"
	"renderchain/models"
	"renderchain/render"
)

// Defaults of SweptOptions.
const (
	DefaultSweepDuration = 2.0 // s
	DefaultSweepTail     = 0.5 // s
	DefaultSweepOrders   = 3
	maxSweepOrders       = 10
)

// SweptOptions configure a swept-sine measurement.
type SweptOptions struct {
	Amplitude  float64 // volts peak at the source
	Duration   float64 // nominal sweep length in s (default 2 s)
	Tail       float64 // silence after the sweep in s (default 0.5 s)
	SampleRate float64 // base rate (default 48 kHz)
	Oversample int     // 0: the chain's own, else render.DefaultOversample
	Orders     int     // highest harmonic response reported (default 3)
	Probe      string  // node measured; empty is the output
}

// SweptWindow describes the time window cut around one order's impulse
// response.
type SweptWindow struct {
	Order        int     `json:"order"`
	OffsetS      float64 `json:"offset_s"` // where the order's response sits, relative to the linear one
	PreS         float64 `json:"pre_s"`    // window extent before it
	PostS        float64 `json:"post_s"`   // and after it
	ResolutionHz float64 `json:"resolution_hz"`
}

// SweptInfo documents a swept measurement.
type SweptInfo struct {
	AmplitudeV       float64       `json:"amplitude_v_peak"`
	F1Hz             float64       `json:"f1_hz"`
	F2Hz             float64       `json:"f2_hz"`
	DurationS        float64       `json:"duration_s"`
	LS               float64       `json:"l_s"` // time for the frequency to grow by e
	SecondsPerOctave float64       `json:"seconds_per_octave"`
	FadeInS          float64       `json:"fade_in_s"`
	FadeOutS         float64       `json:"fade_out_s"`
	TailS            float64       `json:"tail_s"`
	SampleRate       float64       `json:"sample_rate_hz"`
	Oversample       int           `json:"oversample"`
	FFTSize          int           `json:"fft_size"`
	Windows          []SweptWindow `json:"windows"`
	Solver           Solver        `json:"solver"`
}

// Swept measures the chain's large-signal response with an exponential
// sine sweep (Farina 2000) in its synchronized form (Novák et al. 2015):
// the sweep runs through the nonlinear circuit on the render path, the
// output is deconvolved with the sweep's inverse filter, and the
// impulse responses that fall apart in time — the linear one and one per
// harmonic order — are windowed and transformed. It returns one curve per
// order 1…opt.Orders; harmonic curves are plotted against the excitation
// frequency f, at which the h-th harmonic sits at h·f.
func Swept(ctx context.Context, ch *chains.Chain, freqs []float64, opt SweptOptions) ([]Curve, *SweptInfo, error) {
	if opt.SampleRate == 0 {
		opt.SampleRate = DefaultSampleRate
	}
	if opt.Duration == 0 {
		opt.Duration = DefaultSweepDuration
	}
	if opt.Tail == 0 {
		opt.Tail = DefaultSweepTail
	}
	if opt.Orders == 0 {
		opt.Orders = DefaultSweepOrders
	}
	fs := opt.SampleRate
	switch {
	case !(opt.Amplitude > 0) || math.IsInf(opt.Amplitude, 0):
		return nil, nil, inputErr("amplitude", models.FormatValue(opt.Amplitude, "V"), "must be above 0 V")
	case !(opt.Duration >= 0.2 && opt.Duration <= 60):
		return nil, nil, inputErr("--duration", fmt.Sprintf("%gs", opt.Duration), "must lie between 0.2 s and 60 s")
	case !(opt.Tail >= 0.05 && opt.Tail <= 10):
		return nil, nil, inputErr("sweep tail", fmt.Sprintf("%gs", opt.Tail), "must lie between 0.05 s and 10 s")
	case opt.Orders < 1 || opt.Orders > maxSweepOrders:
		return nil, nil, inputErr("--orders", fmt.Sprint(opt.Orders), "must be between 1 and %d", maxSweepOrders)
	case !(fs >= 8000 && fs <= float64(render.MaxRate)):
		return nil, nil, inputErr("sample rate", fmt.Sprint(fs), "must be between 8 kHz and %d kHz", render.MaxRate/1000)
	}
	f2max := 0.98 * fs / 2
	if err := checkFreqs(freqs, f2max, models.FormatValue(fs, "Hz")+" rate less a 2 % guard band"); err != nil {
		return nil, nil, err
	}
	lo, hi := freqs[0], freqs[0]
	for _, f := range freqs {
		lo, hi = math.Min(lo, f), math.Max(hi, f)
	}

	// The sweep: f(t) = f1·e^(t/L) from f1 = lo/2 to f2 = 2·orders·hi
	// (capped below Nyquist), so that the highest harmonic asked for is
	// still inside the inverse filter's band, with f1·L a whole number so
	// that every harmonic's phase lines up with the sweep's (the
	// synchronized sweep).
	f1 := math.Max(lo/2, 1)
	f2 := math.Min(2*float64(opt.Orders)*hi, f2max)
	L := math.Max(math.Round(f1*opt.Duration/math.Log(f2/f1)), 1) / f1
	T := L * math.Log(f2/f1)
	nx := int(T * fs)
	// Raised-cosine fades over the first three quarters of the way from
	// f1 to lo and over the top half octave below f2 (or, when hi lies
	// closer to f2, the upper half of the way from hi to f2, on a log
	// scale), outside the measured band. A long fade-in keeps the
	// deconvolved pulse's low-frequency edge smooth, so that its ringing
	// stays short.
	tIn := L * math.Log(lo/f1) * 0.75
	fo := f2 / math.Sqrt2
	if fo < hi {
		fo = math.Sqrt(hi * f2)
	}
	tOut := L * math.Log(fo/f1)
	x := make([]float64, nx)
	for n := range x {
		t := float64(n) / fs
		v := opt.Amplitude * math.Sin(2*math.Pi*f1*L*math.Exp(t/L))
		switch {
		case t < tIn:
			v *= 0.5 * (1 - math.Cos(math.Pi*t/tIn))
		case t > tOut:
			v *= 0.5 * (1 + math.Cos(math.Pi*(t-tOut)/(T-tOut)))
		}
		x[n] = v
	}

	eng, err := render.Prepare(ch, opt.Oversample)
	if err != nil {
		return nil, nil, err
	}
	probe, err := ResolveNode(eng.Chain, eng.Circuit, opt.Probe)
	if err != nil {
		return nil, nil, err
	}
	st, scale, stats, err := openStream(eng, fs, probe)
	if err != nil {
		return nil, nil, err
	}
	ntail := int(opt.Tail * fs)
	ny := nx + ntail
	y := make([]float64, ny)
	src := make([]float64, render.MaxBlock)
	got := 0
	for pos := 0; pos < ny; pos += len(src) {
		if err := ctx.Err(); err != nil {
			return nil, nil, err
		}
		k := min(len(src), ny-pos)
		for i := 0; i < k; i++ {
			if pos+i < nx {
				src[i] = x[pos+i] / eng.Chain.InputPeak
			} else {
				src[i] = 0
			}
		}
		got += st.Process(y[got:], src[:k])
	}
	if fl, ok := st.(interface{ Flush([]float64) int }); ok {
		for got < ny {
			k := fl.Flush(y[got:])
			if k == 0 {
				break
			}
			got += k
		}
	}
	for i := range y {
		y[i] *= scale
	}

	// Deconvolution by the inverse filter: the sweep reversed in time
	// with an envelope falling 6 dB per octave, e^(−t/L), which whitens
	// the sweep's pink spectrum. Linear convolution through one FFT of
	// length ≥ ny + nx.
	inv := make([]float64, nx)
	for n := range inv {
		inv[n] = x[nx-1-n] * math.Exp(-float64(n)/(fs*L))
	}
	nfft := 1 << bits.Len(uint(ny+nx))
	fft := fourier.NewFFT(nfft)
	pad := make([]float64, nfft)
	spec := func(s []float64) []complex128 {
		clear(pad)
		copy(pad, s)
		return fft.Coefficients(nil, pad)
	}
	I := spec(inv)
	Y := spec(y)
	X := spec(x)
	for k := range Y {
		Y[k] *= I[k]
		X[k] *= I[k]
	}
	dy := fft.Sequence(nil, Y)
	dx := fft.Sequence(nil, X)

	// Windows. The linear response sits at lag0 = nx−1; order h's at
	// lag0 − L·ln(h)·fs. Each gap between neighbouring orders is split
	// evenly: the later order's half is its window's lead-in (covering the
	// deconvolved pulse's ringing on both sides of its peak), the earlier
	// order's half its decay. The linear response's window runs on for
	// the tail. Each window rises over the first half of its lead-in and
	// falls over the last quarter of its decay (raised cosines). The same
	// window cut from the deconvolved sweep itself is the reference each
	// response is divided by, so the sweep's own band edges and the
	// inverse filter's scale cancel.
	lag0 := float64(nx - 1)
	offset := func(h int) float64 { return L * math.Log(float64(h)) * fs }
	info := &SweptInfo{AmplitudeV: opt.Amplitude, F1Hz: f1, F2Hz: f2, DurationS: T, LS: L, SecondsPerOctave: L * math.Ln2,
		FadeInS: tIn, FadeOutS: T - tOut, TailS: float64(ntail) / fs, SampleRate: fs, Oversample: eng.Oversample, FFTSize: nfft}
	passband := resample.PassbandEdge
	if fs < 44100 {
		passband = fs * resample.PassbandEdge / 44100
	}
	fadeOutStart := fo
	var curves []Curve
	var h1 []complex128
	for h := 1; h <= opt.Orders; h++ {
		pre := 0.5 * (offset(h+1) - offset(h))
		post := float64(ntail)
		if h > 1 {
			post = 0.5 * (offset(h) - offset(h-1))
		}
		w := window{pre: pre, post: post}
		centre := lag0 - offset(h)
		info.Windows = append(info.Windows, SweptWindow{Order: h, OffsetS: -offset(h) / fs, PreS: pre / fs, PostS: post / fs,
			ResolutionHz: fs / (pre + post)})
		cv := Curve{Harmonic: h, ResolutionHz: fs / (pre + post)}
		for i, f := range freqs {
			F := float64(h) * f
			if h > 1 && (F > fadeOutStart || F > passband) {
				continue
			}
			num := w.dtft(dy, centre, F/fs)
			den := w.dtft(dx, lag0, F/fs)
			H := num / den
			p := point(f, H)
			if h == 1 {
				h1 = append(h1, H)
			} else {
				r := Num(db(cmplxAbs(H) / cmplxAbs(h1[i])))
				p.DBc = &r
			}
			cv.Points = append(cv.Points, p)
		}
		curves = append(curves, cv)
	}
	s := stats()
	info.Solver = Solver{MeanIterations: s.MeanIterations(), MaxIterations: s.MaxIterations, Fallbacks: s.Fallbacks, NonConverged: s.NonConverged}
	return curves, info, nil
}

// window is a time window around a centre lag: flat, with a raised-cosine
// rise over the first half of the lead-in and fall over the last quarter of
// the decay. Lengths in samples.
type window struct{ pre, post float64 }

func (w window) at(tau float64) float64 {
	rise := w.pre / 2
	fall := w.post / 4
	switch {
	case tau < -w.pre || tau > w.post:
		return 0
	case tau < -w.pre+rise:
		return 0.5 * (1 - math.Cos(math.Pi*(tau+w.pre)/rise))
	case tau > w.post-fall:
		return 0.5 * (1 + math.Cos(math.Pi*(tau-(w.post-fall))/fall))
	}
	return 1
}

// dtft evaluates Σ w(n−c)·s[n]·e^(−j2πν(n−c)) over the window, ν in
// cycles per sample. The phasor is advanced by multiplication and
// recomputed exactly every 256 samples.
func (w window) dtft(s []float64, c, nu float64) complex128 {
	a := max(int(math.Ceil(c-w.pre)), 0)
	b := min(int(math.Floor(c+w.post)), len(s)-1)
	var sum complex128
	step := complex(math.Cos(-2*math.Pi*nu), math.Sin(-2*math.Pi*nu))
	var ph complex128
	for n := a; n <= b; n++ {
		tau := float64(n) - c
		if (n-a)%256 == 0 {
			sn, cs := math.Sincos(-2 * math.Pi * nu * tau)
			ph = complex(cs, sn)
		}
		sum += complex(w.at(tau)*s[n], 0) * ph
		ph *= step
	}
	return sum
}

// RunSwept runs Swept for every variant of the chain, in parallel, and
// labels the curves "H1 …", "H2 …" with the variant's settings.
func RunSwept(ctx context.Context, ch *chains.Chain, variants []Variant, freqs []float64, opt SweptOptions, workers int) (*ResponseReport, error) {
	if len(variants) == 0 {
		variants = []Variant{{}}
	}
	chs := make([]*chains.Chain, len(variants))
	for i, v := range variants {
		c, err := v.Apply(ch)
		if err != nil {
			return nil, err
		}
		chs[i] = c
	}
	curves := make([][]Curve, len(variants))
	infos := make([]*SweptInfo, len(variants))
	errs := make([]error, len(variants))
	if err := parallel(ctx, len(variants), workers, func(ctx context.Context, i int) error {
		curves[i], infos[i], errs[i] = Swept(ctx, chs[i], freqs, opt)
		return errs[i]
	}); err != nil {
		return nil, err
	}
	for _, e := range errs {
		if e != nil && !isCanceled(e) {
			return nil, e
		}
	}
	info := *infos[0]
	for _, in := range infos[1:] {
		// The sweep is the same for every variant; the solver's work is not.
		info.Solver.MaxIterations = max(info.Solver.MaxIterations, in.Solver.MaxIterations)
		info.Solver.Fallbacks += in.Solver.Fallbacks
		info.Solver.NonConverged += in.Solver.NonConverged
		info.Solver.MeanIterations += in.Solver.MeanIterations / float64(len(infos))
	}
	if len(infos) > 1 {
		info.Solver.MeanIterations -= infos[0].Solver.MeanIterations * (1 - 1/float64(len(infos)))
	}
	rep := &ResponseReport{Chain: ch.Name, ChainFile: ch.File, Mode: "swept", Probe: probeName(opt.Probe), Reference: "source", Swept: &info}
	for i, v := range variants {
		for _, c := range curves[i] {
			name := "H1 linear"
			if c.Harmonic > 1 {
				name = fmt.Sprintf("H%d", c.Harmonic)
			}
			if v.Label != "" {
				name += " " + v.Label
			}
			c.Label = name
			c.Settings = v.Sets
			rep.Curves = append(rep.Curves, c)
		}
	}
	return rep, nil
}
