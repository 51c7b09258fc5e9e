package chains

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"renderchain/models"
)

// Severity ranks a finding of the lint.
type Severity int

// Severities, mildest first.
const (
	// Note is a choice the tool made that the user should know about (a
	// node reached only through capacitors given a leak to ground).
	Note Severity = iota + 1
	// Warning is something that is probably wrong; the run goes on and
	// every report carries it.
	Warning
	// Fault cannot be meant: Flatten refuses the chain with it.
	Fault
)

func (s Severity) String() string {
	switch s {
	case Note:
		return "note"
	case Warning:
		return "warning"
	case Fault:
		return "error"
	}
	return "finding"
}

// Finding is one thing the lint found: where (the file, the line, the
// stage or table and part), what, and how bad. Its text is that of an
// *Error: "amp.toml:14: stage amp: part RC: …".
type Finding struct {
	File     string
	Line     int
	Where    string
	Msg      string
	Severity Severity
}

// Err returns the finding as the *Error Flatten returns for a Fault.
func (f Finding) Err() *Error { return &Error{File: f.File, Line: f.Line, Where: f.Where, Msg: f.Msg} }

func (f Finding) String() string { return f.Err().Error() }

// Findings are the lint's findings in the order found.
type Findings []Finding

// Err returns the first Fault as an *Error, or nil.
func (fs Findings) Err() error {
	for _, f := range fs {
		if f.Severity == Fault {
			return f.Err()
		}
	}
	return nil
}

// Warnings returns the text of every Warning, one line each, for a
// report's warnings list.
func (fs Findings) Warnings() []string { return fs.texts(Warning) }

// Notes returns the text of every Note, one line each.
func (fs Findings) Notes() []string { return fs.texts(Note) }

func (fs Findings) texts(s Severity) []string {
	out := []string{}
	for _, f := range fs {
		if f.Severity == s {
			out = append(out, f.String())
		}
	}
	return out
}

// ShortResistance is the resistance below which a resistor straight across
// the supply (from v+, or a node of the supply network, to gnd) is taken
// for a short and refused: this project's own bound, far below any load a
// pedal puts on its rail (a 9 V rail into 1 Ω is 9 A).
const ShortResistance = 1.0

// railSynonyms are names builders often give the supply rail and ground;
// in a chain file the rail is "v+" and ground "gnd" (common practice of
// schematic labels).
var railSynonyms = map[string]string{
	"vcc": "v+", "vdd": "v+", "vbat": "v+", "vsupply": "v+", "supply": "v+", "9v": "v+", "+9v": "v+",
	"-9v": "v+", "+9": "v+", "vplus": "v+", "vpos": "v+",
	"0": "gnd", "ground": "gnd", "earth": "gnd", "0v": "gnd",
}

// pinUse is one pin of a part as written in the chain file, with the node
// of the flat circuit it lands on.
type pinUse struct {
	st   *Stage
	part *Part
	role string // pin role ("1", "2" for two-terminal parts)
	name string // as written
	node string // flat node name (Wiring.Node)
}

// pinLabel names a pin for a message: "pin 2", "pin c".
func (u pinUse) pinLabel() string { return "pin " + u.role }

// pinUses lists every pin of every part, the supply network first, then
// the stages in order; a part's pins in its kind's order.
func (ch *Chain) pinUses(w *Wiring) []pinUse {
	var out []pinUse
	for _, st := range ch.PartStages() {
		for _, p := range st.Parts {
			for _, role := range pinRoles(p) {
				name := p.Pins[role]
				out = append(out, pinUse{st: st, part: p, role: role, name: name, node: w.Node(st.ID, name)})
			}
		}
	}
	return out
}

// pinRoles lists the pins a part has wired, in its kind's order.
func pinRoles(p *Part) []string {
	roles := p.Kind.Pins()
	if roles == nil {
		roles = []string{"1", "2"}
	}
	var out []string
	for _, r := range roles {
		if _, ok := p.Pins[r]; ok {
			out = append(out, r)
		}
	}
	var rest []string
	for r := range p.Pins {
		if !slices.Contains(out, r) {
			rest = append(rest, r)
		}
	}
	sort.Strings(rest)
	return append(out, rest...)
}

// PartStages is the supply network (if any) and the stages: everything a
// builder fits parts in.
func (ch *Chain) PartStages() []*Stage {
	if ch.Power == nil {
		return ch.Stages
	}
	return append([]*Stage{ch.Power}, ch.Stages...)
}

