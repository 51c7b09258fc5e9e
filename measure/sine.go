package measure

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/dsp/window"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/dsp/resample"
	"renderchain/dsp/spectrum"
	"renderchain/engine"
	"renderchain/models"
	"renderchain/report"
)

// Defaults of Options.
const (
	DefaultSampleRate      = 48000.0
	DefaultSettleTolerance = engine.DefaultSettleTolerance
	DefaultMaxSettle       = engine.DefaultMaxSettle // seconds
	DefaultMinRecord       = engine.DefaultMinRecord // seconds
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

// MinFrequency is the lowest test frequency the bench accepts, in Hz.
const MinFrequency = 5.0

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
	// else engine.DefaultOversample (engine.Oversample).
	Oversample int
	// Probe names the node measured (chains.Wiring.Resolve); empty is the
	// chain's output.
	Probe string
	// MaxOrder is the highest harmonic counted (default 10).
	MaxOrder int
	// BandLow and BandHigh bound THD+N (defaults 20 Hz and 20 kHz).
	BandLow, BandHigh float64
	// SettleTolerance, MaxSettle (s) and MinRecord (s) set the engine's
	// settle rule and record (defaults 1e-5, 3 s, 0.1 s).
	SettleTolerance, MaxSettle, MinRecord float64
	// Spectrum keeps the analysed record's amplitude spectrum in the
	// Result, for plots.
	Spectrum bool
	// Scope keeps a few settled cycles of the source and the probed node
	// in the Result (Result.Scope), for the scope view.
	Scope bool
	// Alias adds the aliasing of the test sine (Result.Alias), from its
	// own render at each of AliasFactors (1…16; empty: the
	// measurement's factor). Run fills it; Sine alone does not.
	Alias        bool
	AliasFactors []int
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
	if len(o.AliasFactors) > 0 {
		o.AliasFactors = slices.Compact(slices.Sorted(slices.Values(o.AliasFactors)))
	}
	return o
}

// check refuses options out of range, as *models.FieldError naming the
// option's field.
func (o Options) check() error {
	switch {
	case !(o.SampleRate >= engine.MinRate && o.SampleRate <= engine.MaxRate):
		return models.Fieldf("sample_rate", fmt.Sprint(o.SampleRate), "must be between %d kHz and %d kHz", engine.MinRate/1000, engine.MaxRate/1000)
	case o.MaxOrder < 2 || o.MaxOrder > 100:
		return models.Fieldf("harmonics", fmt.Sprint(o.MaxOrder), "must be between 2 and 100")
	case !(o.SettleTolerance > 0 && o.SettleTolerance < 1):
		return models.Fieldf("settle_tolerance", fmt.Sprint(o.SettleTolerance), "must lie between 0 and 1")
	case !(o.MaxSettle > 0 && o.MaxSettle <= 600):
		return models.Fieldf("max_settle", fmt.Sprintf("%gs", o.MaxSettle), "must lie between 0 and 600 s")
	case !(o.MinRecord > 0 && o.MinRecord <= 10):
		return models.Fieldf("min_record", fmt.Sprintf("%gs", o.MinRecord), "must lie between 0 and 10 s")
	case !(o.BandLow >= 0 && o.BandHigh > o.BandLow) || math.IsInf(o.BandHigh, 0):
		return models.Fieldf("thdn_band", fmt.Sprintf("%g..%g Hz", o.BandLow, o.BandHigh), "needs 0 ≤ low < high")
	}
	return checkAliasFactors(o.AliasFactors)
}

// checkSignal bounds the test sine: MinFrequency ≤ freq < fs/2 and an
// amplitude in models.SignalRange.
func checkSignal(freq, amplitude, fs float64) error {
	fv := models.FormatValue(freq, "Hz")
	switch {
	case math.IsNaN(freq) || math.IsInf(freq, 0) || freq < MinFrequency:
		return models.Fieldf("frequency", fv, "is below the %g Hz limit", MinFrequency)
	case freq >= fs/2:
		return models.Fieldf("frequency", fv, "is at or above the Nyquist limit %s of the %s analysis rate",
			models.FormatValue(fs/2, "Hz"), models.FormatValue(fs, "Hz"))
	case !models.SignalRange.Contains(amplitude):
		return models.Fieldf("amplitude", models.FormatValue(amplitude, "V"), "must be %s", models.SignalRange.Describe())
	}
	return nil
}

