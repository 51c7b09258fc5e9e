package chains

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"renderchain/models"
)

// param is a device parameter a chain file can write: the quantity its
// value is read as (models.ParseValue) and the range it must lie in. The
// ranges are bounds far from any small-signal part that still refuse what
// no part can mean; the device models check the combinations (a
// breakdown voltage needs a knee current, and so on) when the part is
// completed.
type param struct {
	q     models.Quantity
	r     models.Range
	about string
}

// paramHints follow a range error of the parameter.
var paramHints = map[string]string{
	"pinchoff":  "(the magnitude: write 2V for a pinch-off voltage of ±2 V)",
	"threshold": "(the magnitude: write 2V for a threshold of ±2 V)",
}

func closedRange(lo, hi float64, unit string) models.Range {
	return models.Range{Lo: lo, Hi: hi, Unit: unit}
}

func aboveRange(lo, hi float64, unit string) models.Range {
	return models.Range{Lo: lo, LoOpen: true, Hi: hi, Unit: unit}
}

// Parameter groups shared by several kinds.
var (
	pIs       = param{models.Current, aboveRange(0, 1e-3, "A"), "saturation current"}
	pN        = param{models.Dimensionless, aboveRange(0, 10, ""), "emission coefficient"}
	pEg       = param{models.Dimensionless, closedRange(0, 5, ""), "band gap, eV, for the temperature law of is (0: is fixed)"}
	pXTI      = param{models.Dimensionless, closedRange(0, 10, ""), "temperature exponent of is"}
	pCap      = param{models.Capacitance, closedRange(0, 1e-6, "F"), "zero-bias depletion capacitance (0: none)"}
	pPot      = param{models.Voltage, aboveRange(0, 5, "V"), "built-in potential of the junction"}
	pGrading  = param{models.Dimensionless, models.Range{Lo: 0, Hi: 1, HiOpen: true}, "grading exponent (1/2 abrupt, 1/3 graded)"}
	pTransit  = param{models.Time, closedRange(0, 1e-3, "s"), "transit time: diffusion charge per ampere (0: none)"}
	pFraction = param{models.Dimensionless, models.Range{Lo: 0, Hi: 1, HiOpen: true}, "fraction of the built-in potential past which the depletion charge is linearised (0: the default 0.5)"}
	pLambda   = param{models.Dimensionless, closedRange(0, 1, ""), "channel-length modulation λ, 1/V"}
)