// StageOf returns the stage of the given id, the supply network for
// "power" when there is one, or nil.
func (ch *Chain) StageOf(id string) *Stage {
	if id == PowerID && ch.Power != nil {
		return ch.Power
	}
	return ch.Stage(id)
}

// CellResistance tells whether part p of stage st is the cell's own
// resistance: a resistor of the supply network on its emf end. It models
// the battery, not a part to fit, rate or order.
func (ch *Chain) CellResistance(st *Stage, p *Part) bool {
	return st == ch.Power && p.Kind == Resistor && (p.Pins["1"] == EMF || p.Pins["2"] == EMF)
}

// where names a stage for a message: "stage amp", or "power".
func (st *Stage) where() string {
	if st.index == powerBlock {
		return PowerID
	}
	return "stage " + st.ID
}

// partLine returns the line of the chain file where a part is written:
// its table in a parts list, its values override for a template part (or
// the template line), the input table for the implicit pickup stage.
func (ch *Chain) partLine(st *Stage, p *Part) int {
	if ch.loc == nil {
		return 0
	}
	if st.index == -1 {
		return ch.loc.findKey("input", "source")
	}
	if st.Template == "" {
		return ch.loc.find(st.index, "ref", quote(p.Ref))
	}
	if l := ch.loc.findAssign(st.index, p.Ref); l > 0 {
		return l
	}
	return ch.loc.find(st.index, "template")
}

// partFinding builds a finding about a part, on the line it is written.
func (ch *Chain) partFinding(sev Severity, st *Stage, p *Part, format string, a ...any) Finding {
	return Finding{File: ch.File, Line: ch.partLine(st, p), Where: st.where(),
		Msg: "part " + p.Ref + ": " + fmt.Sprintf(format, a...), Severity: sev}
}

// stageFinding builds a finding about a stage as a whole, on its header.
func (ch *Chain) stageFinding(sev Severity, st *Stage, format string, a ...any) Finding {
	line := 0
	if ch.loc != nil && st.index != -1 {
		line = ch.loc.header(st.index) + 1
	}
	return Finding{File: ch.File, Line: line, Where: st.where(), Msg: fmt.Sprintf(format, a...), Severity: sev}
}

// wiringLint checks the wiring as written, before anything is solved:
// names (dotted names, case and near misses of the shared names, rail
// synonyms), stages that take the signal but never name out, dangling
// nodes, the supply network's ends, a short across the supply and nets
// no part uses. Faults come first in the order they are found.
type wiringLint struct {
	ch    *Chain
	w     *Wiring
	uses  []pinUse
	parts map[string][]string // flat node → distinct parts on it ("STAGE.REF")
	fixed map[string]bool     // flat nodes an element of the chain itself touches
	out   Findings
}

func (ch *Chain) lintWiring(w *Wiring, uses []pinUse) Findings {
	l := &wiringLint{ch: ch, w: w, uses: uses, parts: map[string][]string{}, fixed: map[string]bool{}}
	for _, u := range uses {
		key := u.st.ID + "." + u.part.Ref
		if !slices.Contains(l.parts[u.node], key) {
			l.parts[u.node] = append(l.parts[u.node], key)
		}
	}
	l.fixed["in"] = true                            // the signal source
	l.fixed["v+"] = true                            // the supply, or the supply network's end
	l.fixed[w.Node(PowerID, EMF)] = ch.Power != nil // the ideal supply
	l.fixed[w.Out] = true                           // the chain's output: read there, loaded or not
	for _, e := range w.Stages {
		if e.Buffered {
			l.fixed[e.Feed], l.fixed[e.In] = true, true
		}
	}
	if ch.Power != nil {
		l.power()
	}
	for _, st := range ch.PartStages() {
		l.names(st)
		if st != ch.Power {
			l.signalEnds(st)
		}
		l.dangling(st)
		l.shorts(st)
	}
	l.nets()
	// Faults first, then the rest, each in the order found.
	sort.SliceStable(l.out, func(i, j int) bool { return l.out[i].Severity > l.out[j].Severity })
	return l.out
}

func (l *wiringLint) add(f Finding) { l.out = append(l.out, f) }

// stageUses are the pin uses of one stage.
func (l *wiringLint) stageUses(st *Stage) []pinUse {
	var out []pinUse
	for _, u := range l.uses {
		if u.st == st {
			out = append(out, u)
		}
	}
	return out
}

