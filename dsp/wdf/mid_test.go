package wdf

import (
	"math"
	"testing"

	"renderchain/chains"
	"renderchain/dsp/mna"
	"renderchain/models"
)

// compileChain compiles a chain file at rate fs, with edit (nil for none)
// applied to the flat circuit before its operating point.
func compileChain(t *testing.T, path string, fs float64, edit func(*models.Circuit)) *Solver {
	t.Helper()
	ch, err := chains.Load(path)
	if err != nil {
		t.Fatal(err)
	}
	c, err := ch.Build()
	if err != nil {
		t.Fatal(err)
	}
	if edit != nil {
		edit(c)
	}
	op, err := mna.SolveDC(c, mna.DCOptions{})
	if err != nil {
		t.Fatal(err)
	}
	s, err := Compile(c, op, Options{SampleRate: fs})
	if err != nil {
		t.Fatal(err)
	}
	s.InputGain = ch.InputPeak
	return s
}

// dropDiodes removes a circuit's diodes, leaving its transistors (the
// cascade's stages then have 2, 4, 6 or 8 root ports).
func dropDiodes(c *models.Circuit) {
	var keep []models.Element
	for _, e := range c.Elements {
		if e.Kind != models.DiodeKind {
			keep = append(keep, e)
		}
	}
	c.Elements = keep
}

// The mid-size kernel against the general one on the twelve-port cascade
// (four charged transistors, four charged diodes) and on its eight
// transistor ports alone, driven into hard clipping: they must agree bit
// for bit, samples and statistics, because the mid-size kernel does the
// same operations in the same order.
func TestMidKernelMatchesGeneral(t *testing.T) {
	cases := []struct {
		name  string
		edit  func(*models.Circuit)
		ports int
	}{
		{"cascade", nil, 12},
		{"cascade without diodes", dropDiodes, 8},
	}
	const fs = 192000.0
	for _, tc := range cases {
		mid := compileChain(t, "testdata/cascade12.toml", fs, tc.edit)
		if _, k := mid.States(); k != tc.ports || mid.mid == nil {
			t.Fatalf("%s: %d root ports, mid-size kernel %v; want %d and the kernel", tc.name, k, mid.mid != nil, tc.ports)
		}
		// The stages couple only their neighbours: the band elimination
		// must have rows to pass over.
		if mid.mid.kl >= tc.ports-1 {
			t.Fatalf("%s: lower bandwidth %d of %d ports: no band to use", tc.name, mid.mid.kl, tc.ports)
		}
		gen := mid.Clone()
		gen.shared = &shared{}
		*gen.shared = *mid.shared
		gen.mid = nil
		gen.Reset()
		for n := 0; n < 19200; n++ {
			x := 2 * math.Sin(2*math.Pi*1319*float64(n)/fs)
			a, b := mid.Tick(x), gen.Tick(x)
			if math.Float64bits(a) != math.Float64bits(b) {
				t.Fatalf("%s: sample %d: mid-size kernel %.17g, general %.17g", tc.name, n, a, b)
			}
		}
		if mid.Stats() != gen.Stats() {
			t.Errorf("%s: statistics differ: %+v vs %+v", tc.name, mid.Stats(), gen.Stats())
		}
		t.Logf("%s: 19200 samples identical (lower bandwidth %d); %+v", tc.name, mid.mid.kl, mid.Stats())
	}
}

// The mid-size kernel allocates nothing per block (its vectors live in
// the solver), with charged transistors and diodes driven into clipping.
func TestMidKernelDoesNotAllocate(t *testing.T) {
	const fs = 192000.0
	s := compileChain(t, "testdata/cascade12.toml", fs, nil)
	if s.mid == nil {
		t.Fatal("the mid-size kernel was not chosen")
	}
	src := make([]float64, 256)
	for n := range src {
		src[n] = 2 * math.Sin(2*math.Pi*440*float64(n)/fs)
	}
	dst := make([]float64, len(src))
	if a := testing.AllocsPerRun(20, func() { s.Process(dst, src) }); a != 0 {
		t.Errorf("%.1f allocations per block", a)
	}
}
