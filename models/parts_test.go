package models_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"renderchain/models"
)

// TestAddPartBaseResistance: a transistor with base resistance goes in as
// a resistor from its base pin to the internal node "Q1#base" and the
// device on that node; added directly, without the internal node, Check
// refuses it and names the part.
func TestAddPartBaseResistance(t *testing.T) {
	c := models.NewCircuit("rb", tnom)
	vp, b, col := c.Node("v+"), c.Node("b"), c.Node("c")
	c.Add(models.Element{Ref: "V1", Kind: models.VoltageSourceKind, Nodes: []int{vp, models.Ground}, Value: 9})
	c.Add(models.Element{Ref: "RB", Kind: models.ResistorKind, Nodes: []int{vp, b}, Value: 1e6})
	c.Add(models.Element{Ref: "RC", Kind: models.ResistorKind, Nodes: []int{vp, col}, Value: 1e4})
	p := *models.Presets["si-npn"].Complete().BJT
	q := models.Element{Ref: "Q1", Kind: models.BJTKind, Nodes: []int{col, b, models.Ground}, BJT: p}
	bad := c.Clone()
	bad.Add(q)
	err := bad.Check()
	var ce *models.CircuitError
	if !errors.As(err, &ce) || ce.What != "Q1" || !strings.Contains(err.Error(), "AddPart") {
		t.Errorf("direct Add with base resistance: Check gave %v", err)
	}
	oneLine(t, err)
	idx, err := c.AddPart(q)
	if err != nil {
		t.Fatal(err)
	}
	if len(idx) != 2 {
		t.Fatalf("AddPart added %d elements, want the resistor and the device", len(idx))
	}
	rb, dev := c.Elements[idx[0]], c.Elements[idx[1]]
	inner := c.Lookup("Q1#base")
	if rb.Kind != models.ResistorKind || rb.Value != p.BaseResistance || rb.Nodes[0] != b || rb.Nodes[1] != inner || rb.Ref != "Q1#rb" {
		t.Errorf("base resistor %+v", rb)
	}
	if dev.Nodes[1] != inner || dev.Nodes[0] != col || !models.IsInternal(c.Nodes[inner]) {
		t.Errorf("device pins %v, internal node %d", dev.Nodes, inner)
	}
	if err := c.Check(); err != nil {
		t.Errorf("Check after AddPart: %v", err)
	}
}

