// Package testchains holds chain files written out part by part for the
// tests of the bench packages (bias, parts) and the command: a
// voltage-divider-biased common-emitter stage and the two-transistor
// direct-coupled pair with DC feedback, each with its values as fields so
// a test controls every one. It is test support, not a public API.
package testchains

import (
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/models"
)

// Divider is a resistive divider, 10 kΩ over 10 kΩ, behind an ideal
// source of 1 V at full scale into no load: the output is exactly half the
// source.
const Divider = `name = "divider"
[input]
peak = "1V"
[output]
load = "none"
full_scale = "1V"
[[stage]]
id = "div"
parts = [
  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "R2", kind = "resistor", value = "10k", pins = ["out", "gnd"] },
]
`

// RCLowpass is a first-order RC low-pass, 10 kΩ and 22 nF (corner
// 1/(2π·R·C) = 723 Hz), behind an ideal source of 1 V at full scale into
// no load.
const RCLowpass = `name = "rc"
[input]
peak = "1V"
[output]
load = "none"
full_scale = "1V"
[[stage]]
id = "rc"
parts = [
  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "C1", kind = "capacitor", value = "22n", pins = ["out", "gnd"] },
]
`

// CE is a voltage-divider-biased common-emitter stage written out
// part by part (no template, so the test controls every value).
type CE struct {
	Vcc            string
	R1, R2, RC, RE string
	Kind           string // npn or pnp
	Beta           float64
	Swap           bool // collector and emitter pins swapped
}

func (c CE) TOML() string {
	pins := `{ c = "c", b = "b", e = "e" }`
	if c.Swap {
		pins = `{ c = "e", b = "b", e = "c" }`
	}
	return fmt.Sprintf(`
name = "common-emitter test stage"
supply = %q
[input]
source = "ideal"
[output]
load = "1M"
[[stage]]
id = "ce"
parts = [
  { ref = "C1", kind = "capacitor", value = "1u",   pins = ["in", "b"] },
  { ref = "R1", kind = "resistor",  value = %q,     pins = ["v+", "b"] },
  { ref = "R2", kind = "resistor",  value = %q,     pins = ["b", "gnd"] },
  { ref = "RC", kind = "resistor",  value = %q,     pins = ["v+", "c"] },
  { ref = "RE", kind = "resistor",  value = %q,     pins = ["e", "gnd"] },
  { ref = "CE", kind = "capacitor", value = "100u", pins = ["e", "gnd"] },
  { ref = "Q1", kind = %q, is = "10f", hfe = %g, br = 4, pins = %s },
  { ref = "C2", kind = "capacitor", value = "100n", pins = ["c", "out"] },
]
`, c.Vcc, c.R1, c.R2, c.RC, c.RE, c.Kind, c.Beta, pins)
}

