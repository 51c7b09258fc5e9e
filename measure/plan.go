package measure

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"renderchain/chains"
	"renderchain/models"
)

// Variant is one setting of a chain: the overrides that make it and a
// label naming those that differ between variants.
type Variant struct {
	Label string   // e.g. "tone.tone=0.25 supply=9V"; empty for a lone variant
	Sets  []string // every override, in order, as KEY=VALUE
}

// Apply returns a copy of ch with the variant's overrides applied.
func (v Variant) Apply(ch *chains.Chain) (*chains.Chain, error) {
	c := ch.Clone()
	for _, kv := range v.Sets {
		if err := c.Set(kv); err != nil {
			return nil, err
		}
	}
	return c, nil
}

// Expand turns overrides into variants. An override whose value is a
// comma-separated list ("tone.tone=0,0.5,1") is a family: one variant per
// value. Several families give every combination, the first varying
// slowest. Overrides without a comma apply to every variant. A malformed
// override is a *models.FieldError on the field "set".
func Expand(sets []string) ([]Variant, error) {
	type fam struct {
		key    string
		values []string
	}
	var fams []fam
	for _, kv := range sets {
		key, val, ok := strings.Cut(kv, "=")
		key = strings.TrimSpace(key)
		if !ok || key == "" {
			return nil, models.Fieldf("set", kv, "want KEY=VALUE")
		}
		vals, err := models.ParseList(val)
		if err != nil {
			return nil, models.Fieldf("set", kv, "a comma list with an empty item")
		}
		fams = append(fams, fam{key, vals})
	}
	out := []Variant{{}}
	for _, f := range fams {
		var next []Variant
		for _, v := range out {
			for _, val := range f.values {
				nv := Variant{Sets: append(append([]string(nil), v.Sets...), f.key+"="+val), Label: v.Label}
				if len(f.values) > 1 {
					nv.Label = strings.TrimSpace(nv.Label + " " + f.key + "=" + val)
				}
				next = append(next, nv)
			}
		}
		out = next
	}
	return out, nil
}

// SupplyFamily writes supplies (volts, as models.ParseSupplies returns
// them with the chain's polarity) as one override family, "supply=9.6V,9V".
func SupplyFamily(volts []float64) string {
	items := make([]string, len(volts))
	for i, v := range volts {
		items[i] = strconv.FormatFloat(roundTo(v, 12), 'g', -1, 64) + "V"
	}
	return "supply=" + strings.Join(items, ",")
}

// TemperatureFamily writes temperatures (kelvin) as one override family
// in degrees Celsius, "temperature=0C,25C,40C".
func TemperatureFamily(kelvin []float64) string {
	items := make([]string, len(kelvin))
	for i, k := range kelvin {
		items[i] = strconv.FormatFloat(roundTo(k-models.ZeroCelsius, 9), 'g', -1, 64) + "C"
	}
	return "temperature=" + strings.Join(items, ",")
}

// SweepKind tells what a sweep steps.
type SweepKind string

// Sweep kinds.
const (
	LevelSweep SweepKind = "level" // source amplitude, logarithmic steps
	KnobSweep  SweepKind = "knob"  // a knob's rotation, linear steps
)

// Sweep steps the source amplitude or a knob over a range.
type Sweep struct {
	Kind     SweepKind `json:"kind"`
	Key      string    `json:"key,omitempty"` // STAGE.KNOB of a knob sweep
	From     float64   `json:"from"`          // volts peak or rotation
	To       float64   `json:"to"`
	Steps    int       `json:"steps"`
	Spacing  string    `json:"spacing"` // "log" or "linear"
	Unit     string    `json:"unit"`    // "V peak" or "rotation"
	StepList []float64 `json:"values"`
}

// MaxSteps bounds a sweep's step count.
const MaxSteps = 1000

func checkSteps(n int) error {
	if n < 2 || n > MaxSteps {
		return models.Fieldf("steps", strconv.Itoa(n), "must be between 2 and %d", MaxSteps)
	}
	return nil
}

