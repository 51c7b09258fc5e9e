package chains_test

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/models"
)

const toneChain = `name = "tone test"
supply = "9V"
[input]
peak = "1V"
[output]
load = "100k"
[[stage]]
id = "tone"
knobs = { tone = 0.5 }
parts = [
  { ref = "R1", kind = "resistor", value = "22k", pins = ["in", "lp"] },
  { ref = "C1", kind = "capacitor", value = "22n", pins = ["lp", "gnd"] },
  { ref = "VR1", kind = "pot", value = "100k", taper = "linear", knob = "tone",
    pins = { ccw = "lp", wiper = "out", cw = "hp" } },
  { ref = "C2", kind = "capacitor", value = "4n7", pins = ["in", "hp"] },
  { ref = "R3", kind = "resistor", value = "47k", pins = ["hp", "gnd"] },
]
`

// Faults in a chain file give one-line errors naming the file, the line
// and the key (the message format the issue fixes).
func TestParseErrors(t *testing.T) {
	cases := []struct {
		name, edit, want string
	}{
		{"bad value", `value = "22k", pins = ["in", "lp"]` + "\x00" + `value = "22kk", pins = ["in", "lp"]`, `tone.toml:11: stage tone: part R1: value "22kk" is not a resistance`},
		{"unknown kind", `kind = "resistor", value = "47k"` + "\x00" + `kind = "resister", value = "47k"`, `tone.toml:16: stage tone: part R3: kind "resister" is not one of`},
		{"unknown pin", `ccw = "lp", wiper` + "\x00" + `ccx = "lp", wiper`, `part VR1: unknown pin "ccx"`},
		{"knob range", `knobs = { tone = 0.5 }` + "\x00" + `knobs = { tone = 1.5 }`, `tone.toml:9: stage tone: knob tone = 1.5 is outside 0…1`},
		{"negative value", `value = "22n"` + "\x00" + `value = "-22n"`, `tone.toml:12: stage tone: part C1: value -22n must be positive`},
		{"top-level key", `supply = "9V"` + "\x00" + `supply = "9 volts"`, `tone.toml:2: supply: value "9 volts" is not a voltage`},
		{"unknown key", `[output]` + "\x00" + "[output]\nloadd = \"1M\"", `tone.toml:6: unknown key "output.loadd"`},
		{"syntax", `name = "tone test"` + "\x00" + `name = "tone test`, `tone.toml:1: TOML syntax`},
		{"two kinds of unit", `value = "22n"` + "\x00" + `value = "22nH"`, `part C1: value "22nH" is not a capacitance`},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			from, to, _ := strings.Cut(tc.edit, "\x00")
			src := strings.Replace(toneChain, from, to, 1)
			if src == toneChain {
				t.Fatalf("edit %q did not apply", from)
			}
			_, err := chains.Parse("tone.toml", src)
			if err == nil {
				t.Fatalf("no error; want %q", tc.want)
			}
			if !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
				t.Errorf("error %q\nwant it to contain %q on one line", err, tc.want)
			}
		})
	}
}

