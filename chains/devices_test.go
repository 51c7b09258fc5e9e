package chains_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/models"
)

// oneStage wraps parts in a one-stage chain file (stage id "s"); the
// parts start on line 6.
func oneStage(supply, parts string) string {
	return "name = \"t\"\nsupply = \"" + supply + "\"\n[[stage]]\nid = \"s\"\nparts = [\n" + parts + "\n]\n"
}

func build(t *testing.T, src string) (*chains.Chain, *models.Circuit) {
	t.Helper()
	ch, err := chains.Parse("t.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	c, err := ch.Build()
	if err != nil {
		t.Fatal(err)
	}
	return ch, c
}

// Every parameter key written on a part reaches the device model's field,
// in SI units through the quantity parsers.
func TestDeviceKeysReachTheModel(t *testing.T) {
	type check struct {
		key, written string
		get          func(e *models.Element) float64
		want         float64
	}
	cases := []struct {
		kind, pins string
		checks     []check
	}{
		{"npn", `{ c = "c", b = "b", e = "gnd" }`, []check{
			{"early_voltage", `"75V"`, func(e *models.Element) float64 { return e.BJT.EarlyVoltage }, 75},
			{"base_resistance", `"120"`, func(e *models.Element) float64 { return e.BJT.BaseResistance }, 120},
			{"be_capacitance", `"22p"`, func(e *models.Element) float64 { return e.BJT.BE.C0 }, 22e-12},
			{"be_potential", `"0.7V"`, func(e *models.Element) float64 { return e.BJT.BE.Potential }, 0.7},
			{"be_grading", `0.4`, func(e *models.Element) float64 { return e.BJT.BE.Grading }, 0.4},
			{"bc_capacitance", `"4p7"`, func(e *models.Element) float64 { return e.BJT.BC.C0 }, 4.7e-12},
			{"bc_potential", `"0.6V"`, func(e *models.Element) float64 { return e.BJT.BC.Potential }, 0.6},
			{"bc_grading", `0.3`, func(e *models.Element) float64 { return e.BJT.BC.Grading }, 0.3},
			{"transit_time", `"350ps"`, func(e *models.Element) float64 { return e.BJT.TransitTime }, 350e-12},
			{"forward_fraction", `0.6`, func(e *models.Element) float64 { return e.BJT.ForwardFraction }, 0.6},
			{"hfe", `140`, func(e *models.Element) float64 { return e.BJT.BetaF }, 140},
		}},
		{"diode", `{ anode = "b", cathode = "gnd" }`, []check{
			{"breakdown", `"6.2V"`, func(e *models.Element) float64 { return e.Diode.BreakdownVoltage }, 6.2},
			{"breakdown_current", `"1mA"`, func(e *models.Element) float64 { return e.Diode.BreakdownCurrent }, 1e-3},
			{"breakdown_n", `3`, func(e *models.Element) float64 { return e.Diode.BreakdownN }, 3},
			{"junction_capacitance", `"15p"`, func(e *models.Element) float64 { return e.Diode.Junction.C0 }, 15e-12},
			{"junction_potential", `"0.8V"`, func(e *models.Element) float64 { return e.Diode.Junction.Potential }, 0.8},
			{"junction_grading", `0.5`, func(e *models.Element) float64 { return e.Diode.Junction.Grading }, 0.5},
			{"transit_time", `"4n"`, func(e *models.Element) float64 { return e.Diode.TransitTime }, 4e-9},
		}},
		{"p-jfet", `{ d = "gnd", g = "b", s = "c" }`, []check{
			{"idss", `"8mA"`, func(e *models.Element) float64 { return e.JFET.Idss }, 8e-3},
			{"pinchoff", `"3V"`, func(e *models.Element) float64 { return e.JFET.Pinchoff }, 3},
			{"channel_modulation", `0.02`, func(e *models.Element) float64 { return e.JFET.ChannelModulation }, 0.02},
			{"gate_is", `"1p"`, func(e *models.Element) float64 { return e.JFET.GateIs }, 1e-12},
			{"gate_n", `1.2`, func(e *models.Element) float64 { return e.JFET.GateN }, 1.2},
			{"gs_capacitance", `"3p"`, func(e *models.Element) float64 { return e.JFET.GS.C0 }, 3e-12},
			{"gd_capacitance", `"1p5"`, func(e *models.Element) float64 { return e.JFET.GD.C0 }, 1.5e-12},
			{"gd_grading", `0.45`, func(e *models.Element) float64 { return e.JFET.GD.Grading }, 0.45},
		}},
		{"n-mosfet", `{ d = "c", g = "b", s = "gnd" }`, []check{
			{"threshold", `"1.8V"`, func(e *models.Element) float64 { return e.MOSFET.Threshold }, 1.8},
			{"k", `0.2`, func(e *models.Element) float64 { return e.MOSFET.K }, 0.2},
			{"channel_modulation", `0.05`, func(e *models.Element) float64 { return e.MOSFET.ChannelModulation }, 0.05},
			{"body_is", `"10p"`, func(e *models.Element) float64 { return e.MOSFET.BodyIs }, 1e-11},
			{"gs_capacitance", `"40p"`, func(e *models.Element) float64 { return e.MOSFET.GateSource }, 40e-12},
			{"gd_capacitance", `"6p"`, func(e *models.Element) float64 { return e.MOSFET.GateDrain }, 6e-12},
		}},
	}
	for _, tc := range cases {
		var kv []string
		for _, c := range tc.checks {
			kv = append(kv, c.key+" = "+c.written)
		}
		src := oneStage("9V", `  { ref = "R1", kind = "resistor", value = "10k", pins = ["v+", "c"] },
  { ref = "R2", kind = "resistor", value = "100k", pins = ["in", "b"] },
  { ref = "R3", kind = "resistor", value = "10k", pins = ["c", "out"] },
  { ref = "X1", kind = "`+tc.kind+`", `+strings.Join(kv, ", ")+`, pins = `+tc.pins+` },`)
		_, c := build(t, src)
		e := c.Element("s.X1")
		if e == nil {
			t.Fatalf("%s: no element s.X1", tc.kind)
		}
		for _, k := range tc.checks {
			// Exact but for the one rounding of a decimal prefix.
			if got := k.get(e); math.Abs(got-k.want) > 1e-15*math.Abs(k.want) {
				t.Errorf("%s %s = %s: model field %g, want %g", tc.kind, k.key, k.written, got, k.want)
			}
		}
	}
	// The op-amp's parameters, open-loop gain in dB (10^(100/20) = 1e5).
	_, c := build(t, oneStage("9V", `  { ref = "U1", kind = "opamp", open_loop_gain = "100dB", gbw = "3MHz", input_resistance = 1e12,
    output_resistance = "50", headroom_high = "1.2V", headroom_low = "0.1V", knee = "5mV", pins = { noninv = "in", inv = "out", out = "out" } },`))
	rg, hi, lo := c.Element("s.U1#rg"), c.Element("s.U1#high"), c.Element("s.U1#low")
	if rg == nil || hi == nil || lo == nil || c.Element("s.U1#rout").Value != 50 || c.Element("s.U1#rin").Value != 1e12 {
		t.Fatal("op-amp elements missing or wrong")
	}
	// models.AddPart: rg = A0/gm with gm = 1 mS, cg = gm/(2π·GBW).
	if a0 := rg.Value * 1e-3; math.Abs(a0/1e5-1) > 1e-12 {
		t.Errorf("open-loop gain %g, want 1e5", a0)
	}
	if gbw := 1e-3 / (2 * math.Pi * c.Element("s.U1#cg").Value); math.Abs(gbw/3e6-1) > 1e-12 {
		t.Errorf("GBW %g", gbw)
	}
	if hi.Limiter.Onset != -1.2 || lo.Limiter.Onset != -0.1 || hi.Limiter.Knee != 5e-3 {
		t.Errorf("limiters %+v %+v", hi.Limiter, lo.Limiter)
	}
	// The op-amp's supply pins default to v+ and gnd.
	if hi.Nodes[1] != c.Lookup("v+") || lo.Nodes[0] != models.Ground {
		t.Error("op-amp rails are not v+ and gnd by default")
	}
}

// A named model fills every value of its preset, second-order ones
// included (models.DevicePreset.Complete); a part without a model keeps
// only the core of the chain-file interface (Ebers–Moll, Shockley, the
// square laws) with no charge storage; written values win either way.
func TestPresetsCompleteAndCore(t *testing.T) {
	_, c := build(t, oneStage("9V", `  { ref = "R1", kind = "resistor", value = "10k", pins = ["v+", "c"] },
  { ref = "R2", kind = "resistor", value = "1M", pins = ["v+", "b"] },
  { ref = "Q1", kind = "npn", model = "si-npn", hfe = 123, pins = { c = "c", b = "b", e = "gnd" } },
  { ref = "Q2", kind = "npn", pins = { c = "c", b = "b", e = "gnd" } },
  { ref = "D1", kind = "diode", model = "ge-signal", pins = { anode = "c", cathode = "gnd" } },
  { ref = "D2", kind = "diode", pins = { anode = "c", cathode = "gnd" } },
  { ref = "J1", kind = "n-jfet", model = "n-jfet", pins = { d = "c", g = "gnd", s = "x" } },
  { ref = "J2", kind = "n-jfet", pins = { d = "c", g = "gnd", s = "x" } },
  { ref = "R3", kind = "resistor", value = "1k", pins = ["x", "gnd"] },
  { ref = "U1", kind = "opamp", pins = { noninv = "x", inv = "out", out = "out" } },`))
	want := *models.Presets["si-npn"].Complete().BJT
	want.BetaF = 123
	if got := c.Element("s.Q1").BJT; got != want {
		t.Errorf("named transistor %+v\nwant %+v", got, want)
	}
	core := *models.Presets["si-npn"].BJT
	core.Eg = 0 // no model and no eg: is fixed over temperature (README)
	if got := c.Element("s.Q2").BJT; got != core || got.BJTSecondOrder != (models.BJTSecondOrder{}) {
		t.Errorf("transistor without a model %+v, want the core %+v", got, core)
	}
	if got := c.Element("s.D1").Diode; got != *models.Presets["ge-signal"].Complete().Diode {
		t.Errorf("named diode %+v", got)
	}
	if got := c.Element("s.D2").Diode; got.DiodeSecondOrder != (models.DiodeSecondOrder{}) || got.Is != 2.52e-9 || got.N != 1.752 {
		t.Errorf("diode without a model %+v", got)
	}
	if got := c.Element("s.J1").JFET; got != models.JFETPresets["n-jfet"].Params {
		t.Errorf("named JFET %+v", got)
	}
	if got := c.Element("s.J2").JFET; got.GS.C0 != 0 || got.GD.C0 != 0 || got.Idss != models.JFETPresets["n-jfet"].Params.Idss {
		t.Errorf("JFET without a model %+v: want the class's static values, no capacitances", got)
	}
	if a0 := c.Element("s.U1#rg").Value * 1e-3; a0 != models.OpAmpPresets["opamp-general-dual"].Params.Gain {
		t.Errorf("op-amp without a model: gain %g, want the general-purpose dual's", a0)
	}
	// Nodes and elements inside parts carry the mark and stay out of the
	// names a user can probe.
	for _, name := range []string{"s.Q1#base", "s.D1#junction", "s.U1#gain"} {
		if c.Lookup(name) < 0 {
			t.Errorf("no internal node %s", name)
		}
	}
	if c.Element("s.Q1#rb") == nil || c.Element("s.D1#rs") == nil || c.Element("s.Q2#rb") != nil {
		t.Error("internal resistors: want s.Q1#rb and s.D1#rs, and no base resistor for a transistor without a model")
	}
	ch, _ := chains.Parse("t.toml", oneStage("9V", `  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },`))
	for _, n := range ch.Wiring().Names(c) {
		if models.IsInternal(n) {
			t.Errorf("probe list holds internal node %s", n)
		}
	}
}

// Faults in device, transformer and switch parts: one line naming the
// file, the line, the stage, the part and what is wrong.
func TestDeviceParseErrors(t *testing.T) {
	cases := []struct{ name, part, want string }{
		{"mark in a node name", `{ ref = "R9", kind = "resistor", value = "1k", pins = ["in", "a#b"] }`, `t.toml:7: stage s: part R9: pin 2: node name "a#b": "#" is reserved for nodes inside parts`},
		{"mark in a ref", `{ ref = "R#9", kind = "resistor", value = "1k", pins = ["in", "b"] }`, `ref must be letters, digits`},
		{"model of another kind", `{ ref = "J1", kind = "n-jfet", model = "si-npn", pins = { d = "c", g = "gnd", s = "gnd" } }`, `t.toml:7: stage s: part J1: model "si-npn" is not one of the n-jfet models (n-jfet)`},
		{"p model on n kind", `{ ref = "J1", kind = "n-jfet", model = "p-jfet", pins = { d = "c", g = "gnd", s = "gnd" } }`, `is not one of the n-jfet models`},
		{"signed pinch-off", `{ ref = "J1", kind = "n-jfet", pinchoff = "-2V", pins = { d = "c", g = "gnd", s = "gnd" } }`, `part J1: pinchoff = -2V must be above 0 V and at most 100 V (the magnitude`},
		{"breakdown without knee", `{ ref = "D9", kind = "diode", breakdown = "5.1V", pins = { anode = "gnd", cathode = "c" } }`, `part D9: a breakdown voltage needs a knee current`},
		{"Early voltage below 1 V", `{ ref = "Q9", kind = "npn", early_voltage = 0.5, pins = { c = "c", b = "c", e = "gnd" } }`, `part Q9: Early voltage must be 0 (none) or at least 1 V`},
		{"grading of 1", `{ ref = "Q9", kind = "npn", bc_capacitance = "5p", bc_grading = 1, pins = { c = "c", b = "c", e = "gnd" } }`, `bc_grading = 1 must be at least 0 and below 1`},
		{"not a time", `{ ref = "Q9", kind = "npn", transit_time = "4nF", pins = { c = "c", b = "c", e = "gnd" } }`, `transit_time: value "4nF" is not a time`},
		{"gain in odd units", `{ ref = "U9", kind = "opamp", open_loop_gain = "lots", pins = { noninv = "c", inv = "o", out = "o" } }`, `open_loop_gain: value "lots" is not a number`},
		{"rails on one node", `{ ref = "U9", kind = "opamp", pins = { noninv = "c", inv = "o", out = "o", rail_pos = "v+", rail_neg = "v+" } }`, `rail_pos and rail_neg are both on v+`},
		{"op-amp pin unknown", `{ ref = "U9", kind = "opamp", pins = { plus = "c", inv = "o", out = "o" } }`, `unknown pin "plus" (a opamp has noninv, inv, out, rail_pos, rail_neg)`},
		{"one winding", `{ ref = "T1", kind = "transformer", windings = [{ inductance = "1H", pins = ["c", "gnd"] }] }`, `part T1: a transformer needs at least two windings`},
		{"winding without inductance", `{ ref = "T1", kind = "transformer", windings = [{ inductance = "1H", pins = ["c", "gnd"] }, { resistance = 10, pins = ["o", "gnd"] }] }`, `winding 2: needs an inductance`},
		{"turns on winding 1", `{ ref = "T1", kind = "transformer", windings = [{ turns = 2, pins = ["c", "gnd"] }, { inductance = "1H", pins = ["o", "gnd"] }] }`, `winding 1: winding 1 is the reference of the turns`},
		{"both inductance and turns", `{ ref = "T1", kind = "transformer", windings = [{ inductance = "1H", pins = ["c", "gnd"] }, { inductance = "1H", turns = 2, pins = ["o", "gnd"] }] }`, `winding 2: give inductance or turns, not both`},
		{"winding key", `{ ref = "T1", kind = "transformer", windings = [{ inductance = "1H", pins = ["c", "gnd"] }, { inductance = "1H", dcr = 5, pins = ["o", "gnd"] }] }`, `winding 2: unknown key "dcr"`},
		{"coupling above 1", `{ ref = "T1", kind = "transformer", coupling = 1.2, windings = [{ inductance = "1H", pins = ["c", "gnd"] }, { inductance = "1H", pins = ["o", "gnd"] }] }`, `coupling = 1.2 must be above 0 and at most 1`},
		{"transformer pins", `{ ref = "T1", kind = "transformer", pins = ["c", "gnd"], windings = [{ inductance = "1H", pins = ["c", "gnd"] }, { inductance = "1H", pins = ["o", "gnd"] }] }`, `a transformer's pins sit in its windings`},
		{"windings on a resistor", `{ ref = "R9", kind = "resistor", value = "1k", pins = ["c", "gnd"], windings = [] }`, `only a transformer has windings`},
		{"switch of one position", `{ ref = "SW1", kind = "switch", positions = [{ name = "on", connect = [["c", "o"]] }] }`, `a switch needs at least two positions`},
		{"numbered position name", `{ ref = "SW1", kind = "switch", positions = [{ name = "1", connect = [] }, { name = "b", connect = [] }] }`, `position 1: name "1" is a number`},
		{"duplicate position", `{ ref = "SW1", kind = "switch", positions = [{ name = "a", connect = [] }, { name = "a", connect = [] }] }`, `position 2: duplicate name "a"`},
		{"contact across the supply", `{ ref = "SW1", kind = "switch", positions = [{ name = "a", connect = [] }, { name = "b", connect = [["v+", "gnd"]] }] }`, `position 2: contact 1 would short the supply`},
		{"contact to itself", `{ ref = "SW1", kind = "switch", positions = [{ name = "a", connect = [["c", "c"]] }, { name = "b", connect = [] }] }`, `contact 1 joins c to itself`},
		{"unknown position", `{ ref = "SW1", kind = "switch", value = "mid", positions = [{ name = "a", connect = [] }, { name = "b", connect = [] }] }`, `position mid is not one of 1…2 or a, b`},
		{"position out of range", `{ ref = "SW1", kind = "switch", value = 3, positions = [{ name = "a", connect = [] }, { name = "b", connect = [] }] }`, `position 3 is not one of 1…2`},
	}
	for _, tc := range cases {
		src := oneStage("9V", `  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "c"] },
  `+tc.part+`,
  { ref = "R2", kind = "resistor", value = "10k", pins = ["c", "out"] },`)
		_, err := chains.Parse("t.toml", src)
		if err == nil || !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: %v\n  want one line containing %q", tc.name, err, tc.want)
		}
		var ce *chains.Error
		if err != nil && (!errors.As(err, &ce) || ce.Line != 7) {
			t.Errorf("%s: error %v is not a *chains.Error on line 7", tc.name, err)
		}
	}
	// Op-amp rails the wrong way round for the supply's polarity: its
	// defaults (v+ and gnd) on a positive-ground build.
	ch, err := chains.Parse("t.toml", oneStage("-9V", `  { ref = "U1", kind = "opamp", pins = { noninv = "in", inv = "out", out = "out" } },`))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := ch.Build(); err == nil || !strings.Contains(err.Error(), `part U1: rail_pos on v+ sits below rail_neg on gnd with a -9 V supply: write rail_pos = "gnd", rail_neg = "v+"`) {
		t.Errorf("inverted rails: %v", err)
	}
}

