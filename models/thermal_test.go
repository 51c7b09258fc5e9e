package models_test

import (
	"math"
	"testing"

	"renderchain/models"
)

// TestThermalVoltage: Vt = k·T/q with the exact SI constants (SI Brochure,
// 9th ed., table 1). At 25 °C this is 25.693 mV to five significant digits
// (the value every device handbook quotes for 25 °C: common practice).
// Tolerances: 1e-6 relative against the closed form (the brief's bound;
// the two are the same two roundings, so the error is ~1e-16), and half a
// unit of the fifth digit (0.5 µV) against 25.693 mV.
func TestThermalVoltage(t *testing.T) {
	cases := []struct {
		t    float64
		want float64 // closed form
	}{
		{298.15, vtRef(298.15)},
		{273.15, vtRef(273.15)},
		{300, vtRef(300)},
		{358.15, vtRef(358.15)},
	}
	for _, c := range cases {
		got := models.ThermalVoltage(c.t)
		if e := relErr(got, c.want); e > 1e-6 {
			t.Errorf("ThermalVoltage(%g) = %.9g V, k·T/q = %.9g V (rel err %.2g > 1e-6)", c.t, got, c.want, e)
		}
	}
	vt := models.ThermalVoltage(298.15)
	if math.Abs(vt-25.693e-3) > 0.5e-6 {
		t.Errorf("ThermalVoltage(298.15 K) = %.6f mV, want 25.693 mV to five digits", vt*1e3)
	}
	t.Logf("Vt(298.15 K) = %.7f mV; closed-form error %.2g relative", vt*1e3, relErr(vt, vtRef(298.15)))
}

// TestSaturationCurrentAt: Is(T) = Is·(T/Tnom)^(XTI/N)·exp((Eg/(N·Vt))·(T/Tnom − 1))
// (Nagel, UCB ERL-M520, 1975; Massobrio & Antognetti eq. 1.33). Here the
// law is computed by hand in its other, equivalent arrangement
//
//	Is(T) = Is·(T/Tnom)^(XTI/N)·exp((q·Eg/(N·k))·(1/Tnom − 1/T))
//
// with the SI constants. Tolerance 1e-12 relative: the exponent is at most
// ~10 here, so its rounding (a few ulps of 10) moves the result by ~1e-14.
func TestSaturationCurrentAt(t *testing.T) {
	hand := func(is, n, eg, xti, temp float64) float64 {
		return is * math.Pow(temp/tnom, xti/n) * math.Exp(siCharge*eg/(n*siBoltzmann)*(1/tnom-1/temp))
	}
	cases := []struct {
		name           string
		is, n, eg, xti float64
		temp           float64
	}{
		{"silicon junction at 75 °C", 10e-15, 1, 1.11, 3, 348.15},
		{"silicon junction at 0 °C", 10e-15, 1, 1.11, 3, 273.15},
		{"silicon diode n=1.752 at 50 °C", 2.52e-9, 1.752, 1.11, 3, 323.15},
		{"germanium at 45 °C", 200e-9, 1, 0.67, 3, 318.15},
		{"germanium at −20 °C", 200e-9, 1.3, 0.67, 3, 253.15},
	}
	for _, c := range cases {
		got := models.SaturationCurrentAt(c.is, c.n, c.eg, c.xti, c.temp, tnom)
		want := hand(c.is, c.n, c.eg, c.xti, c.temp)
		if e := relErr(got, want); e > 1e-12 {
			t.Errorf("%s: Is(T) = %.12g, by hand %.12g (rel err %.2g)", c.name, got, want, e)
		}
		// Identity at the nominal temperature: T/Tnom = 1, exp(0) = 1.
		if got := models.SaturationCurrentAt(c.is, c.n, c.eg, c.xti, tnom, tnom); got != c.is {
			t.Errorf("%s: Is(Tnom) = %g, want %g exactly", c.name, got, c.is)
		}
		// Eg = 0 disables scaling (documented).
		if got := models.SaturationCurrentAt(c.is, c.n, 0, c.xti, c.temp, tnom); got != c.is {
			t.Errorf("%s: eg = 0 scaled Is to %g", c.name, got)
		}
	}
}

// TestSaturationCurrentDoubling: a silicon junction's saturation current
// roughly doubles for every 5 K near room temperature (about 15 %/K:
// common practice). The law above must land between 1.8× and 2.3× over
// 5 K for Eg = 1.11 eV, XTI = 3.
func TestSaturationCurrentDoubling(t *testing.T) {
	r := models.SaturationCurrentAt(1, 1, 1.11, 3, tnom+5, tnom)
	if r < 1.8 || r > 2.3 {
		t.Errorf("silicon Is ratio over +5 K = %.3f, want about 2 (1.8…2.3)", r)
	}
	t.Logf("silicon Is(T+5 K)/Is(T) = %.4f", r)
}

// TestLeakageAt: germanium collector–base leakage doubles every 10 K
// (common practice), the law being i0·2^((T − Tnom)/d). Tolerance 1e-15
// relative: exp2 of a small integer is exact to an ulp.
func TestLeakageAt(t *testing.T) {
	cases := []struct {
		dt, doubling, want float64
	}{
		{0, 10, 1},
		{10, 10, 2},
		{20, 10, 4},
		{-10, 10, 0.5},
		{30, 10, 8},
		{5, 10, math.Sqrt2},
		{10, 0, 1}, // doubling ≤ 0 disables scaling (documented)
		{10, -5, 1},
	}
	const i0 = 2e-6
	for _, c := range cases {
		got := models.LeakageAt(i0, c.doubling, tnom+c.dt, tnom)
		if e := relErr(got, i0*c.want); e > 1e-15 {
			t.Errorf("LeakageAt(%g, %g, Tnom%+g) = %g, want %g", i0, c.doubling, c.dt, got, i0*c.want)
		}
	}
}

// TestVbeTemperatureCoefficient: at constant collector current a silicon
// transistor's Vbe falls by about 2 mV per kelvin (common practice; the
// range −1.5…−2.5 mV/K covers the usual quotes). Measured on the si-npn
// preset at Ic = 1 mA, Vce = 5 V, by bisection on Vbe at 25 °C ± 10 K.
func TestVbeTemperatureCoefficient(t *testing.T) {
	p := *models.Presets["si-npn"].BJT
	vbeAt := func(temp float64) float64 {
		q := models.NewBJT(p, temp)
		return bisect(func(vbe float64) float64 {
			_, ic := q.Currents(vbe, 5)
			return ic - 1e-3
		}, 0, 1.2)
	}
	tc := (vbeAt(tnom+10) - vbeAt(tnom-10)) / 20
	if tc > -1.5e-3 || tc < -2.5e-3 {
		t.Errorf("dVbe/dT = %.3f mV/K, want about −2 mV/K (−2.5…−1.5)", tc*1e3)
	}
	t.Logf("dVbe/dT at 1 mA = %.3f mV/K", tc*1e3)
}