// TestAddPartRejects: AddPart checks parameters before adding anything and
// names the part; parts (op-amps, transformers) put in with Add are
// refused by Check.
func TestAddPartRejects(t *testing.T) {
	good := models.OpAmpPresets["opamp-general-dual"].Params
	cases := []struct {
		name string
		e    models.Element
		want string
	}{
		{"op-amp gain", models.Element{Ref: "U1", Kind: models.OpAmpKind, Nodes: []int{1, 2, 3, 4, 0},
			OpAmp: func() models.OpAmpParams { p := good; p.Gain = 0.5; return p }()}, "gain"},
		{"op-amp NaN", models.Element{Ref: "U1", Kind: models.OpAmpKind, Nodes: []int{1, 2, 3, 4, 0},
			OpAmp: func() models.OpAmpParams { p := good; p.GBW = math.NaN(); return p }()}, "finite"},
		{"op-amp pins", models.Element{Ref: "U1", Kind: models.OpAmpKind, Nodes: []int{1, 2, 3}, OpAmp: good}, "5 pins"},
		{"transformer coupling", models.Element{Ref: "T1", Kind: models.TransformerKind, Nodes: []int{1, 0, 2, 0},
			Transformer: models.TransformerParams{Coupling: 1.2, Windings: []models.Winding{{1, 0}, {1, 0}}}}, "coupling"},
		{"transformer one winding", models.Element{Ref: "T1", Kind: models.TransformerKind, Nodes: []int{1, 0},
			Transformer: models.TransformerParams{Coupling: 0.9, Windings: []models.Winding{{1, 0}}}}, "two windings"},
		{"transformer inductance", models.Element{Ref: "T1", Kind: models.TransformerKind, Nodes: []int{1, 0, 2, 0},
			Transformer: models.TransformerParams{Coupling: 0.9, Windings: []models.Winding{{1, 0}, {-1, 0}}}}, "winding 2"},
		{"JFET idss", models.Element{Ref: "J1", Kind: models.JFETKind, Nodes: []int{1, 2, 0},
			JFET: models.JFETParams{Idss: 0, Pinchoff: 2, GateIs: 1e-14}}, "idss"},
		{"MOSFET threshold", models.Element{Ref: "M1", Kind: models.MOSFETKind, Nodes: []int{1, 2, 0},
			MOSFET: models.MOSFETParams{Threshold: math.Inf(1), K: 0.1}}, "finite"},
		{"zener knee", models.Element{Ref: "D1", Kind: models.DiodeKind, Nodes: []int{1, 0},
			Diode: models.DiodeParams{Is: 1e-14, N: 1, DiodeSecondOrder: models.DiodeSecondOrder{BreakdownVoltage: 5}}}, "knee"},
		{"grading", models.Element{Ref: "D1", Kind: models.DiodeKind, Nodes: []int{1, 0},
			Diode: models.DiodeParams{Is: 1e-14, N: 1, DiodeSecondOrder: models.DiodeSecondOrder{Junction: models.Depletion{C0: 1e-12, Potential: 0.7, Grading: 1}}}}, "grading"},
		{"limiter knee", models.Element{Ref: "L1", Kind: models.LimiterKind, Nodes: []int{1, 0},
			Limiter: models.LimiterParams{Conductance: 1}}, "knee"},
	}
	for _, tc := range cases {
		c := models.NewCircuit("x", tnom)
		for _, n := range []string{"a", "b", "c", "d"} {
			c.Node(n)
		}
		before := len(c.Elements)
		_, err := c.AddPart(tc.e)
		var ce *models.CircuitError
		if !errors.As(err, &ce) || ce.What != tc.e.Ref || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: AddPart gave %v, want a CircuitError on %s mentioning %q", tc.name, err, tc.e.Ref, tc.want)
		}
		oneLine(t, err)
		if len(c.Elements) != before {
			t.Errorf("%s: AddPart added elements despite the error", tc.name)
		}
	}
	for _, k := range []models.Kind{models.OpAmpKind, models.TransformerKind} {
		c := models.NewCircuit("x", tnom)
		a := c.Node("a")
		e := models.Element{Ref: "X1", Kind: k, Nodes: []int{a, 0, a, 0, a}, OpAmp: good}
		if k == models.TransformerKind {
			e.Nodes = []int{a, 0, a, 0}
			e.Transformer = models.TransformerParams{Coupling: 0.9, Windings: []models.Winding{{1, 0}, {1, 0}}}
		}
		c.Add(e)
		if err := c.Check(); err == nil || !strings.Contains(err.Error(), "AddPart") {
			t.Errorf("%s put in with Add: Check gave %v", k, err)
		}
	}
}

// TestAddPartOpAmp: the macromodel's elements have the values its doc
// comment derives: rg·gm = A0 (DC gain), 1/(2π·rg·cg) = GBW/A0 (the
// dominant pole), limiter onsets at minus the headrooms; every internal
// name carries the internal mark; the circuit passes Check and clones
// deeply. Tolerance 1e-12 relative (one division each).
func TestAddPartOpAmp(t *testing.T) {
	p := models.OpAmpPresets["opamp-general-dual"].Params
	c := models.NewCircuit("opamp", tnom)
	inp, inn, out, vp := c.Node("in+"), c.Node("in-"), c.Node("out"), c.Node("v+")
	c.Add(models.Element{Ref: "V1", Kind: models.VoltageSourceKind, Nodes: []int{vp, models.Ground}, Value: 9})
	c.Add(models.Element{Ref: "R1", Kind: models.ResistorKind, Nodes: []int{inp, models.Ground}, Value: 1e5})
	c.Add(models.Element{Ref: "R2", Kind: models.ResistorKind, Nodes: []int{out, inn}, Value: 1e4})
	idx, err := c.AddPart(models.Element{Ref: "U1", Kind: models.OpAmpKind, Nodes: []int{inp, inn, out, vp, models.Ground}, OpAmp: p})
	if err != nil {
		t.Fatal(err)
	}
	by := map[string]models.Element{}
	for _, i := range idx {
		e := c.Elements[i]
		if !models.IsInternal(e.Ref) || !strings.HasPrefix(e.Ref, "U1#") {
			t.Errorf("element %q is not named as internal to U1", e.Ref)
		}
		by[strings.TrimPrefix(e.Ref, "U1#")] = e
	}
	gm, rg, cg := by["gm"].Value, by["rg"].Value, by["cg"].Value
	if relErr(gm*rg, p.Gain) > 1e-12 || relErr(1/(2*math.Pi*rg*cg), p.GBW/p.Gain) > 1e-12 {
		t.Errorf("gm·rg = %g (A0 %g), pole %g Hz (GBW/A0 %g Hz)", gm*rg, p.Gain, 1/(2*math.Pi*rg*cg), p.GBW/p.Gain)
	}
	if by["high"].Limiter.Onset != -p.HeadroomHigh || by["low"].Limiter.Onset != -p.HeadroomLow ||
		by["high"].Nodes[1] != vp || by["low"].Nodes[0] != models.Ground {
		t.Errorf("limiters %+v %+v", by["high"], by["low"])
	}
	if by["rin"].Value != p.InputResistance || by["rout"].Value != p.OutputResistance || by["rout"].Nodes[1] != out {
		t.Errorf("rin %+v, rout %+v", by["rin"], by["rout"])
	}
	if err := c.Check(); err != nil {
		t.Error(err)
	}
	for _, n := range c.Nodes {
		if strings.HasPrefix(n, "U1") && !models.IsInternal(n) {
			t.Errorf("node %q", n)
		}
	}
	// A transformer's ratios survive a Clone independently.
	_, err = c.AddPart(models.Element{Ref: "T1", Kind: models.TransformerKind, Nodes: []int{out, models.Ground, c.Node("s"), models.Ground},
		Transformer: models.TransformerParams{Coupling: 0.99, Windings: []models.Winding{{1, 10}, {4, 40}}}})
	if err != nil {
		t.Fatal(err)
	}
	d := c.Clone()
	ideal := d.Element("T1#ideal")
	if ideal == nil || len(ideal.Ratios) != 1 || relErr(ideal.Ratios[0], 2) > 1e-15 {
		t.Fatalf("ideal transformer %+v", ideal)
	}
	ideal.Ratios[0] = 7
	if c.Element("T1#ideal").Ratios[0] != 2 {
		t.Error("Clone shares the ratios")
	}
}

