package parts

import (
	"bytes"
	"encoding/csv"
	"math"
	"strings"
	"testing"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/internal/testchains"
)

func bomLine(t *testing.T, b *BOM, ref string) BOMLine {
	t.Helper()
	for _, l := range b.Lines {
		if l.Ref == ref {
			return l
		}
	}
	t.Fatalf("no %s in the parts list", ref)
	return BOMLine{}
}

// Values, series, tolerances and ratings of a written-out stage.
// Expected E12/E24 values follow IEC 60063's tables (nearest in ratio,
// worked by hand); ratings follow the common-practice rules: capacitors at
// least 1.5 × the supply (16 V on 9 V), resistors at least twice their
// idle dissipation V²/R (Joule's law from the idle node voltages).
func TestPartsList(t *testing.T) {
	src := strings.Replace(testchains.CE{Vcc: "9V", R1: "49.9k", R2: "10k", RC: "5k1", RE: "1k", Kind: "npn", Beta: 100}.TOML(),
		`{ ref = "C2", kind = "capacitor", value = "100n"`, `{ ref = "C2", kind = "capacitor", value = "100n", tolerance = "2%"`, 1)
	ch, err := chains.Parse("ce.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	b, err := PartsList(ch, false)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		ref, e12, e24, series, rule string
		tol                         float64
	}{
		{"ce.R1", "47 kΩ", "51 kΩ", "off-series", "off-series resistor", 5}, // 49.9/47 = 1.062 > 51/49.9 = 1.022
		{"ce.R2", "10 kΩ", "10 kΩ", "E3", "E12 value", 10},
		{"ce.RC", "4.7 kΩ", "5.1 kΩ", "E24", "E24 value", 5},
		{"ce.RE", "1 kΩ", "1 kΩ", "E3", "E12 value", 10},
		{"ce.CE", "100 µF", "100 µF", "E3", "E12 value", 10},
		{"ce.C2", "100 nF", "100 nF", "E3", "written", 2},
	}
	for _, c := range cases {
		l := bomLine(t, b, c.ref)
		if l.E12 != c.e12 || l.E24 != c.e24 || l.Series != c.series || l.ToleranceRule != c.rule || float64(l.Tolerance) != c.tol {
			t.Errorf("%s: E12 %s E24 %s series %s rule %s tol %v; want %s %s %s %s %v", c.ref, l.E12, l.E24, l.Series, l.ToleranceRule, l.Tolerance, c.e12, c.e24, c.series, c.rule, c.tol)
		}
	}
	op, _ := bias.Solve(ch)
	vb, _ := op.Voltage("ce.b")
	r1 := bomLine(t, b, "ce.R1")
	if want := (9 - vb) * (9 - vb) / 49.9e3; math.Abs(float64(r1.IdlePower)/want-1) > 1e-9 || r1.Rating != "1/4 W" {
		t.Errorf("R1 idle power %g W (V²/R = %g W), rating %s", float64(r1.IdlePower), want, r1.Rating)
	}
	q := bomLine(t, b, "ce.Q1")
	qt := op.Transistor("ce.Q1")
	if want := qt.Vce*qt.Ic + qt.Vbe*qt.Ib; math.Abs(float64(q.IdlePower)/want-1) > 1e-12 || float64(q.MinPower) != 2*want || float64(q.MinVoltage) != 13.5 {
		t.Errorf("Q1 idle %g W (Vce·Ic + Vbe·Ib = %g W), min %g W, Vceo %g V", float64(q.IdlePower), want, float64(q.MinPower), float64(q.MinVoltage))
	}
	ce := bomLine(t, b, "ce.CE")
	if !strings.Contains(ce.Note, "+ to ce.e") || float64(ce.MinVoltage) != 16 {
		t.Errorf("emitter bypass: note %q, rating %v V", ce.Note, ce.MinVoltage)
	}
	// The positive-ground mirror puts the electrolytic's + on ground.
	pnp := strings.Replace(strings.Replace(src, `"npn"`, `"pnp"`, 1), `supply = "9V"`, `supply = "-9V"`, 1)
	chp, _ := chains.Parse("pnp.toml", pnp)
	bp, err := PartsList(chp, false)
	if err != nil {
		t.Fatal(err)
	}
	if n := bomLine(t, bp, "ce.CE").Note; !strings.Contains(n, "+ to gnd") {
		t.Errorf("PNP emitter bypass: %q", n)
	}
	// CSV: a header and one record per part, as RFC 4180 readers see it.
	var buf bytes.Buffer
	if err := b.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != len(b.Lines)+1 || strings.Join(recs[0], ",") != strings.Join(CSVHeader, ",") || recs[1][0] != b.Lines[0].Ref {
		t.Errorf("CSV: %d records, header %v", len(recs), recs[0])
	}
	// The order groups parts; every part is counted once.
	total := 0
	for _, o := range b.Order {
		total += o.Count
	}
	if total != len(b.Lines) {
		t.Errorf("order counts %d parts of %d", total, len(b.Lines))
	}
}

