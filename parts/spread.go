package parts

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"strings"
	"sync/atomic"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/models"
	"renderchain/parallel"
	"renderchain/report"
)

var sprintf = fmt.Sprintf

// Distribution is the shape of a part's deviation from its nominal value.
type Distribution int

const (
	// Normal: Gaussian with the tolerance at 3σ, truncated at ±tolerance
	// (draws beyond are drawn again).
	Normal Distribution = iota
	// Uniform: uniform within ±tolerance.
	Uniform
)

func (d Distribution) String() string {
	if d == Uniform {
		return "uniform"
	}
	return "normal"
}

// Describe says in words how a part's value is drawn.
func (d Distribution) Describe() string {
	if d == Uniform {
		return "uniform within ±tolerance"
	}
	return "normal with tolerance = 3σ, truncated at ±tolerance"
}

// ParseDistribution reads "normal" or "uniform"; another name is a
// *models.FieldError on the field "distribution".
func ParseDistribution(s string) (Distribution, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "normal", "gaussian", "":
		return Normal, nil
	case "uniform":
		return Uniform, nil
	}
	return 0, models.Fieldf("distribution", s, "is normal or uniform")
}

// deviation draws a relative deviation within ±tol.
func (d Distribution) deviation(r *rand.Rand, tol float64) float64 {
	if d == Uniform {
		return tol * (2*r.Float64() - 1)
	}
	for {
		z := r.NormFloat64()
		if math.Abs(z) <= 3 {
			return tol * z / 3
		}
	}
}

// Spec is an acceptance window for one quantity: a transistor quantity or
// node voltage (Probe set), the gain at the spread's frequency ("gain", dB)
// or THD ("thd", percent). Lo or Hi may be infinite.
type Spec struct {
	Text   string
	Probe  *bias.Probe
	Metric string
	Lo, Hi float64
}

// ParseSpec reads "KEY=LO..HI": fuzz.Q2.vc=4..5V, fuzz.Q2.ic=0.5m..1mA,
// gain=30..40dB, thd=..20%. Either bound may be left out. Errors are
// *models.FieldError on the field "spec".
func ParseSpec(ch *chains.Chain, s string) (*Spec, error) {
	key, span, ok := strings.Cut(s, "=")
	if !ok {
		return nil, models.Fieldf("spec", s, "want KEY=LO..HI, e.g. fuzz.Q2.vc=4..5V, gain=30..40dB, thd=..20%%")
	}
	key = strings.TrimSpace(key)
	sp := &Spec{Text: strings.TrimSpace(s)}
	var parse func(string) (float64, error)
	switch strings.ToLower(key) {
	case "gain":
		sp.Metric, parse = "gain_db", models.ParseDecibels
	case "thd":
		sp.Metric, parse = "thd_percent", models.ParsePercent
	default:
		p, err := bias.ParseProbe(ch, key)
		if err != nil {
			var fe *models.FieldError
			if errors.As(err, &fe) {
				return nil, models.Fieldf("spec", s, "%s", fe.Msg)
			}
			return nil, err
		}
		sp.Probe, sp.Metric = p, p.Key
		parse = func(t string) (float64, error) { return models.ParseValue(t, p.Kind()) }
	}
	lo, hi, err := models.ParseSpan(span, parse, true)
	if err != nil {
		return nil, models.FieldOf("spec", s, err)
	}
	sp.Lo, sp.Hi = lo, hi
	return sp, nil
}

func (s *Spec) pass(v float64) bool { return v >= s.Lo && v <= s.Hi }