// TestCheckNewKinds: Check's connectivity rules for the new kinds. A
// MOSFET's gate is insulated (a gate reached only through a capacitor
// floats at DC, as on the bench); a JFET's gate junction is a DC path; a
// controlled current source's output is not; the windings of an ideal
// transformer after the first are voltage-defined, so one shorted by a
// source is refused.
func TestCheckNewKinds(t *testing.T) {
	base := func() (*models.Circuit, int, int) {
		c := models.NewCircuit("x", tnom)
		vp, d := c.Node("v+"), c.Node("d")
		c.Add(models.Element{Ref: "V1", Kind: models.VoltageSourceKind, Nodes: []int{vp, models.Ground}, Value: 9})
		c.Add(models.Element{Ref: "RD", Kind: models.ResistorKind, Nodes: []int{vp, d}, Value: 1e3})
		return c, vp, d
	}
	c, vp, d := base()
	g := c.Node("g")
	c.Add(models.Element{Ref: "C1", Kind: models.CapacitorKind, Nodes: []int{vp, g}, Value: 1e-9})
	c.Add(models.Element{Ref: "M1", Kind: models.MOSFETKind, Nodes: []int{d, g, models.Ground}, MOSFET: models.MOSFETPresets["n-mosfet"].Params})
	if err := c.Check(); err == nil || !strings.Contains(err.Error(), "node g") {
		t.Errorf("floating MOSFET gate: %v", err)
	}
	c, vp, d = base()
	g = c.Node("g")
	c.Add(models.Element{Ref: "C1", Kind: models.CapacitorKind, Nodes: []int{vp, g}, Value: 1e-9})
	c.Add(models.Element{Ref: "J1", Kind: models.JFETKind, Nodes: []int{d, g, models.Ground}, JFET: models.JFETPresets["n-jfet"].Params})
	if err := c.Check(); err != nil {
		t.Errorf("JFET gate through its junction: %v", err)
	}
	c, _, d = base()
	x := c.Node("x")
	c.Add(models.Element{Ref: "G1", Kind: models.ControlledCurrentKind, Nodes: []int{models.Ground, x, d, models.Ground}, Value: 1e-3})
	if err := c.Check(); err == nil || !strings.Contains(err.Error(), "node x") {
		t.Errorf("node fed only by a controlled current source: %v", err)
	}
	c, vp, _ = base()
	s := c.Node("s")
	c.Add(models.Element{Ref: "V2", Kind: models.VoltageSourceKind, Nodes: []int{s, models.Ground}, Value: 1})
	c.Add(models.Element{Ref: "X1", Kind: models.IdealTransformerKind, Nodes: []int{vp, models.Ground, s, models.Ground}, Ratios: []float64{2}})
	var ce *models.CircuitError
	if err := c.Check(); !errors.As(err, &ce) || ce.What != "X1" || !strings.Contains(err.Error(), "winding") {
		t.Errorf("source across a secondary: %v", err)
	}
}