// deviceParams are the parameters each kind takes besides the common keys.
var deviceParams = map[PartKind]map[string]param{
	Capacitor: {
		"rating": {models.Voltage, models.Range{Lo: 0, LoOpen: true, Hi: 1000, Unit: "V"}, "working voltage; the operating-point check warns when more sits across the capacitor at idle"},
	},
	Diode: {
		"is": pIs, "n": pN, "rs": {models.Resistance, closedRange(0, 1e6, "Ω"), "series resistance"},
		"eg": pEg, "xti": pXTI,
		"breakdown":            {models.Voltage, closedRange(0, models.MaxPortVoltage, "V"), "reverse voltage at which the reverse current reaches breakdown_current (0: no breakdown)"},
		"breakdown_current":    {models.Current, models.Range{Lo: 0, LoOpen: true, Hi: 10, HiOpen: true, Unit: "A"}, "knee current at the breakdown voltage"},
		"breakdown_n":          {models.Dimensionless, closedRange(0, 100, ""), "emission coefficient of the breakdown current (0: 1); sets the slope past the knee"},
		"junction_capacitance": pCap, "junction_potential": pPot, "junction_grading": pGrading,
		"transit_time": pTransit, "forward_fraction": pFraction,
	},
	NPN: {
		"is": pIs, "hfe": {models.Dimensionless, models.GainRange, "forward current gain βF"},
		"br":            {models.Dimensionless, aboveRange(0, 1e3, ""), "reverse current gain βR"},
		"icbo":          {models.Current, closedRange(0, 1e-3, "A"), "collector–base leakage at 25 °C"},
		"leak_doubling": {models.Dimensionless, aboveRange(0, 100, ""), "temperature rise, K, over which icbo doubles"},
		"eg":            pEg, "xti": pXTI,
		"early_voltage":   {models.Voltage, closedRange(0, 1e4, "V"), "forward Early voltage (0: none)"},
		"base_resistance": {models.Resistance, closedRange(0, 1e6, "Ω"), "ohmic base resistance (0: none)"},
		"be_capacitance":  pCap, "be_potential": pPot, "be_grading": pGrading,
		"bc_capacitance": pCap, "bc_potential": pPot, "bc_grading": pGrading,
		"transit_time": pTransit, "forward_fraction": pFraction,
	},
	NJFET: {
		"idss":               {models.Current, models.Range{Lo: 0, LoOpen: true, Hi: 10, HiOpen: true, Unit: "A"}, "drain current at Vgs = 0 in saturation"},
		"pinchoff":           {models.Voltage, aboveRange(0, 100, "V"), "magnitude of the pinch-off voltage"},
		"channel_modulation": pLambda,
		"gate_is":            {models.Current, aboveRange(0, 1e-3, "A"), "saturation current of each gate junction"},
		"gate_n":             {models.Dimensionless, closedRange(0, 10, ""), "emission coefficient of the gate junctions (0: 1)"},
		"gs_capacitance":     pCap, "gs_potential": pPot, "gs_grading": pGrading,
		"gd_capacitance": pCap, "gd_potential": pPot, "gd_grading": pGrading,
		"forward_fraction": pFraction,
	},
	NMOSFET: {
		"threshold":          {models.Voltage, aboveRange(0, 100, "V"), "magnitude of the threshold voltage"},
		"k":                  {models.Dimensionless, aboveRange(0, 1e3, ""), "transconductance parameter, A/V²: Id = (k/2)·(Vgs − Vth)² in saturation"},
		"channel_modulation": pLambda,
		"body_is":            {models.Current, closedRange(0, 1e-3, "A"), "saturation current of the body diode (0: none)"},
		"body_n":             {models.Dimensionless, closedRange(0, 10, ""), "emission coefficient of the body diode (0: 1)"},
		"gs_capacitance":     {models.Capacitance, closedRange(0, 1e-6, "F"), "constant gate–source capacitance"},
		"gd_capacitance":     {models.Capacitance, closedRange(0, 1e-6, "F"), "constant gate–drain capacitance"},
	},
	OpAmp: {
		"open_loop_gain":    {models.Dimensionless, models.Range{Lo: 1, LoOpen: true, Hi: 1e9}, "open-loop DC gain, V/V or dB (\"106dB\")"},
		"gbw":               {models.Frequency, aboveRange(0, 10e9, "Hz"), "gain–bandwidth product"},
		"input_resistance":  {models.Resistance, aboveRange(0, 1e15, "Ω"), "resistance between the inputs"},
		"output_resistance": {models.Resistance, closedRange(0, 1e6, "Ω"), "open-loop output resistance"},
		"headroom_high":     {models.Voltage, closedRange(0, 100, "V"), "how far below the positive rail the output saturates"},
		"headroom_low":      {models.Voltage, closedRange(0, 100, "V"), "how far above the negative rail the output saturates"},
		"knee":              {models.Voltage, closedRange(0, 1, "V"), "width of the rounding into saturation (0: 10 mV)"},
	},
	Transformer: {
		"coupling": {models.Dimensionless, models.Range{Lo: 0, LoOpen: true, Hi: 1}, "coupling coefficient k between every pair of windings"},
	},
	Switch: {
		"contact_resistance": {models.Resistance, aboveRange(0, 10, "Ω"), "resistance of a closed contact"},
	},
}

// windingParams are a transformer winding's own keys: in its table in
// windings = […], and as wN_KEY for an override (w2_inductance).
var windingParams = map[string]param{
	"inductance": {models.Inductance, aboveRange(0, 1e4, "H"), "self-inductance"},
	"turns":      {models.Dimensionless, aboveRange(0, 1e3, ""), "turns relative to winding 1 (inductance = turns²·L1), instead of inductance"},
	"resistance": {models.Resistance, closedRange(0, 1e9, "Ω"), "winding (copper) resistance"},
}