// SpreadOptions set a Monte Carlo run. Zero values pick the defaults.
type SpreadOptions struct {
	Trials  int    // default 200
	Seed    uint64 // trial k draws from generators seeded by SplitMix64 hashes of (Seed, k)
	Workers int    // default GOMAXPROCS (package parallel)
	// Distribution of resistor, capacitor and pot values.
	Distribution Distribution
	// HFEBin is a list of measured hFE values: each trial picks distinct
	// devices from it at random for its transistors (with replacement when
	// the list is shorter than the transistor count). HFELow..HFEHigh
	// instead draws each hFE uniformly. With neither, hFE is as written.
	HFEBin          []float64
	HFELow, HFEHigh float64
	// LeakSpread draws each leaky device's Icbo log-uniformly within
	// ×/÷ LeakSpread of its value; 0 means DefaultLeakSpread, 1 none.
	LeakSpread float64
	// FETSpread draws each JFET's pinch-off voltage log-uniformly within
	// ×/÷ FETSpread of its value and sets its Idss with it so that the
	// square law's β = Idss/Vp² stays as written; 0 means
	// DefaultFETSpread, 1 none.
	FETSpread float64
	Freq      float64 // small-signal gain and THD frequency, Hz (default 1 kHz)
	Amplitude float64 // THD test sine, V peak at the source (default 100 mV)
	NoTHD     bool    // skip the THD render (it dominates the time)
	Specs     []*Spec
	// Retrim, if set, re-trims every trial (and the nominal run) with
	// RetrimAdjust to this target before measuring, as a builder would on
	// the bench; a trial that cannot reach it fails the yield.
	Retrim       *bias.Target
	RetrimAdjust *bias.Adjuster
	// AllStages varies the environment stages (pickup, amplifier input)
	// too.
	AllStages bool
	// Progress, if set, is called after each trial with the count done.
	Progress func(done, total int)
}

// DefaultLeakSpread is the default spread of germanium leakage between
// devices: a factor of 2 either way (a choice of this package, not a
// published figure).
const DefaultLeakSpread = 2.0

// DefaultFETSpread is the default spread of a JFET's pinch-off voltage
// between parts of one type: a factor of 1.5 either way. Datasheets of
// small-signal JFETs give Vgs(off) and Idss as ranges of two to four to
// one within a type (common practice, from memory), the reason a JFET
// stage is trimmed for the part in hand; Idss follows as β·Vp², the
// square law with its β held (Shichman & Hodges, IEEE JSSC 3(3), 1968:
// Idss = β·Vp²), so a part of larger pinch-off also draws more.
const DefaultFETSpread = 1.5

// MaxTrials bounds SpreadOptions.Trials.
const MaxTrials = 100000

// resolve fills in the defaults and refuses options out of range, as
// *models.FieldError naming the field.
func (o *SpreadOptions) resolve() error {
	if o.Trials == 0 {
		o.Trials = 200
	}
	if o.LeakSpread == 0 {
		o.LeakSpread = DefaultLeakSpread
	}
	if o.FETSpread == 0 {
		o.FETSpread = DefaultFETSpread
	}
	if o.Freq == 0 {
		o.Freq = 1000
	}
	if o.Amplitude == 0 {
		o.Amplitude = 0.1
	}
	switch {
	case o.Trials < 1 || o.Trials > MaxTrials:
		return models.Fieldf("trials", strconv.Itoa(o.Trials), "is outside 1…%d", MaxTrials)
	case o.Workers < 0:
		return models.Fieldf("workers", strconv.Itoa(o.Workers), "must be at least 1 (0: one per core)")
	case o.HFEHigh > 0 && !(models.GainRange.Contains(o.HFELow) && o.HFELow <= o.HFEHigh && models.GainRange.Contains(o.HFEHigh)):
		return models.Fieldf("hfe_range", sprintf("%g..%g", o.HFELow, o.HFEHigh), "want 0 < LO ≤ HI ≤ %g", models.GainRange.Hi)
	case !(o.LeakSpread >= 1) || math.IsInf(o.LeakSpread, 0):
		return models.Fieldf("leak_spread", sprintf("%g", o.LeakSpread), "must be a factor of at least 1 (1: no spread)")
	case !(o.FETSpread >= 1 && o.FETSpread <= 10):
		return models.Fieldf("fet_spread", sprintf("%g", o.FETSpread), "must be a factor from 1 (no spread) to 10")
	case !(o.Freq > 0 && o.Freq < thdRate/2):
		return models.Fieldf("frequency", models.FormatValue(o.Freq, "Hz"), "is outside (0, %s)", models.FormatValue(thdRate/2, "Hz"))
	case !models.SignalRange.Contains(o.Amplitude):
		return models.Fieldf("amplitude", models.FormatValue(o.Amplitude, "V"), "must be %s", models.SignalRange.Describe())
	}
	for _, h := range o.HFEBin {
		if !models.GainRange.Contains(h) {
			return models.Fieldf("hfe_bin", sprintf("%g", h), "an hFE must be %s", models.GainRange.Describe())
		}
	}
	for _, sp := range o.Specs {
		if sp.Metric == "thd_percent" && o.NoTHD {
			return models.Fieldf("spec", sp.Text, "a THD spec needs the THD measurement (the THD render is turned off)")
		}
	}
	return nil
}