// Circuit faults found when the chain is flattened.
func TestBuildErrors(t *testing.T) {
	cases := []struct{ name, parts, want string }{
		{"floating island", `{ ref = "C1", kind = "capacitor", value = "1n", pins = ["in", "x"] },
  { ref = "R2", kind = "resistor", value = "1k", pins = ["x", "y"] },
  { ref = "C2", kind = "capacitor", value = "1n", pins = ["y", "out"] },
  { ref = "R1", kind = "resistor", value = "1k", pins = ["out", "gnd"] }`, "f.toml:5: stage x: part C1: pin 2 is on node x.x, which has no DC path to ground"},
		{"short across the supply", `{ ref = "L1", kind = "inductor", value = "1m", pins = ["v+", "gnd"] },
  { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "out"] }`, "short"},
		{"both pins on one node", `{ ref = "R1", kind = "resistor", value = "1k", pins = ["in", "in"] },
  { ref = "R2", kind = "resistor", value = "1k", pins = ["in", "out"] }`, "both pins on node"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			src := "name = \"f\"\n[[stage]]\nid = \"x\"\nparts = [\n  " + tc.parts + ",\n]\n"
			ch, err := chains.Parse("f.toml", src)
			if err == nil {
				_, err = ch.Build()
			}
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
}

func demoChain(t *testing.T) *chains.Chain {
	t.Helper()
	ch, err := chains.Load("demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	return ch
}

// Unknown templates, knobs and refs name the known ones.
func TestOverrideErrorsNameKnownKeys(t *testing.T) {
	cases := []struct{ set, want string }{
		{"fuzz.fuzzz=0.5", "knobs: fuzz, trim1, trim2; parts: R0, C1, Q1"},
		{"fuzz.fuzz=1.2", "outside 0…1"},
		{"fuzzbox.fuzz=0.5", `no stage "fuzzbox" (stages: pickup, fuzz, tone, volume, amp)`},
		{"fuzz.C1=47q", `value "47q"`},
		{"fuzz.Q1.hfee=100", `unknown key "hfee"`},
		{"supply=9 volts", `"9 volts" is not a voltage`},
		{"temperature=500C", "outside −60…150 °C"},
		{"nonsense", "want KEY=VALUE"},
	}
	for _, tc := range cases {
		ch := demoChain(t)
		err := ch.Set(tc.set)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("Set(%q) = %v, want an error containing %q", tc.set, err, tc.want)
		}
	}
	_, err := chains.Parse("t.toml", "[[stage]]\nid = \"a\"\ntemplate = \"no-such\"\n")
	if err == nil || !strings.Contains(err.Error(), "built-in: amp-input, fuzz-ge, fuzz-ge3, fuzz-si") {
		t.Errorf("unknown template: %v", err)
	}
}

// --set reaches every kind of key.
func TestSetKeys(t *testing.T) {
	ch := demoChain(t)
	for _, kv := range []string{"fuzz.fuzz=0.3", "fuzz.C1=47n", "fuzz.Q2.hfe=120", "supply=8.5V", "temperature=10C", "input.peak=500mV", "output.full_scale=2V", "fuzz.Q1=ge-npn"} {
		if err := ch.Set(kv); err != nil {
			t.Fatalf("Set(%q): %v", kv, err)
		}
	}
	st := ch.Stage("fuzz")
	var c1, q1, q2 *chains.Part
	for _, p := range st.Parts {
		switch p.Ref {
		case "C1":
			c1 = p
		case "Q1":
			q1 = p
		case "Q2":
			q2 = p
		}
	}
	if st.Knobs["fuzz"] != 0.3 || math.Abs(c1.Value-47e-9) > 1e-21 || q2.Params["hfe"] != 120 || q1.Model != "ge-npn" {
		t.Errorf("knob %g C1 %g hfe %g model %q", st.Knobs["fuzz"], c1.Value, q2.Params["hfe"], q1.Model)
	}
	if ch.Supply != 8.5 || math.Abs(ch.Temperature-283.15) > 1e-9 || ch.InputPeak != 0.5 || ch.FullScale != 2 {
		t.Errorf("supply %g temperature %g peak %g full scale %g", ch.Supply, ch.Temperature, ch.InputPeak, ch.FullScale)
	}
}

// solved builds the chain and solves its DC operating point.
func solved(t *testing.T, ch *chains.Chain) (*models.Circuit, *mna.OperatingPoint) {
	t.Helper()
	c, err := ch.Build()
	if err != nil {
		t.Fatal(err)
	}
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return c, op
}

func response(t *testing.T, ch *chains.Chain, f float64) complex128 {
	t.Helper()
	c, op := solved(t, ch)
	h, err := mna.AC(c, op, []float64{f}, []int{c.Output})
	if err != nil {
		t.Fatal(err)
	}
	return h[0][0]
}

func db(h complex128) float64 { return 20 * math.Log10(cmplx.Abs(h)) }

// The low-pass/high-pass blend network against its closed-form transfer
// function, derived here by nodal analysis (not by the project's MNA):
// with an ideal source Vi, nodes L (R1 to Vi, C1 to ground), H (C2 to Vi,
// R3 to ground), the pot sections Ra = R·t (L–W) and Rb = R·(1−t) (W–H)
// and the load RL at the wiper W, KCL at L, H and W gives
//
//	(G1 + sC1 + Ga)·VL − Ga·VW = G1·Vi
//	(sC2 + G3 + Gb)·VH − Gb·VW = sC2·Vi
//	−Ga·VL − Gb·VH + (Ga + Gb + GL)·VW = 0
//
// solved by Cramer's rule. Tolerance 0.01 dB (the bound).
func TestBlendToneClosedForm(t *testing.T) {
	const r1, c1, c2, r3, rp, rl = 22e3, 22e-9, 4.7e-9, 47e3, 100e3, 100e3
	for _, knob := range []float64{0.1, 0.5, 0.9} {
		for _, f := range []float64{100, 1000, 5000} {
			ch, err := chains.Parse("tone.toml", toneChain)
			if err != nil {
				t.Fatal(err)
			}
			ch.Stage("tone").Knobs["tone"] = knob
			got := response(t, ch, f)
			s := complex(0, 2*math.Pi*f)
			ga, gb := complex(1/(rp*knob), 0), complex(1/(rp*(1-knob)), 0)
			a11, a13 := complex(1/r1, 0)+s*c1+ga, -ga
			a22, a23 := s*c2+complex(1/r3, 0)+gb, -gb
			a31, a32, a33 := -ga, -gb, ga+gb+complex(1/rl, 0)
			b1, b2 := complex(1/r1, 0), s*c2
			// Eliminate VL and VH: VL = (b1 − a13·VW)/a11, VH = (b2 − a23·VW)/a22.
			vw := -(a31*b1/a11 + a32*b2/a22) / (a33 - a31*a13/a11 - a32*a23/a22)
			if d := math.Abs(db(got) - db(vw)); d > 0.01 {
				t.Errorf("tone %.1f, %g Hz: %.4f dB, closed form %.4f dB", knob, f, db(got), db(vw))
			}
		}
	}
}

// Volume pot at a known rotation into a known load equals the loaded
// voltage divider (Ohm's law), within 0.01 dB.
func TestVolumePotDivider(t *testing.T) {
	src := `name = "vol"
[output]
load = "47k"
[[stage]]
id = "v"
template = "volume"
knobs = { level = 0.5 }
`
	ch, err := chains.Parse("vol.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	got := db(response(t, ch, 1000))
	lower := 100e3 * models.Audio.Fraction(0.5) // 10 % of the track (audio taper at mid rotation)
	upper := 100e3 - lower
	par := lower * 47e3 / (lower + 47e3)
	want := 20 * math.Log10(par/(par+upper))
	if math.Abs(got-want) > 0.01 {
		t.Errorf("volume at 0.5 into 47k: %.4f dB, divider %.4f dB", got, want)
	}
}

// Pickup template: with a light load (volume pot and amplifier set to
// 10 MΩ) the response peaks at 1/(2π√(LC)) of its own L and total C within
// 1 % (textbook LC resonance; the series resistance shifts a Q ≈ 12 peak by
// about 0.2 %); and into a 1 MΩ load with the volume full up it equals the
// analytic RLC divider Zp/(Zp + Rcoil + sL), Zp the parallel of the shunt
// capacitances and resistances, within 0.01 dB.
func TestPickupResonance(t *testing.T) {
	chain := func(vol, load string) *chains.Chain {
		src := "name = \"pu\"\n[input]\nsource = \"pickup\"\n[output]\nload = \"" + load + "\"\n[[stage]]\nid = \"amp\"\nparts = [{ ref = \"R\", kind = \"resistor\", value = \"1G\", pins = [\"in\", \"gnd\"] }]\n"
		ch, err := chains.Parse("pu.toml", src)
		if err != nil {
			t.Fatal(err)
		}
		if err := ch.Set("pickup.VOL=" + vol); err != nil {
			t.Fatal(err)
		}
		return ch
	}
	const L, R, Ccoil, Ccable = 2.5, 6200, 120e-12, 300e-12
	f0 := 1 / (2 * math.Pi * math.Sqrt(L*(Ccoil+Ccable)))
	ch := chain("10M", "10M")
	best, bestF := 0.0, 0.0
	for f := 0.8 * f0; f < 1.2*f0; f *= 1.0005 {
		if m := cmplx.Abs(response(t, ch, f)); m > best {
			best, bestF = m, f
		}
	}
	if math.Abs(bestF/f0-1) > 0.01 {
		t.Errorf("resonance peak at %.1f Hz, 1/(2π√LC) = %.1f Hz", bestF, f0)
	}
	t.Logf("peak %.1f Hz vs 1/(2π√LC) %.1f Hz (%.2f %%)", bestF, f0, 100*(bestF/f0-1))
	ch = chain("250k", "1M")
	for _, f := range []float64{100, 1000, 3000, 5000, 10000} {
		s := complex(0, 2*math.Pi*f)
		g := complex(1/250e3+1/1e6+1/1e9, 0) + s*(Ccoil+Ccable)
		want := (1 / g) / (1/g + complex(R, 0) + s*L)
		if d := math.Abs(db(response(t, ch, f)) - db(want)); d > 0.01 {
			t.Errorf("%g Hz: %.4f dB, RLC formula %.4f dB", f, db(response(t, ch, f)), db(want))
		}
	}
}

// Silicon fuzz template at default trimmers: the second collector sits
// between 35 % and 65 % of the supply (common practice for symmetric
// clipping).
func TestSiliconFuzzBias(t *testing.T) {
	ch, err := chains.Parse("f.toml", "name = \"f\"\n[[stage]]\nid = \"fuzz\"\ntemplate = \"fuzz-si\"\n")
	if err != nil {
		t.Fatal(err)
	}
	c, err := ch.Build()
	if err != nil {
		t.Fatal(err)
	}
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	vc2 := op.Node[c.Lookup("fuzz.c2")]
	if frac := vc2 / ch.Supply; frac < 0.35 || frac > 0.65 {
		t.Errorf("Q2 collector %.2f V is %.0f %% of the supply", vc2, 100*frac)
	}
	t.Logf("Q2 collector %.3f V (%.1f %% of %g V)", vc2, 100*vc2/ch.Supply, ch.Supply)
}

// Every template parses, builds behind an ideal source, and solves DC.
func TestTemplatesBuild(t *testing.T) {
	list, err := chains.Templates()
	if err != nil {
		t.Fatal(err)
	}
	if len(list) < 6 {
		t.Fatalf("%d templates", len(list))
	}
	for _, tp := range list {
		supply := "9V"
		if tp.Name == "fuzz-ge" || tp.Name == "fuzz-ge3" {
			supply = "-9V" // germanium PNP, positive ground
		}
		srcs := []string{"name = \"t\"\nsupply = \"" + supply + "\"\n[[stage]]\nid = \"s\"\ntemplate = \"" + tp.Name + "\"\n"}
		if tp.Supply {
			// A supply network behind each polarity, feeding a 1 kΩ load.
			srcs = nil
			for _, supply := range []string{"9V", "-9V"} {
				srcs = append(srcs, "name = \"t\"\nsupply = \""+supply+"\"\n[power]\ntemplate = \""+tp.Name+"\"\n[[stage]]\nid = \"s\"\n"+
					"parts = [\n  { ref = \"R1\", kind = \"resistor\", value = \"1k\", pins = [\"in\", \"out\"] },\n"+
					"  { ref = \"RL\", kind = \"resistor\", value = \"1k\", pins = [\"v+\", \"gnd\"] },\n]\n")
			}
		}
		for _, src := range srcs {
			ch, err := chains.Parse("t.toml", src)
			if err != nil {
				t.Fatalf("%s: %v", tp.Name, err)
			}
			c, err := ch.Build()
			if err != nil {
				t.Fatalf("%s: %v", tp.Name, err)
			}
			if _, err := mna.SolveDC(c, mna.DCOptions{}); err != nil {
				t.Errorf("%s: %v", tp.Name, err)
			}
		}
	}
}

// Every example chain parses and builds; the device examples under
// chains/examples also bias without a warning at their settings.
func TestExampleChains(t *testing.T) {
	for _, name := range chains.ExampleNames() {
		ch, err := chains.Example(name)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := ch.Build(); err != nil {
			t.Errorf("%s: %v", name, err)
		}
		if !strings.HasPrefix(name, "examples/") {
			continue
		}
		b, err := bias.Solve(ch)
		if err != nil {
			t.Errorf("%s: %v", name, err)
		} else if len(b.Warnings) > 0 {
			t.Errorf("%s: warnings %q", name, b.Warnings)
		}
	}
}

// The chain's output node is named "out" (the interface's shared node),
// also when the last stages are shunt stages that pass their in through,
// and a stage's out is the next stage's in (one node).
func TestOutputNodeIsOut(t *testing.T) {
	ch := demoChain(t)
	c, err := ch.Build()
	if err != nil {
		t.Fatal(err)
	}
	if c.Output != c.Lookup("out") || c.Lookup("out") < 0 {
		t.Errorf("output node %q, want \"out\"", c.Nodes[c.Output])
	}
	// The volume pot's wiper (the last out-driving stage) is the output;
	// the amp-input stage hangs on it.
	if c.Element("volume.VR1.ccw").Nodes[1] != c.Output || c.Element("amp.RIN").Nodes[0] != c.Output {
		t.Error("volume wiper and amplifier input are not the output node")
	}
	if c.Lookup("fuzz.out") < 0 || c.Element("tone.R1").Nodes[0] != c.Lookup("fuzz.out") {
		t.Error("the fuzz's out is not the tone stage's in")
	}
	// A buffered shunt stage at the end: its buffer output is "out".
	src := "name = \"b\"\n[output]\nload = \"none\"\n[[stage]]\nid = \"a\"\nparts = [{ ref = \"R1\", kind = \"resistor\", value = \"1k\", pins = [\"in\", \"out\"] }, { ref = \"R2\", kind = \"resistor\", value = \"1k\", pins = [\"out\", \"gnd\"] }]\n" +
		"[[stage]]\nid = \"load\"\nbuffer = true\nparts = [{ ref = \"R\", kind = \"resistor\", value = \"10k\", pins = [\"in\", \"gnd\"] }]\n"
	ch2, err := chains.Parse("b.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	c2, err := ch2.Build()
	if err != nil {
		t.Fatal(err)
	}
	if c2.Nodes[c2.Output] != "out" || c2.Element("load.R").Nodes[0] != c2.Output {
		t.Errorf("buffered shunt: output %q", c2.Nodes[c2.Output])
	}
}