var windingKey = regexp.MustCompile(`^w([0-9]+)_([a-z]+)$`)

func init() {
	deviceParams[PNP] = deviceParams[NPN]
	deviceParams[PJFET] = deviceParams[NJFET]
	deviceParams[PMOSFET] = deviceParams[NMOSFET]
}

// ParamNames lists the parameters a kind takes besides the common keys,
// sorted (a transformer's winding keys are listed as wN_inductance,
// wN_turns and wN_resistance).
func ParamNames(k PartKind) []string {
	s := keys(deviceParams[k])
	if k == Transformer {
		for _, w := range keys(windingParams) {
			s = append(s, "wN_"+w)
		}
	}
	return s
}

// ParamAbout says what a kind's parameter is, or "".
func ParamAbout(k PartKind, name string) string {
	if k == Transformer {
		if m := windingKey.FindStringSubmatch(name); m != nil || strings.HasPrefix(name, "wN_") {
			return windingParams[name[strings.IndexByte(name, '_')+1:]].about
		}
	}
	return deviceParams[k][name].about
}

// readParam reads the value v of a parameter pr: through the quantity's
// parser, then the range. An op-amp's open_loop_gain may be written in
// decibels ("106dB").
func readParam(key string, pr param, v any) (float64, error) {
	var x float64
	var err error
	if s, isStr := v.(string); isStr && key == "open_loop_gain" && strings.HasSuffix(strings.TrimSpace(s), "dB") {
		var db float64
		if db, err = models.ParseDecibels(s); err == nil {
			x = math.Pow(10, db/20)
		}
	} else {
		x, err = valueOf(v, pr.q)
	}
	if err != nil {
		return 0, fmt.Errorf("%s: %s", key, valueMessage(v, err))
	}
	if err := pr.r.Check(x); err != nil {
		return 0, fmt.Errorf("%s", strings.TrimSpace(fmt.Sprintf("%s = %v %s %s", key, v, models.Reason(err), paramHints[key])))
	}
	return x, nil
}

// setParam applies one parameter key of the part; it reports false for a
// key the kind does not take.
func (p *Part) setParam(key string, v any) (bool, error) {
	if pr, ok := deviceParams[p.Kind][key]; ok {
		x, err := readParam(key, pr, v)
		if err != nil {
			return true, err
		}
		p.Params[key] = x
		return true, nil
	}
	if p.Kind == Transformer {
		if m := windingKey.FindStringSubmatch(key); m != nil {
			pr, ok := windingParams[m[2]]
			if !ok {
				return false, nil
			}
			i, _ := strconv.Atoi(m[1])
			if i < 1 || i > len(p.Windings) {
				return true, fmt.Errorf("%s: the transformer has windings 1 to %d", key, len(p.Windings))
			}
			x, err := readParam(key, pr, v)
			if err != nil {
				return true, err
			}
			return true, p.Windings[i-1].set(i, m[2], x)
		}
	}
	return false, nil
}

// Winding is one winding of a transformer part: its two pins, and its
// inductance either in henries or as turns relative to winding 1.
type Winding struct {
	Start, End string  // node names; the dotted end is Start
	Inductance float64 // H; 0 when Turns gives it
	Turns      float64 // turns relative to winding 1; 0 when Inductance is given
	Resistance float64 // Ω
}

func (w *Winding) set(i int, key string, x float64) error {
	switch key {
	case "inductance":
		w.Inductance, w.Turns = x, 0
	case "turns":
		if i == 1 {
			return fmt.Errorf("w1_turns: winding 1 is the reference of the turns; give its inductance")
		}
		w.Turns, w.Inductance = x, 0
	case "resistance":
		w.Resistance = x
	}
	return nil
}

