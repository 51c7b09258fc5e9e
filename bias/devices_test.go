package bias

import (
	"math"
	"strings"
	"testing"

	"renderchain/chains"
)

func solveText(t *testing.T, supply, parts string) *Bias {
	t.Helper()
	ch, err := chains.Parse("t.toml", "name = \"t\"\nsupply = \""+supply+"\"\n[[stage]]\nid = \"s\"\nparts = [\n"+parts+"\n]\n")
	if err != nil {
		t.Fatal(err)
	}
	b, err := Solve(ch)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func warned(b *Bias, part string) bool {
	for _, w := range b.Warnings {
		if strings.Contains(w, part) {
			return true
		}
	}
	return false
}

// A self-biased JFET (λ = 0) against the handbook solution of
// Id = Idss·(1 − Vgs/VP)² with Vgs = −Id·Rs (Sedra & Smith,
// "Microelectronic Circuits", biasing the JFET; from memory): with
// u = Id·Rs/|VP| and a = Idss·Rs/|VP|, a·u² − (2a + 1)·u + a = 0, whose
// smaller root ((2a + 1) − √(4a + 1))/(2a) keeps Vgs above VP. Within
// 1e-6 relative (the gate junctions' 10 fA through 1 MΩ is 1e-8 V). The
// p-channel mirror reads with every sign flipped.
func TestFETReadings(t *testing.T) {
	const idss, vp, rs, rd = 5e-3, 2.0, 1e3, 3.3e3
	a := idss * rs / vp
	u := ((2*a + 1) - math.Sqrt(4*a+1)) / (2 * a)
	id := u * vp / rs
	for _, tc := range []struct {
		kind, supply string
		sign         float64
	}{{"n-jfet", "9V", 1}, {"p-jfet", "-9V", -1}} {
		b := solveText(t, tc.supply, `  { ref = "R1", kind = "resistor", value = "1M", pins = ["g", "gnd"] },
  { ref = "Q1", kind = "`+tc.kind+`", channel_modulation = 0, pins = { d = "d", g = "g", s = "src" } },
  { ref = "R2", kind = "resistor", value = "1k", pins = ["src", "gnd"] },
  { ref = "R3", kind = "resistor", value = "3k3", pins = ["v+", "d"] },
  { ref = "C1", kind = "capacitor", value = "1u", pins = ["d", "out"] },`)
		q := b.FET("s.Q1")
		if q == nil {
			t.Fatalf("%s: no FET reading", tc.kind)
		}
		if math.Abs(q.Id/(tc.sign*id)-1) > 1e-6 || math.Abs(q.Vgs/(-tc.sign*id*rs)-1) > 1e-6 {
			t.Errorf("%s: Id %g, Vgs %g; handbook Id %g, Vgs %g", tc.kind, q.Id, q.Vgs, tc.sign*id, -tc.sign*id*rs)
		}
		if q.Region != Active || math.Abs(q.Overdrive-(vp-id*rs)) > 1e-6 || len(b.Warnings) != 0 {
			t.Errorf("%s: region %s, overdrive %g, warnings %q", tc.kind, q.Region, q.Overdrive, b.Warnings)
		}
		wantVds := tc.sign * (9 - id*(rd+rs))
		if math.Abs(q.Vds-wantVds) > 1e-5 || q.Kind.String() != tc.kind {
			t.Errorf("%s: Vds %g, want %g (kind %s)", tc.kind, q.Vds, wantVds, q.Kind)
		}
		t.Logf("%s: Id %.6g A (handbook %.6g), Vgs %.6g V, Vds %.4g V", tc.kind, q.Id, tc.sign*id, q.Vgs, q.Vds)
	}
	// A MOSFET driven hard into its ohmic region, and one cut off.
	b := solveText(t, "9V", `  { ref = "R1", kind = "resistor", value = "10k", pins = ["v+", "d"] },
  { ref = "R2", kind = "resistor", value = "100k", pins = ["v+", "g"] },
  { ref = "R3", kind = "resistor", value = "100k", pins = ["g", "gnd"] },
  { ref = "M1", kind = "n-mosfet", pins = { d = "d", g = "g", s = "gnd" } },
  { ref = "M2", kind = "n-mosfet", pins = { d = "d", g = "gnd", s = "gnd" } },
  { ref = "C1", kind = "capacitor", value = "1u", pins = ["d", "out"] },`)
	if m := b.FET("s.M1"); m == nil || m.Region != Ohmic || !warned(b, "s.M1 sits in the ohmic region") {
		t.Errorf("M1 %+v, warnings %q", m, b.Warnings)
	}
	if m := b.FET("s.M2"); m == nil || m.Region != CutOff || !warned(b, "s.M2 is cut off") {
		t.Errorf("M2 %+v", m)
	}
	r := b.Report()
	if len(r.FETs) != 2 || r.FETs[0].Ref != "s.M1" || r.FETs[0].Region != Ohmic || r.FETRegionRule == "" {
		t.Errorf("JSON fets %+v", r.FETs)
	}
}

// An op-amp follower of a divider: its output is the divider's voltage
// times A0/(1 + A0) (the follower's closed loop; 2e5 for the general dual
// class), its swing limits the rails less the class's 1.5 V headroom,
// and the room each way their distance from the output. Moving the
// divider shows a lopsided idle point and an output pinned at its limit,
// each warned about; the macromodel's helper elements appear nowhere in
// the device lists.
func TestOpAmpReadings(t *testing.T) {
	follower := func(upper, lower string) *Bias {
		return solveText(t, "9V", `  { ref = "R1", kind = "resistor", value = "`+upper+`", pins = ["v+", "p"] },
  { ref = "R2", kind = "resistor", value = "`+lower+`", pins = ["p", "gnd"] },
  { ref = "U1", kind = "opamp", output_resistance = 0, input_resistance = 1e12, pins = { noninv = "p", inv = "o", out = "o" } },
  { ref = "C1", kind = "capacitor", value = "1u", pins = ["o", "out"] },`)
	}
	b := follower("10k", "10k")
	a := b.OpAmp("s.U1")
	if a == nil {
		t.Fatal("no op-amp reading")
	}
	want := 4.5 * 2e5 / (1 + 2e5)
	if math.Abs(a.Vout-want) > 1e-6 || a.High != 7.5 || a.Low != 1.5 || math.Abs(a.RoomUp-(7.5-a.Vout)) > 1e-12 ||
		a.Region != Active || a.RailPos != "v+" || a.RailNeg != "gnd" || a.Out != "s.o" || a.NonInv != "s.p" {
		t.Errorf("follower %+v; want out %g", a, want)
	}
	if len(b.Warnings) != 0 || len(b.Diodes) != 0 || len(b.Transistors) != 0 || len(b.FETs) != 0 {
		t.Errorf("warnings %q; devices %d %d %d", b.Warnings, len(b.Diodes), len(b.Transistors), len(b.FETs))
	}
	if b = follower("10k", "22k"); !warned(b, "clips on one side first") {
		t.Errorf("lopsided (6.2 V): %q", b.Warnings)
	}
	if b = follower("1k", "100k"); b.OpAmp("s.U1").Region != SaturatedHigh || !warned(b, "at the high limit at idle") {
		t.Errorf("pinned (8.9 V in): %+v %q", b.OpAmp("s.U1"), b.Warnings)
	}
	r := b.Report()
	if len(r.OpAmps) != 1 || r.OpAmps[0].HighV != 7.5 || r.OpAmps[0].Region != SaturatedHigh {
		t.Errorf("JSON opamps %+v", r.OpAmps)
	}
	// Rails on local nodes the wrong way round: warned at the operating
	// point (the chain's own rails the wrong way round are refused). The
	// divider is stiff (10 Ω steps) so the limiters cannot drag it.
	b = solveText(t, "9V", `  { ref = "R1", kind = "resistor", value = "10", pins = ["v+", "hi"] },
  { ref = "R2", kind = "resistor", value = "10", pins = ["hi", "lo"] },
  { ref = "R3", kind = "resistor", value = "10", pins = ["lo", "gnd"] },
  { ref = "U1", kind = "opamp", pins = { noninv = "lo", inv = "o", out = "o", rail_pos = "lo", rail_neg = "hi" } },
  { ref = "R4", kind = "resistor", value = "10k", pins = ["o", "gnd"] },`)
	if !warned(b, "s.U1's rail_pos (s.lo,") || !warned(b, "is not above its rail_neg (s.hi,") {
		t.Errorf("inverted rails: %q", b.Warnings)
	}
}

// A collector loaded by a transformer winding idles near the supply by
// design: no rail warning; the same collector on a small resistor is
// warned about.
func TestInductiveCollectorNoRailWarning(t *testing.T) {
	stage := func(load string) *Bias {
		return solveText(t, "9V", `  { ref = "R1", kind = "resistor", value = "82k", pins = ["v+", "b"] },
  { ref = "R2", kind = "resistor", value = "15k", pins = ["b", "gnd"] },
  { ref = "Q1", kind = "npn", hfe = 200, pins = { c = "c", b = "b", e = "e" } },
  { ref = "R3", kind = "resistor", value = "680", pins = ["e", "gnd"] },
  `+load+`,
  { ref = "R5", kind = "resistor", value = "10k", pins = ["s", "gnd"] },`)
	}
	b := stage(`{ ref = "T1", kind = "transformer", windings = [{ inductance = "2H", resistance = 150, pins = ["v+", "c"] }, { turns = 1, pins = ["s", "gnd"] }] }`)
	if len(b.Warnings) != 0 {
		t.Errorf("transformer load: %q", b.Warnings)
	}
	b = stage(`{ ref = "R4", kind = "resistor", value = "150", pins = ["v+", "c"] }, { ref = "R6", kind = "resistor", value = "1k", pins = ["c", "s"] }`)
	if !warned(b, "from the supply rail") {
		t.Errorf("resistor load: %q", b.Warnings)
	}
}
