package models_test

import (
	"math"
	"sort"
	"testing"

	"renderchain/models"
)

// TestPresetsWellFormed: names are sorted and match the map keys, each
// preset is exactly one kind of device, and its parameters pass Check.
func TestPresetsWellFormed(t *testing.T) {
	names := models.PresetNames()
	if !sort.StringsAreSorted(names) || len(names) != len(models.Presets) {
		t.Fatalf("PresetNames() = %v", names)
	}
	for _, n := range names {
		p := models.Presets[n]
		if p.Name != n || p.About == "" || (p.Diode == nil) == (p.BJT == nil) {
			t.Errorf("preset %q: name %q, about %q, diode %v, transistor %v", n, p.Name, p.About, p.Diode != nil, p.BJT != nil)
			continue
		}
		c := models.NewCircuit(n, tnom)
		a := c.Node("a")
		c.Add(models.Element{Ref: "V1", Kind: models.VoltageSourceKind, Nodes: []int{a, models.Ground}, Value: 1})
		if p.Diode != nil {
			c.Add(models.Element{Ref: "D1", Kind: models.DiodeKind, Nodes: []int{a, models.Ground}, Diode: *p.Diode})
		} else {
			c.Add(models.Element{Ref: "Q1", Kind: models.BJTKind, Nodes: []int{a, a, models.Ground}, BJT: *p.BJT})
		}
		if err := c.Check(); err != nil {
			t.Errorf("preset %q fails Check: %v", n, err)
		}
	}
}

// TestPresetForwardVoltages checks each preset against the forward
// voltages the trade quotes (common practice): a silicon small-signal
// diode drops "about 0.6 V" at 1 mA (0.55…0.75 V), a germanium one 0.15…0.4 V, a red LED
// 1.6…2.0 V at 10 mA; a silicon transistor's Vbe at Ic = 1 mA is
// 0.6…0.72 V and a germanium one's 0.15…0.35 V. Diode drops include the
// preset's series resistance (I·Rs), as a meter across the part reads.
func TestPresetForwardVoltages(t *testing.T) {
	diodes := []struct {
		name   string
		i      float64
		lo, hi float64
	}{
		{"si-signal", 1e-3, 0.55, 0.75},
		{"ge-signal", 1e-3, 0.15, 0.4},
		{"led-red", 10e-3, 1.6, 2.0},
	}
	for _, c := range diodes {
		p := *models.Presets[c.name].Diode
		d := models.NewDiode(p, tnom)
		vj := bisect(func(v float64) float64 { i, _ := d.Current(v); return i - c.i }, 0, 5)
		v := vj + c.i*p.Rs
		if v < c.lo || v > c.hi {
			t.Errorf("%s at %s: %.3f V, want %.2f…%.2f V", c.name, models.FormatValue(c.i, "A"), v, c.lo, c.hi)
		}
		t.Logf("%s at %s: %.4f V", c.name, models.FormatValue(c.i, "A"), v)
	}
	bjts := []struct {
		name   string
		lo, hi float64
	}{
		{"si-npn", 0.6, 0.72}, {"si-pnp", 0.6, 0.72}, {"ge-npn", 0.15, 0.35}, {"ge-pnp", 0.15, 0.35},
	}
	for _, c := range bjts {
		p := *models.Presets[c.name].BJT
		q := models.NewBJT(p, tnom)
		s := sgn(p)
		vbe := bisect(func(v float64) float64 { _, ic := q.Currents(s*v, s*5); return s*ic - 1e-3 }, 0, 1.2)
		if vbe < c.lo || vbe > c.hi || math.IsNaN(vbe) {
			t.Errorf("%s: Vbe at 1 mA = %.3f V, want %.2f…%.2f V", c.name, vbe, c.lo, c.hi)
		}
		t.Logf("%s: |Vbe| at 1 mA = %.4f V", c.name, vbe)
	}
}
