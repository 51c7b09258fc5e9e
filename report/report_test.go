package report

import (
	"encoding/json"
	"math"
	"slices"
	"testing"

	"renderchain/dsp/wavio"
	"renderchain/dsp/wdf"
)

// JSON has no NaN or infinities (RFC 8259, section 6): both types write
// null for them and read null back as NaN; finite values are written
// exactly (the shortest decimal that reads back to the same float64).
func TestJSON(t *testing.T) {
	cases := []struct {
		v    any
		want string
	}{
		{Level(math.Inf(-1)), "null"},
		{Level(math.NaN()), "null"},
		{Level(-3.0102999566398120), "-3.010299956639812"},
		{Level(1.23456749), "1.23456749"},
		{Level(-0.0000004), "-4e-07"},
		{Number(math.Inf(1)), "null"},
		{Number(math.NaN()), "null"},
		{Number(1.5e-9), "1.5e-09"},
		{Number(0.1), "0.1"},
		{Warnings(nil), "[]"},
		{Warnings{"a"}, `["a"]`},
	}
	for _, c := range cases {
		b, err := json.Marshal(c.v)
		if err != nil || string(b) != c.want {
			t.Errorf("%#v: %s, %v; want %s", c.v, b, err, c.want)
		}
	}
	var back struct {
		L Level
		N Number
	}
	if err := json.Unmarshal([]byte(`{"L": null, "N": 2.5}`), &back); err != nil || !math.IsNaN(float64(back.L)) || back.N != 2.5 {
		t.Errorf("read back %+v, %v", back, err)
	}
	// A finite value survives the round trip bit for bit.
	for _, x := range []float64{math.Pi * 1e-13, -18.1234567, 20 * math.Log10(0.3)} {
		b, _ := json.Marshal([]any{Number(x), Level(x)})
		var y [2]float64
		if err := json.Unmarshal(b, &y); err != nil || y[0] != x || y[1] != x {
			t.Errorf("%v came back as %v", x, y)
		}
	}
}

// Decibels of amplitude and power ratios (IEC 60027-3): 20·log10 2 =
// 6.0206 dB, 10·log10 2 = 3.0103 dB (closed form, to 1e-12); 0 is −∞,
// a negative ratio NaN.
func TestDB(t *testing.T) {
	if d := DB(2) - 20*math.Log10(2); math.Abs(d) > 1e-12 {
		t.Errorf("DB(2) off by %g", d)
	}
	if d := PowerDB(2) - 10*math.Log10(2); math.Abs(d) > 1e-12 {
		t.Errorf("PowerDB(2) off by %g", d)
	}
	if !math.IsInf(DB(0), -1) || !math.IsNaN(DB(-1)) || !math.IsNaN(DB(math.NaN())) {
		t.Errorf("DB(0) %g, DB(-1) %g", DB(0), DB(-1))
	}
	if d := FromDB(DB(0.37)) - 0.37; math.Abs(d) > 1e-15 {
		t.Errorf("FromDB(DB(x)) off by %g", d)
	}
}

// A sine's crest factor is √2 (3.0103 dB) and its RMS A/√2; a square
// wave's is 1 (0 dB); silence has none (closed forms; tolerance 1e-9 for
// a whole number of cycles sampled 1000 times each, exact in theory).
func TestPeakRMS(t *testing.T) {
	var s, q, z PeakRMS
	s.Threshold = 0.5
	x := make([]float64, 4000)
	for i := range x {
		x[i] = 0.8 * math.Sin(2*math.Pi*float64(i)/1000) // sample 250 sits on the crest
	}
	s.Add(x[:1234])
	s.Add(x[1234:])
	if d := s.RMS() - 0.8/math.Sqrt2; math.Abs(d) > 1e-9 {
		t.Errorf("sine RMS off by %g", d)
	}
	if d := s.CrestDB() - 10*math.Log10(2); math.Abs(d) > 1e-6 {
		t.Errorf("sine crest %g dB", s.CrestDB())
	}
	if math.Abs(s.Mean()) > 1e-12 || s.N() != 4000 {
		t.Errorf("mean %g, n %d", s.Mean(), s.N())
	}
	// |0.8 sin| ≥ 0.5 for a fraction 1 − (2/π)·asin(0.5/0.8) of the time.
	want := 4000 * (1 - 2/math.Pi*math.Asin(0.5/0.8))
	if math.Abs(float64(s.Over())-want) > 4 {
		t.Errorf("%d samples over 0.5, want about %.0f", s.Over(), want)
	}
	q.Add([]float64{0.25, -0.25, 0.25, -0.25})
	if q.CrestDB() != 0 || q.Peak() != 0.25 {
		t.Errorf("square: crest %g, peak %g", q.CrestDB(), q.Peak())
	}
	z.Add(make([]float64, 10))
	if !math.IsNaN(z.CrestDB()) || z.RMS() != 0 {
		t.Errorf("silence: crest %g", z.CrestDB())
	}
	if n := testing.AllocsPerRun(100, func() { s.Add(x) }); n != 0 {
		t.Errorf("Add allocates %v times", n)
	}
}

