package measure

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/dsp/fourier"

	"renderchain/chains"
	"renderchain/dsp/resample"
	"renderchain/dsp/spectrum"
	"renderchain/dsp/wdf"
	"renderchain/models"
	"renderchain/render"
)

// Defaults of Options.
const (
	DefaultSampleRate      = 48000.0
	DefaultSettleTolerance = 1e-5
	DefaultMaxSettle       = 3.0 // seconds
	DefaultMinRecord       = 0.1 // seconds
	// ClipDwellRatio is the dwell ratio (see Clipping) at or above which
	// a peak counts as flattened. A sine hard-limited at 90 % of its
	// amplitude (THD_F 4.2 %) reaches 1.32; tanh(x) of a unit sine (THD_F
	// 6.7 %, rounded rather than flat) stays at 1.25.
	ClipDwellRatio = 1.3
	// clipBand is the band below each peak, as a fraction of the
	// peak-to-peak swing, in which dwell time is counted.
	clipBand = 0.05
	// minClipOrders is the fewest counted orders (fundamental included)
	// that can show a flat top.
	minClipOrders = 5
)

// sineDwell is the fraction of a sine's period spent within clipBand of
// the peak-to-peak swing (2·clipBand of the amplitude) below its peak:
// acos(1 − 2·clipBand)/π.
var sineDwell = math.Acos(1-2*clipBand) / math.Pi

// Options configure a sine measurement. The zero value selects the
// defaults.
type Options struct {
	// SampleRate is the base rate in Hz at which the sine is generated
	// and the output analysed, as a render of a file at that rate would
	// be (default 48 kHz). The circuit runs at SampleRate·Oversample.
	SampleRate float64
	// Oversample is the internal rate multiple; 0 takes the chain's own,
	// else render.DefaultOversample.
	Oversample int
	// Probe names the node measured (see ResolveNode); empty is the
	// chain's output.
	Probe string
	// MaxOrder is the highest harmonic counted (default 10).
	MaxOrder int
	// BandLow and BandHigh bound THD+N (defaults 20 Hz and 20 kHz).
	BandLow, BandHigh float64
	// SettleTolerance is the largest relative change of RMS and DC between
	// consecutive record-length windows for the output to count as
	// settled (default 1e-5); MaxSettle bounds the time spent waiting,
	// in seconds (default 3 s); MinRecord is the shortest analysed
	// record in seconds (default 0.1 s).
	SettleTolerance, MaxSettle, MinRecord float64
	// Spectrum keeps the analysed record's amplitude spectrum in the
	// Result, for plots.
	Spectrum bool
}

func (o Options) withDefaults() Options {
	if o.SampleRate == 0 {
		o.SampleRate = DefaultSampleRate
	}
	if o.MaxOrder == 0 {
		o.MaxOrder = spectrum.DefaultMaxOrder
	}
	if o.BandLow == 0 {
		o.BandLow = spectrum.DefaultBandLow
	}
	if o.BandHigh == 0 {
		o.BandHigh = spectrum.DefaultBandHigh
	}
	if o.SettleTolerance == 0 {
		o.SettleTolerance = DefaultSettleTolerance
	}
	if o.MaxSettle == 0 {
		o.MaxSettle = DefaultMaxSettle
	}
	if o.MinRecord == 0 {
		o.MinRecord = DefaultMinRecord
	}
	return o
}

func (o Options) check() error {
	switch {
	case !(o.SampleRate >= 8000 && o.SampleRate <= float64(render.MaxRate)):
		return inputErr("sample rate", fmt.Sprint(o.SampleRate), "must be between 8 kHz and %d kHz", render.MaxRate/1000)
	case o.MaxOrder < 2 || o.MaxOrder > 100:
		return inputErr("harmonic orders", fmt.Sprint(o.MaxOrder), "must be between 2 and 100")
	case !(o.SettleTolerance > 0 && o.SettleTolerance < 1):
		return inputErr("settle tolerance", fmt.Sprint(o.SettleTolerance), "must lie between 0 and 1")
	case !(o.MaxSettle > 0 && o.MaxSettle <= 600):
		return inputErr("settle time", fmt.Sprint(o.MaxSettle), "must lie between 0 and 600 s")
	case !(o.MinRecord > 0 && o.MinRecord <= 10):
		return inputErr("record length", fmt.Sprint(o.MinRecord), "must lie between 0 and 10 s")
	case !(o.BandLow >= 0 && o.BandHigh > o.BandLow):
		return inputErr("THD+N band", fmt.Sprintf("%g..%g Hz", o.BandLow, o.BandHigh), "needs 0 ≤ low < high")
	}
	return nil
}

