package chains

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"renderchain/models"
)

// Position is one position of a switch part: its name and the pairs of
// nodes its contacts join in that position. Different positions may join
// different nodes; a position that joins nothing is "off".
type Position struct {
	Name    string
	Connect [][2]string
}

// DefaultContactResistance is the resistance of a closed switch contact,
// 50 mΩ: small toggle and rotary switches are specified at a few tens of
// milliohms of contact resistance when new (common practice; from memory
// of switch datasheets). An open contact is absent: no capacitance and no
// leakage across it.
const DefaultContactResistance = 0.05

// parsePositions reads positions = [{ name = "…", connect = [["a", "b"],
// …] }, …].
func (p *Part) parsePositions(v any) error {
	list, err := tables(v, `positions must be a list of tables, e.g. positions = [{ name = "bright", connect = [["t", "c1"]] }, …]`)
	if err != nil {
		return err
	}
	if len(list) < 2 {
		return fmt.Errorf("a switch needs at least two positions")
	}
	seen := map[string]bool{}
	for i, m := range list {
		pos := Position{}
		name, _ := m["name"].(string)
		where := fmt.Sprintf("position %d", i+1)
		if name == "" {
			return fmt.Errorf("%s: needs a name", where)
		}
		if !validID(name) {
			return fmt.Errorf("%s: name %q: use letters, digits, '-' and '_'", where, name)
		}
		if _, err := strconv.Atoi(name); err == nil {
			return fmt.Errorf("%s: name %q is a number; a number selects a position by its place", where, name)
		}
		if seen[name] {
			return fmt.Errorf("%s: duplicate name %q", where, name)
		}
		seen[name] = true
		pos.Name = name
		for key := range m {
			if key != "name" && key != "connect" {
				return fmt.Errorf("%s: unknown key %q (a position has name and connect)", where, key)
			}
		}
		pairs, ok := m["connect"].([]any)
		if !ok && m["connect"] != nil {
			return fmt.Errorf("%s: connect must be a list of node pairs, e.g. connect = [[\"t\", \"c1\"]]", where)
		}
		for k, x := range pairs {
			pair, ok := x.([]any)
			if !ok || len(pair) != 2 {
				return fmt.Errorf("%s: contact %d must be a pair of node names", where, k+1)
			}
			var ab [2]string
			for j, y := range pair {
				s, ok := y.(string)
				if !ok || s == "" {
					return fmt.Errorf("%s: contact %d: pin %d is not a node name", where, k+1, j+1)
				}
				if err := checkNodeName(s); err != nil {
					return fmt.Errorf("%s: %v", where, err)
				}
				ab[j] = s
				p.Pins[fmt.Sprintf("%s.%d%c", name, k+1, 'a'+j)] = s
			}
			switch {
			case ab[0] == ab[1]:
				return fmt.Errorf("%s: contact %d joins %s to itself", where, k+1, ab[0])
			case ab[0] == "v+" && ab[1] == "gnd" || ab[0] == "gnd" && ab[1] == "v+":
				return fmt.Errorf("%s: contact %d would short the supply (v+ to gnd)", where, k+1)
			}
			pos.Connect = append(pos.Connect, ab)
		}
		p.Positions = append(p.Positions, pos)
	}
	p.Position = 0
	p.Text = p.Positions[0].Name
	return nil
}

// selectPosition sets the switch's position from a value as written: a
// position's name, or its place counting from 1 (a TOML integer or a
// text such as "2").
func (p *Part) selectPosition(v any) error {
	names := make([]string, len(p.Positions))
	for i, pos := range p.Positions {
		names[i] = pos.Name
	}
	bad := func() error {
		return fmt.Errorf("position %v is not one of 1…%d or %s", v, len(p.Positions), strings.Join(names, ", "))
	}
	var n float64
	switch x := v.(type) {
	case string:
		s := strings.TrimSpace(x)
		for i, name := range names {
			if s == name {
				p.Position, p.Text = i, name
				return nil
			}
		}
		k, err := strconv.Atoi(s)
		if err != nil {
			return bad()
		}
		n = float64(k)
	default:
		f, ok := number(v)
		if !ok {
			return bad()
		}
		n = f
	}
	if n != math.Trunc(n) || n < 1 || n > float64(len(p.Positions)) {
		return bad()
	}
	p.Position = int(n) - 1
	p.Text = p.Positions[p.Position].Name
	return nil
}

