package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const germanium = "../../chains/germanium.toml" // a positive-ground build: supply = "-9V"

// supplies reads every "supply_v" field of a JSON document, in order.
func supplies(t *testing.T, doc string) []float64 {
	t.Helper()
	var v any
	if err := json.Unmarshal([]byte(doc), &v); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, doc)
	}
	var out []float64
	var walk func(any)
	walk = func(x any) {
		switch x := x.(type) {
		case map[string]any:
			if s, ok := x["supply_v"].(float64); ok {
				out = append(out, s)
			}
			for _, k := range []string{"measurements", "conditions", "variants"} {
				walk(x[k])
			}
		case []any:
			for _, e := range x {
				walk(e)
			}
		}
	}
	walk(v)
	return out
}

// Regression (a supply list ran a positive-ground build reversed in
// measure, render and ab while bias kept its polarity): the chain file's
// supply sign is the build's polarity, and the same supply given on the
// command line or in a variant gives the same polarity in every command —
// render, measure, bias, spread and ab all run the germanium build at
// −7 V for "7". A sign that contradicts the file is refused, saying how to
// write it.
func TestSupplyPolarityInEveryCommand(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	report := filepath.Join(dir, "r.json")
	cases := []struct {
		name string
		args []string
		want []float64
		out  func() string // the JSON, when not on stdout
	}{
		{"render", []string{"render", "--chain", germanium, "--in", dry, "--out", filepath.Join(dir, "w.wav"), "--set", "supply=7", "--oversample", "1", "--report", report, "-q"},
			[]float64{-7}, func() string { b, _ := os.ReadFile(report); return string(b) }},
		{"measure", []string{"measure", "--chain", germanium, "--supply", "9,7", "--oversample", "1", "--json", "-q"}, []float64{-9, -7}, nil},
		{"measure --set", []string{"measure", "--chain", germanium, "--set", "supply=7V", "--oversample", "1", "--json", "-q"}, []float64{-7}, nil},
		{"bias", []string{"bias", "--chain", germanium, "--supply", "9,7", "--json"}, []float64{-9, -9, -7}, nil},
		{"spread", []string{"spread", "--chain", germanium, "--set", "supply=7", "--trials", "2", "--no-thd", "--json", "-q"}, []float64{-7}, nil},
		{"ab", []string{"ab", "--chain", germanium, "--in", dry, "--outdir", filepath.Join(dir, "set"), "--variant", "tired battery: supply=7V",
			"--oversample", "1", "--segment", "0", "--json", "-q"}, []float64{-7}, nil},
	}
	for _, tc := range cases {
		code, out, errs := capture(t, tc.args...)
		if code != exitOK {
			t.Errorf("%s: exit %d: %s", tc.name, code, errs)
			continue
		}
		if tc.out != nil {
			out = tc.out()
		}
		got := supplies(t, out)
		if len(got) != len(tc.want) {
			t.Errorf("%s: supplies %v, want %v", tc.name, got, tc.want)
			continue
		}
		for i := range got {
			if got[i] != tc.want[i] {
				t.Errorf("%s: supplies %v, want %v (the chain file's polarity)", tc.name, got, tc.want)
				break
			}
		}
	}
	refused := []struct {
		args []string
		code int
	}{
		{[]string{"measure", "--chain", germanium, "--supply", "+9,7"}, exitUsage},
		{[]string{"bias", "--chain", germanium, "--supply", "9,+7V"}, exitUsage},
		{[]string{"render", "--chain", germanium, "--in", dry, "--out", filepath.Join(dir, "x.wav"), "--set", "supply=+7V"}, exitFailure},
	}
	for _, tc := range refused {
		code, _, errs := capture(t, tc.args...)
		if code != tc.code || !strings.Contains(errs, "negative supply (positive ground)") || strings.Count(strings.TrimSpace(errs), "\n") > 0 {
			t.Errorf("%v: exit %d, %q; want exit %d and one line on the polarity", tc.args, code, errs, tc.code)
		}
	}
}

// The README's example measures a working fuzz on the germanium build:
// every supply and temperature gives a loud, heavily distorted output
// (the reversed build gave −48.6 dBV and 0.005 % THD). Bounds from the
// chain: a 100 mV test sine into a two-stage fuzz with a 0.75 volume knob
// comes out above −30 dBV with THD above 10 % (a clipping stage's figures
// run from tens of per cent up).
func TestGermaniumExampleMeasuresAWorkingFuzz(t *testing.T) {
	code, out, errs := capture(t, "measure", "--chain", germanium, "--supply", "9.6,9,8,7", "--temp", "0,25,40", "--json", "-q")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Measurements []struct {
			Label       string  `json:"label"`
			SupplyV     float64 `json:"supply_v"`
			THD         float64 `json:"thd_percent"`
			Fundamental struct {
				DBV float64 `json:"dbv"`
			} `json:"fundamental"`
		} `json:"measurements"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Measurements) != 12 {
		t.Fatalf("%d measurements, want 4 supplies × 3 temperatures", len(rep.Measurements))
	}
	for _, m := range rep.Measurements {
		if m.SupplyV >= 0 || m.Fundamental.DBV < -30 || m.THD < 10 {
			t.Errorf("%s: supply %g V, output %.1f dBV, THD %.3g %%: not a working positive-ground fuzz", m.Label, m.SupplyV, m.Fundamental.DBV, m.THD)
		}
	}
}