// Line is one spectral line of the output.
type Line struct {
	Order   int           `json:"order"`
	Hz      float64       `json:"hz"`
	VPeak   float64       `json:"v_peak"`
	VRMS    float64       `json:"v_rms"`
	DBV     report.Level  `json:"dbv"`
	DBc     report.Level  `json:"dbc"`
	Percent report.Number `json:"percent"`
	// PhaseDeg is the line's phase relative to the source sine's phase
	// at the same order: h·φ_source subtracted, wrapped to (−180, 180].
	PhaseDeg float64 `json:"phase_deg"`
	// Attenuated marks a line above the rate converter's passband edge,
	// where its filter has started to roll off.
	Attenuated bool `json:"attenuated,omitempty"`
}

// Settle reports how the start-up transient was waited out.
type Settle struct {
	Settled   bool          `json:"settled"`
	Seconds   float64       `json:"seconds"`   // start of the analysed record
	Change    report.Number `json:"change"`    // last window-to-window relative change
	Tolerance float64       `json:"tolerance"` // the threshold it was held to
	FadeIn    float64       `json:"fade_in_s"` // raised-cosine onset of the sine
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
	DwellPositive report.Number `json:"dwell_ratio_positive"`
	DwellNegative report.Number `json:"dwell_ratio_negative"`
	// CrestFactorDB is 20·log10(peak/RMS) of the output less its DC:
	// 3.01 dB for a sine, 0 dB for a square wave.
	CrestFactorDB report.Level `json:"crest_factor_db"`
	// ExceedsFullScale is set when a sample's magnitude exceeds the
	// chain's output full scale: a render would clip the file.
	ExceedsFullScale bool `json:"exceeds_full_scale"`
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
	SupplyV      float64 `json:"supply_v"`
	TemperatureC float64 `json:"temperature_c"`
	SampleRate   float64 `json:"sample_rate_hz"`
	Oversample   int     `json:"oversample"`
	InternalRate float64 `json:"internal_rate_hz"`

	Settle Settle `json:"settle"`
	Record Record `json:"record"`

	Fundamental Line         `json:"fundamental"`
	GainDB      report.Level `json:"gain_db"` // output fundamental over source amplitude
	Harmonics   []Line       `json:"harmonics"`

	THDPercent  report.Number `json:"thd_percent"` // THD_F
	THDDB       report.Level  `json:"thd_db"`
	THDRPercent report.Number `json:"thd_r_percent"`
	THDNPercent report.Number `json:"thdn_percent"`
	THDNDB      report.Level  `json:"thdn_db"`
	THDNBandHz  [2]float64    `json:"thdn_band_hz"`
	// AnalysisFloorDB is the level, relative to the fundamental, under
	// which a harmonic or a distortion figure cannot be told from the
	// measurement's own residue (AnalysisFloor). Tables print figures
	// below it as "< floor"; the JSON keeps them exactly.
	AnalysisFloorDB report.Level `json:"analysis_floor_db"`

	// EvenOddRatio is the energy of the even harmonics over that of the
	// odd ones (null when undefined), EvenOddDB the same in dB.
	EvenOddRatio report.Number `json:"even_odd_ratio"`
	EvenOddDB    report.Level  `json:"even_odd_db"`

	DCV           float64       `json:"dc_v"`
	PeakPositiveV float64       `json:"peak_positive_v"`
	PeakNegativeV float64       `json:"peak_negative_v"`
	PeakAsymmetry report.Number `json:"peak_asymmetry"`

	Clipping Clipping        `json:"clipping"`
	Solver   report.Solver   `json:"solver"`
	Warnings report.Warnings `json:"warnings"`

	// Spectrum is kept when Options.Spectrum is set.
	Spectrum *Spectrum `json:"-"`
	// Scope is kept when Options.Scope is set.
	Scope *Scope `json:"-"`
	// Alias holds the aliasing figures when Options.Alias is set.
	Alias *AliasResult `json:"alias,omitempty"`
}

