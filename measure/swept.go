package measure

import (
	"context"
	"fmt"
	"math"
	"math/bits"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/engine"
	"renderchain/models"
	"renderchain/parallel"
	"renderchain/report"
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
	Oversample int     // 0: the chain's own, else engine.DefaultOversample
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
	Solver           report.Solver `json:"solver"`
}

// sweepDesign is the synchronized exponential sweep of a measurement:
// f(t) = f1·e^(t/L) from f1 to f2 over T = L·ln(f2/f1), f1·L a whole
// number, with raised-cosine fades ending at tIn and starting at tOut.
type sweepDesign struct {
	f1, f2, L, T  float64
	tIn, tOut, fo float64
	fs, amplitude float64
	x             []float64 // the sweep, source volts
	ntail         int
	orders        int
	lo, hi        float64 // the asked band
	passband      float64 // the rate converter's passband edge
}

// checkSwept fills in the defaults and refuses options out of range, as
// *models.FieldError naming the field.
func checkSwept(freqs []float64, opt SweptOptions) (SweptOptions, error) {
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
	case !models.SignalRange.Contains(opt.Amplitude):
		return opt, models.Fieldf("amplitude", models.FormatValue(opt.Amplitude, "V"), "must be %s", models.SignalRange.Describe())
	case !(opt.Duration >= 0.2 && opt.Duration <= 60):
		return opt, models.Fieldf("duration", fmt.Sprintf("%gs", opt.Duration), "must lie between 0.2 s and 60 s")
	case !(opt.Tail >= 0.05 && opt.Tail <= 10):
		return opt, models.Fieldf("tail", fmt.Sprintf("%gs", opt.Tail), "must lie between 0.05 s and 10 s")
	case opt.Orders < 1 || opt.Orders > maxSweepOrders:
		return opt, models.Fieldf("orders", fmt.Sprint(opt.Orders), "must be between 1 and %d", maxSweepOrders)
	case !(fs >= engine.MinRate && fs <= engine.MaxRate):
		return opt, models.Fieldf("sample_rate", fmt.Sprint(fs), "must be between %d kHz and %d kHz", engine.MinRate/1000, engine.MaxRate/1000)
	}
	return opt, checkFreqs(freqs, 0.98*fs/2, models.FormatValue(fs, "Hz")+" rate less a 2 % guard band")
}

// designSweep lays out the sweep for the asked frequencies: from f1 = half
// the lowest to f2 = 2·orders times the highest (capped below Nyquist), so
// that the highest harmonic asked for is still inside the inverse
// filter's band, with f1·L a whole number so that every harmonic's phase
// lines up with the sweep's (the synchronized sweep). Raised-cosine fades
// run over the first three quarters of the way from f1 to the lowest
// frequency and over the top half octave below f2 (or, when the highest
// frequency lies closer to f2, the upper half of the way from it to f2, on
// a log scale), outside the measured band. A long fade-in keeps the
// deconvolved pulse's low-frequency edge smooth, so that its ringing stays
// short.
func designSweep(freqs []float64, opt SweptOptions) *sweepDesign {
	fs := opt.SampleRate
	d := &sweepDesign{fs: fs, amplitude: opt.Amplitude, orders: opt.Orders, lo: freqs[0], hi: freqs[0], passband: passbandEdge(fs)}
	for _, f := range freqs {
		d.lo, d.hi = math.Min(d.lo, f), math.Max(d.hi, f)
	}
	d.f1 = math.Max(d.lo/2, 1)
	d.f2 = math.Min(2*float64(opt.Orders)*d.hi, 0.98*fs/2)
	d.L = math.Max(math.Round(d.f1*opt.Duration/math.Log(d.f2/d.f1)), 1) / d.f1
	d.T = d.L * math.Log(d.f2/d.f1)
	d.tIn = d.L * math.Log(d.lo/d.f1) * 0.75
	d.fo = d.f2 / math.Sqrt2
	if d.fo < d.hi {
		d.fo = math.Sqrt(d.hi * d.f2)
	}
	d.tOut = d.L * math.Log(d.fo/d.f1)
	d.x = make([]float64, int(d.T*fs))
	for n := range d.x {
		t := float64(n) / fs
		v := opt.Amplitude * math.Sin(2*math.Pi*d.f1*d.L*math.Exp(t/d.L))
		switch {
		case t < d.tIn:
			v *= 0.5 * (1 - math.Cos(math.Pi*t/d.tIn))
		case t > d.tOut:
			v *= 0.5 * (1 + math.Cos(math.Pi*(t-d.tOut)/(d.T-d.tOut)))
		}
		d.x[n] = v
	}
	d.ntail = int(opt.Tail * fs)
	return d
}

