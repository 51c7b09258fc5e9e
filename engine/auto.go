package engine

import (
	"context"
	"fmt"
	"math"
	"strings"

	"renderchain/dsp/mna"
	"renderchain/dsp/resample"
	"renderchain/dsp/spectrum"
	"renderchain/report"
)

// The automatic oversampling factor of a render (ChooseOversample).
const (
	// AliasTarget is the signal-to-alias ratio, dB, that the automatic
	// factor holds for every probe tone: aliases at least 50 dB under the
	// tone (−50 dBc), the bar of issue 12 for a 1319 Hz sine at 0.3 of full
	// scale through the demo chain at full fuzz.
	AliasTarget = 50.0
	// AliasProbeLevel is the probe tones' peak in digital full scale of
	// the input (0.3, −10.5 dBFS: a firmly played note on a DI take that
	// peaks a few dB under full scale; common practice).
	AliasProbeLevel = 0.3
	// WarpTolerance is the largest change, in dB of the small-signal
	// response's peak level, that the bilinear transform's frequency
	// warping may make anywhere from 20 Hz to the passband edge at the
	// automatic factor: 0.1 dB, the flatness usually asked of an audio
	// path (common practice).
	WarpTolerance = 0.1
	// WarpMinGain is the small-signal gain (source to output) under which
	// the warping check has nothing to measure: at −120 dB the response is
	// the AC solve's rounding (a rectifier or a gate whose devices are off
	// at idle), and its changes with the factor say nothing.
	WarpMinGain = 1e-6
	// MaxTrials bounds the factors the search renders its probe at.
	MaxTrials = 6
)

// Search constants (see ChooseOversample).
const (
	// searchSlope is the rise of the signal-to-alias ratio per doubling
	// of the factor that the search predicts with until it has two
	// points of its own: 12 dB, under most rises measured on the demo and
	// germanium chains (7–18 dB per doubling, README), so that the
	// prediction usually errs high and the search steps back down.
	searchSlope = 12.0
	// Slopes from two measured points are clamped to this range.
	minSlope, maxSlope = 6.0, 24.0
	// probeRecord is the length of one analysed window, seconds: the
	// probe tones are whole numbers of cycles in it.
	probeRecord = 0.1
	// A tone counts as settled when two consecutive windows agree within
	// probeAgree dB, or both lie probeClear dB above the target.
	probeAgree, probeClear = 0.5, 20.0
	// The first tone waits probeFirstWait before its first window and at
	// most probeFirstMax in all; each later tone, after a phase-continuous
	// switch, probeNextWait and probeNextMax (seconds). The waits are the
	// demo chain's (its windows agree to 0.1 dB from 0.3 s on, and a
	// switch between neighbouring tones settles within 0.1 s), the
	// maxima bound a circuit with slower transients.
	probeFirstWait, probeFirstMax = 0.2, 2.0
	probeNextWait, probeNextMax   = 0.1, 1.0
	// probeTones is the number of probe tones.
	probeTones = 4
	// probeBlock is the input block of the probe run, samples: small, so
	// that a tone switch follows its decision closely.
	probeBlock = 512
)

// probeCycles are the probe tones' whole cycles per window, in order of
// preference: primes above 2·resample.MaxFactor, so tones near 1.3 kHz
// (10·m Hz at a rate divisible by 10). A line folded back from above the
// internal Nyquist frequency lands on a harmonic's bin only when the
// number of base-rate periods it wrapped is a multiple of m, which for
// such an m needs a harmonic near the internal rate times m: with these
// tones every folded line of any weight falls between the harmonics, where
// spectrum.SignalToAlias counts it. Four tones rather than one because a
// single tone's ratio depends on where the strongest folded lines happen
// to land: on the demo at full fuzz neighbouring tones differ by up to
// 8 dB at one factor.
var probeCycles = []int{127, 131, 137, 139, 149, 151, 157, 163}