// written lists the distinct undotted local names a stage writes (not
// the shared names, not nets).
func (l *wiringLint) written(st *Stage) []string {
	var out []string
	for _, u := range l.stageUses(st) {
		if !l.shared(u.name) && !strings.Contains(u.name, ".") && !slices.Contains(out, u.name) {
			out = append(out, u.name)
		}
	}
	return out
}

// shared reports gnd, v+, in, out and the nets.
func (l *wiringLint) shared(name string) bool {
	return slices.Contains(sharedNames, name) || l.ch.isNet(name)
}

// names checks every written node name of a stage: dotted names must name
// a node of another stage, and no name may be a slip for a shared one.
func (l *wiringLint) names(st *Stage) {
	ch := l.ch
	sharedAll := append(append([]string(nil), sharedNames...), ch.Nets...)
	seen := map[string]bool{}
	for _, u := range l.stageUses(st) {
		if seen[u.name] || l.shared(u.name) {
			continue
		}
		seen[u.name] = true
		f := func(format string, a ...any) {
			l.add(ch.partFinding(Fault, st, u.part, "%s is on node %s: %s", u.pinLabel(), quote(u.name), fmt.Sprintf(format, a...)))
		}
		if other, name, dotted := strings.Cut(u.name, "."); dotted {
			if msg := l.dotted(st, other, name); msg != "" {
				f("%s", msg)
			}
			continue
		}
		if c := closest(u.name, sharedAll); c != "" && strings.EqualFold(c, u.name) {
			f("node names are case-sensitive, so this is a new node local to %s, not %s; write %s", st.where(), quote(c), quote(c))
			continue
		}
		if strings.Contains(u.name, "+") && editDistance(u.name, "v+") <= 1 {
			f("a new node local to %s; did you mean %s?", st.where(), quote("v+"))
			continue
		}
		if !slices.Contains(sharedNames, u.name) && len(u.name) >= 2 && editDistance(strings.ToLower(u.name), "gnd") == 1 {
			f("a new node local to %s; did you mean %s?", st.where(), quote("gnd"))
			continue
		}
		if syn, ok := railSynonyms[strings.ToLower(u.name)]; ok && !l.touchesRail(st, u.name) {
			what := "the supply rail"
			if syn == "gnd" {
				what = "ground"
			}
			f("a new node local to %s that nothing connects to the supply; %s is %s in a chain file", st.where(), what, quote(syn))
		}
	}
}

// touchesRail reports a local node that some part of its stage connects
// straight to v+, gnd or a net (a stage's own filtered rail, named "vcc"
// on purpose).
func (l *wiringLint) touchesRail(st *Stage, name string) bool {
	for _, p := range st.Parts {
		on, rail := false, false
		for _, n := range p.Pins {
			on = on || n == name
			rail = rail || n == "v+" || n == "gnd" || l.ch.isNet(n)
		}
		if on && rail {
			return true
		}
	}
	return false
}

// dotted checks a dotted node name OTHER.name written in stage st, and
// returns what is wrong with it, or "".
func (l *wiringLint) dotted(st *Stage, other, name string) string {
	ch := l.ch
	share := fmt.Sprintf("to share a node between stages declare it once, nets = [%s], and write %s in each", quote(name), quote(name))
	if strings.Contains(name, ".") {
		return "that names a node inside a part; pins reach the nodes of stages, not the inside of parts"
	}
	target := ch.StageOf(other)
	if target == nil {
		var ids []string
		for _, s := range ch.PartStages() {
			ids = append(ids, s.ID)
		}
		msg := fmt.Sprintf("there is no stage %s (stages: %s)", quote(other), strings.Join(ids, ", "))
		if c := closest(other, ids); c != "" {
			msg += "; did you mean " + quote(c+"."+name) + "?"
		}
		return msg + "; " + share
	}
	switch {
	case target == st:
		return "" // the stage's own node, written in full
	case name == "in" || name == "out":
		if target == ch.Power {
			return "the supply network has no in or out"
		}
		return ""
	case name == "gnd" || name == "v+":
		return fmt.Sprintf("%s is shared by every stage: write %s", quote(name), quote(name))
	case ch.isNet(name):
		return fmt.Sprintf("%s is a net, shared by every stage: write %s", quote(name), quote(name))
	case target == ch.Power && name == EMF:
		return ""
	}
	nodes := l.written(target)
	if slices.Contains(nodes, name) {
		return "" // another stage's own node: allowed, the name reports use
	}
	return fmt.Sprintf("%s has no node %s (its nodes: %s)%s; %s", target.where(), quote(name), listOr(nodes), didYouMean(name, nodes), share)
}

