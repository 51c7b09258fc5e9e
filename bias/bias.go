package bias

import (
	"context"
	"fmt"
	"math"
	"slices"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/engine"
	"renderchain/models"
	"renderchain/report"
)

// Region is where a bipolar transistor sits on its characteristics.
type Region string

// The regions of a bipolar transistor (see the package documentation for
// the thresholds).
const (
	CutOff    Region = "cut-off"
	Active    Region = "active"
	Saturated Region = "saturated"
	Reverse   Region = "reverse"
)

// ConductionCurrent is the transport current, A, below which a junction
// counts as not injecting: a transistor whose base–emitter and
// base–collector transport currents are both below it is cut off.
const ConductionCurrent = 1e-6

// SaturationGainFraction: a transistor is saturated when its current gain
// without leakage, Ic/Ib, has fallen below this fraction of βF because the
// collector junction is forward biased.
const SaturationGainFraction = 0.9

// RailMargin is the distance, V, from a rail within which a collector is
// reported as having no room to swing.
const RailMargin = 1.0

// Node is one node's DC voltage. Internal nodes are those Build adds inside
// a part (a diode's junction behind its series resistance).
type Node struct {
	Name     string
	Volts    float64
	Internal bool
}

// Transistor is a bipolar transistor at its operating point. Voltages and
// currents are signed as measured: for a PNP device Vbe, Vce and Ic are
// negative in normal operation (the chain-file core's mirror convention).
// Ib and Ic flow into the base and collector; Ie = Ib + Ic leaves by the
// emitter.
type Transistor struct {
	Ref                      string // the circuit's ref, "fuzz.Q2"
	PNP                      bool
	Collector, Base, Emitter string // node names
	Vc, Vb, Ve               float64
	Vbe, Vce, Vbc            float64
	Ib, Ic, Ie               float64
	// Power is the dissipation Vbe·Ib + Vce·Ic, W (positive for either
	// polarity).
	Power float64
	// Beta is Ic/Ib at the operating point (leakage included).
	Beta   float64
	Region Region
	// SatVce is Vt·ln(1/r), r the region rule's ratio for this device's βF
	// and βR: with the base–emitter junction well on, the collector–emitter
	// voltage magnitude below which the rule calls it saturated.
	SatVce float64
	// NearRail is "gnd" or "v+" when the collector idles within
	// RailMargin of that rail with little room to swing towards it, ""
	// otherwise (and for a collector on a rail, on an inductive load at
	// the supply, or driving another transistor's base directly, where
	// the closeness is by design).
	NearRail string
	// RailRoom is how far the collector idles from that rail, V.
	RailRoom float64
}

// Diode is a diode at its operating point: V across its terminals (series
// resistance included), Vj across the junction, I from anode to cathode.
type Diode struct {
	Ref            string
	Anode, Cathode string
	V, Vj, I       float64
	Power          float64
}

// Bias is a chain's DC operating point as a bench reads it.
type Bias struct {
	Chain       string
	File        string
	Supply      float64 // V on v+
	Temperature float64 // K
	Nodes       []Node  // in circuit order, ground left out
	Transistors []Transistor
	Diodes      []Diode
	FETs        []FET   // JFETs and MOSFETs
	OpAmps      []OpAmp // op-amps (their macromodels' helper elements hidden)
	// SupplyCurrent is the current the supply delivers, A (its magnitude),
	// and SupplyPower the power, W.
	SupplyCurrent, SupplyPower float64
	Warnings                   report.Warnings
	// Notes are the chain lint's notes: choices the tool made that the
	// user should know about (a node reached only through capacitors
	// given a leak to ground).
	Notes []string
	// Method and Iterations report how the DC solve finished.
	Method     string
	Iterations int

	Circuit *models.Circuit
	DC      *mna.OperatingPoint
	// Prepared is the chain this was read from (nil for Analyse of a bare
	// circuit), ready to run signals through.
	Prepared *engine.Prepared
}

