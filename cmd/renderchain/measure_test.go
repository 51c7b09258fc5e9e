package main

import (
	"encoding/csv"
	"encoding/json"
	"image/png"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// measTestChain writes a small chain file: an RC low-pass (10 kΩ, 10 nF)
// followed by an antiparallel diode pair to ground behind 10 kΩ, from an
// ideal source.
func measTestChain(t *testing.T) string {
	t.Helper()
	const src = `name = "bench test chain"
supply = "9V"
[input]
peak = "1V"
source = "ideal"
[output]
load = "none"
full_scale = "1V"
[[stage]]
id = "rc"
parts = [
  { ref = "R1", kind = "resistor",  value = "10k", pins = ["in", "out"] },
  { ref = "C1", kind = "capacitor", value = "10n", pins = ["out", "gnd"] },
]
[[stage]]
id = "clip"
parts = [
  { ref = "R1", kind = "resistor", value = "10k", pins = ["in", "out"] },
  { ref = "D1", kind = "diode", is = "2.52n", n = 1.75, pins = { anode = "out", cathode = "gnd" } },
  { ref = "D2", kind = "diode", is = "2.52n", n = 1.75, pins = { anode = "gnd", cathode = "out" } },
]
`
	path := filepath.Join(t.TempDir(), "bench.toml")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// measure --json gives the interface's fields; the clipper makes odd
// harmonics only (half-wave symmetry), so THD_F comes from H3, H5, … and
// every even harmonic is far below them.
func TestMeasureCommandJSON(t *testing.T) {
	chain := measTestChain(t)
	code, out, errs := capture(t, "measure", "--chain", chain, "--freq", "1kHz", "--amplitude", "2Vpp", "--json", "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var m struct {
		THD         float64 `json:"thd_percent"`
		THDN        float64 `json:"thdn_percent"`
		Fundamental struct {
			DBV float64 `json:"dbv"`
		} `json:"fundamental"`
		Harmonics []struct {
			Order int      `json:"order"`
			DBc   *float64 `json:"dbc"`
		} `json:"harmonics"`
		Amplitude float64 `json:"amplitude_v_peak"`
	}
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("stdout is not the JSON record: %v\n%s", err, out)
	}
	if m.Amplitude != 1 || len(m.Harmonics) != 9 || m.Harmonics[0].Order != 2 || !(m.THD > 1) || m.THDN < m.THD*(1-1e-9) {
		t.Errorf("amplitude %g V (want 1 V from 2Vpp), %d harmonics, THD_F %g %%, THD+N %g %%", m.Amplitude, len(m.Harmonics), m.THD, m.THDN)
	}
	for _, h := range m.Harmonics {
		if h.Order%2 == 0 && h.DBc != nil && *h.DBc > -80 {
			t.Errorf("H%d at %.1f dBc: even harmonics of a symmetric clipper must stay below −80 dBc", h.Order, *h.DBc)
		}
	}
}

func TestMeasureCommandConditionsCSVAndPlot(t *testing.T) {
	chain := measTestChain(t)
	dir := t.TempDir()
	plot := filepath.Join(dir, "thd.png")
	code, out, errs := capture(t, "measure", "--chain", chain, "--amplitude", "300mV", "--supply", "9,7",
		"--set", "clip.R1=10k,22k", "--csv", "--plot", plot, "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(recs) != 5 {
		t.Fatalf("CSV: %d records, %v; want a header and 4 rows\n%s", len(recs), err, out)
	}
	if recs[1][0] != "clip.R1=10k supply=9V" || recs[4][0] != "clip.R1=22k supply=7V" {
		t.Errorf("row labels %q … %q", recs[1][0], recs[4][0])
	}
	f, err := os.Open(plot)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if _, err := png.Decode(f); err != nil {
		t.Errorf("plot is not a PNG: %v", err)
	}
	// A knob-free level sweep, table output.
	code, out, errs = capture(t, "measure", "--chain", chain, "--sweep-level", "10mV..1V", "--steps", "3", "--quiet")
	if code != 0 || !strings.Contains(out, "input V pk") || strings.Count(out, "mV") < 2 {
		t.Errorf("level sweep: exit %d, %s\n%s", code, errs, out)
	}
}

// Bad input: a one-line message naming the value, exit status 2 for a bad
// command line, nothing left behind.
func TestMeasureCommandBadInput(t *testing.T) {
	chain := measTestChain(t)
	dir := t.TempDir()
	plot := filepath.Join(dir, "p.png")
	tests := []struct {
		args []string
		code int
		want string
	}{
		{[]string{"--amplitude", "-1mV"}, 2, `"-1mV"`},
		{[]string{"--amplitude", "0"}, 2, "amplitude"},
		{[]string{"--freq", "30k"}, 2, "Nyquist"},
		{[]string{"--freq", "2"}, 2, "5 Hz"},
		{[]string{"--sweep-level", "1V..1mV"}, 2, "reversed"},
		{[]string{"--sweep-knob", "rc.x=1..0"}, 2, "reversed"},
		{[]string{"--probe", "clip.nowhere"}, 2, `"clip.nowhere"`},
		{[]string{"--set", "clip.R9=1k"}, 1, "clip.R9"},
		{[]string{"--plot", filepath.Join(dir, "p.pdf")}, 2, "p.pdf"},
		{[]string{"--json", "--csv"}, 2, "--csv"},
		{[]string{"--amplitude", "1V", "--plot", plot, "--set", "clip.D1.n=banana"}, 1, "banana"},
	}
	for _, tc := range tests {
		code, _, errs := capture(t, append([]string{"measure", "--chain", chain, "--quiet"}, tc.args...)...)
		msg := strings.TrimSpace(errs)
		if code != tc.code || !strings.Contains(msg, tc.want) || strings.Count(msg, "\n") > 0 {
			t.Errorf("measure %v: exit %d, stderr %q; want exit %d and one line naming %s", tc.args, code, msg, tc.code, tc.want)
		}
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Errorf("failed runs left files: %v", ents)
	}
}

// response --json: the interface's curves[].points[].hz, .db, .deg, one
// curve per value of a --set family. At the first stage's output the RC
// low-pass sees the clipper's 10 kΩ in series with the two diodes' zero-bias
// conductance, 2·Is/(n·Vt) (the Shockley equation's slope at 0 V; Vt =
// k·298.15 K/q, the chain's default 25 °C): H = G1/(G1 + jωC + Y) with Y the
// admittance of that branch (nodal analysis by hand). Tolerance 0.01 dB.
func TestResponseCommandJSON(t *testing.T) {
	chain := measTestChain(t)
	code, out, errs := capture(t, "response", "--chain", chain, "--freqs", "100,1k,10k", "--probe", "rc.out",
		"--set", "rc.C1=10n,22n", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Curves []struct {
			Label  string `json:"label"`
			Points []struct {
				Hz, DB, Deg float64
			} `json:"points"`
		} `json:"curves"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if len(rep.Curves) != 2 || len(rep.Curves[0].Points) != 3 || rep.Curves[1].Label != "rc.C1=22n" {
		t.Fatalf("curves %+v", rep.Curves)
	}
	const (
		r1, rClip = 10e3, 10e3
		is, n     = 2.52e-9, 1.75
		boltzmann = 1.380649e-23    // J/K, exact (SI 2019)
		charge    = 1.602176634e-19 // C, exact (SI 2019)
		kelvin25C = 298.15
	)
	vt := boltzmann * kelvin25C / charge
	gd := 2 * is / (n * vt)
	y := 1 / (rClip + 1/gd)
	worst := 0.0
	for k, c := range []float64{10e-9, 22e-9} {
		for _, p := range rep.Curves[k].Points {
			h := complex(1/r1, 0) / complex(1/r1+y, 2*math.Pi*p.Hz*c)
			want := 20 * math.Log10(cmplx.Abs(h))
			wantDeg := cmplx.Phase(h) * 180 / math.Pi
			worst = math.Max(worst, math.Abs(p.DB-want))
			if math.Abs(p.DB-want) > 0.01 || math.Abs(p.Deg-wantDeg) > 0.01 {
				t.Errorf("C1 %g F at %g Hz: %.4f dB %.3f°, want %.4f dB %.3f°", c, p.Hz, p.DB, p.Deg, want, wantDeg)
			}
		}
	}
	t.Logf("rc.out against the hand nodal formula: worst %.2e dB", worst)
	// The swept mode through the same chain at a small level.
	code, out, errs = capture(t, "response", "--chain", chain, "--from", "100", "--to", "5k", "--points", "5",
		"--swept", "--amplitude", "10mV", "--duration", "1s", "--json", "--quiet")
	if code != 0 || !strings.Contains(out, `"mode": "swept"`) || !strings.Contains(out, `"H2`) {
		t.Errorf("swept: exit %d, %s\n%.400s", code, errs, out)
	}
}

func TestResponseCommandBadInput(t *testing.T) {
	chain := measTestChain(t)
	tests := []struct {
		args []string
		want string
	}{
		{[]string{"--freqs", "100k"}, "Nyquist"},
		{[]string{"--freqs", "1"}, "5 Hz"},
		{[]string{"--from", "10k", "--to", "100"}, "reversed"},
		{[]string{"--probe", "rc.zz"}, `"rc.zz"`},
		{[]string{"--swept", "--amplitude", "0V"}, "amplitude"},
		{[]string{"--swept", "--ref", "in"}, "--ref"},
		{[]string{"--amplitude", "1V"}, "--swept"},
		{[]string{"--freqs", "1k", "--points", "9"}, "--freqs"},
	}
	for _, tc := range tests {
		code, _, errs := capture(t, append([]string{"response", "--chain", chain, "--quiet"}, tc.args...)...)
		msg := strings.TrimSpace(errs)
		if code != 2 || !strings.Contains(msg, tc.want) || strings.Contains(msg, "\n") {
			t.Errorf("response %v: exit %d, stderr %q; want exit 2 and one line naming %s", tc.args, code, msg, tc.want)
		}
	}
}

// measure --alias-factors gives one signal-to-alias figure per factor in
// the JSON; the diode clipper's aliasing falls as the factor rises (a
// clipper's harmonic spectrum falls with order, so folding from a higher
// internal rate brings back weaker lines: common practice). A factor out
// of range is a usage error (exit status 2) naming the flag.
func TestMeasureCommandAlias(t *testing.T) {
	chain := measTestChain(t)
	code, out, errs := capture(t, "measure", "--chain", chain, "--freq", "1319", "--amplitude", "2V", "--alias-factors", "8,2", "--json", "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var m struct {
		Alias struct {
			FrequencyHz float64 `json:"frequency_hz"`
			Factors     []struct {
				Oversample int     `json:"oversample"`
				DB         float64 `json:"signal_to_alias_db"`
			} `json:"factors"`
		} `json:"alias"`
	}
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("%v: %s", err, out)
	}
	f := m.Alias.Factors
	if m.Alias.FrequencyHz != 1319 || len(f) != 2 || f[0].Oversample != 2 || f[1].Oversample != 8 || !(f[1].DB > f[0].DB) {
		t.Errorf("alias: %+v", m.Alias)
	}
	code, _, errs = capture(t, "measure", "--chain", chain, "--alias-factors", "32", "--quiet")
	if code != 2 || !strings.Contains(errs, "--alias-factors") {
		t.Errorf("--alias-factors 32: exit %d, %q", code, errs)
	}
}
