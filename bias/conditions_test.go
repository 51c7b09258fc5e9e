package bias

import (
	"errors"
	"math"
	"testing"

	"renderchain/chains"
	"renderchain/internal/testchains"
	"renderchain/models"
)

const leakFixture = `
name = "germanium leakage fixture"
supply = "-9V"
[input]
source = "ideal"
[output]
load = "1M"
[[stage]]
id = "cbo"
parts = [
  { ref = "RC", kind = "resistor", value = "10k", pins = ["v+", "c"] },
  { ref = "RE", kind = "resistor", value = "1G",  pins = ["e", "gnd"] },
  { ref = "Q1", kind = "pnp", model = "ge-pnp", pins = { c = "c", b = "gnd", e = "e" } },
]
[[stage]]
id = "ceo"
parts = [
  { ref = "RC", kind = "resistor", value = "10k", pins = ["v+", "c"] },
  { ref = "RB", kind = "resistor", value = "1G",  pins = ["b", "gnd"] },
  { ref = "Q1", kind = "pnp", model = "ge-pnp", pins = { c = "c", b = "b", e = "gnd" } },
]
`

// Germanium leakage doubles about every 10 °C (common practice; the ge-pnp
// preset's own figure). With the emitter all but open (1 GΩ) the base
// current is the collector–base leakage Icbo; with the base all but open
// the collector current is the leakage multiplied by the gain, Iceo ≈
// (βF+1)·Icbo. Each 10 °C step must multiply both by 2 ± 10 % ("about":
// the transistor's own junction saturation current, which grows a little
// faster, adds a few per cent).
func TestGermaniumLeakageDoubles(t *testing.T) {
	ch, err := chains.Parse("leak.toml", leakFixture)
	if err != nil {
		t.Fatal(err)
	}
	temps, err := models.ParseTemperatures("5,15,25,35,45")
	if err != nil {
		t.Fatal(err)
	}
	rows, err := Sweep(ch, nil, temps)
	if err != nil {
		t.Fatal(err)
	}
	for k := 1; k < len(rows); k++ {
		a, b := rows[k-1], rows[k]
		icbo := math.Abs(b.Transistor("cbo.Q1").Ib) / math.Abs(a.Transistor("cbo.Q1").Ib)
		iceo := math.Abs(b.Transistor("ceo.Q1").Ic) / math.Abs(a.Transistor("ceo.Q1").Ic)
		t.Logf("%.0f → %.0f °C: Icbo %s → %s (×%.3f), Iceo %s → %s (×%.3f)", a.Temperature-models.ZeroCelsius, b.Temperature-models.ZeroCelsius,
			models.FormatValue(math.Abs(a.Transistor("cbo.Q1").Ib), "A"), models.FormatValue(math.Abs(b.Transistor("cbo.Q1").Ib), "A"), icbo,
			models.FormatValue(math.Abs(a.Transistor("ceo.Q1").Ic), "A"), models.FormatValue(math.Abs(b.Transistor("ceo.Q1").Ic), "A"), iceo)
		for _, r := range []float64{icbo, iceo} {
			if r < 1.8 || r > 2.2 {
				t.Errorf("leakage ratio %.3f over 10 °C, want 2 ± 10 %%", r)
			}
		}
	}
	// At 25 °C the base current of the open-emitter device is the preset's
	// 2 µA Icbo plus the Ebers–Moll reverse saturation current of the
	// collector junction with the emitter open, Is·(1 − αF·αR)/αR
	// (Ebers & Moll 1954): within 0.1 %.
	p := models.Presets["ge-pnp"].BJT
	af, ar := p.BetaF/(p.BetaF+1), p.BetaR/(p.BetaR+1)
	want := p.Icbo + p.Is*(1-af*ar)/ar
	got := math.Abs(rows[2].Transistor("cbo.Q1").Ib)
	if math.Abs(got/want-1) > 1e-3 {
		t.Errorf("Icbo at 25 °C: %g A, Ebers–Moll with leakage %g A", got, want)
	}
}

// A fresh battery (about 9.3 V against 9 V nominal: common practice) moves
// the pair's second collector by the first-order handbook estimate: Q2 is
// a current sink set by its emitter resistor, Ie2 = Ve2/R3 + Ib1, with Ve2
// pinned at Vbe1 + R4·Ic1/β1, so its collector follows the rail less the
// small rise of Ic1 with the supply:
//
//	dIc1/dVcc = 1/Rl1,  dVe2/dVcc = (Vt/Ic1 + R4/β1)·dIc1/dVcc,
//	dIc2/dVcc ≈ (dVe2/dVcc/R3 + dIc1/dVcc/β1)·α2,  dVc2/dVcc = 1 − Rl2·dIc2/dVcc,
//
// (Vbe from the diode equation, Rl the collector loads). Tolerance 10 %:
// the estimate drops Vc1's own small shift.
func TestFreshBatteryShift(t *testing.T) {
	p := testchains.SiPair()
	ch := p.Parse(t)
	sup, err := models.ParseSupplies("9,9.3V", ch.Supply)
	if err != nil {
		t.Fatal(err)
	}
	rows, err := Sweep(ch, sup, nil)
	if err != nil {
		t.Fatal(err)
	}
	nom, fresh := rows[0], rows[1]
	q1, q2 := nom.Transistor("fz.Q1"), nom.Transistor("fz.Q2")
	vt := models.ThermalVoltage(models.NominalTemperature)
	rl1, rl2, r3, r4 := 27e3+0.5*50e3, 1.8e3+0.5*10e3, 1e3, 100e3
	dIc1 := 1 / rl1
	dVe2 := (vt/q1.Ic + r4/p.Beta1) * dIc1
	dIc2 := (dVe2/r3 + dIc1/p.Beta1) * p.Beta2 / (p.Beta2 + 1)
	want := 0.3 * (1 - rl2*dIc2)
	got := fresh.Transistor("fz.Q2").Vc - q2.Vc
	t.Logf("9 V → 9.3 V: Vc2 %.4f → %.4f V, shift %.4f V, first-order estimate %.4f V", q2.Vc, fresh.Transistor("fz.Q2").Vc, got, want)
	if math.Abs(got/want-1) > 0.10 {
		t.Errorf("Vc2 shift %.4f V, handbook estimate %.4f V", got, want)
	}
	if d := math.Abs(fresh.Transistor("fz.Q2").Ic/q2.Ic - 1); d > 0.05 {
		t.Errorf("Ic2 moved %.1f %% for a 3.3 %% supply change: a degenerated current sink should hold it", 100*d)
	}
}

func TestConditionLists(t *testing.T) {
	v, err := models.ParseSupplies("9.6, 9V,8,7", -9)
	if err != nil || len(v) != 4 || v[0] != -9.6 || v[1] != -9 || v[3] != -7 {
		t.Errorf("supplies for a positive-ground build: %v %v", v, err)
	}
	k, err := models.ParseTemperatures("0,25C,298.15K")
	if err != nil || len(k) != 3 || k[0] != models.ZeroCelsius || math.Abs(k[1]-k[2]) > 1e-9 {
		t.Errorf("temperatures: %v %v", k, err)
	}
	for _, bad := range []string{"x", "", "0", "100"} {
		_, err := models.ParseSupplies(bad, 9)
		if !errors.Is(err, models.ErrInvalid) {
			t.Errorf("supply list %q: %v, want an error wrapping models.ErrInvalid", bad, err)
		}
	}
	for _, bad := range []string{"-100", "200", "hot", ","} {
		if _, err := models.ParseTemperatures(bad); err == nil {
			t.Errorf("temperature list %q accepted", bad)
		}
	}
}