// Solve prepares the chain (engine.Prepare: build, DC operating point)
// and reads its operating point.
func Solve(ch *chains.Chain) (*Bias, error) { return SolveContext(context.Background(), ch) }

// SolveContext is Solve that stops when ctx is done (engine.PrepareContext:
// the DC solve checks it at every Newton iteration).
func SolveContext(ctx context.Context, ch *chains.Chain) (*Bias, error) {
	p, err := engine.PrepareContext(ctx, ch, 0)
	if err != nil {
		return nil, err
	}
	return Of(p), nil
}

// Of reads the operating point of a prepared chain. Its warnings are the
// prepared chain's (the build's and the stability check's) followed by the
// operating point's.
func Of(p *engine.Prepared) *Bias {
	b := Analyse(p.Circuit, p.DC)
	b.Chain, b.File = p.Chain.Name, p.Chain.File
	b.Prepared = p
	b.Warnings = append(append(report.Warnings{}, p.Warnings...), b.Warnings...)
	b.Notes = p.Findings.Notes()
	return b
}

// Check backs a stability warning with the rendered check: for an unstable
// chain it runs engine.Prepared.IdleWarning (a second or two of render)
// and puts its line right after the stability warning. A stable chain, or
// a Bias read without a prepared chain, is left as it is.
func (b *Bias) Check(ctx context.Context) error {
	if b.Prepared == nil {
		return nil
	}
	w, err := b.Prepared.CheckedWarnings(ctx)
	if err != nil {
		return err
	}
	w.Merge(b.Warnings)
	b.Warnings = w
	return nil
}

// Warnings returns every warning a report on the prepared chain p
// carries, in order: the build's, the stability check's with its rendered
// check (Check), and the operating point's (transistors saturated, cut
// off, reversed or near a rail).
func Warnings(ctx context.Context, p *engine.Prepared) (report.Warnings, error) {
	b := Of(p)
	if err := b.Check(ctx); err != nil {
		return nil, err
	}
	return b.Warnings, nil
}

// Analyse reads an operating point of circuit c: node voltages, the
// transistors' terminal quantities and regions, diode currents and the
// warnings a bench would give.
func Analyse(c *models.Circuit, op *mna.OperatingPoint) *Bias {
	b := &Bias{Chain: c.Name, Temperature: c.Temperature, Method: op.Method, Iterations: op.Iterations, Circuit: c, DC: op}
	for i := 1; i < len(c.Nodes); i++ {
		b.Nodes = append(b.Nodes, Node{Name: c.Nodes[i], Volts: op.Node[i], Internal: internalNode(c.Nodes[i])})
	}
	for i, e := range c.Elements {
		if e.Kind == models.VoltageSourceKind && e.Ref == "supply" {
			b.Supply = e.Value
			ib := op.Branch[i] // from + through the source to −
			b.SupplyCurrent = math.Abs(ib)
			b.SupplyPower = -e.Value * ib
		}
	}
	vplus := c.Lookup("v+")
	for _, d := range op.Devices {
		e := c.Elements[d.Element]
		switch e.Kind {
		case models.BJTKind:
			b.Transistors = append(b.Transistors, transistorAt(c, op, e, d))
		case models.DiodeKind:
			anode := e.Nodes[0]
			if rs := c.Element(models.InternalNode(e.Ref, "rs")); rs != nil {
				anode = rs.Nodes[0]
			}
			v := op.Node[anode] - op.Node[e.Nodes[1]]
			b.Diodes = append(b.Diodes, Diode{Ref: e.Ref, Anode: c.Nodes[anode], Cathode: c.Nodes[e.Nodes[1]],
				V: v, Vj: d.V[0], I: d.I[0], Power: v * d.I[0]})
		}
	}
	b.Warnings = report.Warnings{}
	for i := range b.Transistors {
		t := &b.Transistors[i]
		t.NearRail, t.RailRoom = nearRail(t, c, vplus, b.Supply)
		b.Warnings.Merge(transistorWarnings(*t, c, b.Supply))
	}
	b.readDevices(c, op)
	return b
}

