package chains

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/BurntSushi/toml"

	"renderchain/models"
)

// Chain is a parsed, checked chain file: what drives the chain, the stages
// in order and what loads the output. Values are in SI units.
type Chain struct {
	Name   string
	File   string  // the file name used in messages
	Supply float64 // volts on v+ relative to gnd (negative: positive ground)
	// SupplyAssumed tells that the file gave no supply and Supply is the
	// default, 9 V (negative ground).
	SupplyAssumed bool
	Temperature   float64 // kelvin
	Oversample    int     // 0: the caller's default
	InputPeak     float64 // source volts at digital full scale
	Source        string  // "ideal" or "pickup"
	Load          float64 // Ω from out to gnd; 0 for none
	FullScale     float64 // output volts written as 0 dBFS
	Stages        []*Stage
	// Nets are the node names shared by every stage besides gnd, v+, in
	// and out, declared once by the top-level nets list (see nets.go).
	Nets []string
	// Power is the supply network between the ideal supply and v+, from
	// the [power] table; nil for an ideal supply straight on v+.
	Power *Stage
	loc   *locator
}

// Stage is one stage of a chain, its parts resolved (template expanded and
// overrides applied).
type Stage struct {
	ID, Template, About string
	Buffer              bool
	// Environment marks a stage that models what the build plugs into
	// (the instrument's pickup, the amplifier's input) rather than the
	// build itself: declared by environment = true in its template or its
	// [[stage]] table. Parts lists and tolerance spreads leave such stages
	// out unless asked.
	Environment bool
	Knobs       map[string]float64 // rotation 0..1
	KnobAbout   map[string]string
	Parts       []*Part
	index       int // position among [[stage]] tables, −1 if implicit
}

// Part is one component of a stage.
type Part struct {
	Ref       string
	Kind      PartKind
	Value     float64 // Ω, F, H; a cable's length in metres
	Text      string  // the value as written
	Taper     models.Taper
	Knob      string
	Pins      map[string]string // pin role → node name ("1", "2" for two-terminal parts)
	Model     string
	Params    map[string]float64
	PerMetre  float64 // cable capacitance per metre
	Tolerance float64 // fraction; 0 = unspecified
	Adjusts   string  // a trimmer's transistor, for bias targets
	About     string
	// Windings are a transformer's windings (its pins are in them, and in
	// Pins as "w1.start", "w1.end", …).
	Windings []Winding
	// Positions are a switch's positions, Position the one selected
	// (0-based; Text holds its name).
	Positions []Position
	Position  int
	// Polarized marks a capacitor written with pins = { plus, minus }
	// (an electrolytic): Pins["1"] is its + lead, Pins["2"] its − lead.
	Polarized bool
}

var commonKeys = map[string]bool{"ref": true, "kind": true, "value": true, "pins": true, "tolerance": true,
	"taper": true, "knob": true, "per_metre": true, "model": true, "adjusts": true, "about": true,
	"windings": true, "positions": true}

type rawChain struct {
	Name        string     `toml:"name"`
	Supply      any        `toml:"supply"`
	Temperature any        `toml:"temperature"`
	Oversample  int        `toml:"oversample"`
	Input       rawInput   `toml:"input"`
	Output      rawOutput  `toml:"output"`
	Stages      []rawStage `toml:"stage"`
	Nets        any        `toml:"nets"`
	Power       *rawPower  `toml:"power"`
}

type rawInput struct {
	Peak   any    `toml:"peak"`
	Source string `toml:"source"`
}

type rawOutput struct {
	Load      any `toml:"load"`
	FullScale any `toml:"full_scale"`
}

type rawStage struct {
	ID       string           `toml:"id"`
	Template string           `toml:"template"`
	About    string           `toml:"about"`
	Buffer   bool             `toml:"buffer"`
	Env      bool             `toml:"environment"`
	Knobs    map[string]any   `toml:"knobs"`
	Values   map[string]any   `toml:"values"`
	Parts    []map[string]any `toml:"parts"`
}

// Load reads and checks a chain file.
func Load(path string) (*Chain, error) {
	src, err := ReadFile(path) // bounded: limits.go
	if err != nil {
		return nil, err
	}
	return Parse(filepath.Base(path), src)
}