// deconvolve convolves the output y and the sweep itself with the inverse
// filter: the sweep reversed in time with an envelope falling 6 dB per
// octave, e^(−t/L), which whitens the sweep's pink spectrum. Linear
// convolution through one FFT of length ≥ len(y) + len(x). It returns
// the deconvolved output and the deconvolved sweep (the reference).
func (d *sweepDesign) deconvolve(y []float64) (dy, dx []float64, nfft int) {
	nx := len(d.x)
	inv := make([]float64, nx)
	for n := range inv {
		inv[n] = d.x[nx-1-n] * math.Exp(-float64(n)/(d.fs*d.L))
	}
	nfft = 1 << bits.Len(uint(len(y)+nx))
	fft := fourier.NewFFT(nfft)
	pad := make([]float64, nfft)
	spec := func(s []float64) []complex128 {
		clear(pad)
		copy(pad, s)
		return fft.Coefficients(nil, pad)
	}
	I := spec(inv)
	Y := spec(y)
	X := spec(d.x)
	for k := range Y {
		Y[k] *= I[k]
		X[k] *= I[k]
	}
	return fft.Sequence(nil, Y), fft.Sequence(nil, X), nfft
}

// curves cuts each order's impulse response out of the deconvolved output
// and transforms it at the asked frequencies. The linear response sits at
// lag0 = nx−1; order h's at lag0 − L·ln(h)·fs. Each gap between
// neighbouring orders is split evenly: the later order's half is its
// window's lead-in (covering the deconvolved pulse's ringing on both sides
// of its peak), the earlier order's half its decay. The linear response's
// window runs on for the tail. Each window rises over the first half of
// its lead-in and falls over the last quarter of its decay (raised
// cosines). The same window cut from the deconvolved sweep itself is the
// reference each response is divided by, so the sweep's own band edges
// and the inverse filter's scale cancel.
func (d *sweepDesign) curves(freqs, dy, dx []float64) ([]Curve, []SweptWindow) {
	fs := d.fs
	lag0 := float64(len(d.x) - 1)
	offset := func(h int) float64 { return d.L * math.Log(float64(h)) * fs }
	var curves []Curve
	var wins []SweptWindow
	var h1 []complex128
	for h := 1; h <= d.orders; h++ {
		pre := 0.5 * (offset(h+1) - offset(h))
		post := float64(d.ntail)
		if h > 1 {
			post = 0.5 * (offset(h) - offset(h-1))
		}
		w := cutWindow{pre: pre, post: post}
		centre := lag0 - offset(h)
		wins = append(wins, SweptWindow{Order: h, OffsetS: -offset(h) / fs, PreS: pre / fs, PostS: post / fs, ResolutionHz: fs / (pre + post)})
		cv := Curve{Harmonic: h, ResolutionHz: fs / (pre + post)}
		for i, f := range freqs {
			F := float64(h) * f
			if h > 1 && (F > d.fo || F > d.passband) {
				continue
			}
			H := w.dtft(dy, centre, F/fs) / w.dtft(dx, lag0, F/fs)
			p := point(f, H)
			if h == 1 {
				h1 = append(h1, H)
			} else {
				r := report.Level(report.DB(cmplx.Abs(H) / cmplx.Abs(h1[i])))
				p.DBc = &r
			}
			cv.Points = append(cv.Points, p)
		}
		curves = append(curves, cv)
	}
	return curves, wins
}

