package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"renderchain/bias"
	"renderchain/chains"
)

const benchChain = "../../chains/fuzz-only.toml"

// bias --json carries the interface's fields, and they hold what the bench
// package computes for the same chain.
func TestBiasJSON(t *testing.T) {
	code, out, errs := capture(t, "bias", "--chain", benchChain, "--set", "fuzz.trim2=0.4", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		Nodes   map[string]float64 `json:"nodes"`
		Devices []struct {
			Ref    string   `json:"ref"`
			Vbe    *float64 `json:"vbe_v"`
			Vce    *float64 `json:"vce_v"`
			Ic     *float64 `json:"ic_a"`
			Region string   `json:"region"`
		} `json:"devices"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	ch, _ := chains.Load(benchChain)
	ch.Set("fuzz.trim2=0.4")
	b, err := bias.Solve(ch)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range b.Nodes {
		if n.Internal {
			continue // in internal_nodes (a transistor's base behind its base resistance)
		}
		if v, ok := r.Nodes[n.Name]; !ok || v != n.Volts {
			t.Errorf("nodes[%s] = %v, %v; want %v", n.Name, v, ok, n.Volts)
		}
	}
	if len(r.Devices) != len(b.Transistors) {
		t.Fatalf("%d devices", len(r.Devices))
	}
	for i, d := range r.Devices {
		q := b.Transistors[i]
		if d.Ref != q.Ref || d.Vbe == nil || *d.Vbe != q.Vbe || *d.Vce != q.Vce || *d.Ic != q.Ic || d.Region != string(q.Region) {
			t.Errorf("device %d: %+v, want %s", i, d, q.Ref)
		}
	}
	if !strings.HasPrefix(r.Devices[1].Ref, "fuzz.Q") {
		t.Errorf("refs as in the circuit: %q", r.Devices[1].Ref)
	}
}

func TestBiasTargetAndConditions(t *testing.T) {
	code, out, errs := capture(t, "bias", "--chain", benchChain, "--target", "fuzz.Q2.vc=4.5V", "--supply", "9.6,9", "--temp", "0,40", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		Nodes  map[string]float64 `json:"nodes"`
		Target struct {
			Reached  bool    `json:"reached"`
			Rotation float64 `json:"rotation"`
			Ohms     float64 `json:"ccw_wiper_ohms"`
		} `json:"target"`
		Conditions []struct {
			Supply float64 `json:"supply_v"`
			Temp   float64 `json:"temperature_c"`
		} `json:"conditions"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatal(err)
	}
	if !r.Target.Reached || math.Abs(r.Nodes["fuzz.c2"]-4.5) > 0.01 || len(r.Conditions) != 4 || r.Conditions[0].Supply != 9.6 || r.Conditions[1].Temp != 40 {
		t.Errorf("target %+v, Vc2 %v, conditions %+v", r.Target, r.Nodes["fuzz.c2"], r.Conditions)
	}
	// Text output: the table and the trimmer reading.
	code, out, _ = capture(t, "bias", "--chain", benchChain, "--target", "fuzz.Q2.vc=4.5V")
	if code != exitOK || !strings.Contains(out, "between ccw and wiper of fuzz.TR2") || !strings.Contains(out, "fuzz.Q2") {
		t.Errorf("exit %d, text:\n%s", code, out)
	}
	// Out of reach: said so, exit 0, the closest value given.
	code, out, _ = capture(t, "bias", "--chain", benchChain, "--target", "fuzz.Q2.vc=9.5V", "--json")
	var oor struct {
		Target struct {
			Reached  bool    `json:"reached"`
			Achieved float64 `json:"achieved"`
			Message  string  `json:"message"`
		} `json:"target"`
	}
	json.Unmarshal([]byte(out), &oor)
	if code != exitOK || oor.Target.Reached || !strings.Contains(oor.Target.Message, "out of reach") || oor.Target.Achieved < 7 {
		t.Errorf("out of reach: exit %d, %+v", code, oor.Target)
	}
}

// Bad input: a one-line message on stderr and a usage exit status.
func TestBiasBadInput(t *testing.T) {
	cases := []struct {
		args []string
		want int
		msg  string
	}{
		{[]string{"--target", "fuzz.Q9.vc=4V"}, exitUsage, "no transistor"},
		{[]string{"--target", "fuzz.Q2.vq=4V"}, exitUsage, "not a transistor quantity"},
		{[]string{"--target", "fuzz.Q2.vc=4V", "--adjust", "fuzz.nope"}, exitUsage, "no knob or pot"},
		{[]string{"--target", "fuzz.c2=4V"}, exitUsage, "needs the knob"},
		{[]string{"--supply", "9,x"}, exitUsage, "--supply"},
		{[]string{"--temp", "500"}, exitUsage, "--temp"},
		{[]string{"--adjust", "fuzz.trim2"}, exitUsage, "go with --target"},
		{[]string{"--set", "fuzz.nope=1"}, exitFailure, "fuzz.nope"},
	}
	for _, tc := range cases {
		code, _, errs := capture(t, append([]string{"bias", "--chain", benchChain}, tc.args...)...)
		if code != tc.want || !strings.Contains(errs, tc.msg) || strings.Count(strings.TrimSpace(errs), "\n") != 0 {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q on one line", tc.args, code, errs, tc.want, tc.msg)
		}
	}
}