// parseWindings reads a transformer's windings = [{ pins = [start, end],
// inductance | turns, resistance }, …].
func (p *Part) parseWindings(v any) error {
	list, err := tables(v, `windings must be a list of tables, e.g. windings = [{ inductance = "2H", pins = ["a", "b"] }, …]`)
	if err != nil {
		return err
	}
	if len(list) < 2 {
		return fmt.Errorf("a transformer needs at least two windings (a centre-tapped winding is two windings sharing the tap)")
	}
	p.Windings = make([]Winding, len(list))
	for i, m := range list {
		w := &p.Windings[i]
		name := fmt.Sprintf("winding %d", i+1)
		pins, _ := m["pins"].([]any)
		if len(pins) != 2 {
			return fmt.Errorf("%s: pins must be two node names [start, end] (start is the dotted end)", name)
		}
		for j, x := range pins {
			s, ok := x.(string)
			if !ok || s == "" {
				return fmt.Errorf("%s: pin %d is not a node name", name, j+1)
			}
			if err := checkNodeName(s); err != nil {
				return fmt.Errorf("%s: %v", name, err)
			}
			if j == 0 {
				w.Start = s
			} else {
				w.End = s
			}
		}
		if w.Start == w.End {
			return fmt.Errorf("%s: both pins on node %s", name, w.Start)
		}
		p.Pins[fmt.Sprintf("w%d.start", i+1)] = w.Start
		p.Pins[fmt.Sprintf("w%d.end", i+1)] = w.End
		for _, key := range keys(m) {
			if key == "pins" {
				continue
			}
			pr, ok := windingParams[key]
			if !ok {
				return fmt.Errorf("%s: unknown key %q (a winding has pins, %s)", name, key, strings.Join(keys(windingParams), ", "))
			}
			x, err := readParam(key, pr, m[key])
			if err != nil {
				return fmt.Errorf("%s: %v", name, err)
			}
			if err := w.set(i+1, key, x); err != nil {
				return fmt.Errorf("%s: winding 1 is the reference of the turns; give its inductance", name)
			}
		}
		if m["inductance"] != nil && m["turns"] != nil {
			return fmt.Errorf("%s: give inductance or turns, not both", name)
		}
		if w.Inductance == 0 && w.Turns == 0 {
			return fmt.Errorf("%s: needs an inductance (or, after winding 1, turns relative to winding 1)", name)
		}
	}
	return nil
}

// tables reads a TOML array of tables (as decoded into a map); want is
// the message when v is something else.
func tables(v any, want string) ([]map[string]any, error) {
	switch t := v.(type) {
	case []map[string]any:
		return t, nil
	case []any:
		list := make([]map[string]any, 0, len(t))
		for _, x := range t {
			m, ok := x.(map[string]any)
			if !ok {
				return nil, errors.New(want)
			}
			list = append(list, m)
		}
		return list, nil
	}
	return nil, errors.New(want)
}

// checkNodeName refuses node names a chain file must not write: the
// InternalMark, which names nodes inside parts.
func checkNodeName(s string) error {
	if models.IsInternal(s) {
		return fmt.Errorf("node name %q: %q is reserved for nodes inside parts", s, models.InternalMark)
	}
	return nil
}

// presetNames lists the presets a kind's model can name.
func presetNames(k PartKind) []string {
	var s []string
	switch {
	case k == Diode || k.Transistor():
		for _, name := range models.PresetNames() {
			pr := models.Presets[name]
			if k == Diode && pr.Diode != nil || k.Transistor() && pr.BJT != nil && pr.BJT.PNP == (k == PNP) {
				s = append(s, name)
			}
		}
	case k == NJFET || k == PJFET:
		for _, name := range models.Names(models.JFETPresets) {
			if models.JFETPresets[name].Params.PChannel == (k == PJFET) {
				s = append(s, name)
			}
		}
	case k == NMOSFET || k == PMOSFET:
		for _, name := range models.Names(models.MOSFETPresets) {
			if models.MOSFETPresets[name].Params.PChannel == (k == PMOSFET) {
				s = append(s, name)
			}
		}
	case k == OpAmp:
		s = models.Names(models.OpAmpPresets)
	}
	sort.Strings(s)
	return s
}

// defaultModel is the preset whose static values a part without a model
// starts from.
func defaultModel(k PartKind) string {
	switch k {
	case Diode:
		return "si-signal"
	case NPN, PNP:
		return "si-" + k.String()
	case NJFET, PJFET, NMOSFET, PMOSFET:
		return k.String()
	case OpAmp:
		return "opamp-general-dual"
	}
	return ""
}