// Swept measures the chain's large-signal response with an exponential
// sine sweep (Farina 2000) in its synchronized form (Novák et al. 2015):
// the sweep runs through the nonlinear circuit on the engine's path, the
// output is deconvolved with the sweep's inverse filter, and the impulse
// responses that fall apart in time — the linear one and one per harmonic
// order — are windowed and transformed. It returns one curve per order
// 1…opt.Orders; harmonic curves are plotted against the excitation
// frequency f, at which the h-th harmonic sits at h·f.
func Swept(ctx context.Context, ch *chains.Chain, freqs []float64, opt SweptOptions) ([]Curve, *SweptInfo, error) {
	opt, err := checkSwept(freqs, opt)
	if err != nil {
		return nil, nil, err
	}
	d := designSweep(freqs, opt)
	p, err := engine.PrepareContext(ctx, ch, opt.Oversample)
	if err != nil {
		return nil, nil, err
	}
	node, err := probeNode(p, "probe", opt.Probe)
	if err != nil {
		return nil, nil, err
	}
	y, chn, err := p.Render(ctx, d.fs, node, d.x, d.ntail)
	if err != nil {
		return nil, nil, err
	}
	w, err := bias.Warnings(ctx, p)
	if err != nil {
		return nil, nil, err
	}
	dy, dx, nfft := d.deconvolve(y)
	curves, wins := d.curves(freqs, dy, dx)
	for i := range curves {
		curves[i].Warnings = w
	}
	info := &SweptInfo{AmplitudeV: opt.Amplitude, F1Hz: d.f1, F2Hz: d.f2, DurationS: d.T, LS: d.L, SecondsPerOctave: d.L * math.Ln2,
		FadeInS: d.tIn, FadeOutS: d.T - d.tOut, TailS: float64(d.ntail) / d.fs, SampleRate: d.fs, Oversample: p.Oversample, FFTSize: nfft,
		Windows: wins, Solver: report.SolverOf(chn.Stats())}
	return curves, info, nil
}

// cutWindow is a time window around a centre lag: flat, with a raised-cosine
// rise over the first half of the lead-in and fall over the last quarter of
// the decay. Lengths in samples.
type cutWindow struct{ pre, post float64 }

func (w cutWindow) at(tau float64) float64 {
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
func (w cutWindow) dtft(s []float64, c, nu float64) complex128 {
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
	err := parallel.For(ctx, len(variants), workers, func(ctx context.Context, i int) error {
		var err error
		curves[i], infos[i], err = Swept(ctx, chs[i], freqs, opt)
		return err
	})
	if err != nil {
		return nil, err
	}
	info := *infos[0]
	var st report.Solver
	for _, in := range infos {
		// The sweep is the same for every variant; the solver's work is not.
		st = addSolver(st, in.Solver)
	}
	info.Solver = st
	rep := &ResponseReport{Chain: ch.Name, ChainFile: ch.File, Mode: "swept", Probe: probeName(opt.Probe), Reference: "source", Swept: &info,
		Knobs: Knobs(ch)}
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
	// One list per variant, named as a small-signal curve would be.
	named := make([]Curve, len(variants))
	for i, v := range variants {
		named[i] = Curve{Label: curveLabel(v), Warnings: curves[i][0].Warnings}
	}
	rep.Warnings = combineCurves(named)
	return rep, nil
}

// addSolver pools the solver statistics of two runs.
func addSolver(a, b report.Solver) report.Solver {
	n := a.Samples + b.Samples
	mean := 0.0
	if n > 0 {
		mean = math.Round((a.MeanIterations*float64(a.Samples)+b.MeanIterations*float64(b.Samples))/float64(n)*1000) / 1000
	}
	return report.Solver{Samples: n, MeanIterations: mean, MaxIterations: max(a.MaxIterations, b.MaxIterations),
		Fallbacks: a.Fallbacks + b.Fallbacks, NonConverged: a.NonConverged + b.NonConverged}
}