func errText(err error) string {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}

// Parse reads a chain from TOML text; name is used in messages.
func Parse(name, src string) (*Chain, error) {
	if err := CheckText(name, src); err != nil { // before the parser sees it: limits.go
		return nil, err
	}
	var raw rawChain
	md, err := toml.Decode(src, &raw)
	if err != nil {
		var pe toml.ParseError
		if errors.As(err, &pe) {
			return nil, &Error{File: name, Line: pe.Position.Line, Msg: "TOML syntax: " + firstLine(pe.Message)}
		}
		return nil, &Error{File: name, Msg: "TOML: " + firstLine(err.Error())}
	}
	loc := newLocator(src)
	if und := undecoded(md); len(und) > 0 {
		return nil, unknownChainKey(name, loc, und[0])
	}
	ch := &Chain{Name: raw.Name, File: name, Oversample: raw.Oversample, loc: loc, Source: raw.Input.Source}
	top := func(table, key string, v any, q models.Quantity, r models.Range, def string) (float64, error) {
		if v == nil {
			v = def
		}
		x, err := valueOf(v, q)
		if err == nil && q == models.Voltage && r == models.SupplyRange {
			err = r.Check(math.Abs(x))
		} else if err == nil {
			err = r.Check(x)
		}
		if err != nil {
			where := key
			if table != "" {
				where = table + "." + key
			}
			return 0, &Error{File: name, Line: loc.findKey(table, key), Where: where, Msg: valueMessage(v, err), Err: err}
		}
		return x, nil
	}
	if ch.Supply, err = top("", "supply", raw.Supply, models.Voltage, models.SupplyRange, "9V"); err != nil {
		return nil, err
	}
	ch.SupplyAssumed = raw.Supply == nil
	if ch.Temperature, err = top("", "temperature", raw.Temperature, models.Temperature, models.TemperatureRange, "25C"); err != nil {
		return nil, err
	}
	if ch.InputPeak, err = top("input", "peak", raw.Input.Peak, models.Voltage, models.SignalRange, "300mV"); err != nil {
		return nil, err
	}
	if s, ok := raw.Output.Load.(string); ok && (s == "none" || s == "open") {
		ch.Load = 0
	} else if ch.Load, err = top("output", "load", raw.Output.Load, models.Resistance, models.LoadRange, "1M"); err != nil {
		return nil, err
	}
	if ch.FullScale, err = top("output", "full_scale", raw.Output.FullScale, models.Voltage, models.SignalRange, "1V"); err != nil {
		return nil, err
	}
	if err := models.OversampleRange.Check(float64(ch.Oversample)); ch.Oversample != 0 && err != nil {
		return nil, &Error{File: name, Line: loc.findKey("", "oversample"), Where: "oversample", Msg: err.Error(), Err: err}
	}
	switch ch.Source {
	case "":
		ch.Source = "ideal"
	case "ideal":
	case "pickup":
		st, err := expandTemplate("pickup", "pickup", nil, nil, nil)
		if err != nil {
			return nil, err
		}
		ch.Stages = append(ch.Stages, st)
	default:
		return nil, &Error{File: name, Line: loc.findKey("input", "source"), Where: "input.source",
			Msg: fmt.Sprintf("%q is not a source (ideal, pickup)", ch.Source)}
	}
	if len(raw.Stages) == 0 {
		return nil, &Error{File: name, Msg: "no [[stage]] tables: a chain needs at least one stage"}
	}
	if n := len(raw.Stages) + len(ch.Stages); n > MaxStages { // before expanding any template
		return nil, &LimitError{File: name, What: "number of stages", Value: int64(n), Limit: MaxStages, Unit: "stages"}
	}
	if err := ch.parseNets(raw.Nets); err != nil {
		return nil, err
	}
	if err := ch.parsePower(raw.Power); err != nil {
		return nil, err
	}
	seen := map[string]bool{}
	for k, rs := range raw.Stages {
		st, err := ch.parseStage(k, rs)
		if err != nil {
			return nil, err
		}
		if seen[st.ID] {
			return nil, &Error{File: name, Line: loc.find(k), Where: "stage " + st.ID, Msg: "duplicate stage id"}
		}
		if err := ch.checkStageTemplate(k, st); err != nil {
			return nil, err
		}
		seen[st.ID] = true
		ch.Stages = append(ch.Stages, st)
	}
	return ch, nil
}