// Sine measures the chain's response to a sine of freq Hz and amplitude
// volts peak at its source: it prepares the chain (engine.Prepare), runs
// the engine's test sine through it on the same path a render takes until
// the output settles, and analyses a whole number of cycles.
func Sine(ctx context.Context, ch *chains.Chain, freq, amplitude float64, opt Options) (*Result, error) {
	opt = opt.withDefaults()
	if err := opt.check(); err != nil {
		return nil, err
	}
	if err := checkSignal(freq, amplitude, opt.SampleRate); err != nil {
		return nil, err
	}
	p, err := engine.PrepareContext(ctx, ch, opt.Oversample)
	if err != nil {
		return nil, err
	}
	return sineOn(ctx, p, freq, amplitude, opt)
}

// probeNode resolves a probe name on a prepared chain; a name that names
// no node is a *models.FieldError on field.
func probeNode(p *engine.Prepared, field, name string) (int, error) {
	n, err := p.Node(name)
	var ne *chains.NodeError
	if errors.As(err, &ne) {
		return 0, &models.FieldError{Field: field, Value: name, Msg: ne.Msg, Err: err}
	}
	return n, err
}

// sineOn measures on a prepared chain: resolve the probe, run the sine
// until settled, analyse the record, judge clipping, collect warnings.
func sineOn(ctx context.Context, p *engine.Prepared, freq, amplitude float64, opt Options) (*Result, error) {
	node, err := probeNode(p, "probe", opt.Probe)
	if err != nil {
		return nil, err
	}
	rec, err := p.Sine(ctx, engine.SineOptions{Freq: freq, Amplitude: amplitude, SampleRate: opt.SampleRate, Node: node,
		MinRecord: opt.MinRecord, MaxSettle: opt.MaxSettle, Tolerance: opt.SettleTolerance, NodePeaks: true})
	if err != nil {
		return nil, err
	}
	an, err := spectrum.Analyze(rec.Samples, opt.SampleRate, rec.Sine.Frequency(),
		&spectrum.Options{MaxOrder: opt.MaxOrder, BandLow: opt.BandLow, BandHigh: opt.BandHigh})
	if err != nil {
		return nil, fmt.Errorf("analysing the output: %w", err)
	}
	r := newResult(p, node, freq, amplitude, opt, rec, an)
	r.Clipping = clipping(rec.Samples, an, p.Chain.FullScale, node == p.Circuit.Output)
	r.Solver = report.SolverOf(rec.Stats)
	if r.Warnings, err = bias.Warnings(ctx, p); err != nil {
		return nil, err
	}
	r.Warnings.Merge(warnings(r, opt, passbandEdge(opt.SampleRate)))
	if opt.Spectrum {
		r.Spectrum = amplitudeSpectrum(rec.Samples, opt.SampleRate, r.Record.Coherent)
	}
	if opt.Scope {
		if r.Scope, err = scopeRun(ctx, p, rec, node, freq, amplitude, opt); err != nil {
			return nil, err
		}
	}
	return r, nil
}

// passbandEdge is the rate converter's passband edge at base rate fs:
// resample.PassbandEdge, scaled below 44.1 kHz.
func passbandEdge(fs float64) float64 {
	if fs < 44100 {
		return fs * resample.PassbandEdge / 44100
	}
	return resample.PassbandEdge
}

