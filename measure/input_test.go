package measure

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
)

func TestParseAmplitude(t *testing.T) {
	tests := []struct {
		text string
		want float64 // volts peak
	}{
		{"100mV", 0.1},
		{"0.1", 0.1},
		{"0.1V", 0.1},
		{"100mVp", 0.1},
		{"20mVpp", 0.01}, // peak-to-peak is twice the peak (definition)
		{"2Vpp", 1},
		// dBV is dB re 1 V RMS (common practice); a sine's peak is √2 × RMS.
		{"0dBV", math.Sqrt2},
		{"-20dBV", math.Sqrt2 * 0.1},
		{" -6.0206 dBV ", math.Sqrt2 * 0.5},
		{"1Vrms", math.Sqrt2},
		{"70.71mVrms", 0.07071 * math.Sqrt2},
	}
	for _, tc := range tests {
		got, err := ParseAmplitude(tc.text)
		if err != nil {
			t.Errorf("ParseAmplitude(%q): %v", tc.text, err)
			continue
		}
		// Tolerance: a few ulps of the arithmetic; -6.0206 dB is 0.5 to 5 digits.
		tol := 1e-12
		if strings.Contains(tc.text, "6.0206") {
			tol = 1e-5
		}
		if math.Abs(got-tc.want) > tol*tc.want {
			t.Errorf("ParseAmplitude(%q) = %.12g V, want %.12g V", tc.text, got, tc.want)
		}
	}
}

func TestParseAmplitudeErrors(t *testing.T) {
	for _, text := range []string{"0", "-1mV", "0mVpp", "abc", "10dBX", "dBV", "1A", "", "1e400"} {
		_, err := ParseAmplitude(text)
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Errorf("ParseAmplitude(%q) = %v, want an *InputError", text, err)
			continue
		}
		if msg := err.Error(); strings.Contains(msg, "\n") || !strings.Contains(msg, "amplitude") || (text != "" && !strings.Contains(msg, `"`+text+`"`)) {
			t.Errorf("ParseAmplitude(%q): message %q should be one line naming the amplitude and the value", text, msg)
		}
	}
}

func TestParseFrequency(t *testing.T) {
	tests := []struct {
		text string
		want float64
		ok   bool
	}{
		{"1k", 1000, true}, {"1kHz", 1000, true}, {"440", 440, true}, {"2.5kHz", 2500, true},
		{"0", 0, false}, {"-5", 0, false}, {"1kV", 0, false}, {"fast", 0, false},
	}
	for _, tc := range tests {
		got, err := ParseFrequency(tc.text)
		if (err == nil) != tc.ok || (tc.ok && got != tc.want) {
			t.Errorf("ParseFrequency(%q) = %g, %v; want %g, ok %v", tc.text, got, err, tc.want, tc.ok)
		}
	}
	fs, err := ParseFrequencies("100, 1k,10k")
	if err != nil || !floats.Equal(fs, []float64{100, 1000, 10000}) {
		t.Errorf("ParseFrequencies = %v, %v", fs, err)
	}
	if _, err := ParseFrequencies("100,,1k"); err == nil {
		t.Error("ParseFrequencies with an empty item: want an error")
	}
}

// LogGrid must match gonum's floats.LogSpan (an outside reference for
// logarithmically spaced points) to rounding.
func TestLogGrid(t *testing.T) {
	for _, tc := range []struct {
		lo, hi float64
		n      int
	}{{20, 20000, 61}, {1e-3, 1, 9}, {50, 10000, 2}} {
		got := LogGrid(tc.lo, tc.hi, tc.n)
		want := floats.LogSpan(make([]float64, tc.n), tc.lo, tc.hi)
		if !floats.EqualApprox(got, want, 1e-12*tc.hi) {
			t.Errorf("LogGrid(%g, %g, %d) = %v, want %v", tc.lo, tc.hi, tc.n, got, want)
		}
		if got[0] != tc.lo || got[tc.n-1] != tc.hi {
			t.Errorf("LogGrid ends %g, %g; want exactly %g, %g", got[0], got[tc.n-1], tc.lo, tc.hi)
		}
	}
}