// SpecResult is how many trials met one spec.
type SpecResult struct {
	Spec     string  `json:"spec"`
	Pass     int     `json:"pass"`
	Fraction float64 `json:"fraction"`
	Message  string  `json:"message,omitempty"`
}

// PartDraw summarises the values drawn for one part parameter.
type PartDraw struct {
	Ref       string  `json:"ref"`  // "fuzz.R1", "fuzz.Q2.hfe"
	Kind      string  `json:"kind"` // part kind
	Rule      string  `json:"rule"` // where the tolerance comes from
	Tolerance float64 `json:"tolerance_percent"`
	Summary
}

// SpreadResult is the outcome of Spread.
type SpreadResult struct {
	Chain        string         `json:"chain"`
	SupplyV      float64        `json:"supply_v"`
	Trials       int            `json:"trials"`
	Seed         uint64         `json:"seed"`
	Distribution string         `json:"distribution"`
	HFE          string         `json:"hfe"`
	Freq         float64        `json:"freq_hz"`
	Amplitude    float64        `json:"thd_amplitude_v,omitempty"`
	Failed       int            `json:"failed_trials"`
	FirstFailure string         `json:"first_failure,omitempty"`
	Untrimmable  int            `json:"untrimmable_trials,omitempty"`
	Retrim       string         `json:"retrim,omitempty"`
	Quantities   []Summary      `json:"quantities"`
	Parts        []PartDraw     `json:"parts"`
	Specs        []SpecResult   `json:"specs,omitempty"`
	Yield        *report.Number `json:"yield,omitempty"`
	YieldLow     *report.Number `json:"yield_low,omitempty"`
	YieldHigh    *report.Number `json:"yield_high,omitempty"`
	Messages     []string       `json:"messages,omitempty"`

	columns, drawCols []string
	rows, draws       [][]float64 // per trial
	ok, trimmed       []bool
	errs              []string
}

// Quantity returns the summary of the named quantity ("fuzz.Q2.vce",
// "gain_db", "thd_percent"), or nil.
func (r *SpreadResult) Quantity(name string) *Summary {
	for i := range r.Quantities {
		if r.Quantities[i].Name == name {
			return &r.Quantities[i]
		}
	}
	return nil
}

// Part returns the summary of the named part draw ("fuzz.R1",
// "fuzz.Q2.hfe"), or nil.
func (r *SpreadResult) Part(name string) *PartDraw {
	for i := range r.Parts {
		if r.Parts[i].Name == name {
			return &r.Parts[i]
		}
	}
	return nil
}