// DiodeParams resolves a diode part's parameters. A named model gives its
// preset complete (models.DevicePreset.Complete: second-order values
// included); without one the part is the core Shockley diode of the
// silicon signal preset (is, n, rs; no breakdown, no charge storage) and,
// without eg, its saturation current does not scale with temperature.
// Written parameters win.
func (p *Part) DiodeParams() models.DiodeParams {
	var d models.DiodeParams
	if p.Model != "" {
		d = *models.Presets[p.Model].Complete().Diode
	} else {
		d = *models.Presets[defaultModel(Diode)].Diode // the core only: Complete not applied
		d.Eg = 0
	}
	s := &d.DiodeSecondOrder
	p.setParams(map[string]*float64{"is": &d.Is, "n": &d.N, "rs": &d.Rs, "eg": &d.Eg, "xti": &d.XTI,
		"breakdown": &s.BreakdownVoltage, "breakdown_current": &s.BreakdownCurrent, "breakdown_n": &s.BreakdownN,
		"junction_capacitance": &s.Junction.C0, "junction_potential": &s.Junction.Potential, "junction_grading": &s.Junction.Grading,
		"transit_time": &s.TransitTime, "forward_fraction": &s.ForwardFraction})
	fillPotential(&s.Junction)
	return d
}

// BJTParams resolves a transistor part's parameters like DiodeParams:
// without a model, the core Ebers–Moll transistor of the silicon preset
// of its polarity (is, hfe, br; no Early effect, base resistance or
// charge storage).
func (p *Part) BJTParams() models.BJTParams {
	var b models.BJTParams
	if p.Model != "" {
		b = *models.Presets[p.Model].Complete().BJT
	} else {
		b = *models.Presets[defaultModel(p.Kind)].BJT // the core only: Complete not applied
		b.Eg = 0
	}
	s := &b.BJTSecondOrder
	p.setParams(map[string]*float64{"is": &b.Is, "hfe": &b.BetaF, "br": &b.BetaR, "icbo": &b.Icbo,
		"leak_doubling": &b.LeakDoubling, "eg": &b.Eg, "xti": &b.XTI,
		"early_voltage": &s.EarlyVoltage, "base_resistance": &s.BaseResistance,
		"be_capacitance": &s.BE.C0, "be_potential": &s.BE.Potential, "be_grading": &s.BE.Grading,
		"bc_capacitance": &s.BC.C0, "bc_potential": &s.BC.Potential, "bc_grading": &s.BC.Grading,
		"transit_time": &s.TransitTime, "forward_fraction": &s.ForwardFraction})
	fillPotential(&s.BE)
	fillPotential(&s.BC)
	b.PNP = p.Kind == PNP
	return b
}

// fillPotential gives a depletion capacitance written without a model
// the usual built-in potential and grading of a silicon junction, 0.75 V
// and 1/3 (typical of published device models; from memory), so that
// writing the capacitance alone is enough.
func fillPotential(d *models.Depletion) {
	if d.C0 > 0 && d.Potential == 0 {
		d.Potential = 0.75
		if d.Grading == 0 {
			d.Grading = 0.33
		}
	}
}

// JFETParams resolves an n-jfet or p-jfet part's parameters: the named
// preset (models.JFETPresets) complete with its gate capacitances, or
// without a model the class preset's static values (no capacitances);
// written parameters win.
func (p *Part) JFETParams() models.JFETParams {
	name := p.Model
	if name == "" {
		name = defaultModel(p.Kind)
	}
	j := models.JFETPresets[name].Params
	if p.Model == "" {
		j.GS, j.GD = models.Depletion{}, models.Depletion{}
	}
	p.setParams(map[string]*float64{"idss": &j.Idss, "pinchoff": &j.Pinchoff, "channel_modulation": &j.ChannelModulation,
		"gate_is": &j.GateIs, "gate_n": &j.GateN,
		"gs_capacitance": &j.GS.C0, "gs_potential": &j.GS.Potential, "gs_grading": &j.GS.Grading,
		"gd_capacitance": &j.GD.C0, "gd_potential": &j.GD.Potential, "gd_grading": &j.GD.Grading,
		"forward_fraction": &j.ForwardFraction})
	fillPotential(&j.GS)
	fillPotential(&j.GD)
	j.PChannel = p.Kind == PJFET
	return j
}

