package models_test

import (
	"math"
	"testing"

	"renderchain/models"
)

// nJFET is the n-jfet preset with λ set.
func nJFET(lambda float64) models.JFETParams {
	p := models.JFETPresets["n-jfet"].Params
	p.ChannelModulation = lambda
	return p
}

// TestJFETSquareLaw: the drain current against Shockley's JFET law as the
// textbooks write it (Sedra & Smith, "Microelectronic Circuits", the
// JFET; from memory), with VP = −Vp the signed pinch-off voltage:
//
//	saturation (vDS ≥ vGS − VP): iD = IDSS·(1 − vGS/VP)²·(1 + λ·vDS)
//	triode, λ = 0:               iD = IDSS·(2·(1 − vGS/VP)·(vDS/−VP) − (vDS/VP)²)
//	cut-off (vGS ≤ VP):          iD = 0
//
// and the saturation transconductance gm = (2·IDSS/|VP|)·(1 − vGS/VP) at
// λ = 0. The model adds the gate–drain junction's reverse current (about
// −GateIs = 1e-14 A) to the drain current: tolerance 1e-9 relative plus
// 1e-13 A absolute.
func TestJFETSquareLaw(t *testing.T) {
	const idss, vp = 5e-3, -2.0
	within := func(got, want float64) bool { return math.Abs(got-want) <= 1e-9*math.Abs(want)+1e-13 }
	for _, lambda := range []float64{0, 0.02} {
		q := models.NewJFET(nJFET(lambda), tnom)
		for _, vgs := range []float64{-1.5, -1, -0.5, 0, 0.2} {
			for _, vds := range []float64{0.1, 0.5, 1.2, 3, 10} {
				_, id, jac := q.Eval2(vgs, vds)
				var want float64
				sat := vds >= vgs-vp
				switch {
				case sat:
					want = idss * math.Pow(1-vgs/vp, 2) * (1 + lambda*vds)
					if lambda == 0 {
						gm := 2 * idss / -vp * (1 - vgs/vp)
						if !within(jac[2], gm) {
							t.Errorf("vGS %g, vDS %g: gm = %.10g S, 2·IDSS/|VP|·(1 − vGS/VP) = %.10g S", vgs, vds, jac[2], gm)
						}
					}
				case lambda == 0:
					want = idss * (2*(1-vgs/vp)*(vds/-vp) - (vds/vp)*(vds/vp))
				default:
					continue // the textbook triode form has no λ
				}
				if !within(id, want) {
					t.Errorf("λ %g, vGS %g, vDS %g: iD = %.10g A, square law %.10g A", lambda, vgs, vds, id, want)
				}
			}
		}
		if _, id, _ := q.Eval2(-2.5, 5); math.Abs(id) > 1e-13 {
			t.Errorf("cut-off: iD = %g A, want 0 (but for leakage)", id)
		}
	}
}

// TestFETSymmetryAndMirror: the square-law channel is symmetric, so with
// drain and source swapped (Vds < 0) Id(Vgs, Vds) = −Id(Vgd, −Vds)
// (Shichman & Hodges 1968, the symmetric device), and a p-channel device
// is the n-channel one with every voltage and current negated. Both hold
// exactly (the same floating-point operations run), except that the JFET's
// gate junctions swap too, which cancels in the mirror but not in the
// swap; the channel-only MOSFET (no body diode) swaps exactly.
func TestFETSymmetryAndMirror(t *testing.T) {
	mp := models.MOSFETPresets["n-mosfet"].Params
	mp.BodyIs = 0
	m := models.NewMOSFET(mp, tnom)
	for _, v := range [][2]float64{{3, -0.5}, {4, -3}, {2.5, -0.1}, {5, -6}} {
		_, i1, _ := m.Eval2(v[0], v[1])
		_, i2, _ := m.Eval2(v[0]-v[1], -v[1])
		if i1 != -i2 {
			t.Errorf("MOSFET swap at %v: %g vs %g", v, i1, -i2)
		}
	}
	jn := models.NewJFET(nJFET(0.01), tnom)
	pp := nJFET(0.01)
	pp.PChannel = true
	jp := models.NewJFET(pp, tnom)
	mpp := mp
	mpp.PChannel = true
	mpp.BodyIs = 3e-11
	mp.BodyIs = 3e-11
	mn, mpc := models.NewMOSFET(mp, tnom), models.NewMOSFET(mpp, tnom)
	for _, v := range [][2]float64{{-0.5, 3}, {0.3, 0.2}, {-1, -2}, {0.6, 0.1}, {3, 5}, {4, -0.8}} {
		g1, d1, j1 := jn.Eval2(v[0], v[1])
		g2, d2, j2 := jp.Eval2(-v[0], -v[1])
		if g2 != -g1 || d2 != -d1 || j1 != j2 {
			t.Errorf("JFET mirror at %v", v)
		}
		_, d1, j1 = mn.Eval2(v[0], v[1])
		_, d2, j2 = mpc.Eval2(-v[0], -v[1])
		if d2 != -d1 || j1 != j2 {
			t.Errorf("MOSFET mirror at %v", v)
		}
	}
}