func (c CE) Parse(t testing.TB) *chains.Chain {
	t.Helper()
	ch, err := chains.Parse("ce.toml", c.TOML())
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// Pair is the two-transistor direct-coupled stage with DC feedback
// from the second emitter to the first base, written out part by part.
type Pair struct {
	Vcc          string
	Kind, Model  string // "npn", "" or "pnp", "ge-pnp"
	Is           string
	Beta1, Beta2 float64
	Icbo         string // "" for none
	R1, R2, R3   string
	R4           string
	Trim1, Trim2 float64
	Gain         float64
}

func SiPair() Pair {
	return Pair{Vcc: "9V", Kind: "npn", Is: "10f", Beta1: 170, Beta2: 320, R1: "27k", R2: "1k8", R3: "1k", R4: "100k", Trim1: 0.5, Trim2: 0.5, Gain: 0.7}
}

func GePair() Pair {
	return Pair{Vcc: "-9V", Kind: "pnp", Model: "ge-pnp", Is: "200n", Beta1: 75, Beta2: 110, Icbo: "2u", R1: "4k7", R2: "2k7", R3: "470", R4: "47k", Trim1: 0.5, Trim2: 0.5, Gain: 0.8}
}

func (p Pair) TOML() string {
	dev := func(beta float64) string {
		s := fmt.Sprintf(`kind = %q, is = %q, hfe = %g, br = 4`, p.Kind, p.Is, beta)
		if p.Model != "" {
			s += fmt.Sprintf(`, model = %q`, p.Model)
		}
		if p.Icbo != "" {
			s += fmt.Sprintf(`, icbo = %q`, p.Icbo)
		}
		return s
	}
	return fmt.Sprintf(`
name = "direct-coupled pair test stage"
supply = %q
[input]
source = "ideal"
[output]
load = "1M"
[[stage]]
id = "fz"
knobs = { trim1 = %g, trim2 = %g, gain = %g }
parts = [
  { ref = "R0",  kind = "resistor",  value = "10k",  pins = ["in", "i1"] },
  { ref = "C1",  kind = "capacitor", value = "1u",   pins = ["i1", "b1"] },
  { ref = "Q1",  %s, pins = { c = "c1", b = "b1", e = "gnd" } },
  { ref = "R1",  kind = "resistor",  value = %q,     pins = ["t1", "c1"] },
  { ref = "TR1", kind = "pot", value = "50k", knob = "trim1", adjusts = "Q1", pins = { ccw = "v+", wiper = "t1" } },
  { ref = "Q2",  %s, pins = { c = "c2", b = "c1", e = "e2" } },
  { ref = "R2",  kind = "resistor",  value = %q,     pins = ["t2", "c2"] },
  { ref = "TR2", kind = "pot", value = "10k", knob = "trim2", adjusts = "Q2", pins = { ccw = "v+", wiper = "t2" } },
  { ref = "R3",  kind = "resistor",  value = %q,     pins = ["e2", "gnd"] },
  { ref = "VR1", kind = "pot", value = "1k", knob = "gain", pins = { ccw = "fz", wiper = "fz", cw = "e2" } },
  { ref = "C2",  kind = "capacitor", value = "47u",  pins = ["fz", "gnd"] },
  { ref = "R4",  kind = "resistor",  value = %q,     pins = ["e2", "b1"] },
  { ref = "C3",  kind = "capacitor", value = "100n", pins = ["c2", "out"] },
  { ref = "R5",  kind = "resistor",  value = "470k", pins = ["out", "gnd"] },
]
`, p.Vcc, p.Trim1, p.Trim2, p.Gain, dev(p.Beta1), p.R1, dev(p.Beta2), p.R2, p.R3, p.R4)
}

func (p Pair) Parse(t testing.TB) *chains.Chain {
	t.Helper()
	ch, err := chains.Parse("pair.toml", p.TOML())
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// Example is one of the example chains shipped in chains/, built.
type Example struct {
	Name    string
	Chain   *chains.Chain
	Circuit *models.Circuit
}

// Examples parses and builds every example chain (chains.ExampleNames:
// demo, germanium, fuzz-only and the device examples under
// chains/examples).
func Examples(t testing.TB) []Example {
	t.Helper()
	var out []Example
	for _, name := range chains.ExampleNames() {
		ch, err := chains.Example(name)
		if err != nil {
			t.Fatal(err)
		}
		c, err := ch.Build()
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, Example{name, ch, c})
	}
	return out
}

// CascadeLoopFile is the three-stage germanium cascade with an overall
// feedback path that motorboats, relative to the module's root.
const CascadeLoopFile = "chains/testdata/ge-cascade-loop.toml"

// Cascade parses the three-stage germanium cascade of CascadeLoopFile:
// with its overall feedback path (RF, CF) when loop is set, else the same
// cascade without those two parts (three inverting stages in a row, each
// with its own collector-to-base feedback: stable).
func Cascade(t testing.TB, loop bool) *chains.Chain {
	t.Helper()
	_, here, _, _ := runtime.Caller(0)
	path := filepath.Join(filepath.Dir(here), "..", "..", CascadeLoopFile)
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	text := string(b)
	if !loop {
		var keep []string
		for _, line := range strings.Split(text, "\n") {
			if !strings.Contains(line, `ref = "RF"`) && !strings.Contains(line, `ref = "CF"`) {
				keep = append(keep, line)
			}
		}
		if len(keep) != strings.Count(text, "\n")+1-2 {
			t.Fatal("the cascade's feedback parts RF and CF were not found")
		}
		text = strings.Join(keep, "\n")
	}
	ch, err := chains.Parse(filepath.Base(path), text)
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// Latch is a bistable pair: two NPN common-emitter stages, each
// collector feeding the other's base through a divider (100 kΩ over
// 47 kΩ) with 1 nF from each base to ground. The symmetric idle point the
// DC solve finds has a loop gain far above one, so it is unstable with a
// real pole (no phase shift around a resistive loop): the pair snaps to
// one side and stays there. Its output is AC-coupled from Q1's collector,
// so the latch does not show at the output once the coupling capacitor
// has charged.
const Latch = `name = "bistable pair"
supply = "9V"
[input]
peak = "100mV"
[output]
load = "1M"
full_scale = "1V"
[[stage]]
id = "ff"
parts = [
  { ref = "CIN", kind = "capacitor", value = "100n", pins = ["in", "x"] },
  { ref = "RIN", kind = "resistor",  value = "10k",  pins = ["x", "b1"] },
  { ref = "Q1",  kind = "npn", hfe = 200, pins = { c = "c1", b = "b1", e = "gnd" } },
  { ref = "Q2",  kind = "npn", hfe = 200, pins = { c = "c2", b = "b2", e = "gnd" } },
  { ref = "RC1", kind = "resistor",  value = "10k",  pins = ["v+", "c1"] },
  { ref = "RC2", kind = "resistor",  value = "10k",  pins = ["v+", "c2"] },
  { ref = "RB1", kind = "resistor",  value = "100k", pins = ["c2", "b1"] },
  { ref = "RB2", kind = "resistor",  value = "100k", pins = ["c1", "b2"] },
  { ref = "RD1", kind = "resistor",  value = "47k",  pins = ["b1", "gnd"] },
  { ref = "RD2", kind = "resistor",  value = "47k",  pins = ["b2", "gnd"] },
  { ref = "CB1", kind = "capacitor", value = "1n",   pins = ["b1", "gnd"] },
  { ref = "CB2", kind = "capacitor", value = "1n",   pins = ["b2", "gnd"] },
  { ref = "COUT", kind = "capacitor", value = "100n", pins = ["c1", "out"] },
]
`