// --set reaches the new keys: a switch position by place or name, a
// winding by its wN_ key, an op-amp gain in dB, a second-order value; a
// bad value leaves the part as it was.
func TestSetDeviceKeys(t *testing.T) {
	src := oneStage("9V", `  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "C1", kind = "capacitor", value = "1n", pins = ["a", "gnd"] },
  { ref = "C2", kind = "capacitor", value = "2n", pins = ["b", "gnd"] },
  { ref = "SW1", kind = "switch", positions = [{ name = "none", connect = [] }, { name = "small", connect = [["out", "a"]] }, { name = "big", connect = [["out", "b"]] }] },
  { ref = "T1", kind = "transformer", windings = [{ inductance = "1H", pins = ["out", "gnd"] }, { turns = 2, pins = ["t", "gnd"] }] },
  { ref = "R2", kind = "resistor", value = "10k", pins = ["t", "gnd"] },
  { ref = "Q1", kind = "npn", model = "si-npn", pins = { c = "t", b = "out", e = "gnd" } },
  { ref = "U1", kind = "opamp", pins = { noninv = "t", inv = "u", out = "u" } },`)
	ch, err := chains.Parse("t.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	st := ch.Stage("s")
	sw, tr, q, u := st.Parts[3], st.Parts[4], st.Parts[6], st.Parts[7]
	if sw.Position != 0 || sw.Text != "none" {
		t.Errorf("default position %d %q, want the first", sw.Position, sw.Text)
	}
	for _, tc := range []struct {
		kv   string
		ok   func() bool
		what string
	}{
		{"s.SW1=2", func() bool { return sw.Position == 1 && sw.Text == "small" }, "position by place"},
		{"s.SW1=big", func() bool { return sw.Position == 2 }, "position by name"},
		{"s.T1.w2_inductance=9H", func() bool { return tr.TransformerParams().Windings[1].Inductance == 9 }, "winding inductance"},
		{"s.T1.w2_turns=3", func() bool { return math.Abs(tr.TransformerParams().Windings[1].Inductance-9) < 1e-12 }, "turns: L2 = 3²·1 H"},
		{"s.T1.coupling=0.95", func() bool { return tr.TransformerParams().Coupling == 0.95 }, "coupling"},
		{"s.Q1.early_voltage=50V", func() bool { return q.BJTParams().EarlyVoltage == 50 }, "Early voltage"},
		{"s.U1.open_loop_gain=120dB", func() bool { return math.Abs(u.OpAmpParams().Gain/1e6-1) < 1e-12 }, "gain in dB"},
		{"s.U1=opamp-jfet-dual", func() bool { return u.OpAmpParams().GBW == 3e6 }, "op-amp class by value"},
	} {
		if err := ch.Set(tc.kv); err != nil || !tc.ok() {
			t.Errorf("%s (%s): %v", tc.kv, tc.what, err)
		}
	}
	for _, tc := range []struct{ kv, want string }{
		{"s.SW1=4", "position 4 is not one of 1…3 or none, small, big"},
		{"s.SW1=1.5", "position 1.5 is not one of"},
		{"s.T1.w3_inductance=1H", "w3_inductance: the transformer has windings 1 to 2"},
		{"s.T1.w1_turns=2", "winding 1 is the reference"},
		{"s.U1=si-npn", `model "si-npn" is not one of the opamp models`},
		{"s.Q1.early_voltage=-3", "early_voltage = -3 is outside 0…10 kV"},
	} {
		before := *sw
		if err := ch.Set(tc.kv); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("Set(%q) = %v, want %q", tc.kv, err, tc.want)
		}
		if sw.Position != before.Position {
			t.Errorf("%s changed the switch", tc.kv)
		}
	}
	// A clone's switch and windings are its own.
	d := ch.Clone()
	d.Set("s.SW1=none")
	d.Set("s.T1.w2_inductance=1H")
	if sw.Position != 2 || tr.Windings[1].Turns != 3 {
		t.Error("changing a clone changed the original")
	}
}