// internalNode tells the nodes Build adds inside a part (chains.InternalNode).
func internalNode(name string) bool { return chains.InternalNode(name) }

func transistorAt(c *models.Circuit, op *mna.OperatingPoint, e models.Element, d mna.DeviceState) Transistor {
	nc, nb, ne := e.Nodes[0], e.Nodes[1], e.Nodes[2]
	t := Transistor{Ref: e.Ref, PNP: e.BJT.PNP,
		Collector: c.Nodes[nc], Base: c.Nodes[nb], Emitter: c.Nodes[ne],
		Vc: op.Node[nc], Vb: op.Node[nb], Ve: op.Node[ne],
		Vbe: d.V[0], Vce: d.V[1], Ib: d.I[0], Ic: d.I[1]}
	t.Vbc = t.Vbe - t.Vce
	t.Ie = t.Ib + t.Ic
	t.Power = t.Vbe*t.Ib + t.Vce*t.Ic
	if t.Ib != 0 {
		t.Beta = t.Ic / t.Ib
	}
	t.Region, t.SatVce = classify(e.BJT, c.Temperature, t.Vbe, t.Vbc)
	return t
}

// classify applies the region rule to junction voltages (signed as
// measured) of a transistor of parameters p at temperature temp.
func classify(p models.BJTParams, temp, vbe, vbc float64) (Region, float64) {
	s := 1.0
	if p.PNP {
		s = -1
	}
	vt := models.ThermalVoltage(temp)
	is := models.SaturationCurrentAt(p.Is, 1, p.Eg, p.XTI, temp, models.NominalTemperature)
	fwd := is * math.Expm1(s*vbe/vt) // base–emitter transport current
	rev := is * math.Expm1(s*vbc/vt) // base–collector
	f := SaturationGainFraction
	r := (1 - f) / (1 + 1/p.BetaR + f*p.BetaF/p.BetaR)
	satVce := vt * math.Log(1/r)
	switch {
	case rev > fwd && rev >= ConductionCurrent:
		return Reverse, satVce
	case fwd < ConductionCurrent && rev < ConductionCurrent:
		return CutOff, satVce
	case rev > r*fwd:
		return Saturated, satVce
	}
	return Active, satVce
}

// nearRail is Transistor.NearRail and RailRoom for t at supply volts on
// node vplus.
func nearRail(t *Transistor, c *models.Circuit, vplus int, supply float64) (string, float64) {
	nc := c.Lookup(t.Collector)
	if nc == models.Ground || nc == vplus || drivesBase(c, nc, t.Ref) {
		return "", 0
	}
	if d := math.Abs(t.Vc); d < RailMargin {
		return "gnd", d
	}
	if d := math.Abs(t.Vc - supply); d < RailMargin && !inductiveLoad(c, nc) {
		return "v+", d
	}
	return "", 0
}

func transistorWarnings(t Transistor, c *models.Circuit, supply float64) []string {
	var w []string
	region := t.Region
	if (region == CutOff || region == Reverse) && chains.PolarityFault(!t.PNP, supply, t.Vce, t.Ic) {
		region = "" // the operating-point check names this fault, with its fix
	}
	switch region {
	case Saturated:
		w = append(w, fmt.Sprintf("%s is saturated at idle (Vce %s): its collector cannot swing further towards the emitter", t.Ref, models.FormatValue(t.Vce, "V")))
	case CutOff:
		ic := "Ic " + models.FormatValue(t.Ic, "A")
		if math.Abs(t.Ic) < report.CurrentFloor {
			ic = "Ic under " + models.FormatValue(report.CurrentFloor, "A")
		}
		w = append(w, fmt.Sprintf("%s is cut off at idle (%s): it passes no signal until driven on", t.Ref, ic))
	case Reverse:
		w = append(w, fmt.Sprintf("%s works in reverse (collector and emitter swapped in effect): check its pins", t.Ref))
	case Active:
		if m := leakageWarning(t, c); m != "" {
			w = append(w, m)
		}
	}
	switch t.NearRail {
	case "gnd":
		w = append(w, fmt.Sprintf("%s's collector sits %s ground (under %g V of room to swing)", t.Ref, distance(t.RailRoom), RailMargin))
	case "v+":
		w = append(w, fmt.Sprintf("%s's collector sits %s the supply rail (under %g V of room to swing)", t.Ref, distance(t.RailRoom), RailMargin))
	}
	return w
}

