package chains_test

import (
	"math"
	"strings"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/dsp/wdf"
)

// Fuzz targets for the chain file. Their seed corpora (the example chains,
// every template written out as a stage, and small hostile texts) are in
// testdata/fuzz/<target>/ and run with go test; see the README for longer
// runs. What each checks is the package's promise for any input: no panic,
// a one-line error, and, for a chain that parses, finite values.

// oneLineError fails on an error message that spans lines.
func oneLineError(t *testing.T, err error) {
	t.Helper()
	if err != nil && strings.ContainsAny(err.Error(), "\r\n") {
		t.Fatalf("multi-line error %q", err)
	}
}

// FuzzParse: Parse never panics, its errors are one line, and a chain it
// accepts has finite, checked scalars and passes or fails CheckSize with
// a one-line error.
func FuzzParse(f *testing.F) {
	f.Add("[[stage]]\nid = \"a\"\ntemplate = \"volume\"\n")
	f.Fuzz(func(t *testing.T, src string) {
		ch, err := chains.Parse("fuzz.toml", src)
		oneLineError(t, err)
		if err != nil {
			return
		}
		for _, v := range []float64{ch.Supply, ch.Temperature, ch.InputPeak, ch.Load, ch.FullScale} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("non-finite scalar in %+v", ch)
			}
		}
		if len(ch.Stages) == 0 {
			t.Fatal("a chain without stages was accepted")
		}
		oneLineError(t, ch.CheckSize())
	})
}

// FuzzSet: --set overrides on an example chain never panic, give one-line
// errors, and leave the chain's scalars finite.
func FuzzSet(f *testing.F) {
	for _, s := range []string{"supply=8.5V", "fuzz.fuzz=0.3", "tone.C1=22n", "fuzz.Q1.hfe=120", "temperature=10C", "input.peak=500mV", "x"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, kv string) {
		ch, err := chains.Example("demo")
		if err != nil {
			t.Fatal(err)
		}
		err = ch.Set(kv)
		oneLineError(t, err)
		for _, v := range []float64{ch.Supply, ch.Temperature, ch.InputPeak, ch.Load, ch.FullScale} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("--set %q left a non-finite scalar", kv)
			}
		}
	})
}

// fuzzMaxParts bounds the circuits FuzzRender solves, far below MaxParts,
// so that one input takes milliseconds, not seconds.
const fuzzMaxParts = 40

// FuzzRender: chain text → Parse → CheckSize → Build → CheckCircuit →
// SolveDC → wdf.Compile → 256 samples of a 1 kHz tone at 48 kHz. Any
// stage may fail with a one-line error; none may panic, and every sample
// that comes out must be finite.
func FuzzRender(f *testing.F) {
	f.Add("[[stage]]\nid = \"a\"\ntemplate = \"volume\"\n")
	x := make([]float64, 256)
	for i := range x {
		x[i] = 0.5 * math.Sin(2*math.Pi*1000*float64(i)/48000)
	}
	y := make([]float64, len(x))
	f.Fuzz(func(t *testing.T, src string) {
		ch, err := chains.Parse("fuzz.toml", src)
		oneLineError(t, err)
		if err != nil {
			return
		}
		if err := ch.CheckSize(); err != nil {
			oneLineError(t, err)
			return
		}
		parts := 0
		for _, st := range ch.Stages {
			parts += len(st.Parts)
		}
		if parts > fuzzMaxParts {
			return
		}
		c, err := ch.Build()
		oneLineError(t, err)
		if err != nil {
			return
		}
		if err := chains.CheckCircuit(c); err != nil {
			t.Fatalf("CheckSize passed but CheckCircuit refused: %v", err)
		}
		op, err := mna.SolveDC(c, mna.DCOptions{})
		oneLineError(t, err)
		if err != nil {
			return
		}
		for i, v := range op.Node {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("DC voltage of node %s is %g", c.Nodes[i], v)
			}
		}
		s, err := wdf.Compile(c, op, wdf.Options{SampleRate: 48000})
		oneLineError(t, err)
		if err != nil {
			return
		}
		s.InputGain, s.OutputGain = ch.InputPeak, 1/ch.FullScale
		s.Process(y, x)
		for i, v := range y {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("sample %d is %g", i, v)
			}
		}
	})
}

// FuzzParseDevices feeds chain files with device, transformer and switch
// parts through Parse and Build: neither may panic, every refusal is one
// line, and whatever builds holds finite element values only.
func FuzzParseDevices(f *testing.F) {
	f.Add(oneStage("9V", `  { ref = "U1", kind = "opamp", open_loop_gain = "100dB", pins = { noninv = "in", inv = "out", out = "out" } },`))
	f.Add(oneStage("9V", `  { ref = "T1", kind = "transformer", coupling = 0.98, windings = [{ inductance = "2H", resistance = 100, pins = ["in", "gnd"] }, { turns = 0.5, pins = ["out", "gnd"] }] },`))
	f.Add(oneStage("9V", `  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "C1", kind = "capacitor", value = "1n", pins = ["a", "gnd"] },
  { ref = "SW1", kind = "switch", value = 2, positions = [{ name = "off", connect = [] }, { name = "on", connect = [["out", "a"]] }] },`))
	f.Add(oneStage("-9V", `  { ref = "J1", kind = "p-jfet", model = "p-jfet", idss = "3mA", pinchoff = "1.5V", pins = { d = "gnd", g = "in", s = "out" } },
  { ref = "R1", kind = "resistor", value = "4k7", pins = ["out", "v+"] },`))
	f.Add(oneStage("9V", `  { ref = "Q1", kind = "npn", model = "si-npn", early_voltage = 60, base_resistance = 80, pins = { c = "out", b = "in", e = "gnd" } },
  { ref = "R1", kind = "resistor", value = "10k", pins = ["v+", "out"] },
  { ref = "D1", kind = "diode", breakdown = "4.7V", breakdown_current = "5mA", pins = { anode = "gnd", cathode = "out" } },`))
	f.Add(oneStage("9V", `  { ref = "C1", kind = "capacitor", value = "10u", rating = "6V3", pins = { plus = "in", minus = "out" } },
  { ref = "R1", kind = "resistor", value = "100k", pins = ["out", "gnd"] },`))
	f.Fuzz(func(t *testing.T, src string) {
		ch, err := chains.Parse("f.toml", src)
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("multi-line error %q", err)
			}
			return
		}
		c, err := ch.Build()
		if err != nil {
			if strings.Contains(err.Error(), "\n") {
				t.Errorf("multi-line error %q", err)
			}
			return
		}
		for _, e := range c.Elements {
			if math.IsNaN(e.Value) || math.IsInf(e.Value, 0) {
				t.Errorf("element %s value %g", e.Ref, e.Value)
			}
		}
	})
}
