package chains_test

import (
	"errors"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/models"
)

// Every number a chain file or an override can hold is finite and in its
// range. TOML writes nan and inf as float literals (TOML v1.0.0, "Float":
// "Special float values can also be expressed ... inf, nan"), and Go's
// strconv reads "nan" and "inf" as numbers, so each path is tried: a file
// key, with its file:line, and the same key through Set.
func TestNonFiniteRefused(t *testing.T) {
	files := []struct {
		name, edit, want string
	}{
		{"knob nan", `knobs = { tone = 0.5 }` + "\x00" + `knobs = { tone = nan }`, `tone.toml:9: stage tone: knob tone = NaN is not a finite number`},
		{"knob inf", `knobs = { tone = 0.5 }` + "\x00" + `knobs = { tone = inf }`, `tone.toml:9: stage tone: knob tone = +Inf is not a finite number`},
		{"load nan", `load = "100k"` + "\x00" + `load = nan`, `tone.toml:6: output.load: value NaN is not a finite number`},
		{"full scale inf", `load = "100k"` + "\x00" + "load = \"100k\"\nfull_scale = inf", `tone.toml:7: output.full_scale: value +Inf is not a finite number`},
		{"supply nan", `supply = "9V"` + "\x00" + `supply = nan`, `tone.toml:2: supply: value NaN is not a finite number`},
		{"peak -inf", `peak = "1V"` + "\x00" + `peak = -inf`, `tone.toml:4: input.peak: value -Inf is not a finite number`},
		{"temperature inf", `supply = "9V"` + "\x00" + "supply = \"9V\"\ntemperature = inf", `tone.toml:3: temperature: value +Inf is not a finite number`},
		{"tolerance nan", `value = "22n", pins = ["lp", "gnd"]` + "\x00" + `value = "22n", tolerance = nan, pins = ["lp", "gnd"]`, `tone.toml:12: stage tone: part C1: tolerance NaN is not a finite number`},
		{"tolerance 100 %", `value = "22n", pins = ["lp", "gnd"]` + "\x00" + `value = "22n", tolerance = "100%", pins = ["lp", "gnd"]`, `part C1: tolerance 100% must be at least 0 and below 1`},
		{"value inf", `value = "22n", pins = ["lp", "gnd"]` + "\x00" + `value = inf, pins = ["lp", "gnd"]`, `part C1: value +Inf is not a finite number`},
		{"supply beyond 60 V", `supply = "9V"` + "\x00" + `supply = "-90V"`, `tone.toml:2: supply: value -90V must be above 0 V and at most 60 V`},
		{"oversample 32", `supply = "9V"` + "\x00" + "supply = \"9V\"\noversample = 32", `tone.toml:3: oversample: 32 is outside 1…16`},
	}
	for _, tc := range files {
		from, to, _ := strings.Cut(tc.edit, "\x00")
		src := strings.Replace(toneChain, from, to, 1)
		if src == toneChain {
			t.Fatalf("%s: edit did not apply", tc.name)
		}
		_, err := chains.Parse("tone.toml", src)
		if err == nil || !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: %v\n  want one line containing %q", tc.name, err, tc.want)
		}
	}
	device := `name = "d"
[[stage]]
id = "s"
parts = [
  { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "out"] },
  { ref = "Q1", kind = "npn", hfe = inf, pins = { c = "out", b = "in", e = "gnd" } },
]
`
	if _, err := chains.Parse("d.toml", device); err == nil || !strings.Contains(err.Error(), "d.toml:6: stage s: part Q1: hfe: value +Inf is not a finite number") {
		t.Errorf("hfe = inf: %v", err)
	}
	sets := []struct{ kv, want string }{
		{"fuzz.fuzz=nan", "is not a rotation"},
		{"fuzz.fuzz=NaN", "is not a rotation"},
		{"fuzz.Q1.hfe=inf", "not a finite number"},
		{"fuzz.Q1.hfe=1e6", "hfe = 1e+06 must be above 0 and at most 100000"},
		{"fuzz.R1.tolerance=nan", "not a finite number"},
		{"fuzz.Q2.is=NaN", "not a finite number"},
		{"output.load=nan", "not a resistance"},
		{"output.full_scale=1e400", "not a voltage"},
		{"input.peak=0", "must be above 0 V"},
		{"oversample=0", "outside 1…16"},
	}
	for _, tc := range sets {
		ch := demoChain(t)
		err := ch.Set(tc.kv)
		if err == nil || !strings.Contains(err.Error(), tc.want) || !errors.Is(err, models.ErrInvalid) && !errors.Is(err, chains.ErrChain) {
			t.Errorf("Set(%q) = %v, want an error containing %q", tc.kv, err, tc.want)
		}
	}
}

// The supply rule: the chain file's sign is the build's polarity; an
// override sets the magnitude and keeps it, and a contradicting sign is an
// error that says how to write it.
func TestSetSupplyKeepsPolarity(t *testing.T) {
	ge, err := chains.Load("germanium.toml")
	if err != nil {
		t.Fatal(err)
	}
	for _, kv := range []string{"supply=7V", "supply=7", "supply=-7V"} {
		ch := ge.Clone()
		if err := ch.Set(kv); err != nil || ch.Supply != -7 {
			t.Errorf("germanium %s: supply %g, %v; want -7 V", kv, ch.Supply, err)
		}
	}
	err = ge.Clone().Set("supply=+7V")
	var pe *models.PolarityError
	if !errors.As(err, &pe) || !strings.Contains(err.Error(), "write 7V or -7V") {
		t.Errorf("germanium supply=+7V: %v", err)
	}
	si := demoChain(t)
	if err := si.Set("supply=-9V"); err == nil || !strings.Contains(err.Error(), "positive supply (negative ground)") {
		t.Errorf("demo supply=-9V: %v", err)
	}
}

func TestPartKindAndEnvironment(t *testing.T) {
	ch := demoChain(t)
	env := map[string]bool{}
	for _, st := range ch.Stages {
		env[st.ID] = st.Environment
	}
	if !env["pickup"] || !env["amp"] || env["fuzz"] || env["tone"] || env["volume"] {
		t.Errorf("environment stages %v: want pickup and amp only (declared in their templates)", env)
	}
	q := ch.Stage("fuzz").Parts[2]
	if q.Kind != chains.NPN || !q.Kind.Transistor() || !q.Kind.Device() || q.Kind.Valued() {
		t.Errorf("fuzz.%s kind %v", q.Ref, q.Kind)
	}
	b, _ := chains.Pot.MarshalText()
	if string(b) != "pot" || chains.Capacitor.Unit() != "F" || chains.Resistor.Quantity() != models.Resistance {
		t.Errorf("pot %q", b)
	}
	for _, name := range chains.PartKindNames() {
		if k, ok := chains.ParsePartKind(name); !ok || k.String() != name {
			t.Errorf("kind %q round trip", name)
		}
	}
}
