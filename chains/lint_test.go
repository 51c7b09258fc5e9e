package chains

import (
	"errors"
	"fmt"
	"math/rand"
	"strings"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// editDistance against worked examples: the classic kitten → sitting
// (3: two substitutions and an insertion; V. I. Levenshtein, 1966, the
// usual textbook example, from memory), a swap of neighbours as one edit
// (Damerau 1964), the restricted form's known difference from the
// unrestricted one ("ca" → "abc" is 3 here, 2 with unrestricted
// transpositions; from memory of the standard presentation), and runes
// counted as characters.
func TestEditDistance(t *testing.T) {
	cases := []struct {
		a, b string
		want int
	}{
		{"kitten", "sitting", 3}, {"gdn", "gnd", 1}, {"ca", "abc", 3}, {"", "abc", 3}, {"abc", "", 3},
		{"out", "out", 0}, {"ot", "out", 1}, {"µF", "uF", 1}, {"v+", "V+", 1}, {"flaw", "lawn", 2},
	}
	for _, c := range cases {
		if got := editDistance(c.a, c.b); got != c.want {
			t.Errorf("editDistance(%q, %q) = %d, want %d", c.a, c.b, got, c.want)
		}
		if got := editDistance(c.b, c.a); got != c.want {
			t.Errorf("editDistance(%q, %q) = %d, want %d (symmetry)", c.b, c.a, got, c.want)
		}
	}
	// Against the recursive definition of the restricted distance, on
	// seeded random words over a small alphabet (so swaps occur).
	var ref func(a, b []rune) int
	ref = func(a, b []rune) int {
		if len(a) == 0 || len(b) == 0 {
			return len(a) + len(b)
		}
		i, j := len(a), len(b)
		cost := 1
		if a[i-1] == b[j-1] {
			cost = 0
		}
		d := min(ref(a[:i-1], b)+1, ref(a, b[:j-1])+1, ref(a[:i-1], b[:j-1])+cost)
		if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] {
			d = min(d, ref(a[:i-2], b[:j-2])+1)
		}
		return d
	}
	rng := rand.New(rand.NewSource(10))
	word := func() string {
		r := make([]rune, rng.Intn(6))
		for i := range r {
			r[i] = rune('a' + rng.Intn(3))
		}
		return string(r)
	}
	for range 300 {
		a, b := word(), word()
		if got, want := editDistance(a, b), ref([]rune(a), []rune(b)); got != want {
			t.Fatalf("editDistance(%q, %q) = %d, recursive definition %d", a, b, got, want)
		}
	}
}

// closest takes case-only differences first, one edit for short names,
// two for longer ones, and never offers one letter for another.
func TestClosest(t *testing.T) {
	shared := []string{"gnd", "v+", "in", "out"}
	cases := []struct {
		written string
		cands   []string
		want    string
	}{
		{"V+", shared, "v+"}, {"OUT", shared, "out"}, {"ot", shared, "out"}, {"gdn", shared, "gnd"},
		{"cc", []string{"c", "b"}, "c"}, {"x", []string{"b", "c"}, ""}, {"c", []string{"b", "c1"}, "c1"},
		{"collectr", []string{"collector", "c"}, "collector"}, {"vcc", shared, ""}, {"out", shared, ""},
		{"templat", []string{"template", "parts"}, "template"}, {"vlaue", []string{"value"}, "value"},
	}
	for _, c := range cases {
		if got := closest(c.written, c.cands); got != c.want {
			t.Errorf("closest(%q, %v) = %q, want %q", c.written, c.cands, got, c.want)
		}
	}
}

const netsChain = `name = "nets"
nets = %s
[[stage]]
id = "a"
parts = [
  { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "out"] },
  { ref = "R2", kind = "resistor", value = "1k", pins = ["out", "gnd"] },
]
`

