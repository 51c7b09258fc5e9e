package bias

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/models"
)

// Ohmic is the region of a field-effect transistor whose channel is open
// but whose drain–source voltage is below its overdrive (Vds < Vgs − Vto
// in n polarity): it acts as a gate-controlled resistor (the "triode" or
// "linear" region of FET texts). A FET's amplifying region, called
// saturation in FET texts, is reported as Active, as for the transistor.
const Ohmic Region = "ohmic"

// FET is a JFET or MOSFET at its operating point, signed as measured (a
// p-channel device in normal operation has negative Vgs, Vds and Id; Id
// flows into the drain).
type FET struct {
	Ref                  string
	Kind                 chains.PartKind
	Drain, Gate, Source  string
	Vd, Vg, Vs, Vgs, Vds float64
	Id, Ig               float64
	Power                float64 // Vgs·Ig + Vds·Id, W
	// Overdrive is Vgs − Vto in n polarity: how far the gate sits past
	// pinch-off (JFET, Vto = −|Vp|) or threshold (MOSFET, Vto = Vth).
	Overdrive float64
	Region    Region
	// FloatingGate marks a MOSFET gate that nothing but board leakage
	// (models.LeakResistance) holds.
	FloatingGate bool
}

// OpAmp is an op-amp at its operating point: its pins' voltages, the
// output's swing limits at these rails (the rails less the macromodel's
// headroom) and the room left to each.
type OpAmp struct {
	Ref                                string
	NonInv, Inv, Out, RailPos, RailNeg string
	Vnoninv, Vinv, Vout, Vpos, Vneg    float64
	High, Low                          float64 // the output's swing limits, V
	RoomUp, RoomDown                   float64 // High − Vout and Vout − Low, V
	Region                             Region  // Active, or SaturatedHigh / SaturatedLow
	knee                               float64
}

// The op-amp's regions besides Active.
const (
	SaturatedHigh Region = "at the high limit"
	SaturatedLow  Region = "at the low limit"
)

// FETRegionRule states the FET region rule in words.
func FETRegionRule() string {
	return "in n polarity, with Vto = −|pinch-off| (JFET) or the threshold (MOSFET): reverse if Vds < 0; cut-off if Vgs ≤ Vto; " +
		"ohmic if Vds < Vgs − Vto; else active (the saturation region of FET texts)"
}

// fetAt reads a JFET or MOSFET element at the operating point.
func fetAt(c *models.Circuit, op *mna.OperatingPoint, e models.Element, d mna.DeviceState) FET {
	nd, ng, ns := e.Nodes[0], e.Nodes[1], e.Nodes[2]
	f := FET{Ref: e.Ref, Drain: c.Nodes[nd], Gate: c.Nodes[ng], Source: c.Nodes[ns],
		Vd: op.Node[nd], Vg: op.Node[ng], Vs: op.Node[ns], Vgs: d.V[0], Vds: d.V[1], Ig: d.I[0], Id: d.I[1]}
	f.Power = f.Vgs*f.Ig + f.Vds*f.Id
	p, vto := false, 0.0
	switch e.Kind {
	case models.JFETKind:
		p, vto = e.JFET.PChannel, -e.JFET.Pinchoff
		f.Kind = map[bool]chains.PartKind{false: chains.NJFET, true: chains.PJFET}[p]
	case models.MOSFETKind:
		p, vto = e.MOSFET.PChannel, e.MOSFET.Threshold
		f.Kind = map[bool]chains.PartKind{false: chains.NMOSFET, true: chains.PMOSFET}[p]
		f.FloatingGate = c.Element("leak."+f.Gate) != nil
	}
	s := 1.0
	if p {
		s = -1
	}
	vgs, vds := s*f.Vgs, s*f.Vds
	f.Overdrive = vgs - vto
	switch {
	case vds < 0:
		f.Region = Reverse
	case f.Overdrive <= 0:
		f.Region = CutOff
	case vds < f.Overdrive:
		f.Region = Ohmic
	default:
		f.Region = Active
	}
	return f
}

// JFETGateConduction is the forward gate–channel voltage, V, above which a
// JFET's gate junction is reported as conducting (a silicon junction's
// current becomes noticeable from about 0.4 V: common practice).
const JFETGateConduction = 0.4