// Capacitor voltage ratings by supply: the smallest standard rating at or
// above 1.5 × the supply magnitude (common practice: 16 V on a 9 V rail).
func TestCapacitorRatings(t *testing.T) {
	for _, c := range []struct {
		supply string
		want   float64
	}{{"9V", 16}, {"-9V", 16}, {"12V", 25}, {"18V", 35}, {"24V", 50}, {"5V", 10}} {
		ch := testchains.CE{Vcc: c.supply, R1: "47k", R2: "10k", RC: "4k7", RE: "1k", Kind: "npn", Beta: 100}
		if c.supply[0] == '-' {
			ch.Kind = "pnp"
		}
		b, err := PartsList(ch.Parse(t), false)
		if err != nil {
			t.Fatal(err)
		}
		if got := float64(bomLine(t, b, "ce.C2").MinVoltage); got != c.want {
			t.Errorf("%s supply: capacitor rating %g V, want %g V", c.supply, got, c.want)
		}
	}
}

// The chain's environment (pickup, amplifier input) is left out unless
// asked for.
func TestPartsEnvironment(t *testing.T) {
	ch, err := chains.Load("../chains/demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	for _, all := range []bool{false, true} {
		b, err := PartsList(ch, all)
		if err != nil {
			t.Fatal(err)
		}
		env := 0
		for _, l := range b.Lines {
			if strings.HasPrefix(l.Ref, "pickup.") || strings.HasPrefix(l.Ref, "amp.") {
				env++
			}
		}
		if (env > 0) != all {
			t.Errorf("allStages %v: %d environment parts", all, env)
		}
	}
}

// A capacitor written polarized keeps the written way round in the parts
// list, and one written in backwards (+ on the emitter of a PNP stage on
// −9 V, which idles below ground) says where + should go; a written
// rating is shown, with the common-practice minimum (1.5 × the supply,
// 16 V on 9 V) when it falls short.
func TestPartsWrittenElectrolytic(t *testing.T) {
	base := testchains.CE{Vcc: "-9V", R1: "47k", R2: "10k", RC: "4k7", RE: "1k", Kind: "pnp", Beta: 100}.TOML()
	for _, c := range []struct {
		pins, rating, note, ratingText string
	}{
		{`{ plus = "gnd", minus = "e" }`, "", "+ to gnd as written", "≥ 16 V"},
		{`{ plus = "e", minus = "gnd" }`, `rating = "6V3", `, "written + to ce.e, but that lead idles", "6.3 V as written; needs ≥ 16 V"},
		{`{ plus = "gnd", minus = "e" }`, `rating = "25V", `, "+ to gnd as written", "25 V as written"},
	} {
		src := strings.Replace(base, `{ ref = "CE", kind = "capacitor", value = "100u", pins = ["e", "gnd"] }`,
			`{ ref = "CE", kind = "capacitor", value = "100u", `+c.rating+`pins = `+c.pins+` }`, 1)
		if src == base {
			t.Fatal("the test stage's emitter bypass was not found")
		}
		ch, err := chains.Parse("ce.toml", src)
		if err != nil {
			t.Fatal(err)
		}
		b, err := PartsList(ch, false)
		if err != nil {
			t.Fatal(err)
		}
		l := bomLine(t, b, "ce.CE")
		if !strings.Contains(l.Note, c.note) || l.Rating != c.ratingText {
			t.Errorf("%s %s: note %q, rating %q; want %q, %q", c.pins, c.rating, l.Note, l.Rating, c.note, c.ratingText)
		}
	}
}

// The supply network is built like any stage, so its filter resistor,
// filter capacitor and protection diode are on the parts list and vary in
// a spread; the cell's own resistance (a resistor on emf) models the
// battery and is neither ordered nor given a tolerance. The filter
// resistor's idle power is Joule's law from its idle voltage.
func TestPartsAndSpreadCoverTheSupplyNetwork(t *testing.T) {
	ch, err := chains.Parse("p.toml", `name = "powered"
supply = "9V"
[power]
template = "supply-rc-diode"
[[stage]]
id = "a"
parts = [
  { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "out"] },
  { ref = "RL", kind = "resistor", value = "1k", pins = ["v+", "gnd"] },
]
`)
	if err != nil {
		t.Fatal(err)
	}
	b, err := PartsList(ch, false)
	if err != nil {
		t.Fatal(err)
	}
	refs := map[string]bool{}
	for _, l := range b.Lines {
		refs[l.Ref] = true
	}
	for ref, want := range map[string]bool{"power.RF": true, "power.CF": true, "power.D1": true, "power.RBAT": false, "a.RL": true} {
		if refs[ref] != want {
			t.Errorf("%s on the parts list: %v, want %v", ref, refs[ref], want)
		}
	}
	op, err := bias.Solve(ch)
	if err != nil {
		t.Fatal(err)
	}
	vp, _ := op.Voltage("v+")
	vprot, _ := op.Voltage("power.prot")
	rf := bomLine(t, b, "power.RF")
	if want := (vprot - vp) * (vprot - vp) / 100; math.Abs(float64(rf.IdlePower)/want-1) > 1e-9 {
		t.Errorf("power.RF idle %g W, V²/R %g W", float64(rf.IdlePower), want)
	}
	opt := SpreadOptions{}
	if err := opt.resolve(); err != nil {
		t.Fatal(err)
	}
	var drawn []string
	for _, v := range plan(ch, &opt) {
		drawn = append(drawn, v.name())
	}
	if got := strings.Join(drawn, " "); !strings.Contains(got, "power.RF") || !strings.Contains(got, "power.CF") || strings.Contains(got, "RBAT") {
		t.Errorf("spread draws %s; want power.RF and power.CF, not the cell's resistance", got)
	}
}