// undecoded returns the keys the decoder did not place, less those inside
// free-form tables (parts, values, knobs) that are checked by hand.
func undecoded(md toml.MetaData) []toml.Key {
	var out []toml.Key
	for _, k := range md.Undecoded() {
		free := false
		for _, part := range k {
			free = free || part == "parts" || part == "values" || part == "knobs"
		}
		if !free {
			out = append(out, k)
		}
	}
	return out
}

func firstLine(s string) string {
	s = strings.TrimSpace(s)
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		s = s[:i]
	}
	return s
}

// valueOf turns a TOML value (string or number) into SI units; a number
// must be finite (TOML can write nan and inf).
func valueOf(v any, q models.Quantity) (float64, error) {
	if s, ok := v.(string); ok {
		return models.ParseValue(s, q)
	}
	x, ok := number(v)
	if !ok {
		return 0, fmt.Errorf("value %v is not %s", v, q)
	}
	if err := finite(x); err != nil {
		return 0, err
	}
	if q == models.Temperature {
		x += models.ZeroCelsius // a plain number is degrees Celsius
	}
	return x, nil
}

// finite refuses NaN and infinities.
func finite(x float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return &models.RangeError{Value: x, Range: models.Range{Lo: math.Inf(-1), Hi: math.Inf(1)}}
	}
	return nil
}

// valueMessage words a value error for a chain-file key: the value as
// written and why.
func valueMessage(v any, err error) string {
	var ve *models.ValueError
	if errors.As(err, &ve) {
		return err.Error()
	}
	return fmt.Sprintf("value %v %s", v, models.Reason(err))
}

// number reads a TOML number (integer or float, NaN and infinities
// included: callers check).
func number(v any) (float64, bool) {
	switch x := v.(type) {
	case int64:
		return float64(x), true
	case float64:
		return x, true
	}
	return 0, false
}

// rotation reads a knob setting from a TOML value: a number within
// models.RotationRange.
func rotation(name string, v any) (float64, error) {
	x, ok := number(v)
	if !ok {
		return 0, fmt.Errorf("knob %s = %v is not a number", name, v)
	}
	if err := models.RotationRange.Check(x); err != nil {
		return 0, fmt.Errorf("knob %s = %v %s (0 fully counter-clockwise, 1 fully clockwise)", name, v, models.Reason(err))
	}
	return x, nil
}

func (ch *Chain) parseStage(k int, rs rawStage) (*Stage, error) {
	where := fmt.Sprintf("stage %d", k+1)
	if rs.ID != "" {
		where = "stage " + rs.ID
	}
	fail := func(line int, msg string) error {
		if line == 0 {
			line = ch.loc.find(k)
		}
		return &Error{File: ch.File, Line: line, Where: where, Msg: msg}
	}
	if rs.ID == "" {
		return nil, fail(0, "missing id")
	}
	if !validID(rs.ID) {
		return nil, fail(ch.loc.find(k, "id"), fmt.Sprintf("id %q: use letters, digits, '-' and '_'", rs.ID))
	}
	if rs.ID == "input" || rs.ID == "output" || rs.ID == "supply" || rs.ID == "temperature" {
		return nil, fail(ch.loc.find(k, "id"), fmt.Sprintf("id %q is reserved", rs.ID))
	}
	knobs := map[string]float64{}
	for name, v := range rs.Knobs {
		x, err := rotation(name, v)
		if err != nil {
			return nil, fail(ch.loc.find(k, "knobs", name), err.Error())
		}
		knobs[name] = x
	}
	if rs.Template != "" {
		if len(rs.Parts) > 0 {
			return nil, fail(ch.loc.find(k, "parts"), "a stage takes either template or parts, not both")
		}
		st, err := expandTemplate(rs.Template, rs.ID, knobs, rs.Values, func(needles ...string) int {
			if len(needles) == 1 { // a knob or part name: the line that assigns it
				if line := ch.loc.findAssign(k, needles[0]); line > 0 {
					return line
				}
			}
			return ch.loc.find(k, needles...)
		})
		if err != nil {
			var ce *Error
			if errors.As(err, &ce) && ce.File == "" {
				ce.File = ch.File
				if ce.Line == 0 {
					ce.Line = ch.loc.find(k, "template")
				}
				ce.Where = strings.TrimSuffix(where+": "+ce.Where, ": ")
			}
			return nil, err
		}
		st.Buffer = rs.Buffer
		st.Environment = st.Environment || rs.Env
		st.index = k
		if rs.About != "" {
			st.About = rs.About
		}
		return st, nil
	}
	if len(rs.Values) > 0 {
		return nil, fail(ch.loc.find(k, "values"), "values overrides a template's parts; write the value on the part instead")
	}
	if len(rs.Parts) == 0 {
		return nil, fail(0, "needs a template or a parts list")
	}
	st := &Stage{ID: rs.ID, About: rs.About, Buffer: rs.Buffer, Environment: rs.Env, Knobs: knobs, KnobAbout: map[string]string{}, index: k}
	for _, rp := range rs.Parts {
		ref, _ := rp["ref"].(string)
		p, err := parsePart(rp)
		if err != nil {
			line := ch.loc.find(k, `"`+ref+`"`)
			return nil, fail(line, err.Error())
		}
		if err := st.addPart(p); err != nil {
			return nil, fail(ch.loc.find(k, `"`+ref+`"`), err.Error())
		}
	}
	if err := st.checkKnobs(); err != nil {
		return nil, fail(ch.loc.find(k, "knobs"), err.Error())
	}
	return st, nil
}