// Line is one spectral line of the output.
type Line struct {
	Order   int     `json:"order"`
	Hz      float64 `json:"hz"`
	VPeak   float64 `json:"v_peak"`
	VRMS    float64 `json:"v_rms"`
	DBV     Num     `json:"dbv"`
	DBc     Num     `json:"dbc"`
	Percent float64 `json:"percent"`
	// PhaseDeg is the line's phase relative to the source sine's phase
	// at the same order: h·φ_source subtracted, wrapped to (−180, 180].
	PhaseDeg float64 `json:"phase_deg"`
	// Attenuated marks a line above the rate converter's passband edge,
	// where its filter has started to roll off.
	Attenuated bool `json:"attenuated,omitempty"`
}

// Settle reports how the start-up transient was waited out.
type Settle struct {
	Settled   bool    `json:"settled"`
	Seconds   float64 `json:"seconds"`   // start of the analysed record
	Change    Num     `json:"change"`    // last window-to-window relative change
	Tolerance float64 `json:"tolerance"` // the threshold it was held to
	FadeIn    float64 `json:"fade_in_s"` // raised-cosine onset of the sine
}

// Record describes the analysed stretch of output.
type Record struct {
	Samples  int     `json:"samples"`
	Seconds  float64 `json:"seconds"`
	Cycles   float64 `json:"cycles"`
	Coherent bool    `json:"coherent"`
	Method   string  `json:"method"` // "bins" (coherent DFT) or "fit" (least squares)
}

// Clipping tells whether the output waveform is flattened at its peaks.
type Clipping struct {
	// Clips is set when either dwell ratio reaches ClipDwellRatio.
	Clips bool `json:"clips"`
	// DwellPositive and DwellNegative measure flat tops on one cycle
	// rebuilt from the measured fundamental and harmonics (Lanczos-
	// smoothed, so the rate converter's band limit and Gibbs ripple do not
	// hide a flat top): the fraction of the cycle spent within 5 % of the
	// peak-to-peak swing of the positive and of the negative peak, over
	// that fraction for a sine, acos(0.9)/π ≈ 0.1436. 1 for a sine, about
	// 2.8 for a square wave, below 1 for pointed peaks (a triangle: 0.62).
	// Null when fewer than 5 orders lie below Nyquist.
	DwellPositive Num `json:"dwell_ratio_positive"`
	DwellNegative Num `json:"dwell_ratio_negative"`
	// CrestFactorDB is 20·log10(peak/RMS) of the output less its DC:
	// 3.01 dB for a sine, 0 dB for a square wave.
	CrestFactorDB Num `json:"crest_factor_db"`
	// ExceedsFullScale is set when a sample's magnitude exceeds the
	// chain's output full scale: a render would clip the file.
	ExceedsFullScale bool `json:"exceeds_full_scale"`
}

// Solver gives the Newton statistics of the measurement run.
type Solver struct {
	MeanIterations float64 `json:"mean_iterations"`
	MaxIterations  int     `json:"max_iterations"`
	Fallbacks      int64   `json:"fallbacks"`
	NonConverged   int64   `json:"nonconverged"`
}

// Spectrum is an amplitude spectrum of the analysed record, in dBV (RMS
// of each bin's sine).
type Spectrum struct {
	Hz  []float64
	DBV []float64
}