// FactorChoice says which oversampling factor a render runs at and why.
type FactorChoice struct {
	Factor int `json:"oversample"`
	// From is FactorRequested, FactorChain, FactorDefault or FactorAuto.
	From string `json:"from"`
	// Reason is one sentence for a report.
	Reason string `json:"reason"`
	// WarpFloor is the lowest factor whose frequency warping keeps the
	// small-signal response within WarpTolerance (0 when not computed);
	// WarpDB the worst change at the chosen factor, dB of the peak.
	WarpFloor int     `json:"warp_floor,omitempty"`
	WarpDB    float64 `json:"warp_db,omitempty"`
	// Trials are the factors the probe ran at, in the order run.
	Trials []AliasTrial `json:"trials,omitempty"`
	// AliasDB is the worst probe tone's signal-to-alias ratio at Factor,
	// dB (NaN when not measured: a linear circuit, a factor given).
	AliasDB float64 `json:"-"`
	// Warning is set when the choice could not meet its target.
	Warning string `json:"-"`
}

// AliasTrial is one factor the automatic choice measured: the worst
// signal-to-alias ratio of the probe tones it rendered (a trial stops at
// the first tone under the target) and whether every window settled.
type AliasTrial struct {
	Factor int `json:"oversample"`
	// DB is null in JSON for an output without any non-harmonic line.
	DB      report.Level `json:"worst_db"`
	Tones   int          `json:"tones"`
	Settled bool         `json:"settled"`
	Pass    bool         `json:"pass"`
	// Seconds is the audio the trial rendered, at the base rate.
	Seconds float64 `json:"seconds"`
}

