package wdf

import (
	"math"
	"testing"

	"renderchain/models"
)

// part adds a part through AddPart (internal nodes and elements).
func (b *bench) part(t testing.TB, e models.Element, nodes ...string) {
	t.Helper()
	for _, s := range nodes {
		e.Nodes = append(e.Nodes, b.n(s))
	}
	if _, err := b.c.AddPart(e); err != nil {
		t.Fatal(err)
	}
}

// The adaptor absorbs every ideal element through mna.Real.Ideal, the
// stamp DC, AC and the transient reference share: an ideal transformer
// (here inside a centre-tapped transformer feeding a two-diode full-wave
// rectifier, the octave-up arrangement) and a controlled current source
// with a buffer (inside an op-amp gain stage with clipping diodes in its
// feedback, on a half-supply reference). Each circuit, driven hard enough
// to clip or rectify, must follow the MNA transient reference within
// 1e-6 V (the bound of the other reference tests here).
func TestAbsorbedElementsAgainstReference(t *testing.T) {
	si := models.DiodeParams{Is: 2.52e-9, N: 1.752}
	cases := []struct {
		name  string
		build func() *bench
		fs    float64
		amp   float64
	}{
		{"rectifier", func() *bench {
			b := newBench()
			b.src("VIN", "in", 0, true)
			b.r("RS", "in", "p", 100)
			b.part(t, models.Element{Ref: "T1", Kind: models.TransformerKind, Transformer: models.TransformerParams{Coupling: 0.98,
				Windings: []models.Winding{{Inductance: 1, Resistance: 40}, {Inductance: 2.25, Resistance: 60}, {Inductance: 2.25, Resistance: 60}}}},
				"p", "gnd", "a", "ct", "ct", "b")
			b.r("RCT", "ct", "gnd", 1)
			b.diode("D1", "a", "out", si)
			b.diode("D2", "b", "out", si)
			b.r("RL", "out", "gnd", 10e3)
			b.out("out")
			return b
		}, 96000, 1.5},
		{"op-amp with clipping diodes", func() *bench {
			b := newBench()
			b.src("VCC", "v+", 9, false)
			b.r("RA", "v+", "ref", 10e3)
			b.r("RB", "ref", "gnd", 10e3)
			b.cap("CR", "ref", "gnd", 10e-6)
			b.src("VIN", "in", 0, true)
			b.cap("CIN", "in", "inp", 100e-9)
			b.r("RIN", "inp", "ref", 1e6)
			b.part(t, models.Element{Ref: "U1", Kind: models.OpAmpKind, OpAmp: models.OpAmpPresets["opamp-general-dual"].Params},
				"inp", "inn", "o", "v+", "gnd")
			b.r("RF", "o", "inn", 100e3)
			b.diode("D1", "o", "inn", si)
			b.diode("D2", "inn", "o", si)
			b.r("RG", "inn", "g", 1e3)
			b.cap("CG", "g", "ref", 4.7e-6)
			b.cap("COUT", "o", "out", 1e-6)
			b.r("RL", "out", "gnd", 100e3)
			b.out("out")
			return b
		}, 96000, 0.2},
	}
	for _, tc := range cases {
		b := tc.build()
		worst, st := runAgainstReference(t, b, tc.fs, 4800, func(tt float64) float64 {
			return tc.amp * math.Min(1, tt/0.01) * math.Sin(2*math.Pi*220*tt)
		})
		t.Logf("%s: worst |WDF − MNA| %.3g V; mean Newton %.2f, max %d, nonconverged %d", tc.name, worst, st.MeanIterations(), st.MaxIterations, st.NonConverged)
		if worst > 1e-6 || st.NonConverged != 0 {
			t.Errorf("%s: worst %.3g V (bound 1e-6), %d nonconverged", tc.name, worst, st.NonConverged)
		}
	}
}

// TestFETsAgainstReference: a JFET input booster (self-biased common
// source) into a MOSFET common-source stage, the square-law devices on the
// generic device path of the root's Newton solve, against the MNA
// transient reference within 1e-6 V. Gate capacitances are left out: the
// charge-storing path is checked where the solver implements it.
func TestFETsAgainstReference(t *testing.T) {
	b := newBench()
	jp := models.JFETPresets["n-jfet"].Params
	jp.GS, jp.GD = models.Depletion{}, models.Depletion{}
	mp := models.MOSFETPresets["n-mosfet"].Params
	mp.GateSource, mp.GateDrain = 0, 0
	b.src("VCC", "v+", 9, false)
	b.src("VIN", "in", 0, true)
	b.cap("C1", "in", "g1", 100e-9)
	b.r("RG1", "g1", "gnd", 1e6)
	b.part(t, models.Element{Ref: "J1", Kind: models.JFETKind, JFET: jp}, "d1", "g1", "s1")
	b.r("RD1", "v+", "d1", 2.2e3)
	b.r("RS1", "s1", "gnd", 680)
	b.cap("CS1", "s1", "gnd", 22e-6)
	b.cap("C2", "d1", "g2", 100e-9)
	b.r("RA", "v+", "g2", 1e6)
	b.r("RB", "g2", "gnd", 330e3)
	b.part(t, models.Element{Ref: "M1", Kind: models.MOSFETKind, MOSFET: mp}, "d2", "g2", "gnd")
	b.r("RD2", "v+", "d2", 4.7e3)
	b.out("d2")
	worst, st := runAgainstReference(t, b, 96000, 4800, func(tt float64) float64 {
		return 0.5 * math.Min(1, tt/0.01) * math.Sin(2*math.Pi*220*tt)
	})
	t.Logf("JFET + MOSFET: worst |WDF − MNA| %.3g V; mean Newton %.2f, max %d, nonconverged %d", worst, st.MeanIterations(), st.MaxIterations, st.NonConverged)
	if worst > 1e-6 || st.NonConverged != 0 {
		t.Errorf("worst %.3g V (bound 1e-6), %d nonconverged", worst, st.NonConverged)
	}
}
