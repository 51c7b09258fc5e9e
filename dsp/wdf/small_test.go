package wdf

import (
	"math"
	"testing"

	"renderchain/models"
)

// The fixed-size kernel against the general one on the same circuits, one,
// two, three and four root ports (a diode, an antiparallel pair, a
// transistor with a diode, the two-transistor stage, and the transistor
// with a diode again with charges on both), driven hard enough to clip: the two must agree bit for bit, samples and statistics, because the
// fixed-size kernel does the same operations in the same order and the
// padding adds only exact zeros.
func TestSmallKernelMatchesGeneral(t *testing.T) {
	si := models.DiodeParams{Is: 2.52e-9, N: 1.752}
	q := models.BJTParams{Is: 10e-15, BetaF: 200, BetaR: 4}
	clipper := func(pair bool) func() *bench {
		return func() *bench {
			b := newBench()
			b.src("V1", "in", 0, true)
			b.r("R1", "in", "out", 2200)
			b.cap("C1", "out", "gnd", 10e-9)
			b.diode("D1", "out", "gnd", si)
			if pair {
				b.diode("D2", "gnd", "out", si)
			}
			b.out("out")
			return b
		}
	}
	followerClip := func() *bench { return followerIntoDiode(q, si) }
	// Charged devices (charge_test.go), evaluated through models.Nonlinear
	// and with their charge terms, in both kernels.
	charged := map[int]func(models.Nonlinear) models.Nonlinear{
		0: func(m models.Nonlinear) models.Nonlinear {
			return &transBJT{capBJT{m.(*models.BJT), 22e-12, 4.7e-12}, 100e-12}
		},
		1: func(m models.Nonlinear) models.Nonlinear { return &capDiode{m.(*models.Diode), 1e-9} },
	}
	cases := []struct {
		name  string
		build func() *bench
		wrap  map[int]func(models.Nonlinear) models.Nonlinear
		ports int
		amp   float64
	}{
		{"diode", clipper(false), nil, 1, 3},
		{"pair", clipper(true), nil, 2, 3},
		{"follower+diode", followerClip, nil, 3, 2},
		{"two transistors", twoTransistor, nil, 4, 0.5},
		{"charged follower+diode", followerClip, charged, 3, 2},
	}
	const fs = 96000.0
	for _, tc := range cases {
		fast, _ := tc.build().compileWith(t, fs, tc.wrap)
		gen, _ := tc.build().compileWith(t, fs, tc.wrap)
		if fast.small == nil {
			t.Fatalf("%s: the fixed-size kernel was not chosen", tc.name)
		}
		if _, k := fast.States(); k != tc.ports {
			t.Fatalf("%s: %d root ports, want %d", tc.name, k, tc.ports)
		}
		gen.shared = &shared{}
		*gen.shared = *fast.shared
		gen.small = nil
		for n := 0; n < 9600; n++ {
			x := tc.amp * math.Sin(2*math.Pi*1319*float64(n)/fs)
			a, b := fast.Tick(x), gen.Tick(x)
			if math.Float64bits(a) != math.Float64bits(b) {
				t.Fatalf("%s: sample %d: fixed-size kernel %.17g, general %.17g", tc.name, n, a, b)
			}
		}
		if fast.Stats() != gen.Stats() {
			t.Errorf("%s: statistics differ: %+v vs %+v", tc.name, fast.Stats(), gen.Stats())
		}
		t.Logf("%s: %d samples identical; %+v", tc.name, 9600, fast.Stats())
	}
}

// followerIntoDiode is an emitter follower (transistor q) driving a diode
// d to ground through a coupling capacitor and a resistor: three root
// ports, values of this project's own choosing.
func followerIntoDiode(q models.BJTParams, d models.DiodeParams) *bench {
	b := newBench()
	b.src("VCC", "vcc", 9, false)
	b.src("VIN", "in", 0, true)
	b.cap("C1", "in", "b", 1e-6)
	b.r("RB", "vcc", "b", 470e3)
	b.npn("Q1", "vcc", "b", "e", q)
	b.r("RE", "e", "gnd", 4700)
	b.cap("C2", "e", "x", 1e-6)
	b.r("RS", "x", "out", 2200)
	b.diode("D1", "out", "gnd", d)
	b.r("RL", "out", "gnd", 100e3)
	b.out("out")
	return b
}