// newResult writes the analysis of a record as a Result.
func newResult(p *engine.Prepared, node int, freq, amplitude float64, opt Options, rec *engine.SineRecord, an *spectrum.Analysis) *Result {
	fs := opt.SampleRate
	n := len(rec.Samples)
	r := &Result{
		FrequencyHz:  freq,
		AmplitudeV:   amplitude,
		AmplitudeDBV: report.DB(amplitude / math.Sqrt2),
		Probe:        p.NodeName(node),
		SupplyV:      p.Chain.Supply,
		TemperatureC: p.Chain.Temperature - models.ZeroCelsius,
		SampleRate:   fs,
		Oversample:   p.Oversample,
		InternalRate: fs * float64(p.Oversample),
		Settle: Settle{Settled: rec.Settled, Seconds: float64(rec.Start) / fs, Change: report.Number(rec.Change),
			Tolerance: opt.SettleTolerance, FadeIn: float64(rec.Sine.Fade) / fs},
		Record: Record{Samples: n, Seconds: float64(n) / fs, Cycles: an.Cycles, Coherent: an.Method == spectrum.MethodBins,
			Method: map[spectrum.Method]string{spectrum.MethodBins: "bins", spectrum.MethodFit: "fit"}[an.Method]},
		THDPercent:      report.Number(100 * an.THDF),
		THDDB:           report.Level(report.DB(an.THDF)),
		THDRPercent:     report.Number(100 * an.THDR),
		THDNPercent:     report.Number(100 * an.THDN),
		THDNDB:          report.Level(report.DB(an.THDN)),
		THDNBandHz:      [2]float64{an.BandLow, an.BandHigh},
		AnalysisFloorDB: report.Level(report.DB(AnalysisFloor(opt.SettleTolerance))),
		EvenOddRatio:    report.Number(an.EvenOddRatio),
		EvenOddDB:       report.Level(report.PowerDB(an.EvenOddRatio)),
		DCV:             an.DC,
		PeakPositiveV:   an.PeakPositive,
		PeakNegativeV:   an.PeakNegative,
		PeakAsymmetry:   report.Number(an.PeakAsymmetry),
	}
	// The node's peaks as the solver computes them (engine.SineRecord:
	// the record's own overshoot a fast edge by the band limit's ringing).
	if !math.IsNaN(rec.NodeMax) {
		r.PeakPositiveV, r.PeakNegativeV = rec.NodeMax, rec.NodeMin
		r.PeakAsymmetry = report.Number(math.NaN())
		if up, down := rec.NodeMax-an.DC, an.DC-rec.NodeMin; up+down > 0 {
			r.PeakAsymmetry = report.Number((up - down) / (up + down))
		}
	}
	passband := passbandEdge(fs)
	phaseIn := rec.Sine.Phase(rec.Start)
	line := func(h spectrum.Harmonic) Line {
		ph := h.Phase - float64(h.Order)*phaseIn
		return Line{Order: h.Order, Hz: h.Frequency, VPeak: h.Amplitude, VRMS: h.Amplitude / math.Sqrt2,
			DBV: report.Level(report.DB(h.Amplitude / math.Sqrt2)), DBc: report.Level(h.DBc), Percent: report.Number(h.Percent),
			PhaseDeg: wrapDeg(ph * 180 / math.Pi), Attenuated: h.Frequency > passband}
	}
	r.Fundamental = line(an.Fundamental)
	r.GainDB = report.Level(report.DB(an.Fundamental.Amplitude / amplitude))
	r.Harmonics = make([]Line, 0, len(an.Harmonics))
	for _, h := range an.Harmonics {
		r.Harmonics = append(r.Harmonics, line(h))
	}
	return r
}

// AnalysisFloor returns the amplitude ratio to the fundamental under which
// a harmonic or a distortion figure (THD, THD+N) is residue of the
// measurement rather than the circuit's: the larger of the rate
// converter's stopband, 10^(−resample.StopbandAttenuation/20) = 1e-5
// (−100 dB: what the circuit makes above the base band comes back into it
// at most this far down), and the settle tolerance (the window-to-window
// change left when the record was taken, a start-up transient of about
// that size relative to the output). With the default tolerance, 1e-5:
// THD under 0.001 % prints as "< 0.001 %".
func AnalysisFloor(settleTolerance float64) float64 {
	return math.Max(report.FromDB(-resample.StopbandAttenuation), settleTolerance)
}