func validID(s string) bool {
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_') {
			return false
		}
	}
	return s != ""
}

func (st *Stage) addPart(p *Part) error {
	for _, q := range st.Parts {
		if q.Ref == p.Ref {
			return fmt.Errorf("part %s: duplicate ref", p.Ref)
		}
	}
	st.Parts = append(st.Parts, p)
	return nil
}

// checkKnobs verifies that every pot's knob has a setting and that every
// knob set drives some pot.
func (st *Stage) checkKnobs() error {
	used := map[string]bool{}
	for _, p := range st.Parts {
		if p.Kind == Pot {
			used[p.Knob] = true
			if _, ok := st.Knobs[p.Knob]; !ok {
				return fmt.Errorf("part %s: knob %q has no setting (add it to knobs)", p.Ref, p.Knob)
			}
		}
	}
	for name := range st.Knobs {
		if !used[name] {
			return fmt.Errorf("knob %q turns no pot (known knobs: %s)", name, listOr(keys(used)))
		}
	}
	return nil
}

func keys[T any](m map[string]T) []string {
	s := make([]string, 0, len(m))
	for k := range m {
		s = append(s, k)
	}
	sort.Strings(s)
	return s
}

func listOr(s []string) string {
	if len(s) == 0 {
		return "none"
	}
	return strings.Join(s, ", ")
}