// WriteCSV writes one row per trial: its index, whether it solved, every
// measured quantity and every drawn value, in SI units (gain in dB, THD in
// percent).
func (r *SpreadResult) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	head := append(append([]string{"trial", "ok"}, r.columns...), r.drawCols...)
	if err := cw.Write(head); err != nil {
		return err
	}
	for k := range r.rows {
		rec := []string{strconv.Itoa(k), strconv.FormatBool(r.ok[k])}
		for _, v := range append(append([]float64(nil), r.rows[k]...), r.draws[k]...) {
			rec = append(rec, strconv.FormatFloat(v, 'g', 8, 64))
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// splitmix64 is the SplitMix64 mixing function (Steele, Lea & Flood,
// "Fast splittable pseudorandom number generators", OOPSLA 2014).
func splitmix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// trialRand returns trial k's generator: a PCG seeded with SplitMix64
// hashes of (seed, k), so a trial's draws depend on nothing but the seed
// and its index, whatever worker runs it and when.
func trialRand(seed uint64, k int) *rand.Rand {
	s1 := splitmix64(splitmix64(seed) ^ uint64(k))
	return rand.New(rand.NewPCG(s1, splitmix64(s1)))
}

// varied is one part parameter a trial draws.
type varied struct {
	stage, ref, param string // param "" for the value
	kind              chains.PartKind
	rule              string
	tol               float64
}

func (v varied) name() string {
	s := v.stage + "." + v.ref
	if v.param != "" {
		s += "." + v.param
	}
	return s
}

// plan lists, in a fixed order, what each trial draws.
func plan(ch *chains.Chain, opt *SpreadOptions) []varied {
	var out []varied
	for _, st := range ch.PartStages() {
		if st.Environment && !opt.AllStages {
			continue
		}
		for _, p := range st.Parts {
			if ch.CellResistance(st, p) {
				continue // the battery's resistance: a condition, not a tolerance
			}
			switch p.Kind {
			case chains.Resistor, chains.Capacitor, chains.Pot:
				if tol, rule := Tolerance(p); tol > 0 {
					out = append(out, varied{stage: st.ID, ref: p.Ref, kind: p.Kind, rule: rule, tol: tol})
				}
			case chains.NPN, chains.PNP:
				if len(opt.HFEBin) > 0 {
					out = append(out, varied{stage: st.ID, ref: p.Ref, param: "hfe", kind: p.Kind, rule: "hFE bin"})
				} else if opt.HFEHigh > 0 {
					out = append(out, varied{stage: st.ID, ref: p.Ref, param: "hfe", kind: p.Kind, rule: "hFE range"})
				}
				if p.BJTParams().Icbo > 0 && opt.LeakSpread > 1 {
					out = append(out, varied{stage: st.ID, ref: p.Ref, param: "icbo", kind: p.Kind, rule: "leakage spread"})
				}
			case chains.NJFET, chains.PJFET:
				if opt.FETSpread > 1 {
					out = append(out, varied{stage: st.ID, ref: p.Ref, param: "pinchoff", kind: p.Kind, rule: "pinch-off spread (Idss = β·Vp²)"})
				}
			}
		}
	}
	return out
}

// draw applies one trial's draws to ch (a clone) and returns the values.
func draw(ch *chains.Chain, pl []varied, opt *SpreadOptions, r *rand.Rand) []float64 {
	nT := 0
	for _, v := range pl {
		if v.param == "hfe" {
			nT++
		}
	}
	var perm []int
	if len(opt.HFEBin) >= nT && nT > 0 {
		perm = r.Perm(len(opt.HFEBin))
	}
	vals := make([]float64, len(pl))
	t := 0
	for i, v := range pl {
		p := findPart(ch, v.stage, v.ref)
		switch v.param {
		case "":
			p.Value *= 1 + opt.Distribution.deviation(r, v.tol)
			vals[i] = p.Value
		case "hfe":
			var h float64
			switch {
			case perm != nil:
				h = opt.HFEBin[perm[t]]
			case len(opt.HFEBin) > 0:
				h = opt.HFEBin[r.IntN(len(opt.HFEBin))]
			default:
				h = opt.HFELow + (opt.HFEHigh-opt.HFELow)*r.Float64()
			}
			t++
			p.Params["hfe"] = h
			vals[i] = h
		case "icbo":
			i0 := p.BJTParams().Icbo
			p.Params["icbo"] = i0 * math.Pow(opt.LeakSpread, 2*r.Float64()-1)
			vals[i] = p.Params["icbo"]
		case "pinchoff":
			j := p.JFETParams()
			vp := j.Pinchoff * math.Pow(opt.FETSpread, 2*r.Float64()-1)
			p.Params["pinchoff"] = vp
			p.Params["idss"] = j.Idss * (vp / j.Pinchoff) * (vp / j.Pinchoff) // β = Idss/Vp² held
			vals[i] = vp
		}
	}
	return vals
}

func findPart(ch *chains.Chain, stage, ref string) *chains.Part {
	for _, p := range ch.StageOf(stage).Parts {
		if p.Ref == ref {
			return p
		}
	}
	return nil
}

// Spread runs a Monte Carlo over the chain's part tolerances, transistor
// gains and leakage: opt.Trials trials on a bounded pool of opt.Workers
// goroutines, each a clone of the chain with values drawn and set on its
// parts, prepared and measured like the nominal build. It reports
// percentiles of every transistor's Vce, Ic and Vc, the small-signal gain
// at opt.Freq and (unless NoTHD) the THD of a sine at opt.Amplitude, the
// values drawn, and the yield against opt.Specs. The result depends only
// on the chain, the options and the seed.
func Spread(ctx context.Context, ch *chains.Chain, opt SpreadOptions) (*SpreadResult, error) {
	if err := opt.resolve(); err != nil {
		return nil, err
	}
	nominal, err := measureTrial(ctx, ch.Clone(), &opt, nil) // fixes the columns
	if err != nil {
		return nil, err
	}
	pl := plan(ch, &opt)
	res := newSpreadResult(ch, &opt, nominal, pl)
	if err := res.runTrials(ctx, ch, &opt, pl, nominal.names); err != nil {
		return nil, err
	}
	res.summarise(ch, pl, nominal)
	res.judge(&opt)
	return res, nil
}

// newSpreadResult sets up the result: its description and one row of
// measurements and draws per trial.
func newSpreadResult(ch *chains.Chain, opt *SpreadOptions, nominal *trialMeasure, pl []varied) *SpreadResult {
	res := &SpreadResult{Chain: ch.Name, SupplyV: ch.Supply, Trials: opt.Trials, Seed: opt.Seed, Distribution: opt.Distribution.Describe(), Freq: opt.Freq}
	switch {
	case len(opt.HFEBin) > 0:
		res.HFE = "drawn from the bin " + joinFloats(opt.HFEBin)
	case opt.HFEHigh > 0:
		res.HFE = sprintf("uniform in %g…%g", opt.HFELow, opt.HFEHigh)
	default:
		res.HFE = "as written"
	}
	if !opt.NoTHD {
		res.Amplitude = opt.Amplitude
	}
	if opt.Retrim != nil {
		res.Retrim = opt.Retrim.Text + " with " + opt.RetrimAdjust.Key()
	}
	res.columns = nominal.names
	for _, v := range pl {
		res.drawCols = append(res.drawCols, v.name())
	}
	n := opt.Trials
	res.rows, res.draws = make([][]float64, n), make([][]float64, n)
	res.ok, res.trimmed, res.errs = make([]bool, n), make([]bool, n), make([]string, n)
	return res
}

// runTrials draws and measures every trial on the worker pool. A trial
// that finds no operating point is recorded as failed, not an error; only
// the caller's cancellation stops the run.
func (res *SpreadResult) runTrials(ctx context.Context, ch *chains.Chain, opt *SpreadOptions, pl []varied, names []string) error {
	var done atomic.Int64
	return parallel.For(ctx, opt.Trials, opt.Workers, func(ctx context.Context, k int) error {
		trial := ch.Clone()
		res.draws[k] = draw(trial, pl, opt, trialRand(opt.Seed, k))
		m, err := measureTrial(ctx, trial, opt, names)
		if err := ctx.Err(); err != nil {
			return err
		}
		if err != nil {
			res.rows[k] = nanRow(len(res.columns))
			res.errs[k] = err.Error()
		} else {
			res.rows[k], res.ok[k], res.trimmed[k] = m.values, true, m.trimmed
		}
		if opt.Progress != nil {
			opt.Progress(int(done.Add(1)), opt.Trials)
		}
		return nil
	})
}

// summarise counts the failures and writes the percentiles of every
// measured quantity and every drawn value.
func (res *SpreadResult) summarise(ch *chains.Chain, pl []varied, nominal *trialMeasure) {
	for k, ok := range res.ok {
		switch {
		case !ok:
			res.Failed++
			if res.FirstFailure == "" {
				res.FirstFailure = sprintf("trial %d: %s", k, res.errs[k])
			}
		case res.Retrim != "" && !res.trimmed[k]:
			res.Untrimmable++
		}
	}
	column := func(rows [][]float64, j int) []float64 {
		x := make([]float64, len(rows))
		for k, row := range rows {
			x[k] = row[j]
		}
		return x
	}
	for j, name := range res.columns {
		res.Quantities = append(res.Quantities, summarise(name, nominal.units[j], nominal.values[j], column(res.rows, j)))
	}
	for j, v := range pl {
		p := findPart(ch, v.stage, v.ref)
		nom, unit := p.Value, v.kind.Unit()
		switch v.param {
		case "hfe":
			nom, unit = p.BJTParams().BetaF, ""
		case "icbo":
			nom, unit = p.BJTParams().Icbo, "A"
		case "pinchoff":
			nom, unit = p.JFETParams().Pinchoff, "V"
		}
		res.Parts = append(res.Parts, PartDraw{Kind: v.kind.String(), Rule: v.rule, Tolerance: 100 * v.tol, Summary: summarise(v.name(), unit, nom, column(res.draws, j))})
	}
}

// judge counts the trials that meet each spec and all of them (the yield,
// with its Wilson interval), and words what a reader must know.
func (res *SpreadResult) judge(opt *SpreadOptions) {
	if len(opt.Specs) > 0 {
		all := 0
		for k := range res.rows {
			ok := res.ok[k] && (opt.Retrim == nil || res.trimmed[k])
			for _, sp := range opt.Specs {
				ok = ok && sp.pass(res.rows[k][indexOf(res.columns, sp.Metric)])
			}
			if ok {
				all++
			}
		}
		for _, sp := range opt.Specs {
			j := indexOf(res.columns, sp.Metric)
			n := 0
			for k := range res.rows {
				if res.ok[k] && sp.pass(res.rows[k][j]) {
					n++
				}
			}
			sr := SpecResult{Spec: sp.Text, Pass: n, Fraction: float64(n) / float64(opt.Trials)}
			if n == 0 {
				s := res.Quantities[j]
				sr.Message = sprintf("no trial meets %s: the trials span %s … %s (5–95 %%: %s … %s)", sp.Text,
					fmtUnit(float64(s.Min), s.Unit), fmtUnit(float64(s.Max), s.Unit), fmtUnit(float64(s.P5), s.Unit), fmtUnit(float64(s.P95), s.Unit))
				res.Messages = append(res.Messages, sr.Message)
			}
			res.Specs = append(res.Specs, sr)
		}
		y := report.Number(float64(all) / float64(opt.Trials))
		lo, hi := Wilson(all, opt.Trials)
		l, h := report.Number(lo), report.Number(hi)
		res.Yield, res.YieldLow, res.YieldHigh = &y, &l, &h
		if all == 0 && len(res.Messages) == 0 {
			res.Messages = append(res.Messages, "no trial meets all the specs at once")
		}
	}
	if res.Failed > 0 {
		res.Messages = append(res.Messages, sprintf("%d of %d trials found no DC operating point and count as failing (%s)", res.Failed, opt.Trials, res.FirstFailure))
	}
	if res.Untrimmable > 0 {
		res.Messages = append(res.Messages, sprintf("%d of %d trials could not be trimmed to %s and count as failing", res.Untrimmable, opt.Trials, opt.Retrim.Text))
	}
}

func nanRow(n int) []float64 {
	r := make([]float64, n)
	for i := range r {
		r[i] = math.NaN()
	}
	return r
}

func indexOf(s []string, x string) int { return slices.Index(s, x) }

// FormatQuantity writes a value with its unit: engineering notation for
// SI units, two decimals for dB and %, four figures for plain numbers.
func FormatQuantity(v float64, unit string) string { return fmtUnit(v, unit) }

func fmtUnit(v float64, unit string) string {
	switch unit {
	case "dB":
		return sprintf("%.2f dB", v)
	case "%":
		return sprintf("%.2f %%", v)
	case "":
		return sprintf("%.4g", v)
	}
	return models.FormatValue(v, unit)
}

func joinFloats(x []float64) string {
	s := make([]string, len(x))
	for i, v := range x {
		s[i] = strconv.FormatFloat(v, 'g', -1, 64)
	}
	return strings.Join(s, ",")
}