// checkSwitch completes a switch part.
func (p *Part) checkSwitch() error {
	if len(p.Positions) < 2 || p.Position < 0 || p.Position >= len(p.Positions) {
		return fmt.Errorf("a switch needs at least two positions and one of them selected")
	}
	return nil
}

// ContactResistance is the switch's closed-contact resistance, Ω.
func (p *Part) ContactResistance() float64 {
	if r, ok := p.Params["contact_resistance"]; ok {
		return r
	}
	return DefaultContactResistance
}

// addSwitch flattens a switch in its selected position: each closed
// contact a resistor of the contact resistance named REF#contactK (K
// counting the position's pairs from 1); open contacts are left out. It
// returns the nodes the other positions name that this one leaves
// unconnected by the switch: Build gives each that has no DC path left a
// leak to ground, so a part left hanging on an open contact (a tone cap
// not selected) keeps a defined DC voltage.
func (p *Part) addSwitch(c *models.Circuit, ref string, node func(string) int) []int {
	pos := p.Positions[p.Position]
	closed := map[int]bool{}
	for k, ab := range pos.Connect {
		a, b := node(ab[0]), node(ab[1])
		closed[a], closed[b] = true, true
		if a == b {
			continue // joined already (a stage's in and out of a shunt stage)
		}
		c.Add(models.Element{Ref: models.InternalNode(ref, fmt.Sprintf("contact%d", k+1)), Kind: models.ResistorKind,
			Nodes: []int{a, b}, Value: p.ContactResistance()})
	}
	var open []int
	for i, other := range p.Positions {
		if i == p.Position {
			continue
		}
		for _, ab := range other.Connect {
			for _, name := range ab {
				if n := node(name); n != models.Ground && !closed[n] {
					open = append(open, n)
					closed[n] = true // once
				}
			}
		}
	}
	return open
}

// PositionNames lists a switch's position names in order.
func (p *Part) PositionNames() []string {
	s := make([]string, len(p.Positions))
	for i, pos := range p.Positions {
		s[i] = pos.Name
	}
	return s
}

// leakOpenContacts gives each node in open that no DC path joins to
// ground (a tone cap left on an open contact) a models.LeakResistance to
// ground named "leak.NODE": board leakage standing in for what an open
// contact leaves undefined. Nodes with a DC path keep nothing extra, so an
// open contact stays absent.
func leakOpenContacts(c *models.Circuit, open []int) {
	if len(open) == 0 {
		return
	}
	root := make([]int, len(c.Nodes))
	for i := range root {
		root[i] = i
	}
	find := func(i int) int {
		for root[i] != i {
			root[i] = root[root[i]]
			i = root[i]
		}
		return i
	}
	join := func(a, b int) { root[find(a)] = find(b) }
	// DC paths: every element's pins but a capacitor's, a MOSFET's gate,
	// a controlled source's, and between an ideal transformer's windings
	// (models.Circuit.Check's rule).
	for _, e := range c.Elements {
		switch e.Kind {
		case models.CapacitorKind, models.ControlledCurrentKind:
		case models.MOSFETKind:
			join(e.Nodes[0], e.Nodes[2])
		case models.BufferKind:
			join(e.Nodes[0], models.Ground)
		case models.IdealTransformerKind:
			for k := 0; k+1 < len(e.Nodes); k += 2 {
				join(e.Nodes[k], e.Nodes[k+1])
			}
		default:
			for _, n := range e.Nodes[1:] {
				join(e.Nodes[0], n)
			}
		}
	}
	done := map[int]bool{}
	for _, n := range open {
		if done[n] || find(n) == find(models.Ground) {
			continue
		}
		done[n] = true
		c.Add(models.Element{Ref: "leak." + c.Nodes[n], Kind: models.ResistorKind, Nodes: []int{n, models.Ground}, Value: models.LeakResistance})
		join(n, models.Ground)
	}
}