// MOSFETParams resolves an n-mosfet or p-mosfet part's parameters like
// JFETParams (without a model: no gate capacitances).
func (p *Part) MOSFETParams() models.MOSFETParams {
	name := p.Model
	if name == "" {
		name = defaultModel(p.Kind)
	}
	m := models.MOSFETPresets[name].Params
	if p.Model == "" {
		m.GateSource, m.GateDrain = 0, 0
	}
	p.setParams(map[string]*float64{"threshold": &m.Threshold, "k": &m.K, "channel_modulation": &m.ChannelModulation,
		"body_is": &m.BodyIs, "body_n": &m.BodyN, "gs_capacitance": &m.GateSource, "gd_capacitance": &m.GateDrain})
	m.PChannel = p.Kind == PMOSFET
	return m
}

// OpAmpParams resolves an op-amp part's parameters: the named class
// (models.OpAmpPresets), or the general-purpose dual without a model;
// written parameters win.
func (p *Part) OpAmpParams() models.OpAmpParams {
	name := p.Model
	if name == "" {
		name = defaultModel(OpAmp)
	}
	o := models.OpAmpPresets[name].Params
	p.setParams(map[string]*float64{"open_loop_gain": &o.Gain, "gbw": &o.GBW, "input_resistance": &o.InputResistance,
		"output_resistance": &o.OutputResistance, "headroom_high": &o.HeadroomHigh, "headroom_low": &o.HeadroomLow, "knee": &o.Knee})
	return o
}

// DefaultCoupling is a transformer's coupling coefficient when none is
// written: 0.99, a small audio transformer's leakage of about 1 % of its
// inductance (typical of interstage and output transformers; from
// memory).
const DefaultCoupling = 0.99

// TransformerParams resolves a transformer part's windings: a winding
// given by turns has inductance turns²·L1 (inductance goes as the square
// of the turns on one core).
func (p *Part) TransformerParams() models.TransformerParams {
	t := models.TransformerParams{Coupling: DefaultCoupling}
	if k, ok := p.Params["coupling"]; ok {
		t.Coupling = k
	}
	for _, w := range p.Windings {
		l := w.Inductance
		if l == 0 && len(p.Windings) > 0 {
			l = w.Turns * w.Turns * p.Windings[0].Inductance
		}
		t.Windings = append(t.Windings, models.Winding{Inductance: l, Resistance: w.Resistance})
	}
	return t
}

// setParams copies the written parameters over the defaults.
func (p *Part) setParams(dst map[string]*float64) {
	for k, v := range p.Params {
		if d, ok := dst[k]; ok {
			*d = v
		}
	}
}

// element is the flat-circuit element of a device part before AddPart
// (nodes left to the caller).
func (p *Part) element(ref string) models.Element {
	e := models.Element{Ref: ref}
	switch p.Kind {
	case Diode:
		e.Kind, e.Diode = models.DiodeKind, p.DiodeParams()
	case NPN, PNP:
		e.Kind, e.BJT = models.BJTKind, p.BJTParams()
	case NJFET, PJFET:
		e.Kind, e.JFET = models.JFETKind, p.JFETParams()
	case NMOSFET, PMOSFET:
		e.Kind, e.MOSFET = models.MOSFETKind, p.MOSFETParams()
	case OpAmp:
		e.Kind, e.OpAmp = models.OpAmpKind, p.OpAmpParams()
	case Transformer:
		e.Kind, e.Transformer = models.TransformerKind, p.TransformerParams()
	}
	return e
}