// ChooseOversample returns the oversampling factor for a render of this
// chain at base rate fs. A factor the caller or the chain named
// (OversampleFrom not FactorDefault) is kept. Otherwise it is chosen:
//
//   - The floor: the lowest factor at which the bilinear transform's
//     frequency warping (every reactive part is integrated by the
//     trapezoidal rule, so the solver's small-signal response at f is the
//     circuit's at (2·F·fs/π)·tan(π·f/(F·fs)); Oppenheim & Schafer,
//     Discrete-Time Signal Processing, 3rd ed., sec. 7.2, from memory)
//     moves the small-signal response at the output, linearised at the
//     operating point (mna.AC), by at most WarpTolerance of its peak from
//     20 Hz to the resampler's passband edge.
//   - A circuit without nonlinear devices makes no aliases: the floor is
//     the factor.
//   - A circuit with devices: the lowest factor from the floor up at which
//     every probe tone (AliasProbeLevel of full scale at four frequencies
//     near 1.3 kHz, one after another, phase continuous) comes out with a
//     signal-to-alias ratio (spectrum.SignalToAlias on a settled coherent
//     tenth of a second) of at least AliasTarget. The search starts at
//     the floor (a failing trial stops at its first tone, so a low start
//     is cheap) and goes up by a prediction from the measured rise per
//     doubling, at most MaxTrials factors. Stepping down from a passing factor is only
//     tried while it pays: while budget (the seconds of audio the render
//     will run, all channels) exceeds the probe's own length times the
//     lower factor; budget +Inf always tries.
//
// The last trial the search allows is 16×; when no factor up to 16 meets
// the target the result is 16 with a Warning. A circuit that oscillates on its own (Unstable) makes
// non-harmonic output that no factor removes; it keeps DefaultOversample
// with a Warning. The probe costs about one second of audio per factor
// tried, less for a factor that fails.
func (p *Prepared) ChooseOversample(ctx context.Context, fs, budget float64) (*FactorChoice, error) {
	if p.OversampleFrom != FactorDefault && p.OversampleFrom != "" {
		why := "given on the command line"
		if p.OversampleFrom == FactorChain {
			why = "the chain's oversample setting"
		}
		return &FactorChoice{Factor: p.Oversample, From: p.OversampleFrom, Reason: why, AliasDB: math.NaN()}, nil
	}
	if !(fs >= MinRate && fs <= MaxRate) {
		return nil, fmt.Errorf("base rate %g Hz is outside %d–%d Hz", fs, MinRate, MaxRate)
	}
	floor, err := p.warpFloor(fs)
	if err != nil {
		return nil, err
	}
	c := &FactorChoice{From: FactorAuto, WarpFloor: floor, AliasDB: math.NaN()}
	// No small-signal path at idle (a rectifier or gate whose devices
	// rest): warping has nothing to measure (WarpFloor and WarpDB stay 0),
	// so the floor is the fixed factor the analyses use, whose accuracy the
	// tests establish.
	silent := floor == 0
	if silent {
		floor = DefaultOversample
	}
	finish := func(f int) (*FactorChoice, error) {
		c.Factor = f
		if !silent {
			if c.WarpDB, _, err = p.warpAt(fs, f); err != nil {
				return nil, err
			}
		}
		return c, nil
	}
	if len(p.Circuit.Devices()) == 0 && silent {
		c.Reason = fmt.Sprintf("automatic: a circuit without nonlinear devices makes no aliases, and its small-signal response is under %.0f dB, so frequency warping cannot set the floor: the analyses' %d×",
			20*math.Log10(WarpMinGain), floor)
		return finish(floor)
	}
	if len(p.Circuit.Devices()) == 0 {
		c.Reason = fmt.Sprintf("automatic: a circuit without nonlinear devices makes no aliases; %d× is the lowest factor whose frequency warping "+
			"moves the small-signal response by at most %.1f dB up to %s", floor, WarpTolerance, hzText(passband(fs)))
		return finish(floor)
	}
	if p.Unstable() {
		f := max(floor, DefaultOversample)
		c.Reason = fmt.Sprintf("automatic: %d×; the circuit oscillates on its own, so its output holds non-harmonic lines no factor removes and the alias probe cannot run", f)
		c.Warning = "the automatic oversampling factor could not measure aliasing: the circuit oscillates on its own"
		return finish(f)
	}
	trial := func(f int) (AliasTrial, error) {
		t, err := p.aliasProbe(ctx, fs, f)
		c.Trials = append(c.Trials, t)
		return t, err
	}
	best := 0 // lowest passing factor found
	var bestTrial AliasTrial
	// The search starts at the floor: a failing trial stops at its first
	// tone, so a low start is cheap, and a floor that passes is the answer.
	t, err := trial(floor)
	if err != nil {
		return nil, err
	}
	if t.Pass {
		best, bestTrial = floor, t
	} else {
		lo := t // highest failing trial
		var below *AliasTrial
		for len(c.Trials) < MaxTrials && lo.Factor < resample.MaxFactor {
			slope := searchSlope
			if below != nil {
				slope = float64(lo.DB-below.DB) / math.Log2(float64(lo.Factor)/float64(below.Factor))
				slope = min(max(slope, minSlope), maxSlope)
			}
			next := resample.MaxFactor
			if len(c.Trials) < MaxTrials-1 && report.Finite(float64(lo.DB)) {
				next = int(math.Ceil(float64(lo.Factor) * math.Pow(2, (AliasTarget-float64(lo.DB))/slope)))
			}
			next = min(max(next, lo.Factor+1), resample.MaxFactor)
			t, err := trial(next)
			if err != nil {
				return nil, err
			}
			if t.Pass {
				best, bestTrial = next, t
				break
			}
			prev := lo
			below, lo = &prev, t
		}
		// Step down towards the highest failing factor while it pays: a
		// factor less saves the render budget·(one factor's work), a try
		// costs the probe's length times the factor tried.
		for f := best - 1; best > 0 && f > lo.Factor && len(c.Trials) < MaxTrials && budget > bestTrial.Seconds*float64(f); f-- {
			t, err := trial(f)
			if err != nil {
				return nil, err
			}
			if !t.Pass {
				break
			}
			best, bestTrial = f, t
		}
		if best == 0 {
			worst := c.Trials[len(c.Trials)-1]
			c.AliasDB = float64(worst.DB)
			c.Reason = fmt.Sprintf("automatic: %d×, the highest factor tried; a probe tone still came out %.1f dB over its aliases there, short of the %g dB target",
				worst.Factor, float64(worst.DB), AliasTarget)
			c.Warning = fmt.Sprintf("aliasing: at %d×, the highest factor, a probe tone near 1.3 kHz at %.1f of full scale keeps its aliases only %.1f dB under it (target %g dB)",
				worst.Factor, AliasProbeLevel, float64(worst.DB), AliasTarget)
			if first := c.Trials[0]; float64(worst.DB-first.DB) < minSlope {
				c.Warning += "; the non-harmonic output hardly falls with the factor, so it may not be aliasing at all (a sub-harmonic or an oscillation the signal sets off)"
			}
			return finish(worst.Factor)
		}
	}
	c.AliasDB = float64(bestTrial.DB)
	tried := make([]string, len(c.Trials))
	for i, t := range c.Trials {
		tried[i] = fmt.Sprintf("%d× %s", t.Factor, dbText(float64(t.DB)))
	}
	c.Reason = fmt.Sprintf("automatic: the lowest factor tried at which %d probe tones near 1.3 kHz at %.1f of full scale keep their aliases %g dB down (%s)",
		probeTones, AliasProbeLevel, AliasTarget, strings.Join(tried, ", "))
	switch {
	case silent:
		c.Reason += fmt.Sprintf("; the small-signal response at idle is under %.0f dB (no linear path while the devices rest), so frequency warping cannot set the floor and the search starts at the analyses' %d×", 20*math.Log10(WarpMinGain), DefaultOversample)
	case best == floor && floor > 1:
		c.Reason += fmt.Sprintf("; %d× is also the floor the small-signal frequency warping sets", floor)
	}
	if !bestTrial.Settled {
		c.Warning = fmt.Sprintf("the alias probe at %d× did not settle: its figure (%s) may be off by a few dB", best, dbText(float64(bestTrial.DB)))
	}
	return finish(best)
}

