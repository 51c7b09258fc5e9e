package models_test

import (
	"math"
	"testing"

	"renderchain/models"
)

// siDiode is the si-signal preset without temperature scaling (the tests
// run at the nominal temperature, where scaling is the identity anyway).
func siDiode() models.DiodeParams {
	p := *models.Presets["si-signal"].Diode
	p.Rs = 0
	return p
}

// TestDiodeShockley: I = Is·(exp(V/(n·Vt)) − 1) (Shockley, Bell Syst. Tech.
// J. 28, 1949, with the emission coefficient n), computed by hand from the
// SI constants. Tolerance 1e-12 relative: the exponent is below 30, so its
// rounding moves the result by < 30 ulps ≈ 7e-15.
func TestDiodeShockley(t *testing.T) {
	cases := []struct {
		name string
		p    models.DiodeParams
		v    float64
	}{
		{"silicon at 0.6 V", siDiode(), 0.6},
		{"silicon at 0.7 V", siDiode(), 0.7},
		{"silicon at 0.2 V", siDiode(), 0.2},
		{"silicon at −0.5 V", siDiode(), -0.5},
		{"n = 1 at 0.65 V", models.DiodeParams{Is: 1e-14, N: 1}, 0.65},
		{"germanium at 0.25 V", models.DiodeParams{Is: 200e-9, N: 1.3}, 0.25},
	}
	for _, c := range cases {
		d := models.NewDiode(c.p, tnom)
		nvt := c.p.N * vtRef(tnom)
		want := c.p.Is * (math.Exp(c.v/nvt) - 1)
		wantG := c.p.Is / nvt * math.Exp(c.v/nvt)
		i, g := d.Current(c.v)
		if e := relErr(i, want); e > 1e-12 {
			t.Errorf("%s: I = %.12g A, Shockley %.12g A (rel err %.2g)", c.name, i, want, e)
		}
		if e := relErr(g, wantG); e > 1e-12 {
			t.Errorf("%s: dI/dV = %.12g S, by hand %.12g S (rel err %.2g)", c.name, g, wantG, e)
		}
		if e := relErr(d.EmissionVoltage(), nvt); e > 1e-12 {
			t.Errorf("%s: n·Vt = %g, want %g", c.name, d.EmissionVoltage(), nvt)
		}
	}
	// Zero volts, zero current, exactly.
	if i, _ := models.NewDiode(siDiode(), tnom).Current(0); i != 0 {
		t.Errorf("I(0) = %g, want 0", i)
	}
}

// TestDiodeLimexp checks the documented continuation of the exponential:
// past V = 80·n·Vt the current grows linearly with the slope it has there
// (value and slope continuous, so Newton sees a C¹ function), it stays
// finite for any finite voltage, and below −50·n·Vt it is −Is exactly.
func TestDiodeLimexp(t *testing.T) {
	p := siDiode()
	d := models.NewDiode(p, tnom)
	nvt := d.EmissionVoltage()
	e80 := math.Exp(80)
	vk := 80 * nvt
	i0, g0 := d.Current(vk)
	// At the knee: Is·(e^80 − 1) and Is·e^80/nVt, 1e-12 relative (exponent 80: ~80 ulps).
	if e := relErr(i0, p.Is*(e80-1)); e > 1e-12 {
		t.Errorf("I at the knee = %g, want %g", i0, p.Is*(e80-1))
	}
	if e := relErr(g0, p.Is*e80/nvt); e > 1e-12 {
		t.Errorf("g at the knee = %g, want %g", g0, p.Is*e80/nvt)
	}
	// Past the knee: linear with slope g0. Tolerance 1e-12 relative.
	for _, dv := range []float64{0.01, 0.5, 3, 100} {
		i, g := d.Current(vk + dv)
		want := p.Is * (e80*(1+dv/nvt) - 1)
		if e := relErr(i, want); e > 1e-12 {
			t.Errorf("I(knee + %g V) = %g, linear continuation %g (rel err %.2g)", dv, i, want, e)
		}
		if e := relErr(g, g0); e > 1e-12 {
			t.Errorf("g(knee + %g V) = %g, want the knee slope %g", dv, g, g0)
		}
	}
	for _, v := range []float64{10, 1e3, 1e6} {
		if i, g := d.Current(v); math.IsInf(i, 0) || math.IsNaN(i) || math.IsInf(g, 0) || math.IsNaN(g) {
			t.Errorf("Current(%g V) not finite: %g, %g", v, i, g)
		}
	}
	// Deep reverse: −Is, zero slope.
	for _, v := range []float64{-51 * nvt, -5, -1e3} {
		if i, g := d.Current(v); i != -p.Is || g != 0 {
			t.Errorf("Current(%g V) = %g, %g; want −Is = %g and 0", v, i, g, -p.Is)
		}
	}
}

