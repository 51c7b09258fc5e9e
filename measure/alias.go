package measure

import (
	"context"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"renderchain/chains"
	"renderchain/engine"
	"renderchain/models"
	"renderchain/report"
)

// AliasResult is the aliasing of a measurement's test sine
// (Options.Alias): the signal-to-alias ratio of the settled output at
// each factor asked, from its own render of the sine.
type AliasResult struct {
	// FrequencyHz is the tone measured: the measurement's own, or a
	// neighbour whose folded lines fall between its harmonics
	// (engine.AliasTone), Moved saying why.
	FrequencyHz float64 `json:"frequency_hz"`
	Moved       string  `json:"moved,omitempty"`
	AmplitudeV  float64 `json:"amplitude_v_peak"`
	// TargetDB is what a render's automatic factor holds its probe tones
	// to (engine.AliasTarget), for comparison; FloorDB the analysis
	// floor's ratio (AnalysisFloor): a figure above it cannot be told
	// from the measurement's residue.
	TargetDB float64       `json:"target_db"`
	FloorDB  float64       `json:"floor_db"`
	Factors  []AliasFactor `json:"factors"`
}

// AliasFactor is the signal-to-alias ratio at one oversampling factor:
// the power of the output's harmonic lines (fundamental included) over
// the power in every other bin but DC (spectrum.SignalToAlias), in dB,
// and the same as the aliases' level under the lines, dBc.
type AliasFactor struct {
	Oversample      int          `json:"oversample"`
	InternalRate    float64      `json:"internal_rate_hz"`
	SignalToAliasDB report.Level `json:"signal_to_alias_db"`
	AliasDBc        report.Level `json:"alias_dbc"`
	Orders          int          `json:"harmonic_orders"`
	Settled         bool         `json:"settled"`
	MeetsTarget     bool         `json:"meets_target"`
}

// checkAliasFactors refuses a factor outside 1…16.
func checkAliasFactors(fs []int) error {
	for _, f := range fs {
		if err := models.OversampleRange.Check(float64(f)); err != nil {
			return models.Fieldf("alias_factors", strconv.Itoa(f), "outside 1…%g", models.OversampleRange.Hi)
		}
	}
	return nil
}

// ParseFactors reads a comma list of oversampling factors ("2,4,8,16"),
// each 1…16, and returns them sorted without repeats.
func ParseFactors(text string) ([]int, error) {
	items, err := models.ParseList(text)
	if err != nil || len(items) == 0 {
		return nil, models.Fieldf("alias_factors", text, "want a comma list of factors, e.g. 2,4,8,16")
	}
	var out []int
	for _, it := range items {
		n, err := strconv.Atoi(strings.TrimSpace(it))
		if err != nil {
			return nil, models.Fieldf("alias_factors", it, "is not a whole number")
		}
		out = append(out, n)
	}
	if err := checkAliasFactors(out); err != nil {
		return nil, err
	}
	slices.Sort(out)
	return slices.Compact(out), nil
}

// aliasJob is one factor of one measurement's alias figures.
type aliasJob struct {
	job    int
	factor int
}

// aliasFactors returns the factors the alias figures of job j are taken
// at: Options.AliasFactors, else the measurement's own factor.
func (j job) aliasFactors(ch *chains.Chain, opt Options) ([]int, error) {
	if len(opt.AliasFactors) > 0 {
		return opt.AliasFactors, nil
	}
	c, err := j.chain(ch)
	if err != nil {
		return nil, err
	}
	f, err := engine.Oversample(c, opt.Oversample)
	if err != nil {
		return nil, err
	}
	return []int{f}, nil
}

// chain returns the job's chain: the variant's overrides and the knob
// step's applied to ch.
func (j job) chain(ch *chains.Chain) (*chains.Chain, error) {
	c, err := j.variant.Apply(ch)
	if err == nil && j.set != "" {
		err = c.Set(j.set)
	}
	return c, err
}