// TestMOSFETSquareLaw: the drain current against the textbook square law
// (Sedra & Smith, "Microelectronic Circuits", the enhancement MOSFET;
// from memory), k = µCox·W/L:
//
//	saturation (vDS ≥ vOV): iD = (k/2)·vOV²·(1 + λ·vDS)
//	triode, λ = 0:          iD = k·(vOV·vDS − vDS²/2)
//	cut-off (vOV ≤ 0):      iD = 0
//
// the on-resistance at small vDS 1/(k·vOV), and the body diode: with the
// channel off (vGS = 0) and vDS = −V the drain current is
// −BodyIs·(exp(V/(n·Vt)) − 1) (Shockley's law); reverse-biased, it adds
// its saturation current to the channel's. No gate current ever.
// Tolerance 1e-12 relative (a few operations, no cancellation), 1e-9 for
// the on-resistance (a difference quotient over 1 µV).
func TestMOSFETSquareLaw(t *testing.T) {
	p := models.MOSFETPresets["n-mosfet"].Params
	k, vth := p.K, p.Threshold
	for _, lambda := range []float64{0, 0.02} {
		p.ChannelModulation = lambda
		q := models.NewMOSFET(p, tnom)
		for _, vgs := range []float64{1, 2.5, 4, 10} {
			for _, vds := range []float64{0.2, 1, 3, 12} {
				ig, id, _ := q.Eval2(vgs, vds)
				vov := vgs - vth
				var want float64
				switch {
				case vov <= 0:
					want = 0
				case vds >= vov:
					want = k / 2 * vov * vov * (1 + lambda*vds)
				case lambda == 0:
					want = k * (vov*vds - vds*vds/2)
				default:
					continue
				}
				// The reverse-biased body diode's −BodyIs·(e^(−vDS/nVt) − 1).
				want -= p.BodyIs * (math.Exp(-vds/(p.BodyN*vtRef(tnom))) - 1)
				if relErr(id, want) > 1e-12 || ig != 0 {
					t.Errorf("λ %g, vGS %g, vDS %g: iD = %.12g A (iG %g), square law %.12g A", lambda, vgs, vds, id, ig, want)
				}
			}
		}
	}
	p.ChannelModulation = 0
	q := models.NewMOSFET(p, tnom)
	_, _, jac := q.Eval2(10, 0)
	if e := relErr(1/jac[3], 1/(k*(10-vth))); e > 1e-9 {
		t.Errorf("on-resistance %.6g Ω, 1/(k·vOV) = %.6g Ω", 1/jac[3], 1/(k*(10-vth)))
	}
	nvt := p.BodyN * vtRef(tnom)
	for _, v := range []float64{0.3, 0.6, 0.8} {
		_, id, _ := q.Eval2(0, -v)
		want := -p.BodyIs * (math.Exp(v/nvt) - 1)
		if e := relErr(id, want); e > 1e-12 {
			t.Errorf("body diode at %g V: iD = %.12g A, Shockley %.12g A", v, id, want)
		}
	}
}

// TestFETJacobians: every FET's Jacobian and, where it stores charge, its
// capacitance matrix against central differences (scaled error of
// checkDerivatives, tolerance 1e-7), n and p channel, across cut-off,
// triode, saturation, reversed channel and forward-biased gate or body.
func TestFETJacobians(t *testing.T) {
	pts := [][2]float64{{-1, 5}, {-0.5, 0.3}, {0, 1}, {0.3, 2}, {0.5, -0.2}, {-3, 2}, {2.5, 0.1}, {3, 6}, {4, -0.5}, {5, -0.9}, {1, -3}}
	type dev struct {
		name   string
		m      models.Charged
		vscale float64
		floor  float64
	}
	var devs []dev
	for _, k := range []string{"n-jfet", "p-jfet"} {
		p := models.JFETPresets[k].Params
		devs = append(devs, dev{k, models.NewJFET(p, tnom), vtRef(tnom), p.GateIs})
	}
	for _, k := range []string{"n-mosfet", "p-mosfet"} {
		p := models.MOSFETPresets[k].Params
		devs = append(devs, dev{k, models.NewMOSFET(p, tnom), p.BodyN * vtRef(tnom), p.BodyIs})
	}
	for _, d := range devs {
		s := 1.0
		if d.name[0] == 'p' {
			s = -1
		}
		worstI, worstQ := 0.0, 0.0
		for _, pt := range pts {
			v := []float64{s * pt[0], s * pt[1]}
			worstI = math.Max(worstI, checkDerivatives(t, d.name+" current", 2, d.m.Eval, v, d.vscale, d.floor))
			worstQ = math.Max(worstQ, checkDerivatives(t, d.name+" charge", 2, d.m.Charges, v, d.vscale, 1e-12*d.vscale))
		}
		t.Logf("%s: worst scaled error, currents %.2g, charges %.2g (tolerance 1e-7)", d.name, worstI, worstQ)
	}
}

