package chains

import (
	"fmt"
	"math"
	"strings"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// Bounds of the operating-point lint, each a figure of the trade.
const (
	// MaxIdleCurrent is the supply current at idle above which the lint
	// warns: a pedal draws a few milliamperes to a few tens of
	// milliamperes (common practice; a 9 V cell of about 500 mAh would
	// last under five hours at this bound).
	MaxIdleCurrent = 0.1
	// ConductionCurrent is the collector current, A, below which a
	// transistor counts as cut off for the polarity check: the same
	// 1 µA as the bias package's region rule.
	ConductionCurrent = 1e-6
	// ReverseBias is the reverse voltage, V, across a polarized
	// capacitor at idle above which the lint says it sits the wrong way
	// round. Aluminium electrolytics are commonly specified for no more
	// than about 1 V of reverse voltage, and that only for short times
	// (from memory of typical datasheets); a correctly fitted coupling or
	// bypass capacitor idles with its + lead at or above its − lead, so
	// half a volt the wrong way is a part in backwards, not a rounding.
	ReverseBias = 0.5
)

// Typical power ratings, W, of the parts a pedal is built from, for the
// dissipation warning (common practice, from memory of typical small-part
// ratings; the real part's datasheet rating wins).
var (
	// ResistorRating: the ¼ W film resistor of most pedal builds.
	ResistorRating = 0.25
	// PotRating: a small board-mount pot or trimmer, 0.1 W.
	PotRating = 0.1
)

// deviceRating is the typical rating of a device part by its preset: a
// small-signal silicon transistor in a small plastic package about 0.3 W,
// a germanium one in a small metal can about 0.1 W, a glass small-signal
// or zener diode 0.5 W, a germanium point-contact diode 0.05 W, an
// indicator LED 0.1 W (from memory of typical datasheet figures of each
// family, not any one part).
func deviceRating(p *Part) (float64, string) {
	switch {
	case p.Kind.Transistor() && strings.HasPrefix(p.Model, "ge-"):
		return 0.1, "a small germanium transistor"
	case p.Kind.Transistor():
		return 0.3, "a small-signal silicon transistor"
	case p.Model == "ge-signal":
		return 0.05, "a germanium point-contact diode"
	case strings.HasPrefix(p.Model, "led-"):
		return 0.1, "an indicator LED"
	case strings.HasPrefix(p.Model, "zener-"):
		return 0.5, "a small zener diode"
	}
	return 0.5, "a small-signal diode"
}

// CheckOperatingPoint lints what only the DC operating point shows and
// returns the findings, all warnings: the idle supply current above
// MaxIdleCurrent (naming the part that carries the most), a part
// dissipating beyond its typical rating, and a transistor whose polarity
// disagrees with the supply's sign and is, at idle, cut off or working in
// reverse ("this build has a positive-ground supply (−9 V) but Q1 is
// NPN …"). A transistor of the other polarity that works (a complementary
// stage) is not flagged. It also appends them to f.Findings.
//
// The one caller is engine.Prepare, right after the DC solve, so bias and
// every command that renders or measures see the same findings.
func (f *Flat) CheckOperatingPoint(op *mna.OperatingPoint) Findings {
	ch, c := f.Chain, f.Circuit
	var out Findings
	// Part power, with the parts' pieces (pot sections, a diode's series
	// resistance) summed into their part.
	type load struct {
		st    *Stage
		p     *Part
		watts float64
		amps  float64 // largest current through any piece
	}
	var loads []*load
	byRef := map[string]*load{}
	at := func(ref string) *load {
		st, p := ch.partOf(ref)
		if p == nil {
			return nil
		}
		key := st.ID + "." + p.Ref
		if l, ok := byRef[key]; ok {
			return l
		}
		l := &load{st: st, p: p}
		byRef[key] = l
		loads = append(loads, l)
		return l
	}
	for i, e := range c.Elements {
		if e.Kind != models.ResistorKind {
			continue
		}
		if l := at(e.Ref); l != nil {
			v := op.ElementVoltage(i)
			l.watts += v * v / e.Value
			l.amps = math.Max(l.amps, math.Abs(v)/e.Value)
		}
	}
	for _, d := range op.Devices {
		e := c.Elements[d.Element]
		l := at(e.Ref)
		if l == nil {
			continue
		}
		switch e.Kind {
		case models.BJTKind:
			l.watts += d.V[0]*d.I[0] + d.V[1]*d.I[1] // Vbe·Ib + Vce·Ic
			l.amps = math.Max(l.amps, math.Abs(d.I[1]))
			if fd, ok := f.polarity(l.st, l.p, d); ok {
				out = append(out, fd)
			}
		case models.DiodeKind:
			l.watts += d.V[0] * d.I[0] // the junction; its series resistance is summed above
			l.amps = math.Max(l.amps, math.Abs(d.I[0]))
		}
	}
	// The supply current.
	for i, e := range c.Elements {
		if e.Ref != "supply" || e.Kind != models.VoltageSourceKind {
			continue
		}
		amps := math.Abs(op.Branch[i])
		if amps <= MaxIdleCurrent {
			break
		}
		var top *load
		for _, l := range loads {
			if top == nil || l.amps > top.amps {
				top = l
			}
		}
		msg := fmt.Sprintf("the supply delivers %s at idle, above the %s bound for a pedal (which draws a few mA to a few tens of mA, common practice): look for a short or a wrong value between v+ and gnd",
			models.FormatValue(amps, "A"), models.FormatValue(MaxIdleCurrent, "A"))
		if top != nil {
			msg += fmt.Sprintf("; the most current, %s, flows through %s.%s", models.FormatValue(top.amps, "A"), top.st.ID, top.p.Ref)
		}
		line := 0
		if ch.loc != nil {
			line = ch.loc.findKey("", "supply")
		}
		out = append(out, Finding{File: ch.File, Line: line, Where: "supply", Msg: msg, Severity: Warning})
	}
	// Dissipation against typical ratings.
	for _, l := range loads {
		rating, what := 0.0, ""
		switch {
		case l.p.Kind == Resistor:
			if ch.CellResistance(l.st, l.p) {
				continue // the source's own resistance, not a part
			}
			rating, what = ResistorRating, "a common ¼ W resistor"
		case l.p.Kind == Pot:
			rating, what = PotRating, "a small pot or trimmer"
		case l.p.Kind.Device():
			rating, what = deviceRating(l.p)
		default:
			continue
		}
		if l.watts > rating {
			out = append(out, ch.partFinding(Warning, l.st, l.p, "dissipates %s at idle, above the %s rating of %s (common practice): it would run hot or fail; check its value and pins, or use a part rated for it",
				models.FormatValue(l.watts, "W"), models.FormatValue(rating, "W"), what))
		}
	}
	out = append(out, f.capacitorFindings(op)...)
	if fd, ok := f.railFinding(op); ok {
		out = append(out, fd)
	}
	f.Findings = append(f.Findings, out...)
	return out
}

// capacitorFindings warns about a polarized capacitor reversed at idle
// (more than ReverseBias across it the wrong way) and about any capacitor
// with a rating that has more than that across it at idle.
func (f *Flat) capacitorFindings(op *mna.OperatingPoint) Findings {
	ch, c := f.Chain, f.Circuit
	var out Findings
	for i, e := range c.Elements {
		if e.Kind != models.CapacitorKind {
			continue
		}
		st, p := ch.partOf(e.Ref)
		if p == nil || p.Kind != Capacitor {
			continue // a cable's capacitance, or one inside a part
		}
		v := op.ElementVoltage(i) // V(Pins["1"]) − V(Pins["2"]): + minus − when polarized
		if p.Polarized && v < -ReverseBias {
			out = append(out, ch.partFinding(Warning, st, p, "polarized, but its + lead (%s) idles %s below its − lead (%s): it is in backwards and an electrolytic fitted so leaks, heats and can vent; swap plus and minus (in a positive-ground build every electrolytic turns round)",
				p.Pins["1"], models.FormatValue(-v, "V"), p.Pins["2"]))
		}
		if r, ok := p.Params["rating"]; ok && math.Abs(v) > r {
			out = append(out, ch.partFinding(Warning, st, p, "%s across it at idle, above its %s rating: use a part rated for the supply",
				models.FormatValue(math.Abs(v), "V"), models.FormatValue(r, "V")))
		}
	}
	return out
}

// PolarityFault tells whether a transistor (npn, else pnp) with Vce and Ic
// at idle (signed as measured) disagrees with the supply's sign and does
// not work: cut off (|Ic| under ConductionCurrent) or in reverse. The
// operating-point check words it (with the two ways to fix it); package
// bias leaves its own cut-off and reverse lines out for such a transistor
// so that one fault reads once.
func PolarityFault(npn bool, supply, vce, ic float64) bool {
	if npn == (supply > 0) || supply == 0 {
		return false
	}
	s := 1.0
	if !npn {
		s = -1
	}
	return math.Abs(ic) < ConductionCurrent || s*vce < 0 || s*ic < 0
}

// polarity is the warning for a transistor whose polarity disagrees with
// the supply's sign and that does not work at idle.
func (f *Flat) polarity(st *Stage, p *Part, d mna.DeviceState) (Finding, bool) {
	ch := f.Chain
	npn := p.Kind == NPN
	vce, ic := d.V[1], d.I[1]
	if !PolarityFault(npn, ch.Supply, vce, ic) {
		return Finding{}, false
	}
	state := "works in reverse at idle (Vce " + models.FormatValue(vce, "V") + ": collector and emitter swapped in effect)"
	if math.Abs(ic) < ConductionCurrent {
		state = "is cut off at idle (Ic " + models.FormatValue(ic, "A") + ")"
	}
	ground, kind, other := "positive-ground", "NPN", "a pnp"
	if !npn {
		ground, kind, other = "negative-ground", "PNP", "an npn"
	}
	return ch.partFinding(Warning, st, p, "this build has a %s supply (%s) but %s is %s and %s: for a build of %ss write supply = \"%gV\", or make %s %s",
		ground, models.FormatValue(ch.Supply, "V"), p.Ref, kind, state, kind, -ch.Supply, p.Ref, other), true
}

// RailFraction is the share of the supply below which v+ counts as not
// reached through a [power] network at idle. A battery's internal
// resistance, a series filter resistor and a protection diode together
// drop a volt or two from 9 V at a pedal's few milliamperes (common
// practice); half the supply gone is a part that blocks it.
const RailFraction = 0.5

// railFinding is the warning for a [power] network that passes less than
// RailFraction of the supply to v+ at idle, naming the part of the
// network with the most voltage across it (not counting parts to ground)
// and, when that is a reverse-biased diode, that it is written the wrong
// way round for the supply's polarity.
func (f *Flat) railFinding(op *mna.OperatingPoint) (Finding, bool) {
	ch, c, w := f.Chain, f.Circuit, f.Wiring
	if ch.Power == nil || ch.Supply == 0 {
		return Finding{}, false
	}
	volts := func(pin string) float64 {
		if pin == "gnd" {
			return 0
		}
		if n := c.Lookup(w.Node(PowerID, pin)); n > 0 {
			return op.Node[n]
		}
		return 0
	}
	rail := volts("v+")
	if rail*ch.Supply > 0 && math.Abs(rail) >= RailFraction*math.Abs(ch.Supply) {
		return Finding{}, false
	}
	var worst *Part
	drop := 0.0
	for _, p := range ch.Power.Parts {
		a, b := p.Pins["1"], p.Pins["2"]
		if p.Kind == Diode {
			a, b = p.Pins["anode"], p.Pins["cathode"]
		}
		if a == "" || b == "" || a == "gnd" || b == "gnd" {
			continue
		}
		if d := volts(a) - volts(b); math.Abs(d) > math.Abs(drop) {
			worst, drop = p, d
		}
	}
	msg := fmt.Sprintf("v+ idles at %s of the %s supply: the supply network passes almost none of it",
		models.FormatValue(rail, "V"), models.FormatValue(ch.Supply, "V"))
	if worst == nil {
		return ch.stageFinding(Warning, ch.Power, "%s", msg), true
	}
	msg += fmt.Sprintf("; %s has %s across it", worst.Ref, models.FormatValue(math.Abs(drop), "V"))
	if worst.Kind == Diode && drop < 0 {
		msg += ", reverse-biased: a series protection diode written the wrong way round for this supply's polarity; swap its anode and cathode"
	}
	return ch.partFinding(Warning, ch.Power, worst, "%s", msg), true
}