// signalEnds refuses a stage that takes the signal (names in) and holds
// a transistor, or a diode with no pin on in, but never names out: the
// wiring rule would pass its in through and the active parts would hang
// off the signal path unheard. A passive shunt (a load) and diodes
// straight across the signal (a shunt clipper) pass their in through as
// documented; any stage that never names out but has a node that looks
// like a slip for it is refused too.
func (l *wiringLint) signalEnds(st *Stage) {
	if st.usesPin("out") {
		return
	}
	local := l.written(st)
	slip := ""
	for _, n := range local {
		if editDistance(strings.ToLower(n), "out") <= 1 && n != "in" {
			slip = n
			break
		}
	}
	active := false
	for _, p := range st.Parts {
		switch {
		case p.Kind == Diode:
			active = active || (p.Pins["anode"] != "in" && p.Pins["cathode"] != "in")
		case p.Kind.Device():
			active = true
		}
	}
	if !(slip != "" || active && st.usesPin("in")) {
		return
	}
	why := "so the chain would pass its in straight through and the stage would not be heard"
	if slip != "" {
		for _, u := range l.stageUses(st) {
			if u.name == slip {
				l.add(l.ch.partFinding(Fault, st, u.part, "%s is on node %s: did you mean %s? No part of the stage names %s, %s",
					u.pinLabel(), quote(slip), quote("out"), quote("out"), why))
				return
			}
		}
	}
	l.add(l.ch.stageFinding(Fault, st, "no part names %s, %s; name its output node %s", quote("out"), why, quote("out")))
}

// dangling refuses a node only one part touches: a pin connected to
// nothing. Nodes the chain itself drives or reads (in, the supply, the
// chain's output, a buffer's ends) are not dangling.
func (l *wiringLint) dangling(st *Stage) {
	reported := map[string]bool{}
	for _, u := range l.stageUses(st) {
		if u.node == "gnd" || l.fixed[u.node] || len(l.parts[u.node]) != 1 || reported[u.node] {
			continue
		}
		reported[u.node] = true
		var cands []string
		for _, n := range append(append([]string(nil), sharedNames...), l.ch.Nets...) {
			if n != u.name {
				cands = append(cands, n)
			}
		}
		for _, n := range l.written(st) {
			if n != u.name && len(l.parts[l.w.Node(st.ID, n)]) > 1 {
				cands = append(cands, n)
			}
		}
		hint := ""
		if c := closest(u.name, cands); c != "" {
			hint = " (did you mean " + quote(c) + "?)"
		} else if syn, ok := railSynonyms[strings.ToLower(u.name)]; ok {
			hint = " (did you mean " + quote(syn) + "?)"
		}
		fix := "connect it or remove the part"
		if u.part.Kind == Pot && u.role == "cw" {
			fix = "connect it, or leave cw out for a two-terminal pot"
		}
		where := "which no other part touches"
		if l.ch.isNet(u.name) {
			where = "a net no other part touches"
		}
		l.add(l.ch.partFinding(Fault, st, u.part, "%s is on node %s, %s%s: %s", u.pinLabel(), quote(u.name), where, hint, fix))
	}
}

// shorts refuses a resistor below ShortResistance straight across the
// supply: from v+, emf or a node of the supply network to gnd.
func (l *wiringLint) shorts(st *Stage) {
	ch := l.ch
	rail := func(node string) bool {
		return node == "v+" || ch.Power != nil && strings.HasPrefix(node, PowerID+".")
	}
	for _, p := range st.Parts {
		if p.Kind != Resistor || !(p.Value < ShortResistance) {
			continue
		}
		a, b := l.w.Node(st.ID, p.Pins["1"]), l.w.Node(st.ID, p.Pins["2"])
		if !(rail(a) && b == "gnd" || rail(b) && a == "gnd") {
			continue
		}
		hint := ""
		if strings.HasSuffix(strings.TrimSpace(p.Text), "m") || strings.Contains(p.Text, "m") && !strings.Contains(p.Text, "M") {
			hint = fmt.Sprintf(" (%q is in milliohms: m is milli; write %q for megohms)", p.Text, strings.Replace(p.Text, "m", "M", 1))
		}
		railPin := p.Pins["1"]
		if b != "gnd" {
			railPin = p.Pins["2"]
		}
		l.add(ch.partFinding(Fault, st, p, "%s from %s to gnd is a short across the supply: it would draw %s from %s; check its pins and its value%s",
			models.FormatValue(p.Value, "Ω"), railPin, models.FormatValue(math.Abs(ch.Supply)/p.Value, "A"),
			models.FormatValue(ch.Supply, "V"), hint))
	}
}