// Result is one sine measurement. The JSON names thd_percent,
// thdn_percent, fundamental.dbv, harmonics[].order and harmonics[].dbc are
// part of the project's stable interface.
type Result struct {
	Label    string   `json:"label,omitempty"`
	Settings []string `json:"settings,omitempty"`
	// SweepValue is the stepped value of a sweep (volts peak or rotation).
	SweepValue *float64 `json:"sweep_value,omitempty"`

	FrequencyHz  float64 `json:"frequency_hz"`
	AmplitudeV   float64 `json:"amplitude_v_peak"` // at the source, before its impedance
	AmplitudeDBV float64 `json:"amplitude_dbv"`    // the same in dBV (RMS)
	Probe        string  `json:"probe"`
	SampleRate   float64 `json:"sample_rate_hz"`
	Oversample   int     `json:"oversample"`
	InternalRate float64 `json:"internal_rate_hz"`

	Settle Settle `json:"settle"`
	Record Record `json:"record"`

	Fundamental Line   `json:"fundamental"`
	GainDB      Num    `json:"gain_db"` // output fundamental over source amplitude
	Harmonics   []Line `json:"harmonics"`

	THDPercent  float64    `json:"thd_percent"` // THD_F
	THDDB       Num        `json:"thd_db"`
	THDRPercent float64    `json:"thd_r_percent"`
	THDNPercent float64    `json:"thdn_percent"`
	THDNDB      Num        `json:"thdn_db"`
	THDNBandHz  [2]float64 `json:"thdn_band_hz"`

	// EvenOddRatio is the energy of the even harmonics over that of the
	// odd ones (null when undefined), EvenOddDB the same in dB.
	EvenOddRatio Num `json:"even_odd_ratio"`
	EvenOddDB    Num `json:"even_odd_db"`

	DCV           float64 `json:"dc_v"`
	PeakPositiveV float64 `json:"peak_positive_v"`
	PeakNegativeV float64 `json:"peak_negative_v"`
	PeakAsymmetry Num     `json:"peak_asymmetry"`

	Clipping Clipping `json:"clipping"`
	Solver   Solver   `json:"solver"`
	Warnings []string `json:"warnings"`

	// Spectrum is kept when Options.Spectrum is set.
	Spectrum *Spectrum `json:"-"`
}

// Sine measures the chain's response to a sine of freq Hz and amplitude
// volts peak at its source: it prepares the chain's circuit, renders the
// sine through it on the same path a render takes (upsampling, the wave
// digital solver, downsampling), waits out the start-up transient and
// analyses a whole number of cycles.
func Sine(ctx context.Context, ch *chains.Chain, freq, amplitude float64, opt Options) (*Result, error) {
	opt = opt.withDefaults()
	if err := opt.check(); err != nil {
		return nil, err
	}
	if err := checkSignal(freq, amplitude, opt.SampleRate); err != nil {
		return nil, err
	}
	eng, err := render.Prepare(ch, opt.Oversample)
	if err != nil {
		return nil, err
	}
	return sineEngine(ctx, eng, freq, amplitude, opt)
}

func checkSignal(freq, amplitude, fs float64) error {
	fv := models.FormatValue(freq, "Hz")
	switch {
	case math.IsNaN(freq) || math.IsInf(freq, 0) || freq < MinFrequency:
		return inputErr("frequency", fv, "is below the %g Hz limit", MinFrequency)
	case freq >= fs/2:
		return inputErr("frequency", fv, "is at or above the Nyquist limit %s of the %s analysis rate",
			models.FormatValue(fs/2, "Hz"), models.FormatValue(fs, "Hz"))
	case !(amplitude > 0) || math.IsInf(amplitude, 0):
		return inputErr("amplitude", models.FormatValue(amplitude, "V"), "must be above 0 V")
	}
	return nil
}

// stream is a channel through the circuit at the base rate.
type stream interface {
	Process(dst, src []float64) int
}

// openStream builds the render path for the probed node: the render's own
// Channel, for the output or for another node.
func openStream(eng *render.Engine, fs float64, probe int) (stream, float64, func() wdf.Stats, error) {
	if probe == eng.Circuit.Output {
		c, err := eng.NewChannel(fs)
		if err != nil {
			return nil, 0, nil, err
		}
		return c, eng.Chain.FullScale, c.Stats, nil
	}
	c, err := eng.NewProbeChannel(fs, probe)
	if err != nil {
		return nil, 0, nil, err
	}
	return c, 1, c.Stats, nil
}

// recordGeometry picks the analysed record: the shortest whole number of
// cycles spanning a whole number of samples (to within 1e-7 cycle) and at
// least minN samples, searched up to one second's worth per coherent
// unit; failing that, about minN samples holding a whole number of cycles
// to the nearest sample, analysed by least squares.
func recordGeometry(fs, f float64, minN int) (n int, coherent bool, unitN, unitM int) {
	limit := int(math.Max(fs, float64(4*minN)))
	for m := 1; ; m++ {
		nn := math.Round(float64(m) * fs / f)
		if nn > float64(limit) {
			break
		}
		if nn >= 1 && math.Abs(nn*f/fs-float64(m)) <= 1e-7 {
			unitN, unitM = int(nn), m
			k := (minN + unitN - 1) / unitN
			return k * unitN, true, unitN, unitM
		}
	}
	m := math.Ceil(float64(minN) * f / fs)
	return int(math.Round(m * fs / f)), false, 0, 0
}