// A switch in its position: each closed contact a resistor of the
// contact resistance between its pins, open contacts absent, and a node
// left hanging on an open contact held by a 1 TΩ leak so the circuit
// still solves.
func TestSwitchFlattening(t *testing.T) {
	src := oneStage("9V", `  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "C1", kind = "capacitor", value = "1n", pins = ["a", "gnd"] },
  { ref = "C2", kind = "capacitor", value = "2n", pins = ["b", "gnd"] },
  { ref = "SW1", kind = "switch", value = "small", contact_resistance = "20m",
    positions = [{ name = "none", connect = [] }, { name = "small", connect = [["out", "a"]] }, { name = "both", connect = [["out", "a"], ["out", "b"]] }] },`)
	ch, c := build(t, src)
	e := c.Element("s.SW1#contact1")
	if e == nil || e.Value != 0.02 || e.Nodes[0] != c.Output || e.Nodes[1] != c.Lookup("s.a") {
		t.Fatalf("closed contact %+v", e)
	}
	if c.Element("s.SW1#contact2") != nil || c.Element("leak.s.b") == nil || c.Element("leak.s.b").Value != models.LeakResistance {
		t.Error("open contact: want no resistor and a 1 TΩ leak on s.b")
	}
	ch.Set("s.SW1=both")
	c, err := ch.Build()
	if err != nil {
		t.Fatal(err)
	}
	if c.Element("s.SW1#contact2") == nil || c.Element("leak.s.b") != nil {
		t.Error("both contacts closed: want two resistors and no leak")
	}
	ch.Set("s.SW1=none")
	if c, err = ch.Build(); err != nil || c.Element("s.SW1#contact1") != nil || c.Element("leak.s.a") == nil {
		t.Errorf("all open: %v", err)
	}
}