// TestFETLimit: the JFET's gate junctions get junction limiting (a step
// that would forward-bias the gate by 3 V is cut to the logarithmic step
// nVt·ln(V/nVt), Nagel 1975), and the MOSFET's gate step obeys the
// project's rule: at most 1 V plus the distance from the threshold, so
// from Vgs = 0 with a 2.1 V threshold no more than 3.1 V. A small step is
// untouched by either. Tolerance 1e-12 V.
func TestFETLimit(t *testing.T) {
	j := models.NewJFET(nJFET(0), tnom)
	nvt := vtRef(tnom)
	v := []float64{3, 5}
	j.Limit(v, []float64{0, 5})
	if want := nvt * math.Log(3/nvt); math.Abs(v[0]-want) > 1e-12 {
		t.Errorf("JFET gate step 0 → 3 V limited to %.12g V, want %.12g V", v[0], want)
	}
	v = []float64{-1.2, 4}
	j.Limit(v, []float64{-1, 5})
	if v[0] != -1.2 || v[1] != 4 {
		t.Errorf("JFET small step changed to %v", v)
	}
	p := models.MOSFETPresets["n-mosfet"].Params
	m := models.NewMOSFET(p, tnom)
	v = []float64{20, 5}
	m.Limit(v, []float64{0, 5})
	if math.Abs(v[0]-(1+p.Threshold)) > 1e-12 || v[1] != 5 {
		t.Errorf("MOSFET gate step 0 → 20 V limited to %v, want Vgs %.2f V", v, 1+p.Threshold)
	}
	v = []float64{3, 5}
	m.Limit(v, []float64{2.5, 5})
	if v[0] != 3 {
		t.Errorf("MOSFET small step changed to %v", v)
	}
}

// TestLimiter: the soft limiter's current against its closed form
// G·s·ln(1 + e^((V − V0)/s)), its asymptotes (0 far below the onset,
// G·(V − V0) far above, each to within G·s·e^−k at k knee widths), its
// slope against central differences, and finite values at ±1 MV.
// Tolerance 1e-12 relative for the closed form.
func TestLimiter(t *testing.T) {
	p := models.LimiterParams{Onset: -1.5, Conductance: 0.1, Knee: 0.01}
	l := models.NewLimiter(p)
	for _, v := range []float64{-3, -1.6, -1.52, -1.5, -1.49, -1.4, 0, 2} {
		i, _ := l.Current(v)
		want := p.Conductance * p.Knee * math.Log1p(math.Exp((v-p.Onset)/p.Knee))
		if e := relErr(i, want); e > 1e-12 && math.Abs(i-want) > 1e-300 {
			t.Errorf("I(%g) = %.12g, closed form %.12g", v, i, want)
		}
	}
	for _, k := range []float64{5, 10, 20} {
		lo, _ := l.Current(p.Onset - k*p.Knee)
		hi, _ := l.Current(p.Onset + k*p.Knee)
		bound := p.Conductance * p.Knee * math.Exp(-k)
		if !(lo >= 0 && lo <= bound) || math.Abs(hi-p.Conductance*k*p.Knee) > bound {
			t.Errorf("at ±%g knee widths: I = %g and %g; asymptotes 0 and %g within %g", k, lo, hi, p.Conductance*k*p.Knee, bound)
		}
	}
	worst := 0.0
	for _, v := range []float64{-2, -1.55, -1.5, -1.45, -1} {
		worst = math.Max(worst, checkDerivatives(t, "limiter", 1, l.Eval, []float64{v}, p.Knee, 0))
	}
	for _, v := range []float64{-1e6, 1e6} {
		i, g := l.Current(v)
		if math.IsNaN(i) || math.IsInf(i, 0) || math.IsNaN(g) {
			t.Errorf("I(%g) = %g, %g", v, i, g)
		}
	}
	t.Logf("slope worst scaled error %.2g (tolerance 1e-7)", worst)
}
