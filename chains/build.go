package chains

import (
	"fmt"

	"renderchain/models"
)

// Build flattens the chain into one circuit (see Flatten), for callers
// that need the circuit only; its findings short of errors are dropped.
func (ch *Chain) Build() (*models.Circuit, error) {
	f, err := ch.Flatten()
	if err != nil {
		return nil, err
	}
	return f.Circuit, nil
}

func (st *Stage) usesPin(name string) bool {
	for _, p := range st.Parts {
		for _, n := range p.Pins {
			if n == name {
				return true
			}
		}
	}
	return false
}

func (ch *Chain) addPart(c *models.Circuit, st *Stage, p *Part, node func(string) int) error {
	ref := st.ID + "." + p.Ref
	two := func(kind models.Kind, v float64) {
		c.Add(models.Element{Ref: ref, Kind: kind, Nodes: []int{node(p.Pins["1"]), node(p.Pins["2"])}, Value: v})
	}
	switch p.Kind {
	case Resistor:
		two(models.ResistorKind, p.Value)
	case Capacitor:
		two(models.CapacitorKind, p.Value)
	case Cable:
		two(models.CapacitorKind, p.Value*p.PerMetre)
	case Inductor:
		two(models.InductorKind, p.Value)
	case Pot:
		x := st.Knobs[p.Knob]
		lower, upper := models.PotSections(p.Value, p.Taper, x)
		ccw, wiper := node(p.Pins["ccw"]), node(p.Pins["wiper"])
		// A section whose ends are wired together (a wiper tied to an end,
		// common practice for a rheostat) carries no current: leave it out.
		if ccw != wiper {
			c.Add(models.Element{Ref: ref + ".ccw", Kind: models.ResistorKind, Nodes: []int{ccw, wiper}, Value: lower})
		}
		if cwName, ok := p.Pins["cw"]; ok {
			if cw := node(cwName); cw != wiper {
				c.Add(models.Element{Ref: ref + ".cw", Kind: models.ResistorKind, Nodes: []int{wiper, cw}, Value: upper})
			}
		}
	case Diode, NPN, PNP, NJFET, PJFET, NMOSFET, PMOSFET, OpAmp, Transformer:
		if err := ch.checkRails(p); err != nil {
			return &Error{File: ch.File, Where: "stage " + st.ID + ": part " + p.Ref, Msg: err.Error()}
		}
		if err := p.addDevice(c, ref, node); err != nil {
			return &Error{File: ch.File, Where: "stage " + st.ID, Msg: err.Error()}
		}
	default:
		return &Error{File: ch.File, Where: "part " + ref, Msg: fmt.Sprintf("kind %s cannot be built", p.Kind)}
	}
	return nil
}

// Stage returns the stage of the given id, or nil.
func (ch *Chain) Stage(id string) *Stage {
	for _, st := range ch.Stages {
		if st.ID == id {
			return st
		}
	}
	return nil
}

// Clone returns a deep copy of the chain, for variants.
func (ch *Chain) Clone() *Chain {
	d := *ch
	d.Stages = nil
	for _, st := range ch.Stages {
		d.Stages = append(d.Stages, st.clone())
	}
	if ch.Power != nil {
		d.Power = ch.Power.clone()
	}
	d.Nets = append([]string(nil), ch.Nets...)
	return &d
}

// clone returns a deep copy of the stage.
func (st *Stage) clone() *Stage {
	s := *st
	s.Knobs = map[string]float64{}
	for k, v := range st.Knobs {
		s.Knobs[k] = v
	}
	s.Parts = nil
	for _, p := range st.Parts {
		s.Parts = append(s.Parts, clonePart(p))
	}
	return &s
}