// power checks the supply network's ends: it runs from emf to v+ and has
// no in or out.
func (l *wiringLint) power() {
	st := l.ch.Power
	for _, u := range l.stageUses(st) {
		if u.name == "in" || u.name == "out" {
			l.add(l.ch.partFinding(Fault, st, u.part, "%s is on %s: the supply network runs from %s (the ideal supply) to %s and has no in or out",
				u.pinLabel(), quote(u.name), quote(EMF), quote("v+")))
			return
		}
	}
	for _, end := range []string{EMF, "v+"} {
		if !st.usesPin(end) {
			l.add(l.ch.stageFinding(Fault, st, "no part names %s: the supply network runs from %s (the ideal supply) to %s, the rail the stages use",
				quote(end), quote(EMF), quote("v+")))
			return
		}
	}
}

// nets warns of a declared net no part uses, and refuses one when a
// written node looks like a slip for it.
func (l *wiringLint) nets() {
	ch := l.ch
	line := 0
	if ch.loc != nil {
		line = ch.loc.findKey("", "nets")
	}
	for _, n := range ch.Nets {
		if len(l.parts[n]) > 0 {
			continue
		}
		for _, u := range l.uses {
			if !strings.Contains(u.name, ".") && !l.shared(u.name) && closest(u.name, []string{n}) == n {
				l.add(ch.partFinding(Fault, u.st, u.part, "%s is on node %s: did you mean the net %s? No part names that net", u.pinLabel(), quote(u.name), quote(n)))
				return
			}
		}
		l.add(Finding{File: ch.File, Line: line, Where: "nets", Msg: fmt.Sprintf("net %s is declared but no part names it", quote(n)), Severity: Warning})
	}
}

// Bounds above which a value is legal but unlikely in a pedal, so that a
// unit left off ("10" for a capacitor is 10 F) is named rather than
// simulated (common practice: a pedal's largest capacitors are supply
// filters of a few thousand µF, its largest inductances pickup coils and
// the inductors of swept filters, a few henries to tens of henries).
const (
	LargeCapacitance = 0.1 // F
	LargeInductance  = 100 // H
)

// valueFindings warns about an input peak above models.LargeSignal and
// about a capacitor or inductor whose value is past the bounds above, with the value as written and, when it was a plain
// number, what it would be with the usual prefixes.
func (ch *Chain) valueFindings() Findings {
	var out Findings
	if ch.InputPeak > models.LargeSignal {
		line := 0
		if ch.loc != nil {
			line = ch.loc.findKey("input", "peak")
		}
		out = append(out, Finding{File: ch.File, Line: line, Where: "input.peak", Severity: Warning,
			Msg: fmt.Sprintf("%s at full scale is beyond any guitar (a pickup gives up to about 1 V peak, an active one a few volts): did you mean %s?",
				models.FormatValue(ch.InputPeak, "V"), models.FormatValue(ch.InputPeak/1000, "V"))})
	}
	for _, st := range ch.PartStages() {
		for _, p := range st.Parts {
			var what, unit, hint string
			switch {
			case p.Kind == Capacitor && p.Value >= LargeCapacitance:
				what, unit, hint = "farads", "F", "u"
			case p.Kind == Inductor && p.Value >= LargeInductance:
				what, unit, hint = "henries", "H", "m"
			default:
				continue
			}
			msg := fmt.Sprintf("value %q is %s, far beyond the parts of a pedal (plain numbers are %s)", p.Text, models.FormatValue(p.Value, unit), what)
			if _, err := strconv.ParseFloat(strings.TrimSpace(p.Text), 64); err == nil {
				msg += fmt.Sprintf(": did you mean %q", strings.TrimSpace(p.Text)+hint)
				if p.Kind == Capacitor {
					msg += fmt.Sprintf(" or %q", strings.TrimSpace(p.Text)+"n")
				}
				msg += "?"
			}
			out = append(out, ch.partFinding(Warning, st, p, "%s", msg))
		}
	}
	return out
}