func TestWarningsOnce(t *testing.T) {
	var w Warnings
	w.Add("%d samples clipped", 3)
	w.Add("%d samples clipped", 3)
	w.Merge([]string{"3 samples clipped", "other"})
	if len(w) != 2 || w[1] != "other" {
		t.Errorf("%q", w)
	}
}

// Combine says a finding every result shares once, names the result of
// one only one has, and joins findings that differ only in their figures,
// giving each differing figure's range.
func TestCombine(t *testing.T) {
	for _, tc := range []struct {
		labels []string
		lists  []Warnings
		want   Warnings
	}{
		{[]string{"9V", "7V"}, []Warnings{{"shared", "Q1 cut off"}, {"Q1 saturated", "shared"}},
			Warnings{"shared", "9V: Q1 cut off", "7V: Q1 saturated"}},
		{[]string{"a", "b", "c"}, []Warnings{{"Q1 sits 230 mV from ground"}, {"Q1 sits 620.6 mV from ground"}, {"Q1 sits -5 mV from ground"}},
			Warnings{"Q1 sits -5 to 620.6 mV from ground (in all 3)"}},
		{[]string{"a", "b", "c"}, []Warnings{{"fuzz.Q2 at 1.5 V, 3 s"}, {}, {"fuzz.Q2 at 2 V, 3 s"}},
			Warnings{"fuzz.Q2 at 1.5 to 2 V, 3 s (in a and c)"}},
		{[]string{"a", "b", "c", "d", "e"}, []Warnings{{"x"}, {"x"}, {"x"}, {"x"}, {}},
			Warnings{"x (in a, b, c and 1 more)"}},
		{[]string{"only"}, []Warnings{{"a"}}, Warnings{"a"}},
		{nil, nil, Warnings{}},
	} {
		if got := Combine(tc.labels, tc.lists); !slices.Equal(got, tc.want) || got == nil {
			t.Errorf("%q: %q, want %q", tc.lists, got, tc.want)
		}
	}
}

// A figure is a number that does not continue a name ("Q1", "H2", the
// exponent of "3e5").
func TestFigures(t *testing.T) {
	text, nums := figures("fuzz.Q1's Vce -17.24 mV, H2 at 3e5 and +4")
	if !slices.Equal(nums, []string{"-17.24", "3", "+4"}) || len(text) != len(nums)+1 {
		t.Errorf("%q %q", text, nums)
	}
}

func TestSolverAndWAV(t *testing.T) {
	s := SolverOf(wdf.Stats{Samples: 3, Iterations: 7, MaxIterations: 4, Fallbacks: 1})
	if s.MeanIterations != 2.333 || s.MaxIterations != 4 || s.Fallbacks != 1 || s.Samples != 3 {
		t.Errorf("%+v", s)
	}
	w := WAVOf("x.wav", wavio.Format{SampleRate: 48000, Channels: 2, BitDepth: 24}, 24000)
	if w.Seconds != 0.5 || w.Channels != 2 || w.Format == "" {
		t.Errorf("%+v", w)
	}
}

// Display rules: a figure under its floor prints as 0 or as "< floor", a
// negative zero never prints, a figure that does not exist prints "—".
func TestDisplay(t *testing.T) {
	cases := []struct{ got, want string }{
		{Quantity(8.7e-33, PowerFloor, "W"), "0 W"},
		{Quantity(-2.5e-15, CurrentFloor, "A"), "0 A"},
		{Quantity(-0.0, CurrentFloor, "A"), "0 A"},
		{Quantity(145.1e-6, CurrentFloor, "A"), "145.1 µA"},
		{Quantity(-720.1e-6, CurrentFloor, "A"), "-720.1 µA"},
		{Quantity(math.NaN(), CurrentFloor, "A"), "—"},
		{Fixed(-0.3, "%.0f"), "0"},
		{Fixed(-0.04, "%+.1f"), "+0.0"},
		{Fixed(-0.0, "%.3f"), "0.000"},
		{Fixed(-1.5, "%.1f"), "-1.5"},
		{Fixed(math.Inf(1), "%.1f"), "—"},
		{AtLeast(2.116e-14, 0.001, "%.4g"), "< 0.001"},
		{AtLeast(55.78, 0.001, "%.4g"), "55.78"},
		{AtLeast(-274.9, -100, "%.1f"), "< -100.0"},
		{AtLeast(math.Inf(-1), -100, "%.1f"), "< -100.0"},
		{AtLeast(-16.4, -100, "%.1f"), "-16.4"},
		{AtLeast(math.NaN(), -100, "%.1f"), "—"},
	}
	for i, c := range cases {
		if c.got != c.want {
			t.Errorf("case %d: %q, want %q", i, c.got, c.want)
		}
	}
}
