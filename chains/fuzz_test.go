package chains_test

import (
	"math"
	"strings"
	"testing"

	"renderchain/chains"
)

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
