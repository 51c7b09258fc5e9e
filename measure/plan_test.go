package measure

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"

	"renderchain/models"
)

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
		var fe *models.FieldError
		if !errors.As(err, &fe) || fe.Field != "sweep_"+b.level {
			t.Errorf("sweep %q: got %v, want a *models.FieldError on sweep_%s", b.text, err, b.level)
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
	sup := SupplyFamily([]float64{9.6, 9, 8})
	neg := SupplyFamily([]float64{-9.6, -7})
	tmp := TemperatureFamily([]float64{273.15, 298.15, 313.15})
	if sup != "supply=9.6V,9V,8V" || neg != "supply=-9.6V,-7V" || tmp != "temperature=0C,25C,40C" {
		t.Errorf("SupplyFamily = %q, %q, TemperatureFamily = %q", sup, neg, tmp)
	}
}