func TestSweeps(t *testing.T) {
	s, err := ParseLevelSweep("1mV..1V", 4)
	if err != nil {
		t.Fatal(err)
	}
	// Logarithmic steps: 1 mV, 10 mV, 100 mV, 1 V (tolerance: rounding).
	if !floats.EqualApprox(s.StepList, []float64{1e-3, 1e-2, 1e-1, 1}, 1e-15) {
		t.Errorf("level steps %v", s.StepList)
	}
	s, err = ParseLevelSweep("-60dBV..0dBV", 3)
	if err != nil || math.Abs(s.StepList[1]-math.Sqrt2*1e-3*math.Sqrt(1e3)) > 1e-12 {
		t.Errorf("dBV sweep %v, %v", s, err)
	}
	k, err := ParseKnobSweep("fuzz.fuzz=0..1", 5)
	if err != nil || !floats.Equal(k.StepList, []float64{0, 0.25, 0.5, 0.75, 1}) || k.Key != "fuzz.fuzz" {
		t.Errorf("knob sweep %+v, %v", k, err)
	}
	if got := k.knobSet(0.1 + 0.2); got != "fuzz.fuzz=0.3" {
		t.Errorf("knobSet(0.1+0.2) = %q, want fuzz.fuzz=0.3", got)
	}
	bad := []struct{ level, text string }{
		{"level", "1V..1mV"}, {"level", "1mV..1mV"}, {"level", "1mV-1V"}, {"level", "0..1V"},
		{"knob", "fuzz.fuzz=1..0"}, {"knob", "fuzz=0..1"}, {"knob", "fuzz.fuzz=0..2"}, {"knob", "fuzz.fuzz=a..b"},
	}
	for _, b := range bad {
		var err error
		if b.level == "level" {
			_, err = ParseLevelSweep(b.text, 5)
		} else {
			_, err = ParseKnobSweep(b.text, 5)
		}
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Errorf("sweep %q: got %v, want an *InputError", b.text, err)
		}
	}
	if _, err := ParseLevelSweep("1mV..1V", 1); err == nil {
		t.Error("one step: want an error")
	}
	if _, err := ParseLevelSweep("1V..1mV", 5); err == nil || !strings.Contains(err.Error(), "reversed") {
		t.Errorf("reversed bounds: error %v should say so", err)
	}
}

func TestExpand(t *testing.T) {
	vs, err := Expand([]string{"tone.tone=0,0.5", "fuzz.fuzz=1", "supply=9V,7V"})
	if err != nil {
		t.Fatal(err)
	}
	want := []Variant{
		{"tone.tone=0 supply=9V", []string{"tone.tone=0", "fuzz.fuzz=1", "supply=9V"}},
		{"tone.tone=0 supply=7V", []string{"tone.tone=0", "fuzz.fuzz=1", "supply=7V"}},
		{"tone.tone=0.5 supply=9V", []string{"tone.tone=0.5", "fuzz.fuzz=1", "supply=9V"}},
		{"tone.tone=0.5 supply=7V", []string{"tone.tone=0.5", "fuzz.fuzz=1", "supply=7V"}},
	}
	if len(vs) != len(want) {
		t.Fatalf("%d variants, want %d: %+v", len(vs), len(want), vs)
	}
	for i := range want {
		if vs[i].Label != want[i].Label || strings.Join(vs[i].Sets, "|") != strings.Join(want[i].Sets, "|") {
			t.Errorf("variant %d = %+v, want %+v", i, vs[i], want[i])
		}
	}
	one, err := Expand(nil)
	if err != nil || len(one) != 1 || one[0].Label != "" {
		t.Errorf("Expand(nil) = %+v, %v; want one unlabelled variant", one, err)
	}
	for _, bad := range []string{"novalue", "=3", "a.b=1,,2"} {
		if _, err := Expand([]string{bad}); err == nil {
			t.Errorf("Expand(%q): want an error", bad)
		}
	}
	sup, _ := SupplySet("9.6, 9,8V")
	tmp, _ := TemperatureSet("0,25,313.15K")
	if sup != "supply=9.6V,9V,8V" || tmp != "temperature=0C,25C,313.15K" {
		t.Errorf("SupplySet = %q, TemperatureSet = %q", sup, tmp)
	}
}

func TestNumJSON(t *testing.T) {
	b, err := json.Marshal([]Num{1.5, Num(math.Inf(-1)), Num(math.NaN()), Num(math.Inf(1))})
	if err != nil || string(b) != "[1.5,null,null,null]" {
		t.Errorf("Num JSON = %s, %v", b, err)
	}
}
