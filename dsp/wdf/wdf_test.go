package wdf

import (
	"math"
	"math/rand/v2"
	"testing"

	"renderchain/dsp/mna"
	"renderchain/models"
)

// bench is a tiny netlist builder for the tests.
type bench struct{ c *models.Circuit }

func newBench() *bench { return &bench{models.NewCircuit("test", models.NominalTemperature)} }

func (b *bench) n(name string) int {
	if name == "gnd" {
		return models.Ground
	}
	return b.c.Node(name)
}
func (b *bench) r(ref, p, m string, v float64) {
	b.c.Add(models.Element{Ref: ref, Kind: models.ResistorKind, Nodes: []int{b.n(p), b.n(m)}, Value: v})
}
func (b *bench) cap(ref, p, m string, v float64) {
	b.c.Add(models.Element{Ref: ref, Kind: models.CapacitorKind, Nodes: []int{b.n(p), b.n(m)}, Value: v})
}
func (b *bench) ind(ref, p, m string, v float64) {
	b.c.Add(models.Element{Ref: ref, Kind: models.InductorKind, Nodes: []int{b.n(p), b.n(m)}, Value: v})
}
func (b *bench) src(ref, p string, v float64, signal bool) {
	b.c.Add(models.Element{Ref: ref, Kind: models.VoltageSourceKind, Nodes: []int{b.n(p), models.Ground}, Value: v, Signal: signal})
	if signal {
		b.c.Input = b.n(p)
	}
}
func (b *bench) diode(ref, a, k string, p models.DiodeParams) {
	b.c.Add(models.Element{Ref: ref, Kind: models.DiodeKind, Nodes: []int{b.n(a), b.n(k)}, Diode: p})
}
func (b *bench) npn(ref, c, base, e string, p models.BJTParams) {
	b.c.Add(models.Element{Ref: ref, Kind: models.BJTKind, Nodes: []int{b.n(c), b.n(base), b.n(e)}, BJT: p})
}
func (b *bench) out(name string) { b.c.Output = b.n(name) }

func (b *bench) compile(t testing.TB, fs float64) (*Solver, *mna.OperatingPoint) {
	t.Helper()
	b.c.AddLeaks() // as chains.Build does
	op, err := mna.SolveDC(b.c, mna.DCOptions{})
	if err != nil {
		t.Fatalf("DC: %v", err)
	}
	s, err := Compile(b.c, op, Options{SampleRate: fs})
	if err != nil {
		t.Fatalf("compile: %v", err)
	}
	return s, op
}

// RC low-pass and high-pass: the WDF is the bilinear transform of the
// analogue first-order sections H(s) = 1/(1+sRC) and sRC/(1+sRC)
// (Oppenheim & Schafer, "Discrete-Time Signal Processing", 3rd ed., sec.
// 7.2.3: s = (2/T)(1 − z⁻¹)/(1 + z⁻¹)). The difference equations below are
// that transform written out; tolerance 1e-9 V on a 1 V signal: both are
// exact in exact arithmetic, so only rounding separates them.
func TestFirstOrderBilinear(t *testing.T) {
	const fs, R, C = 48000.0, 1e3, 100e-9
	for _, hp := range []bool{false, true} {
		b := newBench()
		b.src("V1", "in", 0, true)
		if hp {
			b.cap("C1", "in", "out", C)
			b.r("R1", "out", "gnd", R)
		} else {
			b.r("R1", "in", "out", R)
			b.cap("C1", "out", "gnd", C)
		}
		b.out("out")
		s, _ := b.compile(t, fs)
		k := 2 * fs * R * C
		// Low-pass: y = (x + x1 − (1−k)y1)/(1+k); high-pass: k(x − x1) − (1−k)y1 over (1+k).
		rng := rand.New(rand.NewPCG(1, 2))
		var x1, y1, worst float64
		for n := 0; n < 5000; n++ {
			x := rng.Float64()*2 - 1
			var y float64
			if hp {
				y = (k*(x-x1) - (1-k)*y1) / (1 + k)
			} else {
				y = (x + x1 - (1-k)*y1) / (1 + k)
			}
			got := s.Tick(x)
			worst = math.Max(worst, math.Abs(got-y))
			x1, y1 = x, y
		}
		if worst > 1e-9 {
			t.Errorf("hp=%v: worst deviation from the bilinear transform %.3g V > 1e-9", hp, worst)
		}
		t.Logf("hp=%v: worst deviation %.3g V", hp, worst)
	}
}

// The MNA-derived scattering matrix of three resistive ports in series
// equals Fettweis's series adaptor, S = I − 2·R·1ᵀ/ΣR (Fettweis, "Wave
// digital filters: theory and practice", Proc. IEEE 74(2), 1986, eq. 38
// with γ_k = 2R_k/ΣR), and in parallel S = 2·1·Gᵀ/ΣG − I (eq. 35).
// Tolerance 1e-12: closed form against a dense solve of a 3×3 system.
func TestAdaptorMatchesFettweis(t *testing.T) {
	rs := []float64{100, 2200, 47000}
	c := models.NewCircuit("adaptor", models.NominalTemperature)
	a, b2 := c.Node("a"), c.Node("b")
	// Series loop gnd–a–b–gnd through three ports.
	series := []port{{a, models.Ground, rs[0], leafResistor, 0}, {b2, a, rs[1], leafResistor, 1}, {models.Ground, b2, rs[2], leafResistor, 2}}
	ad, err := newAdaptor(c, series)
	if err != nil {
		t.Fatal(err)
	}
	S := ad.Scattering()
	sum := rs[0] + rs[1] + rs[2]
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			want := -2 * rs[i] / sum
			if i == j {
				want++
			}
			if math.Abs(S[i*3+j]-want) > 1e-12 {
				t.Errorf("series S[%d][%d] = %.15g, Fettweis %.15g", i, j, S[i*3+j], want)
			}
		}
	}
	cp := models.NewCircuit("parallel", models.NominalTemperature)
	ap := cp.Node("a")
	par := []port{{ap, models.Ground, rs[0], leafResistor, 0}, {ap, models.Ground, rs[1], leafResistor, 1}, {ap, models.Ground, rs[2], leafResistor, 2}}
	ad, err = newAdaptor(cp, par)
	if err != nil {
		t.Fatal(err)
	}
	S = ad.Scattering()
	gsum := 1/rs[0] + 1/rs[1] + 1/rs[2]
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			want := 2 * (1 / rs[j]) / gsum
			if i == j {
				want--
			}
			if math.Abs(S[i*3+j]-want) > 1e-12 {
				t.Errorf("parallel S[%d][%d] = %.15g, Fettweis %.15g", i, j, S[i*3+j], want)
			}
		}
	}
}
