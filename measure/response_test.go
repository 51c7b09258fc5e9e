package measure

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"renderchain/models"
)

// respTol is the agreement asked of the small-signal response with closed
// forms: 0.01 dB (the tolerance; the solver is exact to rounding,
// so the actual errors are near 1e-12 dB).
const respTol = 0.01

func TestSmallSignalRC(t *testing.T) {
	ch := loadChain(t, "rc-lowpass")
	freqs := LogGrid(10, 90000, 41)
	pts, err := SmallSignal(ch, freqs, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	worst, worstDeg := 0.0, 0.0
	for i, f := range freqs {
		h := rcLowpass(f) // 1/(1 + jωRC), no discretisation in nodal analysis
		worst = math.Max(worst, math.Abs(float64(pts[i].DB)-db(cmplx.Abs(h))))
		worstDeg = math.Max(worstDeg, math.Abs(float64(pts[i].Deg)-cmplx.Phase(h)*180/math.Pi))
	}
	t.Logf("RC low-pass vs 1/(1+jωRC): worst %.2e dB, %.2e°", worst, worstDeg)
	if worst > respTol || worstDeg > 0.01 {
		t.Errorf("worst error %.3g dB, %.3g°; want within %g dB and 0.01°", worst, worstDeg, respTol)
	}
	// At the corner, −3.0103 dB and −45° (handbook values).
	c, err := SmallSignal(ch, []float64{1 / (2 * math.Pi * rcR * rcC)}, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(float64(c[0].DB)+10*math.Log10(2)) > 1e-9 || math.Abs(float64(c[0].Deg)+45) > 1e-7 {
		t.Errorf("corner: %.6f dB %.6f°, want −3.0103 dB −45°", float64(c[0].DB), float64(c[0].Deg))
	}
}

// blendH is the closed-form nodal transfer function of the LP/HP blend
// network of testdata/blend.toml, from the source to the wiper, obtained by
// eliminating the two filter nodes from the three nodal equations
//
//	lp:  (V_lp − V_in)·G1 + V_lp·sC1 + (V_lp − V_o)·Ga = 0
//	hp:  (V_hp − V_in)·sC2 + V_hp·G2 + (V_hp − V_o)·Gb = 0
//	out: (V_o − V_lp)·Ga + (V_o − V_hp)·Gb + V_o·GL = 0
//
// giving V_o/V_in = (Ga·G1/D1 + Gb·sC2/D2) / (Ga + Gb + GL − Ga²/D1 − Gb²/D2)
// with D1 = G1 + sC1 + Ga and D2 = sC2 + G2 + Gb. The pot sections follow the
// chain format's definition, R·x and R·(1−x) for a linear taper, each at
// least the models package's end-stop resistance.
func blendH(f, x float64) complex128 {
	const (
		R1, C1, C2, R2, RV, RL = 33e3, 10e-9, 3.9e-9, 56e3, 100e3, 1e6
	)
	ra := math.Max(RV*x, models.PotEndResistance)
	rb := math.Max(RV*(1-x), models.PotEndResistance)
	s := complex(0, 2*math.Pi*f)
	ga, gb, g1, g2, gl := complex(1/ra, 0), complex(1/rb, 0), complex(1/R1, 0), complex(1/R2, 0), complex(1/RL, 0)
	d1 := g1 + s*C1 + ga
	d2 := s*C2 + g2 + gb
	return (ga*g1/d1 + gb*s*C2/d2) / (ga + gb + gl - ga*ga/d1 - gb*gb/d2)
}

func TestSmallSignalBlendNetwork(t *testing.T) {
	ch := loadChain(t, "blend")
	knobs := []float64{0, 0.25, 0.5, 0.75, 1}
	vs, err := Expand([]string{"tone.tone=0,0.25,0.5,0.75,1"})
	if err != nil {
		t.Fatal(err)
	}
	freqs := LogGrid(20, 20000, 31)
	rep, err := RunResponse(context.Background(), ch, vs, freqs, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Curves) != len(knobs) {
		t.Fatalf("%d curves, want %d", len(rep.Curves), len(knobs))
	}
	for k, x := range knobs {
		c := rep.Curves[k]
		worst, worstDeg := 0.0, 0.0
		for i, f := range freqs {
			h := blendH(f, x)
			worst = math.Max(worst, math.Abs(float64(c.Points[i].DB)-db(cmplx.Abs(h))))
			worstDeg = math.Max(worstDeg, math.Abs(float64(c.Points[i].Deg)-cmplx.Phase(h)*180/math.Pi))
		}
		t.Logf("%s: worst error %.2e dB, %.2e°", c.Label, worst, worstDeg)
		if worst > respTol || worstDeg > 0.01 {
			t.Errorf("tone %g: worst error %.3g dB, %.3g°; want within %g dB and 0.01°", x, worst, worstDeg, respTol)
		}
		if !strings.Contains(c.Label, "tone.tone=") {
			t.Errorf("curve label %q should name its setting", c.Label)
		}
	}
	// The mid-rotation curve has its scoop in the mids: lower at 600 Hz
	// than at 60 Hz and at 6 kHz (the template's stated voicing; checked
	// on the closed form too, so it is a property of the network).
	mid, _ := SmallSignal(ch, []float64{60, 600, 6000}, ResponseOptions{})
	if !(mid[1].DB < mid[0].DB && mid[1].DB < mid[2].DB) {
		t.Errorf("tone 0.5: %.2f, %.2f, %.2f dB at 60, 600, 6000 Hz; want a mid scoop", mid[0].DB, mid[1].DB, mid[2].DB)
	}
}

// Between two nodes: relative to the source node the response is the same
// as from the EMF (ideal source), relative to the probe itself it is 1, and
// from tone.lp to out it is the closed form's ratio of the two node
// voltages.
func TestSmallSignalRef(t *testing.T) {
	ch := loadChain(t, "blend")
	freqs := []float64{100, 1000, 10000}
	base, err := SmallSignal(ch, freqs, ResponseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	viaIn, err := SmallSignal(ch, freqs, ResponseOptions{Ref: "in"})
	if err != nil {
		t.Fatal(err)
	}
	self, err := SmallSignal(ch, freqs, ResponseOptions{Probe: "tone.lp", Ref: "tone.lp"})
	if err != nil {
		t.Fatal(err)
	}
	out, err := SmallSignal(ch, freqs, ResponseOptions{Probe: "out"})
	if err != nil {
		t.Fatal(err)
	}
	lp, err := SmallSignal(ch, freqs, ResponseOptions{Probe: "tone.lp"})
	if err != nil {
		t.Fatal(err)
	}
	rel, err := SmallSignal(ch, freqs, ResponseOptions{Probe: "tone.out", Ref: "tone.lp"})
	if err != nil {
		t.Fatal(err)
	}
	for i := range freqs {
		if math.Abs(float64(base[i].DB-viaIn[i].DB)) > 1e-9 || math.Abs(float64(self[i].DB)) > 1e-9 {
			t.Errorf("%g Hz: ref in %.6f vs %.6f dB, self %.3g dB", freqs[i], float64(viaIn[i].DB), float64(base[i].DB), float64(self[i].DB))
		}
		if d := float64(rel[i].DB) - float64(out[i].DB-lp[i].DB); math.Abs(d) > 1e-9 {
			t.Errorf("%g Hz: lp→out %.6f dB, want %.6f dB", freqs[i], float64(rel[i].DB), float64(out[i].DB-lp[i].DB))
		}
	}
}

func TestSmallSignalBadInput(t *testing.T) {
	ch := loadChain(t, "blend")
	tests := []struct {
		freqs []float64
		opt   ResponseOptions
		want  string
	}{
		{[]float64{96000}, ResponseOptions{}, "Nyquist"},             // 48 kHz × 4 = 192 kHz inside
		{[]float64{50000}, ResponseOptions{Oversample: 2}, "48 kHz"}, // 96 kHz inside: limit 48 kHz
		{[]float64{4}, ResponseOptions{}, "5 Hz"},
		{nil, ResponseOptions{}, "none"},
		{[]float64{1000}, ResponseOptions{Probe: "tone.x9"}, `"tone.x9"`},
		{[]float64{1000}, ResponseOptions{Ref: "nope"}, `ref "nope"`},
	}
	for _, tc := range tests {
		_, err := SmallSignal(ch, tc.freqs, tc.opt)
		var fe *models.FieldError
		if !errors.As(err, &fe) || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("SmallSignal(%v, %+v) = %v; want a *models.FieldError naming %s", tc.freqs, tc.opt, err, tc.want)
		}
	}
	if _, err := SmallSignal(ch, []float64{50000}, ResponseOptions{}); err != nil {
		t.Errorf("50 kHz with 192 kHz inside: %v", err)
	}
}