func sineEngine(ctx context.Context, eng *render.Engine, freq, amplitude float64, opt Options) (*Result, error) {
	fs := opt.SampleRate
	probe, err := ResolveNode(eng.Chain, eng.Circuit, opt.Probe)
	if err != nil {
		return nil, err
	}
	st, scale, stats, err := openStream(eng, fs, probe)
	if err != nil {
		return nil, err
	}
	minN := int(math.Ceil(opt.MinRecord * fs))
	n, coherent, unitN, unitM := recordGeometry(fs, freq, minN)
	fadeN := int(math.Ceil(math.Min(math.Max(4/freq, 0.01), opt.MaxSettle/4) * fs))
	maxN := int(math.Ceil(opt.MaxSettle * fs))

	// The sine, in digital units (full scale = the chain's input peak).
	// A coherent record is generated at exactly unitM cycles per unitN
	// samples, which is freq to within 1e-7 cycle per unit, and analysed
	// at that frequency.
	gain := amplitude / eng.Chain.InputPeak
	fGen := freq
	if coherent {
		fGen = float64(unitM) * fs / float64(unitN)
	}
	phase := func(k int) float64 {
		if coherent {
			// Exactly periodic over unitN samples.
			return 2 * math.Pi * float64(unitM) * float64(k%unitN) / float64(unitN)
		}
		return 2 * math.Pi * math.Mod(freq*float64(k)/fs, 1)
	}

	src := make([]float64, render.MaxBlock)
	out := make([]float64, render.MaxBlock)
	win := make([]float64, n)
	fill, windows := 0, 0
	var sd settleDetector
	sd.tol = opt.SettleTolerance
	settled := false
	var change float64 = math.Inf(1)
	var start int
	generated := 0
	done := false
	for !done {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		for i := range src {
			k := generated + i
			v := gain * math.Sin(phase(k))
			if k < fadeN {
				v *= 0.5 * (1 - math.Cos(math.Pi*float64(k)/float64(fadeN)))
			}
			src[i] = v
		}
		generated += len(src)
		got := st.Process(out, src)
		for _, v := range out[:got] {
			if done {
				break
			}
			win[fill] = v * scale
			fill++
			if fill < n {
				continue
			}
			fill = 0
			windows++
			wStart := (windows - 1) * n
			if wStart < fadeN {
				continue // the window overlaps the onset
			}
			change = sd.next(win)
			if sd.settled() {
				settled, start, done = true, wStart, true
			} else if wStart+n >= maxN {
				start, done = wStart, true
			}
		}
	}

	an, err := spectrum.Analyze(win, fs, fGen, &spectrum.Options{MaxOrder: opt.MaxOrder, BandLow: opt.BandLow, BandHigh: opt.BandHigh})
	if err != nil {
		return nil, fmt.Errorf("analysing the output: %w", err)
	}
	r := &Result{
		FrequencyHz:  freq,
		AmplitudeV:   amplitude,
		AmplitudeDBV: db(amplitude / math.Sqrt2),
		Probe:        nodeName(eng.Circuit, probe),
		SampleRate:   fs,
		Oversample:   eng.Oversample,
		InternalRate: fs * float64(eng.Oversample),
		Settle: Settle{Settled: settled, Seconds: float64(start) / fs, Change: Num(change),
			Tolerance: opt.SettleTolerance, FadeIn: float64(fadeN) / fs},
		Record: Record{Samples: n, Seconds: float64(n) / fs, Cycles: an.Cycles, Coherent: an.Method == spectrum.MethodBins,
			Method: map[spectrum.Method]string{spectrum.MethodBins: "bins", spectrum.MethodFit: "fit"}[an.Method]},
		THDPercent:    100 * an.THDF,
		THDDB:         Num(db(an.THDF)),
		THDRPercent:   100 * an.THDR,
		THDNPercent:   100 * an.THDN,
		THDNDB:        Num(db(an.THDN)),
		THDNBandHz:    [2]float64{an.BandLow, an.BandHigh},
		EvenOddRatio:  Num(an.EvenOddRatio),
		EvenOddDB:     Num(10 * math.Log10(an.EvenOddRatio)),
		DCV:           an.DC,
		PeakPositiveV: an.PeakPositive,
		PeakNegativeV: an.PeakNegative,
		PeakAsymmetry: Num(an.PeakAsymmetry),
		Warnings:      []string{},
	}
	passband := resample.PassbandEdge
	if fs < 44100 {
		passband = fs * resample.PassbandEdge / 44100
	}
	phaseIn := phase(start)
	line := func(h spectrum.Harmonic) Line {
		ph := h.Phase - float64(h.Order)*phaseIn
		return Line{Order: h.Order, Hz: h.Frequency, VPeak: h.Amplitude, VRMS: h.Amplitude / math.Sqrt2,
			DBV: Num(db(h.Amplitude / math.Sqrt2)), DBc: Num(h.DBc), Percent: h.Percent,
			PhaseDeg: wrapDeg(ph * 180 / math.Pi), Attenuated: h.Frequency > passband}
	}
	r.Fundamental = line(an.Fundamental)
	r.GainDB = Num(db(an.Fundamental.Amplitude / amplitude))
	r.Harmonics = make([]Line, 0, len(an.Harmonics))
	for _, h := range an.Harmonics {
		r.Harmonics = append(r.Harmonics, line(h))
	}
	r.Clipping = clipping(win, an, eng.Chain.FullScale, probe == eng.Circuit.Output)
	s := stats()
	r.Solver = Solver{MeanIterations: s.MeanIterations(), MaxIterations: s.MaxIterations, Fallbacks: s.Fallbacks, NonConverged: s.NonConverged}
	r.Warnings = warnings(r, opt, passband)
	if opt.Spectrum {
		r.Spectrum = amplitudeSpectrum(win, fs, r.Record.Coherent)
	}
	return r, nil
}

