package plotting

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
)

// axisTicks runs setAxis on data spanning lo..hi and returns the axis
// label, its range and the labelled ticks.
func axisTicks(t *testing.T, lo, hi float64, spec Axis, cm float64, horizontal bool) (string, float64, float64, []string) {
	t.Helper()
	a := plot.New().Y
	a.Min, a.Max = lo, hi
	if err := setAxis(&a, spec, false, vg.Length(cm)*vg.Centimeter, horizontal); err != nil {
		t.Fatal(err)
	}
	var labels []string
	for _, tk := range a.Tick.Marker.Ticks(a.Min, a.Max) {
		if tk.Label != "" {
			labels = append(labels, tk.Label)
		}
	}
	return a.Label.Text, a.Min, a.Max, labels
}

// Round ticks (common practice for bench plots and the issue's own
// complaint about −25.00 / −100.00 / −175.00): dB axes on 10 or 20 dB
// steps, phase on multiples of 90°, engineering prefixes in the label,
// only the decimals the step needs, a true minus sign and no "−0".
// Automatic ranges end on a minor tick, one further out when the data
// come within 2 % of the span of it (except at zero).
func TestAxisTicks(t *testing.T) {
	for _, tc := range []struct {
		name       string
		lo, hi     float64
		spec       Axis
		cm         float64
		horizontal bool
		label      string
		min, max   float64
		labels     string
	}{
		{"spectrum in dB", -175, -25, Axis{Label: "level (dBV, RMS per bin)"}, 9, false,
			"level (dBV, RMS per bin)", -180, -20, "−180 −160 −140 −120 −100 −80 −60 −40 −20"},
		{"gain rounds out", -63.2, 1.4, Axis{Label: "gain (dB)"}, 9, false,
			"gain (dB)", -66, 4, "−60 −50 −40 −30 −20 −10 0"},
		{"unwrapped phase", -268, 61, Axis{Label: "phase (degrees)"}, 5, false,
			"phase (degrees)", -300, 90, "−270 −180 −90 0 90"},
		{"input in millivolts", -0.1, 0.1, Axis{Label: "voltage", Unit: "V"}, 5, false,
			"voltage (mV)", -0.11, 0.11, "−100 −50 0 50 100"},
		{"time in milliseconds", 0, 0.00298, Axis{Label: "time", Unit: "s", Tight: true}, 10, true,
			"time (ms)", 0, 0.00298, "0.0 0.5 1.0 1.5 2.0 2.5"},
		{"collector volts", 0.93, 7.1, Axis{Label: "voltage", Unit: "V"}, 5, false,
			"voltage (V)", 0.5, 7.5, "2 4 6"},
		{"group delay", 0, 5.3e-3, Axis{Label: "group delay", Unit: "s"}, 6, false,
			"group delay (ms)", 0, 5.6e-3, "0 1 2 3 4 5"},
		{"rotation", 0, 1, Axis{Label: "fuzz.fuzz (rotation, 0–1)"}, 18, true,
			"fuzz.fuzz (rotation, 0–1)", 0, 1.02, "0.0 0.1 0.2 0.3 0.4 0.5 0.6 0.7 0.8 0.9 1.0"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			label, lo, hi, labels := axisTicks(t, tc.lo, tc.hi, tc.spec, tc.cm, tc.horizontal)
			if label != tc.label || math.Abs(lo-tc.min) > 1e-12 || math.Abs(hi-tc.max) > 1e-12 ||
				strings.Join(labels, " ") != tc.labels {
				t.Errorf("got %q [%g, %g] %q;\nwant %q [%g, %g] %q", label, lo, hi, strings.Join(labels, " "),
					tc.label, tc.min, tc.max, tc.labels)
			}
		})
	}
}

func TestFormatTick(t *testing.T) {
	for _, tc := range []struct {
		v    float64
		d    int
		want string
	}{{-0.0001, 1, "0.0"}, {-20, 0, "−20"}, {2.5, 1, "2.5"}, {1e-17, 0, "0"}} {
		if got := formatTick(tc.v, tc.d); got != tc.want {
			t.Errorf("formatTick(%g, %d) = %q, want %q", tc.v, tc.d, got, tc.want)
		}
	}
}

func TestLogTicks(t *testing.T) {
	tests := []struct {
		lo, hi float64
		labels []string
	}{
		{20, 20000, []string{"20", "50", "100", "200", "500", "1k", "2k", "5k", "10k", "20k"}},
		{1e-3, 1e3, []string{"1m", "10m", "100m", "1", "10", "100", "1k"}},
	}
	for _, tc := range tests {
		var got []string
		for _, tk := range (LogTicks{}).Ticks(tc.lo, tc.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if strings.Join(got, " ") != strings.Join(tc.labels, " ") {
			t.Errorf("Ticks(%g, %g) labels %v, want %v", tc.lo, tc.hi, got, tc.labels)
		}
	}
}

// A range inside one decade still gets at least two labels, all inside it.
func TestLogTicksNarrow(t *testing.T) {
	n := 0
	for _, tk := range (LogTicks{}).Ticks(1.1, 1.9) {
		if tk.Label != "" {
			n++
			if tk.Value < 1.1 || tk.Value > 1.9 {
				t.Errorf("label %q at %g outside [1.1, 1.9]", tk.Label, tk.Value)
			}
		}
	}
	if n < 2 {
		t.Errorf("%d labels in [1.1, 1.9], want at least 2", n)
	}
}

func TestSI(t *testing.T) {
	tests := []struct {
		v    float64
		want string
	}{{20000, "20k"}, {0.001, "1m"}, {1.5, "1.5"}, {-2.2e-6, "-2.2µ"}, {4.7e6, "4.7M"}, {0, "0"}}
	for _, tc := range tests {
		if got := SI(tc.v); got != tc.want {
			t.Errorf("SI(%g) = %q, want %q", tc.v, got, tc.want)
		}
	}
}

// A flat trace whose values differ only by rounding (a supply node at
// 9 V and 9 V + 5e-15) is drawn on a range of its own, with round ticks,
// instead of ticks a rounding step apart; ticks too fine for their
// values are none, not an endless loop.
func TestFlatRange(t *testing.T) {
	f := &Figure{Panels: []Panel{{X: Axis{Label: "time", Unit: "s"}, Y: Axis{Label: "voltage", Unit: "V"},
		Lines: []Line{{X: []float64{0, 1, 2}, Y: []float64{9, 9 + 5e-15, 9}}}}}}
	r := ranges(t, f)
	if lo, hi := r[0][2], r[0][3]; !(lo <= 8.1+1e-9 && hi >= 9.9-1e-9) {
		t.Errorf("flat trace at 9 V drawn on %g … %g V, want at least 8.1 … 9.9 V", lo, hi)
	}
	tk := linearTicks{stepChoice: stepChoice{step: 1e-18, minor: 5}, scale: 1}
	if got := tk.Ticks(9, 9+5e-15); got != nil {
		t.Errorf("%d ticks a rounding step apart", len(got))
	}
}