// passband is the resampler's passband edge at base rate fs (the
// protected band; package resample).
func passband(fs float64) float64 {
	return math.Min(resample.PassbandEdge, fs*resample.PassbandEdge/44100)
}

// warpGrid is the frequency grid of the warping check: 48 points a decade
// from 20 Hz to the passband edge.
func warpGrid(fs float64) []float64 {
	lo, hi := 20.0, passband(fs)
	n := int(math.Ceil(48*math.Log10(hi/lo))) + 1
	g := make([]float64, n)
	for i := range g {
		g[i] = lo * math.Pow(hi/lo, float64(i)/float64(n-1))
	}
	g[n-1] = hi
	return g
}

// warpFloor returns the lowest factor (1…16) at which the bilinear
// transform's warping changes the small-signal response at the output by
// at most WarpTolerance of its peak over warpGrid; 16 when none does; 0
// when the response's peak is under WarpMinGain (nothing to measure).
func (p *Prepared) warpFloor(fs float64) (int, error) {
	for f := 1; f < resample.MaxFactor; f++ {
		d, peak, err := p.warpAt(fs, f)
		if err != nil {
			return 0, err
		}
		if peak < WarpMinGain {
			return 0, nil
		}
		if d <= WarpTolerance {
			return f, nil
		}
	}
	return resample.MaxFactor, nil
}

// warpAt returns the largest change, in dB of the peak level, that the
// bilinear transform at factor·fs makes to the small-signal response at
// the output over warpGrid: max | |H(jω')| − |H(jω)| | / max |H(jω)| as
// 20·log10(1 + ·), ω' = 2·factor·fs·tan(ω/(2·factor·fs)); and the peak
// gain max |H(jω)|.
func (p *Prepared) warpAt(fs float64, factor int) (float64, float64, error) {
	grid := warpGrid(fs)
	t := 1 / (fs * float64(factor))
	warped := make([]float64, len(grid))
	for i, f := range grid {
		warped[i] = math.Tan(math.Pi*f*t) / (math.Pi * t)
	}
	h, err := mna.AC(p.Circuit, p.DC, append(append([]float64(nil), grid...), warped...), []int{p.Circuit.Output})
	if err != nil {
		return 0, 0, err
	}
	n := len(grid)
	peak, worst := 0.0, 0.0
	for i := 0; i < n; i++ {
		a := abs(h[i][0])
		peak = math.Max(peak, a)
		worst = math.Max(worst, math.Abs(abs(h[n+i][0])-a))
	}
	if peak == 0 {
		return 0, 0, nil
	}
	return 20 * math.Log10(1+worst/peak), peak, nil
}

func abs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

// probeWindow is the probe's window length in samples at fs.
func probeWindow(fs float64) int { return int(math.Round(fs * probeRecord)) }