func fetWarnings(f FET) []string {
	var w []string
	switch f.Region {
	case CutOff:
		w = append(w, fmt.Sprintf("%s is cut off at idle (Vgs %s): it passes no signal until driven on", f.Ref, models.FormatValue(f.Vgs, "V")))
	case Ohmic:
		w = append(w, fmt.Sprintf("%s sits in the ohmic region at idle (Vds %s, below its overdrive %s): its drain has little room to swing (as meant only for a FET used as a switch or variable resistor)",
			f.Ref, models.FormatValue(f.Vds, "V"), models.FormatValue(f.Overdrive, "V")))
	case Reverse:
		w = append(w, fmt.Sprintf("%s works with drain and source swapped (Vds %s): check its pins", f.Ref, models.FormatValue(f.Vds, "V")))
	}
	s := 1.0
	if f.Kind == chains.PJFET {
		s = -1
	}
	if (f.Kind == chains.NJFET || f.Kind == chains.PJFET) && (s*f.Vgs > JFETGateConduction || s*(f.Vgs-f.Vds) > JFETGateConduction) {
		w = append(w, fmt.Sprintf("%s's gate junction is forward biased at idle (Vgs %s): gate current flows", f.Ref, models.FormatValue(f.Vgs, "V")))
	}
	if f.FloatingGate {
		w = append(w, fmt.Sprintf("%s's gate has no DC path but board leakage (1 TΩ assumed): on a real board its idle voltage is undefined; give it a gate resistor", f.Ref))
	}
	return w
}

// opAmps finds the op-amps of c by the elements models.Circuit.AddPart
// builds for each (REF#gm, REF#rin, REF#high, REF#low, REF#buf and
// REF#rout) and reads them at the operating point.
func opAmps(c *models.Circuit, op *mna.OperatingPoint) []OpAmp {
	var out []OpAmp
	for _, e := range c.Elements {
		ref, ok := strings.CutSuffix(e.Ref, models.InternalMark+"gm")
		if !ok || e.Kind != models.ControlledCurrentKind {
			continue
		}
		part := func(role string) *models.Element { return c.Element(models.InternalNode(ref, role)) }
		rin, high, low, buf := part("rin"), part("high"), part("low"), part("buf")
		if rin == nil || high == nil || low == nil || buf == nil {
			continue
		}
		outNode := buf.Nodes[0]
		if rout := part("rout"); rout != nil {
			outNode = rout.Nodes[1]
		}
		gain := buf.Nodes[1]
		a := OpAmp{Ref: ref, NonInv: c.Nodes[rin.Nodes[0]], Inv: c.Nodes[rin.Nodes[1]], Out: c.Nodes[outNode],
			RailPos: c.Nodes[high.Nodes[1]], RailNeg: c.Nodes[low.Nodes[0]],
			Vnoninv: op.Node[rin.Nodes[0]], Vinv: op.Node[rin.Nodes[1]], Vout: op.Node[outNode],
			Vpos: op.Node[high.Nodes[1]], Vneg: op.Node[low.Nodes[0]], knee: high.Limiter.Knee}
		// The limiters' onsets are minus the headroom (models.AddPart).
		a.High, a.Low = a.Vpos+high.Limiter.Onset, a.Vneg-low.Limiter.Onset
		a.RoomUp, a.RoomDown = a.High-a.Vout, a.Vout-a.Low
		a.Region = Active
		switch vg := op.Node[gain]; {
		case vg > a.High-SaturationKnees*a.knee:
			a.Region = SaturatedHigh
		case vg < a.Low+SaturationKnees*a.knee:
			a.Region = SaturatedLow
		}
		out = append(out, a)
	}
	return out
}

// SaturationKnees is how many knee widths of the op-amp macromodel's
// output limiter the gain node may come within its swing limit before the
// op-amp is reported as saturated: at 3 widths the limiter's slope is 5 %
// of its full conductance (the logistic function at −3).
const SaturationKnees = 3

// LopsidedRoom is the ratio of the smaller to the larger output room
// below which an op-amp's idle point is reported as lopsided: the output
// clips on one side at under half the swing it has on the other.
const LopsidedRoom = 0.5

func opAmpWarnings(a OpAmp) []string {
	var w []string
	switch {
	case a.Vpos <= a.Vneg:
		return []string{fmt.Sprintf("%s's rail_pos (%s, %s) is not above its rail_neg (%s, %s): check its supply pins",
			a.Ref, a.RailPos, models.FormatValue(a.Vpos, "V"), a.RailNeg, models.FormatValue(a.Vneg, "V"))}
	case a.Region != Active:
		w = append(w, fmt.Sprintf("%s's output is %s at idle (%s): it passes no signal that way; check the reference and the feedback's DC path",
			a.Ref, a.Region, models.FormatValue(a.Vout, "V")))
	case math.Min(a.RoomUp, a.RoomDown) < LopsidedRoom*math.Max(a.RoomUp, a.RoomDown):
		w = append(w, fmt.Sprintf("%s's output idles at %s, %s below its high limit and %s above its low one: it clips on one side first",
			a.Ref, models.FormatValue(a.Vout, "V"), models.FormatValue(a.RoomUp, "V"), models.FormatValue(a.RoomDown, "V")))
	}
	for _, in := range []struct {
		name string
		v    float64
	}{{a.NonInv, a.Vnoninv}, {a.Inv, a.Vinv}} {
		if in.v > math.Max(a.Vpos, a.Vneg) || in.v < math.Min(a.Vpos, a.Vneg) {
			w = append(w, fmt.Sprintf("%s's input %s sits at %s, outside its rails: a real part misbehaves there, and the model does not show it",
				a.Ref, in.name, models.FormatValue(in.v, "V")))
		}
	}
	return w
}

