package measure

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"

	"renderchain/chains"
)

// Variant is one setting of a chain: the --set overrides that make it and a
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

// Expand turns --set overrides into variants. An override whose value is a
// comma-separated list ("tone.tone=0,0.5,1") is a family: one variant per
// value. Several families give every combination, the first varying
// slowest. Overrides without a comma apply to every variant.
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
			return nil, inputErr("--set", kv, "want KEY=VALUE")
		}
		vals, err := ParseList("--set "+key, val)
		if err != nil {
			return nil, err
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

// SupplySet turns a --supply list ("9.6,9,8,7"; plain numbers are volts)
// into a --set family.
func SupplySet(list string) (string, error) {
	items, err := ParseList("--supply", list)
	if err != nil {
		return "", err
	}
	for i, it := range items {
		if endsInDigit(it) {
			items[i] = it + "V"
		}
	}
	return "supply=" + strings.Join(items, ","), nil
}

// TemperatureSet turns a --temp list ("0,25,40"; plain numbers are degrees
// Celsius) into a --set family.
func TemperatureSet(list string) (string, error) {
	items, err := ParseList("--temp", list)
	if err != nil {
		return "", err
	}
	for i, it := range items {
		if endsInDigit(it) {
			items[i] = it + "C"
		}
	}
	return "temperature=" + strings.Join(items, ","), nil
}

func endsInDigit(s string) bool {
	r := []rune(s)
	return len(r) > 0 && unicode.IsDigit(r[len(r)-1])
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

// ParseLevelSweep reads "FROM..TO" amplitudes (each in any ParseAmplitude
// form, e.g. "1mV..1V" or "-60dBV..0dBV") and steps them logarithmically.
func ParseLevelSweep(text string, steps int) (*Sweep, error) {
	a, b, ok := strings.Cut(text, "..")
	if !ok {
		return nil, inputErr("--sweep-level", text, "want FROM..TO, e.g. 1mV..1V")
	}
	from, err := ParseAmplitude(a)
	if err != nil {
		return nil, err
	}
	to, err := ParseAmplitude(b)
	if err != nil {
		return nil, err
	}
	if !(to > from) {
		return nil, inputErr("--sweep-level", text, "bounds are reversed or equal: FROM must be below TO")
	}
	if err := checkSteps(steps); err != nil {
		return nil, err
	}
	s := &Sweep{Kind: LevelSweep, From: from, To: to, Steps: steps, Spacing: "log", Unit: "V peak"}
	s.StepList = LogGrid(from, to, steps)
	return s, nil
}

// ParseKnobSweep reads "STAGE.KNOB=FROM..TO" (rotations 0…1) and steps it
// linearly. Whether the stage and knob exist is checked when the sweep is
// applied to a chain.
func ParseKnobSweep(text string, steps int) (*Sweep, error) {
	key, rng, ok := strings.Cut(text, "=")
	key = strings.TrimSpace(key)
	if !ok || !strings.Contains(key, ".") {
		return nil, inputErr("--sweep-knob", text, "want STAGE.KNOB=FROM..TO, e.g. fuzz.fuzz=0..1")
	}
	a, b, ok := strings.Cut(rng, "..")
	if !ok {
		return nil, inputErr("--sweep-knob", text, "want STAGE.KNOB=FROM..TO, e.g. fuzz.fuzz=0..1")
	}
	from, err1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
	to, err2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
	if err1 != nil || err2 != nil {
		return nil, inputErr("--sweep-knob", text, "bounds must be rotations between 0 and 1")
	}
	if from < 0 || to > 1 {
		return nil, inputErr("--sweep-knob", text, "bounds must lie within 0…1")
	}
	if !(to > from) {
		return nil, inputErr("--sweep-knob", text, "bounds are reversed or equal: FROM must be below TO")
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

func checkSteps(n int) error {
	if n < 2 || n > MaxSteps {
		return inputErr("--steps", strconv.Itoa(n), "must be between 2 and %d", MaxSteps)
	}
	return nil
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
