package bias

import (
	"errors"
	"fmt"
	"sort"
	"strings"

	"renderchain/chains"
	"renderchain/models"
)

var sprintf = fmt.Sprintf

// keyErr is the error of a key a user wrote (a target, a spec, an
// adjuster): a *models.FieldError on field.
func keyErr(field, key, format string, a ...any) error {
	return models.Fieldf(field, key, format, a...)
}

// relabel gives a *models.FieldError the field of its caller's option.
func relabel(err error, field string) error {
	var fe *models.FieldError
	if errors.As(err, &fe) {
		c := *fe
		c.Field = field
		return &c
	}
	return err
}

// Quantities a transistor key may name: STAGE.REF.Q. Voltages are signed
// as measured (negative for a PNP's vbe, vce, ic in normal operation).
var transistorQuantities = map[string]models.Quantity{
	"vc": models.Voltage, "vb": models.Voltage, "ve": models.Voltage,
	"vce": models.Voltage, "vbe": models.Voltage, "vbc": models.Voltage,
	"ic": models.Current, "ib": models.Current, "ie": models.Current,
}

// Quantities a FET key may name (JFETs and MOSFETs): STAGE.REF.Q, signed
// as measured.
var fetQuantities = map[string]models.Quantity{
	"vd": models.Voltage, "vg": models.Voltage, "vs": models.Voltage,
	"vds": models.Voltage, "vgs": models.Voltage,
	"id": models.Current, "ig": models.Current,
}

// quantityOf is the quantity a device key names: a transistor's or a
// FET's.
func quantityOf(q string) (models.Quantity, bool) {
	if k, ok := transistorQuantities[q]; ok {
		return k, true
	}
	k, ok := fetQuantities[q]
	return k, ok
}

func quantityNames(m map[string]models.Quantity) string {
	var s []string
	for k := range m {
		s = append(s, k)
	}
	sort.Strings(s)
	return strings.Join(s, ", ")
}

// Probe names one DC quantity of a chain: a transistor's or a FET's
// terminal voltage or current (Ref and Quantity set, e.g. fuzz.Q2 and
// "vc", boost.Q1 and "vd") or a node's voltage (Node set, e.g. "fuzz.c2").
type Probe struct {
	Key      string // as written, "fuzz.Q2.vc"
	Ref      string // "fuzz.Q2"
	Stage    string // "fuzz"
	Part     string // "Q2"
	Quantity string // vc, vb, ve, vce, vbe, vbc, ic, ib, ie; vd, vg, vs, vds, vgs, id, ig; "v" for a node
	Node     string
}

// Unit returns the SI unit symbol of the probed quantity.
func (p *Probe) Unit() string {
	if q, _ := quantityOf(p.Quantity); q == models.Current {
		return "A"
	}
	return "V"
}

// Kind is the quantity of the probed value (a voltage or a current).
func (p *Probe) Kind() models.Quantity {
	if p.Quantity == "v" {
		return models.Voltage
	}
	q, _ := quantityOf(p.Quantity)
	return q
}