func warnings(r *Result, opt Options, passband float64) []string {
	w := []string{}
	if !r.Settle.Settled {
		w = append(w, fmt.Sprintf("output not settled within %g s (last window-to-window change %.2g, tolerance %.2g): figures include some start-up transient",
			opt.MaxSettle, float64(r.Settle.Change), r.Settle.Tolerance))
	}
	if last := len(r.Harmonics) + 1; last < opt.MaxOrder {
		w = append(w, fmt.Sprintf("harmonics %d–%d lie at or above the Nyquist limit %s of the %s rate and are not counted; raise the rate to count them",
			last+1, opt.MaxOrder, models.FormatValue(r.SampleRate/2, "Hz"), models.FormatValue(r.SampleRate, "Hz")))
	}
	if r.FrequencyHz > passband {
		w = append(w, fmt.Sprintf("the fundamental lies above the %s passband of the rate converter and is attenuated", models.FormatValue(passband, "Hz")))
	} else {
		first := 0
		for _, h := range r.Harmonics {
			if h.Attenuated {
				first = h.Order
				break
			}
		}
		if first > 0 {
			w = append(w, fmt.Sprintf("harmonics from %d on lie above the %s passband of the rate converter and are attenuated by its filter",
				first, models.FormatValue(passband, "Hz")))
		}
	}
	if r.Solver.NonConverged > 0 {
		w = append(w, fmt.Sprintf("%d samples did not converge in the circuit solver", r.Solver.NonConverged))
	}
	if r.Clipping.ExceedsFullScale {
		w = append(w, "the output exceeds the chain's full scale: a render at this level would clip the file")
	}
	return w
}

// settleDetector compares consecutive record-length windows: their DC and
// the RMS about it. Next does not allocate.
type settleDetector struct {
	tol              float64
	n                int
	prevRMS, prevDC  float64
	change, previous float64
}

// next takes one window and returns its relative change from the one
// before (+Inf for the first).
func (d *settleDetector) next(x []float64) float64 {
	var sum float64
	for _, v := range x {
		sum += v
	}
	dc := sum / float64(len(x))
	var ss float64
	for _, v := range x {
		ss += (v - dc) * (v - dc)
	}
	rms := math.Sqrt(ss / float64(len(x)))
	d.previous = d.change
	if d.n == 0 {
		d.change = math.Inf(1)
		d.previous = math.Inf(1)
	} else {
		den := math.Max(rms, 1e-12) // 1 pV: below it a node is silent
		d.change = math.Max(math.Abs(rms-d.prevRMS), math.Abs(dc-d.prevDC)) / den
	}
	d.prevRMS, d.prevDC = rms, dc
	d.n++
	return d.change
}