// drivesBase tells whether node n is another transistor's base, directly
// or through that transistor's base resistance. A collector that drives
// the next base directly (the direct-coupled pair of a shunt-feedback
// fuzz) sits one base–emitter drop from that transistor's emitter by
// design, so the rail-room warning would only mislead there.
func drivesBase(c *models.Circuit, n int, self string) bool {
	for _, e := range c.Elements {
		if e.Kind != models.BJTKind || e.Ref == self {
			continue
		}
		if e.Nodes[1] == n {
			return true
		}
		if rb := c.Element(models.InternalNode(e.Ref, "rb")); rb != nil && slices.Contains(rb.Nodes, n) && slices.Contains(rb.Nodes, e.Nodes[1]) {
			return true
		}
	}
	return false
}

// leakageWarning words an active transistor whose base current runs
// against its collector current: the collector–base leakage (Icbo at the
// circuit's temperature) is more than the base current the collector
// current needs, so the bias network takes current out of the base lead
// of an NPN (into that of a PNP). A germanium part does this at a few
// hundred µA; then Ic/Ib is no reading of hFE, and how far the collector
// current follows the leakage (doubling every ten kelvin or so) depends
// on the bias network. "" otherwise.
func leakageWarning(t Transistor, c *models.Circuit) string {
	if t.Ic == 0 || t.Ib == 0 || (t.Ic > 0) == (t.Ib > 0) {
		return ""
	}
	e := c.Element(t.Ref)
	if e == nil || e.Kind != models.BJTKind || e.BJT.Icbo <= 0 {
		return ""
	}
	icbo := models.LeakageAt(e.BJT.Icbo, e.BJT.LeakDoubling, c.Temperature, models.NominalTemperature)
	return fmt.Sprintf("%s's leakage (Icbo %s at %.0f °C) is more than the base current its Ic needs: the base lead carries %s the other way, so Ic/Ib is no reading of hFE (βF %g); a temperature table shows how far Ic follows the leakage",
		t.Ref, models.FormatValue(icbo, "A"), c.Temperature-models.ZeroCelsius, models.FormatValue(math.Abs(t.Ib), "A"), e.BJT.BetaF)
}

// distance words how far a node sits from a rail: "at" below the display
// floor of voltages, else "X V from".
func distance(d float64) string {
	if d < report.VoltageFloor {
		return "at"
	}
	return models.FormatValue(d, "V") + " from"
}

// Kind is the transistor's part kind, npn or pnp.
func (t *Transistor) Kind() chains.PartKind {
	if t.PNP {
		return chains.PNP
	}
	return chains.NPN
}

// Transistor returns the transistor of the given ref, or nil.
func (b *Bias) Transistor(ref string) *Transistor {
	for i := range b.Transistors {
		if b.Transistors[i].Ref == ref {
			return &b.Transistors[i]
		}
	}
	return nil
}

// Voltage returns the named node's voltage (0 for "gnd").
func (b *Bias) Voltage(name string) (float64, bool) {
	if name == "gnd" {
		return 0, true
	}
	for _, n := range b.Nodes {
		if n.Name == name {
			return n.Volts, true
		}
	}
	return 0, false
}
