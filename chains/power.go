package chains

import (
	"fmt"
	"strings"
)

// rawPower is the [power] table: a supply network written like a stage
// (a template with knobs and values, or parts), without id, buffer or
// environment.
type rawPower struct {
	Template string           `toml:"template"`
	About    string           `toml:"about"`
	Knobs    map[string]any   `toml:"knobs"`
	Values   map[string]any   `toml:"values"`
	Parts    []map[string]any `toml:"parts"`
}

// parsePower reads the [power] table into ch.Power: the supply network
// between the ideal supply (on node emf) and v+, the rail every stage
// sees. Its parts are "power.REF", its own nodes "power.NAME". A supply
// template's diodes are written for a positive supply; on a negative one
// (a positive-ground build) they are turned round, so a series
// reverse-protection diode still conducts the right way. Parts written
// out are taken as written.
func (ch *Chain) parsePower(rp *rawPower) error {
	if rp == nil {
		return nil
	}
	st, err := ch.parseStage(powerBlock, rawStage{ID: PowerID, Template: rp.Template, About: rp.About,
		Knobs: rp.Knobs, Values: rp.Values, Parts: rp.Parts})
	if err != nil {
		if e, ok := err.(*Error); ok && strings.HasPrefix(e.Where, "stage "+PowerID) {
			e.Where = PowerID + strings.TrimPrefix(e.Where, "stage "+PowerID)
		}
		return err
	}
	if st.Template != "" {
		t, err := LoadTemplate(st.Template)
		if err != nil {
			return err
		}
		if !t.Supply {
			return &Error{File: ch.File, Line: ch.loc.find(powerBlock, "template"), Where: PowerID,
				Msg: fmt.Sprintf("template %s is a stage, not a supply network (supply networks: %s)", st.Template, strings.Join(supplyTemplateNames(), ", "))}
		}
		if ch.Supply < 0 {
			for _, p := range st.Parts {
				if p.Kind == Diode {
					p.Pins["anode"], p.Pins["cathode"] = p.Pins["cathode"], p.Pins["anode"]
				}
			}
		}
	}
	st.index = powerBlock
	ch.Power = st
	return nil
}

// checkStageTemplate refuses a supply-network template used as a stage,
// and a stage whose id clashes with the [power] table's.
func (ch *Chain) checkStageTemplate(k int, st *Stage) error {
	if ch.Power != nil && st.ID == PowerID {
		return &Error{File: ch.File, Line: ch.loc.find(k, "id"), Where: "stage " + st.ID,
			Msg: fmt.Sprintf("id %q is taken by the [power] table: pick another", PowerID)}
	}
	if st.Template == "" {
		return nil
	}
	t, err := LoadTemplate(st.Template)
	if err != nil {
		return err
	}
	if t.Supply {
		return &Error{File: ch.File, Line: ch.loc.find(k, "template"), Where: "stage " + st.ID,
			Msg: fmt.Sprintf("template %s is a supply network: put it in a [power] table (template = %q there)", t.Name, t.Name)}
	}
	return nil
}

// supplyTemplateNames lists the built-in supply-network templates.
func supplyTemplateNames() []string {
	var s []string
	for _, name := range TemplateNames() {
		if t, err := LoadTemplate(name); err == nil && t.Supply {
			s = append(s, name)
		}
	}
	return s
}