// settled holds after two consecutive changes within tolerance.
func (d *settleDetector) settled() bool {
	return d.n >= 3 && d.change <= d.tol && d.previous <= d.tol
}

func clipping(x []float64, an *spectrum.Analysis, fullScale float64, isOutput bool) Clipping {
	var c Clipping
	hi, lo := math.Inf(-1), math.Inf(1)
	var ss float64
	for _, v := range x {
		hi = math.Max(hi, v)
		lo = math.Min(lo, v)
		ss += (v - an.DC) * (v - an.DC)
		if isOutput && math.Abs(v) > fullScale {
			c.ExceedsFullScale = true
		}
	}
	rms := math.Sqrt(ss / float64(len(x)))
	c.CrestFactorDB = Num(db(math.Max(hi-an.DC, an.DC-lo) / rms))
	c.DwellPositive, c.DwellNegative = Num(math.NaN()), Num(math.NaN())
	if len(an.Harmonics)+1 < minClipOrders || !(an.Fundamental.Amplitude > 0) {
		return c
	}
	up, down := dwellRatios(an)
	c.DwellPositive, c.DwellNegative = Num(up), Num(down)
	c.Clips = up >= ClipDwellRatio || down >= ClipDwellRatio
	return c
}

// dwellRatios reconstructs one cycle from the measured lines, each order h
// of H weighted by Lanczos' sigma factor sinc(h/(H+1)) so that the partial
// Fourier sum of a flat top shows no Gibbs overshoot (Lanczos, "Applied
// Analysis", 1956, ch. IV; from memory), and returns the fractions of the
// cycle spent within clipBand of the peak-to-peak swing of the positive and
// of the negative peak, each over a sine's.
func dwellRatios(an *spectrum.Analysis) (up, down float64) {
	lines := append([]spectrum.Harmonic{an.Fundamental}, an.Harmonics...)
	order := lines[len(lines)-1].Order
	const points = 2048
	var y [points]float64
	hi, lo := math.Inf(-1), math.Inf(1)
	for i := range y {
		th := 2 * math.Pi * float64(i) / points
		var v float64
		for _, h := range lines {
			k := math.Pi * float64(h.Order) / float64(order+1)
			v += math.Sin(k) / k * h.Amplitude * math.Sin(float64(h.Order)*th+h.Phase)
		}
		y[i] = v
		hi, lo = math.Max(hi, v), math.Min(lo, v)
	}
	band := clipBand * (hi - lo)
	var nu, nd int
	for _, v := range y {
		if v >= hi-band {
			nu++
		}
		if v <= lo+band {
			nd++
		}
	}
	return float64(nu) / points / sineDwell, float64(nd) / points / sineDwell
}

// amplitudeSpectrum returns the record's one-sided spectrum in dBV RMS:
// the plain DFT of a coherent record (every harmonic on a bin), or for
// another record the DFT weighted by a periodic 4-term Blackman–Harris
// window (Harris 1978) scaled by its coherent gain.
func amplitudeSpectrum(x []float64, fs float64, coherent bool) *Spectrum {
	n := len(x)
	w := make([]float64, n)
	copy(w, x)
	gain := 1.0
	if !coherent {
		a := [4]float64{0.35875, 0.48829, 0.14128, 0.01168}
		var sum float64
		for i := range w {
			t := 2 * math.Pi * float64(i) / float64(n)
			wi := a[0] - a[1]*math.Cos(t) + a[2]*math.Cos(2*t) - a[3]*math.Cos(3*t)
			w[i] *= wi
			sum += wi
		}
		gain = sum / float64(n)
	}
	coef := fourier.NewFFT(n).Coefficients(nil, w)
	s := &Spectrum{Hz: make([]float64, len(coef)), DBV: make([]float64, len(coef))}
	for k, c := range coef {
		amp := cmplxAbs(c) / float64(n) / gain
		if k > 0 && !(n%2 == 0 && k == n/2) {
			amp *= 2
		}
		s.Hz[k] = float64(k) * fs / float64(n)
		if k == 0 {
			s.DBV[k] = db(amp) // DC: its own value, not a sine's RMS
		} else {
			s.DBV[k] = db(amp / math.Sqrt2)
		}
	}
	return s
}

func cmplxAbs(c complex128) float64 { return math.Hypot(real(c), imag(c)) }

func wrapDeg(d float64) float64 {
	d = math.Mod(d, 360)
	if d > 180 {
		d -= 360
	} else if d <= -180 {
		d += 360
	}
	return d
}