// ParseProbe reads a probe key against a chain: STAGE.REF.Q for a
// transistor quantity or a node name (STAGE.NODE, or out, in, v+). A key
// that names nothing is a *models.FieldError on the field "key" (callers
// relabel it with their option's field).
func ParseProbe(ch *chains.Chain, key string) (*Probe, error) {
	key = strings.TrimSpace(key)
	parts := strings.Split(key, ".")
	switch {
	case key == "":
		return nil, keyErr("key", key, "empty key (want STAGE.REF.QUANTITY or a node name)")
	case len(parts) == 3:
		st := ch.Stage(parts[0])
		if st == nil {
			return nil, keyErr("key", key, "no stage %q (stages: %s)", parts[0], stageIDs(ch))
		}
		q := strings.ToLower(parts[2])
		var found *chains.Part
		var refs []string
		for _, p := range st.Parts {
			if p.Kind.Transistor() || p.Kind.FET() {
				refs = append(refs, p.Ref)
				if p.Ref == parts[1] {
					found = p
				}
			}
		}
		if found == nil {
			return nil, keyErr("key", key, "stage %s has no transistor or FET %q (they are: %s)", st.ID, parts[1], listOrNone(refs))
		}
		if found.Kind.FET() {
			if _, ok := fetQuantities[q]; !ok {
				return nil, keyErr("key", key, "%q is not a FET quantity (%s)", parts[2], quantityNames(fetQuantities))
			}
		} else if _, ok := transistorQuantities[q]; !ok {
			return nil, keyErr("key", key, "%q is not a transistor quantity (%s)", parts[2], quantityNames(transistorQuantities))
		}
		return &Probe{Key: key, Ref: st.ID + "." + found.Ref, Stage: st.ID, Part: found.Ref, Quantity: q}, nil
	case len(parts) <= 2:
		c, err := ch.Build()
		if err != nil {
			return nil, err
		}
		if n, err := ch.Wiring().Resolve(c, key); err == nil && n > 0 {
			name := c.Nodes[n]
			return &Probe{Key: key, Quantity: "v", Node: name, Stage: stageOfNode(name)}, nil
		}
		return nil, keyErr("key", key, "no node %q (want STAGE.REF.QUANTITY, e.g. fuzz.Q2.vc, or a node such as %s)", key, someNodes(c))
	}
	return nil, keyErr("key", key, "want STAGE.REF.QUANTITY (e.g. fuzz.Q2.vc) or a node name (e.g. fuzz.c2)")
}

func stageOfNode(n string) string {
	if i := strings.IndexByte(n, '.'); i > 0 {
		return n[:i]
	}
	return ""
}

func someNodes(c *models.Circuit) string {
	var s []string
	for _, n := range c.Nodes[1:] {
		if !internalNode(n) {
			s = append(s, n)
		}
		if len(s) == 8 {
			s = append(s, "…")
			break
		}
	}
	return strings.Join(s, ", ")
}

func stageIDs(ch *chains.Chain) string {
	var ids []string
	for _, s := range ch.Stages {
		ids = append(ids, s.ID)
	}
	return strings.Join(ids, ", ")
}

func listOrNone(s []string) string {
	if len(s) == 0 {
		return "none"
	}
	return strings.Join(s, ", ")
}

// Read returns the probed quantity at an operating point.
func (p *Probe) Read(b *Bias) (float64, error) {
	if p.Quantity == "v" {
		v, ok := b.Voltage(p.Node)
		if !ok {
			return 0, keyErr("key", p.Key, "no node %q in the circuit", p.Node)
		}
		return v, nil
	}
	if _, ok := fetQuantities[p.Quantity]; ok {
		f := b.FET(p.Ref)
		if f == nil {
			return 0, keyErr("key", p.Key, "no FET %s in the circuit", p.Ref)
		}
		switch p.Quantity {
		case "vd":
			return f.Vd, nil
		case "vg":
			return f.Vg, nil
		case "vs":
			return f.Vs, nil
		case "vds":
			return f.Vds, nil
		case "vgs":
			return f.Vgs, nil
		case "id":
			return f.Id, nil
		case "ig":
			return f.Ig, nil
		}
	}
	t := b.Transistor(p.Ref)
	if t == nil {
		return 0, keyErr("key", p.Key, "no transistor %s in the circuit", p.Ref)
	}
	switch p.Quantity {
	case "vc":
		return t.Vc, nil
	case "vb":
		return t.Vb, nil
	case "ve":
		return t.Ve, nil
	case "vce":
		return t.Vce, nil
	case "vbe":
		return t.Vbe, nil
	case "vbc":
		return t.Vbc, nil
	case "ic":
		return t.Ic, nil
	case "ib":
		return t.Ib, nil
	case "ie":
		return t.Ie, nil
	}
	return 0, keyErr("key", p.Key, "unknown quantity %q", p.Quantity)
}

// format writes a value of the probe's quantity.
func (p *Probe) format(v float64) string { return models.FormatValue(v, p.Unit()) }