// A nets list that cannot be meant is refused at its line, saying why.
func TestNetsErrors(t *testing.T) {
	for list, want := range map[string]string{
		`"vf"`:         "want a list of node names",
		`["gnd"]`:      `"gnd" is shared by every stage already`,
		`["a.b"]`:      "a net name has no dot",
		`["vf", "vf"]`: `"vf" is declared twice`,
		`["emf"]`:      "the supply network's own node",
		`[""]`:         "is not a node name",
		`[3]`:          "3 is not a node name",
		`["v f"]`:      "a node name has no spaces",
	} {
		_, err := Parse("n.toml", strings.Replace(netsChain, "%s", list, 1))
		if err == nil || !strings.Contains(err.Error(), want) || !strings.HasPrefix(err.Error(), "n.toml:2: nets: ") {
			t.Errorf("nets = %s: %v, want n.toml:2 and %q", list, err, want)
		}
	}
}

const powerChain = `name = "power"
supply = "%s"
[power]
template = "supply-rc-diode"
[[stage]]
id = "a"
parts = [
  { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "out"] },
  { ref = "RL", kind = "resistor", value = "1k", pins = ["v+", "gnd"] },
]
`

// The [power] table: its template's diode is turned round on a negative
// supply so it still conducts from the cell towards the rail, --set
// reaches its parts as power.REF, a clone owns its own copy, and the rail
// at DC obeys Kirchhoff: V(v+) = I·RL with I the supply current, and
// EMF − V(v+) = I·(RBAT + RF) + the diode's drop.
func TestPowerNetwork(t *testing.T) {
	for _, supply := range []string{"9V", "-9V"} {
		ch, err := Parse("p.toml", strings.Replace(powerChain, "%s", supply, 1))
		if err != nil {
			t.Fatal(err)
		}
		d := ch.Power.part("D1")
		toward := "prot" // the cathode, on a positive supply
		if ch.Supply < 0 {
			toward = "bat"
		}
		if d.Pins["cathode"] != toward {
			t.Errorf("%s: diode pins %v", supply, d.Pins)
		}
		f, err := ch.Flatten()
		if err != nil {
			t.Fatal(err)
		}
		op, err := mna.SolveDC(f.Circuit, mna.DCOptions{})
		if err != nil {
			t.Fatal(err)
		}
		c := f.Circuit
		vplus := op.Node[c.Lookup("v+")]
		var i float64
		for k, e := range c.Elements {
			if e.Ref == "supply" {
				i = -op.Branch[k] // delivered from + into the circuit
			}
		}
		// 1e-9 relative: the DC solve converges to steps of 1e-10 V on
		// a rail of a few volts.
		if rel := (vplus - i*1e3) / vplus; rel > 1e-9 || rel < -1e-9 {
			t.Errorf("%s: V(v+) %.9g V, I·RL %.9g V", supply, vplus, i*1e3)
		}
		drop := op.Node[c.Lookup("power.bat")] - op.Node[c.Lookup("power.prot")]
		if drop*ch.Supply <= 0 || abs(drop) < 0.4 || abs(drop) > 0.8 {
			t.Errorf("%s: diode drop %.3f V, want a silicon diode's 0.4–0.8 V forward, common practice", supply, drop)
		}
		if got, want := ch.Supply-vplus, i*(3+100)+drop; abs(got-want) > 1e-9 {
			t.Errorf("%s: EMF − V(v+) = %.9g V, I·(RBAT + RF) + diode %.9g V", supply, got, want)
		}
		if len(f.Findings) != 0 {
			t.Errorf("%s: findings %v", supply, f.Findings)
		}
	}
	ch, _ := Parse("p.toml", strings.Replace(powerChain, "%s", "9V", 1))
	cl := ch.Clone()
	if err := cl.Set("power.RBAT=15"); err != nil {
		t.Fatal(err)
	}
	if cl.Power.part("RBAT").Value != 15 || ch.Power.part("RBAT").Value != 3 {
		t.Errorf("power.RBAT: clone %g Ω, original %g Ω", cl.Power.part("RBAT").Value, ch.Power.part("RBAT").Value)
	}
	if err := ch.Set("powr.RBAT=15"); err == nil || !strings.Contains(err.Error(), `did you mean "power"?`) {
		t.Errorf("powr.RBAT: %v", err)
	}
	if err := ch.Set("suply=8V"); err == nil || !strings.Contains(err.Error(), `did you mean "supply"?`) {
		t.Errorf("suply: %v", err)
	}
	// A stage may not take the id the [power] table uses, and a stage
	// template does not go in [power].
	pos := strings.Replace(powerChain, "%s", "9V", 1)
	_, err := Parse("p.toml", strings.Replace(pos, `id = "a"`, `id = "power"`, 1))
	if err == nil || !strings.Contains(err.Error(), `id "power" is taken by the [power] table`) {
		t.Errorf("stage id power: %v", err)
	}
	_, err = Parse("p.toml", strings.Replace(pos, `"supply-rc-diode"`, `"volume"`, 1))
	if err == nil || !strings.Contains(err.Error(), "p.toml:4: power: template volume is a stage, not a supply network") {
		t.Errorf("stage template in power: %v", err)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// The findings' API: faults come back from Flatten as an *Error (one
// line, wrapping ErrChain, or the models error it places), notes and
// warnings stay on the Flat.
func TestFindingsAPI(t *testing.T) {
	src := `name = "f"
[[stage]]
id = "a"
parts = [
  { ref = "C1", kind = "capacitor", value = "100n", pins = ["in", "x"] },
  { ref = "C2", kind = "capacitor", value = "100n", pins = ["x", "out"] },
  { ref = "R1", kind = "resistor", value = "1k", pins = ["out", "gnd"] },
]
`
	ch, err := Parse("f.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	f, err := ch.Flatten()
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Findings) != 1 || f.Findings[0].Severity != Note || len(f.Findings.Notes()) != 1 || len(f.Findings.Warnings()) != 0 {
		t.Fatalf("findings %v", f.Findings)
	}
	if got := f.Findings.Notes()[0]; !strings.HasPrefix(got, "f.toml:5: stage a: node a.x is reached only through capacitors (C1, C2)") {
		t.Errorf("note %q", got)
	}
	leak := f.Circuit.Element("leak.a.x")
	if leak == nil || leak.Value != models.LeakResistance {
		t.Errorf("no %g Ω leak on a.x: %+v", models.LeakResistance, leak)
	}
	if f.Findings.Err() != nil {
		t.Errorf("Err() = %v with no fault", f.Findings.Err())
	}
	// A lint fault wraps ErrChain; a placed models error wraps the
	// *models.CircuitError.
	bad, _ := Parse("f.toml", strings.Replace(src, `["x", "out"]`, `["x", "X"]`, 1))
	_, err = bad.Flatten()
	var ce *Error
	if !errors.As(err, &ce) || !errors.Is(err, ErrChain) || ce.Line != 6 || strings.Contains(err.Error(), "\n") {
		t.Errorf("dangling: %v", err)
	}
	loop, err := Parse("f.toml", strings.Replace(src, "\n]\n", "\n"+`  { ref = "L1", kind = "inductor", value = "1m", pins = ["v+", "gnd"] },`+"\n]\n", 1))
	if err != nil {
		t.Fatal(err)
	}
	_, err = loop.Flatten()
	var me *models.CircuitError
	if !errors.As(err, &me) || !strings.HasPrefix(err.Error(), "f.toml:8: stage a: part L1: inductor closes a loop") {
		t.Errorf("placed models error: %v", err)
	}
	if (Finding{Severity: Warning}).Severity.String() != "warning" || Fault.String() != "error" || Note.String() != "note" {
		t.Error("severity names")
	}
}

// stageAt writes a one-transistor common-emitter stage: the emitter
// resistor to the rail and the collector load to ground when
// emitterToRail, else the other way round, with the base divider set for
// that orientation.
func stageAt(supply, kind string, emitterToRail bool) string {
	rb1, rb2, re, rc := `"v+", "b"`, `"b", "gnd"`, `"e", "gnd"`, `"v+", "c"`
	upper, lower := "470k", "68k"
	if emitterToRail {
		upper, lower = lower, upper
		re, rc = `"v+", "e"`, `"c", "gnd"`
	}
	return fmt.Sprintf(`name = "one transistor"
supply = %q
[[stage]]
id = "a"
parts = [
  { ref = "CIN", kind = "capacitor", value = "100n", pins = ["in", "b"] },
  { ref = "RB1", kind = "resistor", value = %q, pins = [%s] },
  { ref = "RB2", kind = "resistor", value = %q, pins = [%s] },
  { ref = "RE",  kind = "resistor", value = "1k",  pins = [%s] },
  { ref = "RC",  kind = "resistor", value = "10k", pins = [%s] },
  { ref = "Q1",  kind = %q, model = "si-%s", pins = { c = "c", b = "b", e = "e" } },
  { ref = "COUT", kind = "capacitor", value = "100n", pins = ["c", "out"] },
]
`, supply, upper, rb1, lower, rb2, re, rc, kind, kind)
}

// The polarity warning is for a transistor that disagrees with the
// supply's sign and does not work: a PNP stage with its emitter towards
// the rail of a positive supply (a complementary stage) and its mirror
// image, an NPN so on a negative supply, work and are not flagged; an
// NPN common-emitter stage drawn for negative ground on a negative supply
// works in reverse, and the warning names the sign.
func TestPolarityLeavesWorkingStagesAlone(t *testing.T) {
	cases := []struct {
		supply, kind  string
		emitterToRail bool
		want          string
	}{
		{"9V", "pnp", true, ""},
		{"-9V", "npn", true, ""},
		{"9V", "npn", false, ""},
		{"-9V", "npn", false, "this build has a positive-ground supply (-9 V) but Q1 is NPN and"},
		{"9V", "pnp", false, "this build has a negative-ground supply (9 V) but Q1 is PNP and"},
	}
	for _, c := range cases {
		got := opFindings(t, stageAt(c.supply, c.kind, c.emitterToRail))
		if c.want == "" && len(got) != 0 || c.want != "" && (len(got) != 1 || !strings.Contains(got[0].Msg, c.want)) {
			t.Errorf("%s on %s (emitter to the rail: %v): %v, want %q", c.kind, c.supply, c.emitterToRail, got, c.want)
		}
	}
}

// opFindings parses and flattens a chain, solves its operating point and
// returns the operating-point findings.
func opFindings(t *testing.T, src string) Findings {
	t.Helper()
	return opFindingsEdited(t, src, nil)
}

// opFindingsEdited is opFindings with edit (nil for none) applied to the
// parsed chain before it is flattened.
func opFindingsEdited(t *testing.T, src string, edit func(*Chain)) Findings {
	t.Helper()
	ch, err := Parse("p.toml", src)
	if err != nil {
		t.Fatal(err)
	}
	if edit != nil {
		edit(ch)
	}
	f, err := ch.Flatten()
	if err != nil {
		t.Fatal(err)
	}
	op, err := mna.SolveDC(f.Circuit, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	got := f.CheckOperatingPoint(op)
	if len(f.Findings) < len(got) {
		t.Errorf("CheckOperatingPoint did not keep its findings on the Flat")
	}
	return got
}

// FuzzLint: whatever the text, Parse and Flatten (the lint) return a circuit or a
// one-line error; they never panic.
func FuzzLint(f *testing.F) {
	for _, s := range []string{powerChain, netsChain, `name = "x"
nets = ["vf"]
[[stage]]
id = "a"
parts = [
  { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "vf"] },
  { ref = "R2", kind = "resistor", value = "1k", pins = ["vf", "a.out"] },
  { ref = "C1", kind = "capacitor", value = "1n", pins = ["b.x", "gnd"] },
]
[[stage]]
id = "b"
parts = [{ ref = "R1", kind = "resistor", value = "1m", pins = ["v+", "gnd"] }]
`} {
		f.Add(strings.Replace(s, "%s", "9V", 1))
	}
	f.Fuzz(func(t *testing.T, src string) {
		ch, err := Parse("f.toml", src)
		if err == nil {
			_, err = ch.Flatten()
		}
		if err != nil && strings.Contains(err.Error(), "\n") {
			t.Errorf("two-line error %q", err)
		}
	})
}

// electrolyticStage is a divider-biased common-emitter stage on supply
// with an emitter bypass electrolytic and an output coupling one, their
// pins as given (TOML tables), and the coupling one's rating ("" for
// none).
func electrolyticStage(supply, kind, bypass, coupling, rating string) string {
	r := ""
	if rating != "" {
		r = fmt.Sprintf("rating = %q, ", rating)
	}
	rc, rb := `"v+", "c"`, `"v+", "b"`
	return fmt.Sprintf(`name = "electrolytics"
supply = %q
[[stage]]
id = "a"
parts = [
  { ref = "CIN", kind = "capacitor", value = "100n", pins = ["in", "b"] },
  { ref = "RB1", kind = "resistor", value = "100k", pins = [%s] },
  { ref = "RB2", kind = "resistor", value = "22k", pins = ["b", "gnd"] },
  { ref = "RE",  kind = "resistor", value = "1k",  pins = ["e", "gnd"] },
  { ref = "CE",  kind = "capacitor", value = "47u", pins = %s },
  { ref = "RC",  kind = "resistor", value = "2k2", pins = [%s] },
  { ref = "Q1",  kind = %q, model = "si-%s", pins = { c = "c", b = "b", e = "e" } },
  { ref = "COUT", kind = "capacitor", value = "10u", %spins = %s },
  { ref = "RL",  kind = "resistor", value = "100k", pins = ["out", "gnd"] },
]
`, supply, rb, bypass, rc, kind, kind, r, coupling)
}

// Electrolytics against the rule of the trade (common practice): the +
// lead goes to the node that idles more positive, so on a negative-ground
// NPN stage the bypass has + on the emitter and the coupling capacitor +
// on the collector, and on the positive-ground mirror image (a PNP on
// −9 V) both turn round. Each reversed one is named with the voltage
// across it, on its own line of the file; a rating under the idle voltage
// is named too; an unpolarized capacitor and a correctly fitted one are
// left alone.
func TestElectrolyticPolarityAndRating(t *testing.T) {
	const (
		eUp   = `{ plus = "e", minus = "gnd" }`
		eDown = `{ plus = "gnd", minus = "e" }`
		cUp   = `{ plus = "c", minus = "out" }`
		cDown = `{ plus = "out", minus = "c" }`
		plain = `["c", "out"]`
	)
	cases := []struct {
		name, supply, kind, bypass, coupling, rating string
		want                                         []string // part refs warned about, with a word of the message
	}{
		{"npn as drawn", "9V", "npn", eUp, cUp, "", nil},
		{"npn, unpolarized coupling", "9V", "npn", eUp, plain, "", nil},
		{"npn, bypass in backwards", "9V", "npn", eDown, cUp, "", []string{"CE: polarized"}},
		{"npn, coupling in backwards", "9V", "npn", eUp, cDown, "", []string{"COUT: polarized"}},
		{"pnp on -9 V with the npn's orientation", "-9V", "pnp", eUp, cUp, "", []string{"CE: polarized", "COUT: polarized"}},
		{"pnp on -9 V turned round", "-9V", "pnp", eDown, cDown, "", nil},
		{"npn, coupling rated 6V3", "9V", "npn", eUp, cUp, "6V3", []string{"COUT: ", "above its 6.3 V rating"}},
		{"npn, coupling rated 16V", "9V", "npn", eUp, cUp, "16V", nil},
	}
	for _, c := range cases {
		got := opFindings(t, electrolyticStage(c.supply, c.kind, c.bypass, c.coupling, c.rating))
		var msgs []string
		for _, f := range got {
			msgs = append(msgs, f.String())
		}
		all := strings.Join(msgs, "\n")
		switch {
		case c.want == nil && len(got) != 0:
			t.Errorf("%s: %q, want no findings", c.name, msgs)
		case c.want != nil && c.name == "npn, coupling rated 6V3":
			if len(got) != 1 || !strings.Contains(all, c.want[0]) || !strings.Contains(all, c.want[1]) {
				t.Errorf("%s: %q, want one finding with %q", c.name, msgs, c.want)
			}
		case c.want != nil:
			if len(got) != len(c.want) {
				t.Errorf("%s: %q, want %d findings", c.name, msgs, len(c.want))
			}
			for _, w := range c.want {
				if !strings.Contains(all, "part "+w) {
					t.Errorf("%s: %q, want one about %q", c.name, msgs, w)
				}
			}
		}
		for _, f := range got {
			if f.Line == 0 {
				t.Errorf("%s: %q has no line", c.name, f.String())
			}
		}
	}
}

// A chain with a transistor and no supply runs on the documented default
// and says so in a note; written out, or on a chain of passive parts
// only, it says nothing.
func TestAssumedSupplyNote(t *testing.T) {
	withSupply := stageAt("9V", "npn", false)
	without := strings.Replace(withSupply, "supply = \"9V\"\n", "", 1)
	if without == withSupply {
		t.Fatal("the supply line was not removed")
	}
	passive := `name = "passive"
[[stage]]
id = "a"
parts = [ { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "out"] } ]
`
	for _, c := range []struct {
		name, src string
		want      bool
	}{{"transistor, no supply", without, true}, {"transistor, supply written", withSupply, false}, {"passive, no supply", passive, false}} {
		ch, err := Parse("s.toml", c.src)
		if err != nil {
			t.Fatal(err)
		}
		f, err := ch.Flatten()
		if err != nil {
			t.Fatal(err)
		}
		got := strings.Contains(strings.Join(f.Findings.Notes(), "\n"), "no supply")
		if got != c.want || ch.Supply != 9 {
			t.Errorf("%s: notes %q, supply %g V; want a note %v and 9 V", c.name, f.Findings.Notes(), ch.Supply, c.want)
		}
	}
	// A file that gave no supply has no polarity to keep: a supply set
	// later takes either sign, and the note goes.
	ch, err := Parse("s.toml", without)
	if err != nil {
		t.Fatal(err)
	}
	if err := ch.Set("supply=-9V"); err != nil || ch.Supply != -9 || ch.SupplyAssumed {
		t.Errorf("supply=-9V on a file without supply: %v, %g V, assumed %v", err, ch.Supply, ch.SupplyAssumed)
	}
	if err := ch.Set("supply=8V"); err != nil || ch.Supply != -8 {
		t.Errorf("supply=8V after -9V: %v, %g V; want −8 V (the polarity now set)", err, ch.Supply)
	}
}

// A supply network that passes less than half the supply to v+ is named
// with its part that drops the most (by Kirchhoff, the series part with
// the largest voltage across it): the series protection diode turned the
// wrong way round for the polarity (it blocks: v+ at ground), and a cell
// resistance of 10 kΩ into a 1 kΩ load (the divider leaves about a tenth
// of the supply). The template as written says nothing.
func TestRailNotReached(t *testing.T) {
	for _, c := range []struct {
		name, supply string
		edit         func(*Chain)
		want         []string // "" for no warning
	}{
		{"as written", "9V", nil, nil},
		{"as written, negative", "-9V", nil, nil},
		{"diode reversed", "9V", func(ch *Chain) {
			d := ch.Power.part("D1")
			d.Pins["anode"], d.Pins["cathode"] = d.Pins["cathode"], d.Pins["anode"]
		}, []string{"part D1:", "reverse-biased", "swap its anode and cathode"}},
		{"diode reversed, negative", "-9V", func(ch *Chain) {
			d := ch.Power.part("D1")
			d.Pins["anode"], d.Pins["cathode"] = d.Pins["cathode"], d.Pins["anode"]
		}, []string{"part D1:", "swap its anode and cathode"}},
		{"cell of 10 kΩ", "9V", func(ch *Chain) { ch.Power.part("RBAT").Value = 10e3 }, []string{"part RBAT:", "passes almost none"}},
	} {
		var rail []string
		for _, fd := range opFindingsEdited(t, strings.Replace(powerChain, "%s", c.supply, 1), c.edit) {
			if strings.Contains(fd.Msg, "v+ idles at") {
				rail = append(rail, fd.String())
			}
		}
		if c.want == nil {
			if len(rail) != 0 {
				t.Errorf("%s: %q, want no rail warning", c.name, rail)
			}
			continue
		}
		if len(rail) != 1 {
			t.Errorf("%s: %q, want one rail warning", c.name, rail)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(rail[0], w) {
				t.Errorf("%s: %q, want %q in it", c.name, rail[0], w)
			}
		}
	}
}

// A capacitor or inductor far beyond a pedal's parts is named, with the
// prefixed reading when it was written as a plain number (plain numbers
// are SI units: "10" is 10 F); the largest parts of real builds (a
// 4700 µF supply filter, a 10 H pickup coil; common practice) are not.
func TestImplausibleValues(t *testing.T) {
	for _, c := range []struct {
		kind, value, want string
	}{
		{"capacitor", "10", `value "10" is 10 F, far beyond the parts of a pedal (plain numbers are farads): did you mean "10u" or "10n"?`},
		{"capacitor", "0.22", `did you mean "0.22u" or "0.22n"?`},
		{"capacitor", "220mF", `value "220mF" is 220 mF, far beyond the parts of a pedal (plain numbers are farads)`},
		{"capacitor", "4700u", ""},
		{"capacitor", "10u", ""},
		{"inductor", "500", `did you mean "500m"?`},
		{"inductor", "10", ""},
	} {
		src := fmt.Sprintf(`name = "values"
[[stage]]
id = "a"
parts = [
  { ref = "X1", kind = %q, value = %q, pins = ["in", "out"] },
  { ref = "R1", kind = "resistor", value = "10k", pins = ["out", "gnd"] },
]
`, c.kind, c.value)
		ch, err := Parse("v.toml", src)
		if err != nil {
			t.Fatal(err)
		}
		f, err := ch.Flatten()
		if err != nil {
			t.Fatal(err)
		}
		got := strings.Join(f.Findings.Warnings(), "\n")
		if c.want == "" && got != "" || c.want != "" && (!strings.Contains(got, c.want) || !strings.HasPrefix(got, "v.toml:5: stage a: part X1: ")) {
			t.Errorf("%s %s: %q, want %q", c.kind, c.value, got, c.want)
		}
	}
}

// An input peak beyond models.LargeSignal (5 V, past any pickup: common
// practice) is named on its line with the millivolt reading; 2 V (an
// active pickup's hard strum) is not.
func TestLargeInputPeak(t *testing.T) {
	for _, c := range []struct{ peak, want string }{{"2V", ""}, {"30", "v.toml:4: input.peak: 30 V at full scale is beyond any guitar"}} {
		src := fmt.Sprintf(`name = "peak"

[input]
peak = %q
[[stage]]
id = "a"
parts = [ { ref = "R1", kind = "resistor", value = "1k", pins = ["in", "out"] } ]
`, c.peak)
		ch, err := Parse("v.toml", src)
		if err != nil {
			t.Fatal(err)
		}
		f, err := ch.Flatten()
		if err != nil {
			t.Fatal(err)
		}
		got := strings.Join(f.Findings.Warnings(), "\n")
		if c.want == "" && got != "" || c.want != "" && !strings.HasPrefix(got, c.want) {
			t.Errorf("peak %s: %q, want %q", c.peak, got, c.want)
		}
	}
}