// pinOrder lists the part's pin roles in the order of its element's
// nodes.
func (p *Part) pinOrder() []string {
	switch p.Kind {
	case Diode:
		return []string{"anode", "cathode"}
	case NPN, PNP:
		return []string{"c", "b", "e"}
	case NJFET, PJFET, NMOSFET, PMOSFET:
		return []string{"d", "g", "s"}
	case OpAmp:
		return []string{"noninv", "inv", "out", "rail_pos", "rail_neg"}
	case Transformer:
		var s []string
		for i := range p.Windings {
			s = append(s, fmt.Sprintf("w%d.start", i+1), fmt.Sprintf("w%d.end", i+1))
		}
		return s
	}
	return nil
}

// checkDevice completes a device part: its model must be one of its
// kind's presets, and its resolved parameters must pass the device
// model's own checks (the combinations the ranges cannot see). It builds
// the part into a scratch circuit with models.Circuit.AddPart, the same
// call Build makes.
func (p *Part) checkDevice() error {
	if p.Model != "" {
		names := presetNames(p.Kind)
		found := false
		for _, n := range names {
			found = found || n == p.Model
		}
		if !found {
			if len(names) == 0 {
				return fmt.Errorf("a %s takes no model", p.Kind)
			}
			return fmt.Errorf("model %q is not one of the %s models (%s)", p.Model, p.Kind, strings.Join(names, ", "))
		}
	}
	if p.Kind == OpAmp {
		if p.Pins["rail_pos"] == p.Pins["rail_neg"] {
			return fmt.Errorf("rail_pos and rail_neg are both on %s", p.Pins["rail_pos"])
		}
	}
	c := models.NewCircuit("check", models.NominalTemperature)
	e := p.element(p.Ref)
	for _, role := range p.pinOrder() {
		e.Nodes = append(e.Nodes, c.Node("n."+p.Pins[role]))
	}
	if _, err := c.AddPart(e); err != nil {
		return fmt.Errorf("%s", strings.TrimPrefix(err.Error(), p.Ref+": "))
	}
	return nil
}

// addDevice flattens a device part into c through models.Circuit.AddPart,
// so the nodes and elements inside it are named REF#role.
func (p *Part) addDevice(c *models.Circuit, ref string, node func(string) int) error {
	e := p.element(ref)
	for _, role := range p.pinOrder() {
		e.Nodes = append(e.Nodes, node(p.Pins[role]))
	}
	_, err := c.AddPart(e)
	return err
}

// checkRails refuses an op-amp whose supply pins sit on the chain's two
// rails the wrong way round for the supply's polarity: the output could
// not swing between them. (Rails on other nodes are checked at the
// operating point: bias warns.)
func (ch *Chain) checkRails(p *Part) error {
	if p.Kind != OpAmp {
		return nil
	}
	pos, neg := p.Pins["rail_pos"], p.Pins["rail_neg"]
	wrong := ch.Supply > 0 && pos == "gnd" && neg == "v+" || ch.Supply < 0 && pos == "v+" && neg == "gnd"
	if wrong {
		return fmt.Errorf("rail_pos on %s sits below rail_neg on %s with a %s supply: write rail_pos = %q, rail_neg = %q", pos, neg, models.FormatValue(ch.Supply, "V"), neg, pos)
	}
	return nil
}

// PinRoles lists the part's pin roles in their natural order (the keys of
// Pins): "1", "2" for a two-terminal part, the kind's named pins, a
// transformer's "w1.start", "w1.end", …, a switch's "POSITION.Ka" and
// "POSITION.Kb" for its K-th contact in each position.
func (p *Part) PinRoles() []string {
	switch {
	case p.Kind == Switch:
		var s []string
		for _, pos := range p.Positions {
			for k := range pos.Connect {
				s = append(s, fmt.Sprintf("%s.%da", pos.Name, k+1), fmt.Sprintf("%s.%db", pos.Name, k+1))
			}
		}
		return s
	case p.Kind == Transformer || p.Kind.Device():
		return p.pinOrder()
	case p.Kind.Pins() != nil:
		var s []string
		for _, r := range p.Kind.Pins() {
			if _, ok := p.Pins[r]; ok {
				s = append(s, r)
			}
		}
		return s
	}
	return []string{"1", "2"}
}