// TestDiodeJacobian compares Eval's dI/dV with a central difference.
//
// Step: h = 1e-5·n·Vt. Truncation error of the central difference for an
// exponential is h²/(6(nVt)²) ≈ 1.7e-11 relative; the rounding error is
// about δ·nVt/h where δ ≈ eps·(1 + |V/nVt|) is the relative error of one
// evaluation (the exponent's rounding is amplified by |V/nVt|): at most
// ~3e-14·1e5 = 3e-9 at V/nVt ≈ 100. Tolerance 1e-7 relative to the scale
// |g| + (|I| + Is)/nVt (the rounding is relative to the current, not to
// the slope), which leaves a factor ≥ 30 over the worst estimate.
func TestDiodeJacobian(t *testing.T) {
	ge := models.DiodeParams{Is: 200e-9, N: 1.3}
	for _, p := range []models.DiodeParams{siDiode(), ge, {Is: 5e-19, N: 1.8}} {
		d := models.NewDiode(p, tnom)
		nvt := d.EmissionVoltage()
		h := 1e-5 * nvt
		worst := 0.0
		for _, x := range []float64{-60, -49, -20, -3, -0.5, 0, 0.5, 5, 15, 25, 35, 60, 79.5, 80.5, 100, 150} {
			v := x * nvt
			var vi, ii, jj [1]float64
			vi[0] = v
			d.Eval(vi[:], ii[:], jj[:])
			fd := centralDiff(func(u float64) float64 { i, _ := d.Current(u); return i }, v, h)
			scale := math.Abs(jj[0]) + (math.Abs(ii[0])+p.Is)/nvt
			e := math.Abs(fd-jj[0]) / scale
			worst = math.Max(worst, e)
			if e > 1e-7 {
				t.Errorf("Is=%g: V/nVt=%g: dI/dV = %.10g, central difference %.10g (scaled err %.2g > 1e-7)", p.Is, x, jj[0], fd, e)
			}
			if ii[0] != func() float64 { i, _ := d.Current(v); return i }() {
				t.Errorf("Eval and Current disagree at V/nVt=%g", x)
			}
		}
		t.Logf("Is=%g: worst scaled Jacobian error %.2g (tolerance 1e-7)", p.Is, worst)
	}
}

// TestDiodeLimit checks junction limiting against the rule it implements
// (L. W. Nagel, UCB ERL-M520, 1975, sec. 4.3): with the critical
// voltage vcrit = nVt·ln(nVt/(√2·Is)), a step to vnew > vcrit larger than
// 2·nVt from vold > 0 is replaced by vold + nVt·ln(1 + (vnew − vold)/nVt),
// which is the voltage at which the exponential equals its linearisation
// at vold; from vold ≤ 0 it is nVt·ln(vnew/nVt). Other steps are left
// alone, bit for bit.
func TestDiodeLimit(t *testing.T) {
	p := siDiode()
	d := models.NewDiode(p, tnom)
	nvt := d.EmissionVoltage()
	vcrit := nvt * math.Log(nvt/(math.Sqrt2*p.Is))
	limit := func(vnew, vold float64) float64 {
		a, b := []float64{vnew}, []float64{vold}
		d.Limit(a, b)
		return a[0]
	}
	// Small steps and steps below vcrit are untouched.
	untouched := []struct{ vnew, vold float64 }{
		{0.6 + 1.9*nvt, 0.6}, // step below 2·nVt
		{0.6 - 1.9*nvt, 0.6}, // downwards, small
		{vcrit - 0.01, -5},   // large step ending below vcrit
		{-10, 0.5},           // large step into reverse bias
		{0.3, 0},             // below vcrit
		{vcrit + nvt, vcrit}, // above vcrit but only one nVt
	}
	for _, c := range untouched {
		if got := limit(c.vnew, c.vold); got != c.vnew {
			t.Errorf("Limit(%g ← %g) = %g, want the step left alone", c.vnew, c.vold, got)
		}
	}
	// Large forward steps from a forward-biased point: the exponential at
	// the limited voltage equals its linearisation at vold, i.e.
	// exp((vlim − vold)/nVt) = 1 + (vnew − vold)/nVt (1e-12 relative:
	// one log and one exp of arguments ≤ ~12), and the limited current
	// never exceeds the linearised prediction I(vold) + g(vold)·Δ.
	for _, vold := range []float64{0.3, 0.55, 0.7, 0.9} {
		for _, vnew := range []float64{vold + 3*nvt, vold + 0.5, 5, 100, 1e4} {
			if vnew <= vcrit {
				continue
			}
			vl := limit(vnew, vold)
			lhs := math.Exp((vl - vold) / nvt)
			rhs := 1 + (vnew-vold)/nvt
			if e := relErr(lhs, rhs); e > 1e-12 {
				t.Errorf("Limit(%g ← %g) = %g: exp step %g, want 1 + Δ/nVt = %g", vnew, vold, vl, lhs, rhs)
			}
			if !(vl > vold && vl < vnew) {
				t.Errorf("Limit(%g ← %g) = %g not inside the step", vnew, vold, vl)
			}
			i0, g0 := d.Current(vold)
			il, _ := d.Current(vl)
			if pred := i0 + g0*(vnew-vold); il > pred*(1+1e-12) {
				t.Errorf("Limit(%g ← %g): current %g above the linearised %g", vnew, vold, il, pred)
			}
		}
	}
	// From zero or reverse bias: nVt·ln(vnew/nVt), 1e-15 absolute-ish (one log).
	for _, vold := range []float64{0, -1} {
		for _, vnew := range []float64{1, 9, 1e3} {
			want := nvt * math.Log(vnew/nvt)
			if got := limit(vnew, vold); math.Abs(got-want) > 1e-14 {
				t.Errorf("Limit(%g ← %g) = %g, want nVt·ln(vnew/nVt) = %g", vnew, vold, got, want)
			}
		}
	}
	// Bounded: a sweep of huge steps from 0.6 V never moves more than
	// nVt·ln(1 + Δ/nVt) ≤ nVt·ln(1 + 1e6/nVt) ≈ 0.9 V.
	for _, vnew := range []float64{1, 10, 1e2, 1e3, 1e4, 1e5, 1e6} {
		if vl := limit(vnew, 0.6); vl-0.6 > nvt*math.Log(1+1e6/nvt)+1e-12 {
			t.Errorf("Limit(%g ← 0.6) = %g: step not bounded", vnew, vl)
		}
	}
}