func warnings(r *Result, opt Options, passband float64) report.Warnings {
	w := report.Warnings{}
	if !r.Settle.Settled {
		w.Add("output not settled within %g s (last window-to-window change %.2g, tolerance %.2g): figures include some start-up transient",
			opt.MaxSettle, float64(r.Settle.Change), r.Settle.Tolerance)
	}
	if last := len(r.Harmonics) + 1; last < opt.MaxOrder {
		w.Add("harmonics %d–%d lie at or above the Nyquist limit %s of the %s rate and are not counted; raise the rate to count them",
			last+1, opt.MaxOrder, models.FormatValue(r.SampleRate/2, "Hz"), models.FormatValue(r.SampleRate, "Hz"))
	}
	if r.FrequencyHz > passband {
		w.Add("the fundamental lies above the %s passband of the rate converter and is attenuated", models.FormatValue(passband, "Hz"))
	} else {
		first := 0
		for _, h := range r.Harmonics {
			if h.Attenuated {
				first = h.Order
				break
			}
		}
		if first > 0 {
			w.Add("harmonics from %d on lie above the %s passband of the rate converter and are attenuated by its filter",
				first, models.FormatValue(passband, "Hz"))
		}
	}
	if r.AmplitudeV > models.LargeSignal {
		w.Add("the source sine, %s peak, is beyond any guitar (a pickup gives up to about 1 V peak, an active one a few volts): did you mean %s?",
			models.FormatValue(r.AmplitudeV, "V"), models.FormatValue(r.AmplitudeV/1000, "V"))
	}
	if r.Solver.NonConverged > 0 {
		w.Add("%d samples did not converge in the circuit solver", r.Solver.NonConverged)
	}
	if r.Clipping.ExceedsFullScale {
		w.Add("the output exceeds the chain's full scale: a render at this level would clip the file")
	}
	return w
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
	c.CrestFactorDB = report.Level(report.DB(math.Max(hi-an.DC, an.DC-lo) / rms))
	c.DwellPositive, c.DwellNegative = report.Number(math.NaN()), report.Number(math.NaN())
	if len(an.Harmonics)+1 < minClipOrders || !(an.Fundamental.Amplitude > 0) {
		return c
	}
	up, down := dwellRatios(an)
	c.DwellPositive, c.DwellNegative = report.Number(up), report.Number(down)
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
// window (Harris 1978; gonum's window over n+1 points, its last dropped)
// scaled by its coherent gain.
func amplitudeSpectrum(x []float64, fs float64, coherent bool) *Spectrum {
	n := len(x)
	w := make([]float64, n)
	copy(w, x)
	gain := 1.0
	if !coherent {
		win := make([]float64, n+1)
		for i := range win {
			win[i] = 1
		}
		win = window.BlackmanHarris(win)[:n]
		var sum float64
		for i, wi := range win {
			w[i] *= wi
			sum += wi
		}
		gain = sum / float64(n)
	}
	coef := fourier.NewFFT(n).Coefficients(nil, w)
	s := &Spectrum{Hz: make([]float64, len(coef)), DBV: make([]float64, len(coef))}
	for k, c := range coef {
		amp := cmplx.Abs(c) / float64(n) / gain
		if k > 0 && !(n%2 == 0 && k == n/2) {
			amp *= 2
		}
		s.Hz[k] = float64(k) * fs / float64(n)
		if k == 0 {
			s.DBV[k] = report.DB(amp) // DC: its own value, not a sine's RMS
		} else {
			s.DBV[k] = report.DB(amp / math.Sqrt2)
		}
	}
	return s
}

func wrapDeg(d float64) float64 {
	d = math.Mod(d, 360)
	if d > 180 {
		d -= 360
	} else if d <= -180 {
		d += 360
	}
	return d
}