// alias renders the measurement's alias tone at one factor and returns
// its signal-to-alias ratio.
func (j job) alias(ctx context.Context, ch *chains.Chain, freq float64, factor int, opt Options) (AliasFactor, error) {
	c, err := j.chain(ch)
	if err != nil {
		return AliasFactor{}, err
	}
	p, err := engine.Prepare(c, factor)
	if err != nil {
		return AliasFactor{}, err
	}
	node, err := probeNode(p, "probe", opt.Probe)
	if err != nil {
		return AliasFactor{}, err
	}
	// A tone whose coherent record is long (1319 Hz at 48 kHz: 1 s) needs
	// three such windows to settle: the wait is stretched to four.
	tone, record, _ := engine.AliasTone(opt.SampleRate, freq)
	record = math.Max(opt.MinRecord, record)
	a, rec, err := p.AliasRatio(ctx, engine.SineOptions{Freq: tone, Amplitude: j.amp, SampleRate: opt.SampleRate, Node: node,
		MinRecord: record, MaxSettle: math.Max(opt.MaxSettle, 4*record), Tolerance: opt.SettleTolerance})
	if err != nil {
		return AliasFactor{}, fmt.Errorf("alias at %d×: %w", factor, err)
	}
	return AliasFactor{Oversample: factor, InternalRate: opt.SampleRate * float64(factor), SignalToAliasDB: report.Level(a.DB),
		AliasDBc: report.Level(-a.DB), Orders: a.Orders, Settled: rec.Settled, MeetsTarget: a.DB >= engine.AliasTarget}, nil
}

// newAliasResult starts a measurement's alias figures.
func newAliasResult(freq, amp float64, opt Options) *AliasResult {
	tone, _, moved := engine.AliasTone(opt.SampleRate, freq)
	return &AliasResult{FrequencyHz: tone, Moved: moved, AmplitudeV: amp, TargetDB: engine.AliasTarget,
		FloorDB: -report.DB(AnalysisFloor(opt.SettleTolerance)), Factors: []AliasFactor{}}
}

// warnings says what the alias figures need said: a record that did not
// settle.
func (a *AliasResult) warnings() report.Warnings {
	w := report.Warnings{}
	for _, f := range a.Factors {
		if !f.Settled {
			w.Add("the alias measurement at %d× did not settle: its figure includes some start-up transient", f.Oversample)
		}
	}
	return w
}

// aliasText writes a signal-to-alias ratio for a table: "> floor" above
// the analysis floor, "∞" for no line off the harmonics at all.
func (a *AliasResult) aliasText(f AliasFactor) string {
	v := float64(f.SignalToAliasDB)
	switch {
	case math.IsInf(v, 1):
		return "∞"
	case v > a.FloorDB:
		return fmt.Sprintf("> %.0f", a.FloorDB)
	}
	return fmtNum(v, "%.1f")
}

// writeDetail writes the alias figures of one measurement.
func (a *AliasResult) writeDetail(w io.Writer) error {
	b := &strings.Builder{}
	fmt.Fprintf(b, "  aliasing   %s sine at %s peak: power off its harmonic lines, under the lines' (target %g dB for a render)\n",
		models.FormatValue(a.FrequencyHz, "Hz"), models.FormatValue(a.AmplitudeV, "V"), a.TargetDB)
	if a.Moved != "" {
		fmt.Fprintf(b, "             (%s)\n", a.Moved)
	}
	if _, err := io.WriteString(w, b.String()); err != nil {
		return err
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "  \tfactor\tinternal rate\tsignal-to-alias dB\ttarget\t")
	for _, f := range a.Factors {
		meets := "met"
		if !f.MeetsTarget {
			meets = "NOT met"
		}
		fmt.Fprintf(tw, "  \t%d×\t%s\t%s\t%s\t\n", f.Oversample, models.FormatValue(f.InternalRate, "Hz"), a.aliasText(f), meets)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintln(w)
	return err
}

// aliasColumns are the factors the rows of a report show alias figures
// for: every factor any measurement has, in order.
func (r *Report) aliasColumns() []int {
	var fs []int
	for _, m := range r.Measurements {
		if m.Alias != nil {
			for _, f := range m.Alias.Factors {
				fs = append(fs, f.Oversample)
			}
		}
	}
	slices.Sort(fs)
	return slices.Compact(fs)
}

// aliasAt returns a measurement's alias figure at a factor.
func (m *Result) aliasAt(factor int) (AliasFactor, bool) {
	if m.Alias == nil {
		return AliasFactor{}, false
	}
	for _, f := range m.Alias.Factors {
		if f.Oversample == factor {
			return f, true
		}
	}
	return AliasFactor{}, false
}