// readDevices adds the FETs and op-amps of the operating point to b.
func (b *Bias) readDevices(c *models.Circuit, op *mna.OperatingPoint) {
	for _, d := range op.Devices {
		e := c.Elements[d.Element]
		if e.Kind == models.JFETKind || e.Kind == models.MOSFETKind {
			f := fetAt(c, op, e, d)
			b.FETs = append(b.FETs, f)
			b.Warnings.Merge(fetWarnings(f))
		}
	}
	b.OpAmps = opAmps(c, op)
	for _, a := range b.OpAmps {
		b.Warnings.Merge(opAmpWarnings(a))
	}
}

// FETReport is one FET in a BiasReport.
type FETReport struct {
	Ref         string          `json:"ref"`
	Kind        chains.PartKind `json:"kind"`
	Drain       string          `json:"drain"`
	Gate        string          `json:"gate"`
	Source      string          `json:"source"`
	VdV         float64         `json:"vd_v"`
	VgV         float64         `json:"vg_v"`
	VsV         float64         `json:"vs_v"`
	VgsV        float64         `json:"vgs_v"`
	VdsV        float64         `json:"vds_v"`
	IdA         float64         `json:"id_a"`
	IgA         float64         `json:"ig_a"`
	PowerW      float64         `json:"power_w"`
	OverdriveV  float64         `json:"overdrive_v"`
	Region      Region          `json:"region"`
	GateLeakage bool            `json:"gate_held_by_leakage_only,omitempty"`
}

// OpAmpReport is one op-amp in a BiasReport.
type OpAmpReport struct {
	Ref       string  `json:"ref"`
	NonInv    string  `json:"noninv"`
	Inv       string  `json:"inv"`
	Out       string  `json:"out"`
	RailPos   string  `json:"rail_pos"`
	RailNeg   string  `json:"rail_neg"`
	VnoninvV  float64 `json:"vnoninv_v"`
	VinvV     float64 `json:"vinv_v"`
	VoutV     float64 `json:"vout_v"`
	VposV     float64 `json:"vpos_v"`
	VnegV     float64 `json:"vneg_v"`
	HighV     float64 `json:"swing_high_v"`
	LowV      float64 `json:"swing_low_v"`
	RoomUpV   float64 `json:"room_up_v"`
	RoomDownV float64 `json:"room_down_v"`
	Region    Region  `json:"region"`
}

func otherReports(b *Bias) ([]FETReport, []OpAmpReport) {
	fets, amps := []FETReport{}, []OpAmpReport{}
	for _, f := range b.FETs {
		fets = append(fets, FETReport{Ref: f.Ref, Kind: f.Kind, Drain: f.Drain, Gate: f.Gate, Source: f.Source,
			VdV: f.Vd, VgV: f.Vg, VsV: f.Vs, VgsV: f.Vgs, VdsV: f.Vds, IdA: f.Id, IgA: f.Ig, PowerW: f.Power,
			OverdriveV: f.Overdrive, Region: f.Region, GateLeakage: f.FloatingGate})
	}
	for _, a := range b.OpAmps {
		amps = append(amps, OpAmpReport{Ref: a.Ref, NonInv: a.NonInv, Inv: a.Inv, Out: a.Out, RailPos: a.RailPos, RailNeg: a.RailNeg,
			VnoninvV: a.Vnoninv, VinvV: a.Vinv, VoutV: a.Vout, VposV: a.Vpos, VnegV: a.Vneg, HighV: a.High, LowV: a.Low,
			RoomUpV: a.RoomUp, RoomDownV: a.RoomDown, Region: a.Region})
	}
	return fets, amps
}

// FET returns the FET of the given ref, or nil.
func (b *Bias) FET(ref string) *FET {
	for i := range b.FETs {
		if b.FETs[i].Ref == ref {
			return &b.FETs[i]
		}
	}
	return nil
}

// OpAmp returns the op-amp of the given ref, or nil.
func (b *Bias) OpAmp(ref string) *OpAmp {
	for i := range b.OpAmps {
		if b.OpAmps[i].Ref == ref {
			return &b.OpAmps[i]
		}
	}
	return nil
}

// inductiveLoad reports whether node n is wired to an inductor or to a
// transformer winding: a collector loaded so idles near the supply rail by
// design and swings beyond it, so the rail-margin warning does not apply.
func inductiveLoad(c *models.Circuit, n int) bool {
	for _, e := range c.Elements {
		if !slices.Contains(e.Nodes, n) {
			continue
		}
		if e.Kind == models.InductorKind {
			return true
		}
		if part, _, ok := strings.Cut(e.Ref, models.InternalMark); ok {
			if x := c.Element(models.InternalNode(part, "ideal")); x != nil && x.Kind == models.IdealTransformerKind {
				return true
			}
		}
	}
	return false
}