// NewLevelSweep steps the source amplitude from from to to volts peak
// (both in models.SignalRange, from below to) in steps logarithmic steps.
func NewLevelSweep(from, to float64, steps int) (*Sweep, error) {
	text := fmt.Sprintf("%g..%g V", from, to)
	switch {
	case !models.SignalRange.Contains(from) || !models.SignalRange.Contains(to):
		return nil, models.Fieldf("sweep_level", text, "bounds must be %s", models.SignalRange.Describe())
	case !(to > from):
		return nil, models.Fieldf("sweep_level", text, "bounds are reversed or equal: FROM must be below TO")
	}
	if err := checkSteps(steps); err != nil {
		return nil, err
	}
	return &Sweep{Kind: LevelSweep, From: from, To: to, Steps: steps, Spacing: "log", Unit: "V peak", StepList: LogGrid(from, to, steps)}, nil
}

// NewKnobSweep steps the knob key (STAGE.KNOB) from from to to (rotations
// 0…1, from below to) in steps linear steps. Whether the stage and knob
// exist is checked when the sweep is applied to a chain.
func NewKnobSweep(key string, from, to float64, steps int) (*Sweep, error) {
	text := fmt.Sprintf("%s=%g..%g", key, from, to)
	switch {
	case !strings.Contains(key, "."):
		return nil, models.Fieldf("sweep_knob", text, "want STAGE.KNOB=FROM..TO, e.g. fuzz.fuzz=0..1")
	case !models.RotationRange.Contains(from) || !models.RotationRange.Contains(to):
		return nil, models.Fieldf("sweep_knob", text, "bounds must lie within 0…1")
	case !(to > from):
		return nil, models.Fieldf("sweep_knob", text, "bounds are reversed or equal: FROM must be below TO")
	}
	if err := checkSteps(steps); err != nil {
		return nil, err
	}
	s := &Sweep{Kind: KnobSweep, Key: key, From: from, To: to, Steps: steps, Spacing: "linear", Unit: "rotation"}
	for i := 0; i < steps; i++ {
		s.StepList = append(s.StepList, from+(to-from)*float64(i)/float64(steps-1))
	}
	s.StepList[steps-1] = to
	return s, nil
}

// ParseLevelSweep reads "FROM..TO" amplitudes (each in any
// models.ParseAmplitude form, e.g. "1mV..1V" or "-60dBV..0dBV").
func ParseLevelSweep(text string, steps int) (*Sweep, error) {
	from, to, err := models.ParseSpan(text, models.ParseAmplitude, false)
	if err != nil {
		return nil, models.FieldOf("sweep_level", text, err)
	}
	return NewLevelSweep(from, to, steps)
}

// ParseKnobSweep reads "STAGE.KNOB=FROM..TO" (rotations 0…1).
func ParseKnobSweep(text string, steps int) (*Sweep, error) {
	key, span, ok := strings.Cut(text, "=")
	key = strings.TrimSpace(key)
	if !ok || !strings.Contains(key, ".") {
		return nil, models.Fieldf("sweep_knob", text, "want STAGE.KNOB=FROM..TO, e.g. fuzz.fuzz=0..1")
	}
	from, to, err := models.ParseSpan(span, models.ParseRotation, false)
	if err != nil {
		return nil, models.FieldOf("sweep_knob", text, err)
	}
	return NewKnobSweep(key, from, to, steps)
}

// knobSet writes the override of one knob-sweep step.
func (s *Sweep) knobSet(v float64) string {
	return fmt.Sprintf("%s=%s", s.Key, strconv.FormatFloat(roundTo(v, 12), 'g', -1, 64))
}

func roundTo(v float64, digits int) float64 {
	if v == 0 {
		return 0
	}
	p := math.Pow(10, float64(digits)-math.Ceil(math.Log10(math.Abs(v))))
	return math.Round(v*p) / p
}

// LogGrid returns n frequencies spaced evenly on a logarithmic scale from
// lo to hi inclusive (n ≥ 2), or [lo] for n = 1.
func LogGrid(lo, hi float64, n int) []float64 {
	if n <= 1 {
		return []float64{lo}
	}
	out := make([]float64, n)
	r := math.Log(hi / lo)
	for i := range out {
		out[i] = lo * math.Exp(r*float64(i)/float64(n-1))
	}
	out[n-1] = hi
	return out
}