// parsePart reads one part table.
func parsePart(rp map[string]any) (*Part, error) {
	ref, _ := rp["ref"].(string)
	kindName, _ := rp["kind"].(string)
	if ref == "" {
		return nil, errors.New("part without ref")
	}
	if !validID(ref) {
		return nil, fmt.Errorf("part %q: ref must be letters, digits, '-' and '_'", ref)
	}
	fail := func(format string, a ...any) (*Part, error) {
		return nil, fmt.Errorf("part %s: %s", ref, fmt.Sprintf(format, a...))
	}
	kind, known := ParsePartKind(kindName)
	if !known {
		return fail("kind %q is not one of %s", kindName, strings.Join(PartKindNames(), ", "))
	}
	pinRoles := kind.Pins()
	p := &Part{Ref: ref, Kind: kind, Params: map[string]float64{}, Pins: map[string]string{}}
	for key := range rp {
		if commonKeys[key] {
			continue
		}
		if _, ok := deviceParams[kind][key]; ok || kind == Transformer && windingKey.MatchString(key) {
			continue
		}
		return fail("unknown key %q for a %s%s", key, kind, didYouMean(key, partKeys(kind)))
	}
	if (rp["windings"] != nil) != (kind == Transformer) {
		return fail("only a transformer has windings")
	}
	if (rp["positions"] != nil) != (kind == Switch) {
		return fail("only a switch has positions")
	}
	// Pins.
	switch pins := rp["pins"].(type) {
	case []any:
		if kind == Transformer || kind == Switch {
			return fail("a %s's pins sit in its %s", kind, map[PartKind]string{Transformer: "windings", Switch: "positions"}[kind])
		}
		if pinRoles != nil {
			return fail("pins of a %s are named: %s", kind, strings.Join(pinRoles, ", "))
		}
		if len(pins) != 2 {
			return fail("a %s has two pins, got %d", kind, len(pins))
		}
		for i, v := range pins {
			s, ok := v.(string)
			if !ok || s == "" {
				return fail("pin %d is not a node name", i+1)
			}
			if err := checkNodeName(s); err != nil {
				return fail("pin %d: %v", i+1, err)
			}
			p.Pins[fmt.Sprint(i+1)] = s
		}
	case map[string]any:
		if kind == Capacitor {
			if err := p.parsePolarPins(pins); err != nil {
				return fail("%v", err)
			}
			break
		}
		if kind == Transformer || kind == Switch {
			return fail("a %s's pins sit in its %s", kind, map[PartKind]string{Transformer: "windings", Switch: "positions"}[kind])
		}
		if pinRoles == nil {
			return fail("pins of a %s are a two-name list, e.g. pins = [\"a\", \"b\"]", kind)
		}
		for role, v := range pins {
			ok := false
			for _, r := range pinRoles {
				ok = ok || r == role
			}
			if !ok {
				return fail("unknown pin %q (a %s has %s)", role, kind, strings.Join(pinRoles, ", "))
			}
			s, isStr := v.(string)
			if !isStr || s == "" {
				return fail("pin %s is not a node name", role)
			}
			if err := checkNodeName(s); err != nil {
				return fail("pin %s: %v", role, err)
			}
			p.Pins[role] = s
		}
		if kind == OpAmp {
			// The supply pins default to the chain's rails.
			if _, ok := p.Pins["rail_pos"]; !ok {
				p.Pins["rail_pos"] = "v+"
			}
			if _, ok := p.Pins["rail_neg"]; !ok {
				p.Pins["rail_neg"] = "gnd"
			}
		}
		for _, r := range pinRoles {
			if _, ok := p.Pins[r]; !ok && !(kind == Pot && r == "cw") {
				return fail("pin %s is not connected", r)
			}
		}
	case nil:
		switch kind {
		case Transformer:
			if err := p.parseWindings(rp["windings"]); err != nil {
				return fail("%v", err)
			}
		case Switch:
			if err := p.parsePositions(rp["positions"]); err != nil {
				return fail("%v", err)
			}
		default:
			return fail("no pins")
		}
	default:
		return fail("pins must be a list or a table")
	}
	if err := p.apply(rp, true); err != nil {
		return nil, err
	}
	if err := p.complete(); err != nil {
		return nil, err
	}
	return p, nil
}

// apply sets values and parameters from a part table or a values override.
func (p *Part) apply(t map[string]any, full bool) error {
	fail := func(format string, a ...any) error {
		return fmt.Errorf("part %s: %s", p.Ref, fmt.Sprintf(format, a...))
	}
	for key, v := range t {
		switch key {
		case "ref", "kind", "pins", "windings", "positions":
			if !full {
				return fail("%s cannot be overridden", key)
			}
		case "value":
			if p.Kind == Switch {
				if err := p.selectPosition(v); err != nil {
					return fail("%v", err)
				}
				continue
			}
			if !p.Kind.Valued() {
				if s, isStr := v.(string); isStr && p.Kind.Device() {
					p.Model = s // a device's "value" names its model
					continue
				}
				return fail("a %s has no value; set its parameters", p.Kind)
			}
			x, err := valueOf(v, p.Kind.Quantity())
			if err != nil {
				return fail("%s", valueMessage(v, err))
			}
			p.Value = x
			p.Text = fmt.Sprint(v)
		case "model":
			s, ok := v.(string)
			if !ok {
				return fail("model must be a name")
			}
			p.Model = s
		case "taper":
			s, _ := v.(string)
			tp, err := models.ParseTaper(s)
			if err != nil {
				return fail("%v", err)
			}
			p.Taper = tp
		case "knob":
			s, ok := v.(string)
			if !ok || s == "" {
				return fail("knob must be a name")
			}
			p.Knob = s
		case "per_metre":
			x, err := valueOf(v, models.Capacitance)
			if err != nil {
				return fail("per_metre: %s", valueMessage(v, err))
			}
			p.PerMetre = x
		case "tolerance":
			x, err := tolerance(v)
			if err != nil {
				return fail("tolerance %v %s (a fraction or a percentage below 100 %%)", v, models.Reason(err))
			}
			p.Tolerance = x
		case "adjusts":
			s, _ := v.(string)
			p.Adjusts = s
		case "about":
			s, _ := v.(string)
			p.About = s
		default:
			known, err := p.setParam(key, v)
			if !known {
				return fail("unknown key %q for a %s%s", key, p.Kind, didYouMean(key, partKeys(p.Kind)))
			}
			if err != nil {
				return fail("%v", err)
			}
		}
	}
	return nil
}