// probeSet returns the probe tones' cycles per window at fs: the first
// probeTones of probeCycles that share no factor with the window length.
func probeSet(fs float64) []int {
	n := probeWindow(fs)
	var out []int
	for _, m := range probeCycles {
		if gcd(m, n) == 1 {
			out = append(out, m)
		}
		if len(out) == probeTones {
			break
		}
	}
	return out
}

// probeHz is the frequency of probe tone i at fs.
func probeHz(fs float64, i int) float64 {
	return float64(probeSet(fs)[i]) * fs / float64(probeWindow(fs))
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// aliasProbe renders the probe tones one after another through the
// output at factor and returns the worst signal-to-alias ratio among
// them; it stops at the first tone under AliasTarget. Each tone is
// analysed over consecutive windows of probeRecord once its wait is over,
// until two agree (probeAgree, probeClear) or its maximum is reached,
// when the lower of the last two counts and the trial is unsettled.
func (p *Prepared) aliasProbe(ctx context.Context, fs float64, factor int) (AliasTrial, error) {
	tr := AliasTrial{Factor: factor, DB: report.Level(math.Inf(1)), Settled: true}
	ch, err := p.channelAt(fs, p.Circuit.Output, factor)
	if err != nil {
		return tr, err
	}
	n := probeWindow(fs)
	cycles := probeSet(fs)
	fade := int(math.Ceil(0.01 * fs))
	wait, most := int(probeFirstWait*fs), int(probeFirstMax*fs)
	var (
		m, start      = cycles[0], 0 // the tone being generated and its first sample
		phase         float64        // its phase at start
		winStart      = wait         // first output sample of the next window
		toneEnd       = most         // last output sample the tone may use
		win           = make([]float64, n)
		fill, windows int
		prev          = math.NaN()
		tin, tout     int
		src           = make([]float64, probeBlock)
		dst           = make([]float64, probeBlock)
	)
	for {
		if err := ctx.Err(); err != nil {
			return tr, err
		}
		for i := range src {
			k := (tin + i - start) % n
			v := AliasProbeLevel * math.Sin(phase+2*math.Pi*float64(m)*float64(k)/float64(n))
			if t := tin + i; t < fade {
				v *= 0.5 * (1 - math.Cos(math.Pi*float64(t)/float64(fade)))
			}
			src[i] = v
		}
		tin += len(src)
		got := ch.Process(dst, src)
		for _, y := range dst[:got] {
			o := tout
			tout++
			if o < winStart {
				continue
			}
			win[fill] = y
			if fill++; fill < n {
				continue
			}
			fill = 0
			windows++
			winStart += n
			a, err := spectrum.SignalToAlias(win, fs, float64(m)*fs/float64(n))
			if err != nil {
				return tr, fmt.Errorf("alias probe at %d×: %w", factor, err)
			}
			db := a.DB
			agreed := windows >= 2 && (math.Abs(db-prev) <= probeAgree || math.Min(db, prev) >= AliasTarget+probeClear)
			if !agreed && o+1 < toneEnd {
				prev = db
				continue
			}
			if windows >= 2 {
				db = math.Min(db, prev)
			}
			if !agreed {
				tr.Settled = false
			}
			tr.Tones++
			tr.DB = report.Level(math.Min(float64(tr.DB), db))
			if db < AliasTarget || tr.Tones == len(cycles) {
				tr.Pass = tr.DB >= AliasTarget
				tr.Seconds = float64(tin) / fs
				return tr, nil
			}
			// The next tone, phase continuous, from the next input sample.
			phase = math.Mod(phase+2*math.Pi*float64(m)*float64((tin-start)%n)/float64(n), 2*math.Pi)
			m, start = cycles[tr.Tones], tin
			winStart, toneEnd = tin+int(probeNextWait*fs), tin+int(probeNextMax*fs)
			windows, prev, fill = 0, math.NaN(), 0
		}
	}
}

// hzText writes a frequency for a sentence.
func hzText(f float64) string { return formatHz(f) }

// dbText writes a ratio in dB for a sentence: "∞ dB" for an output with no
// non-harmonic line at all.
func dbText(db float64) string {
	if math.IsInf(db, 1) {
		return "∞ dB"
	}
	return fmt.Sprintf("%.1f dB", db)
}