// tolerance reads a part's tolerance from a TOML value: a fraction, or a
// text such as "5%" (models.ParseTolerance).
func tolerance(v any) (float64, error) {
	if s, ok := v.(string); ok {
		return models.ParseTolerance(s)
	}
	x, ok := number(v)
	if !ok {
		return 0, fmt.Errorf("not a number")
	}
	return x, models.ToleranceRange.Check(x)
}

// complete checks a part's values after parsing or overriding.
func (p *Part) complete() error {
	fail := func(format string, a ...any) error {
		return fmt.Errorf("part %s: %s", p.Ref, fmt.Sprintf(format, a...))
	}
	switch {
	case p.Kind.Valued():
		if !(p.Value > 0) {
			if p.Text == "" {
				return fail("no value")
			}
			return fail("value %s must be positive", p.Text)
		}
		if max := kinds[p.Kind].max; max > 0 && p.Value > max {
			return fail("value %s is implausibly large for a %s", p.Text, p.Kind)
		}
		if p.Kind == Pot && p.Knob == "" {
			return fail("a pot needs knob = \"name\"")
		}
		if p.Kind == Cable && p.PerMetre == 0 {
			p.PerMetre = 100e-12 // about 100 pF/m for instrument cable (common practice)
		}
		if p.Kind == Cable && !(p.PerMetre > 0 && p.PerMetre < 1e-6) {
			return fail("per_metre %s is not a cable's capacitance per metre", models.FormatValue(p.PerMetre, "F"))
		}
	case p.Kind.Device() || p.Kind == Transformer:
		if err := p.checkDevice(); err != nil {
			return fail("%v", err)
		}
	case p.Kind == Switch:
		if err := p.checkSwitch(); err != nil {
			return fail("%v", err)
		}
	}
	return nil
}

// parsePolarPins reads a polarized capacitor's pins, a table with the two
// leads plus and minus, into Pins["1"] (+) and Pins["2"] (−).
func (p *Part) parsePolarPins(pins map[string]any) error {
	for role, v := range pins {
		if role != "plus" && role != "minus" {
			return fmt.Errorf("unknown pin %q (a polarized capacitor has plus, minus; an unpolarized one a two-name list)", role)
		}
		s, isStr := v.(string)
		if !isStr || s == "" {
			return fmt.Errorf("pin %s is not a node name", role)
		}
		if err := checkNodeName(s); err != nil {
			return fmt.Errorf("pin %s: %v", role, err)
		}
	}
	for _, role := range []string{"plus", "minus"} {
		if _, ok := pins[role]; !ok {
			return fmt.Errorf("pin %s is not connected", role)
		}
	}
	p.Pins["1"], p.Pins["2"] = pins["plus"].(string), pins["minus"].(string)
	p.Polarized = true
	return nil
}

// Polarity is the supply whose sign supplies given outside the file keep
// (models.ParseSupply): the file's supply, or 0, any sign, when the file
// gave none.
func (ch *Chain) Polarity() float64 {
	if ch.SupplyAssumed {
		return 0
	}
	return ch.Supply
}
