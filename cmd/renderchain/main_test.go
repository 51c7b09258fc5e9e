package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"renderchain/dsp/synth"
	"renderchain/dsp/wavio"
)

func dryTake(t *testing.T, dir string) string {
	t.Helper()
	x, err := synth.Render([]synth.Note{{Start: 0, String: 0, Fret: 3, Velocity: 0.8}, {Start: 0.02, String: 1, Fret: 5, Velocity: 0.8}}, 0.5, synth.Options{SampleRate: 48000, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "dry.wav")
	if err := wavio.WriteFile(path, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 24}, x); err != nil {
		t.Fatal(err)
	}
	return path
}

// The render command writes the WAV and a report with the fields the
// project's interface fixes.
func TestRenderCommand(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	out := filepath.Join(dir, "wet.wav")
	rep := filepath.Join(dir, "r.json")
	code := run([]string{"renderchain", "render", "--chain", "../../chains/demo.toml", "--in", dry, "--out", out,
		"--set", "fuzz.fuzz=0.9", "--oversample", "2", "--report", rep, "--quiet"})
	if code != exitOK {
		t.Fatalf("exit %d", code)
	}
	var r map[string]any
	b, err := os.ReadFile(rep)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	get := func(path ...string) any {
		var v any = r
		for _, p := range path {
			m, _ := v.(map[string]any)
			v = m[p]
		}
		return v
	}
	for _, p := range [][]string{{"output", "peak_dbfs"}, {"output", "rms_dbfs"}, {"solver", "mean_iterations"}, {"solver", "max_iterations"}, {"solver", "nonconverged"}, {"realtime_factor"}} {
		v, ok := get(p...).(float64)
		if !ok || math.IsNaN(v) {
			t.Errorf("report field %v = %v", p, get(p...))
		}
	}
	if get("solver", "nonconverged").(float64) != 0 {
		t.Errorf("nonconverged samples: %v", get("solver", "nonconverged"))
	}
	rd, err := wavio.Open(out)
	if err != nil {
		t.Fatal(err)
	}
	defer rd.Close()
	if rd.Frames() != 24000 {
		t.Errorf("%d frames, want 24000", rd.Frames())
	}
}

// Exit statuses: 2 for a wrong command line, 1 for bad input, and no
// output file either way.
func TestExitStatuses(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	out := filepath.Join(dir, "wet.wav")
	nonEmpty := filepath.Join(dir, "full")
	os.MkdirAll(nonEmpty, 0o755)
	os.WriteFile(filepath.Join(nonEmpty, "x"), []byte("x"), 0o644)
	cases := []struct {
		name string
		args []string
		want int
	}{
		{"missing flag", []string{"render", "--in", dry, "--out", out}, exitUsage},
		{"unknown flag", []string{"render", "--chain", "x", "--bogus"}, exitUsage},
		{"oversample range", []string{"render", "--chain", "../../chains/demo.toml", "--in", dry, "--out", out, "--oversample", "32"}, exitUsage},
		{"unknown set key", []string{"render", "--chain", "../../chains/demo.toml", "--in", dry, "--out", out, "--set", "fuzz.nope=1"}, exitFailure},
		{"missing chain", []string{"render", "--chain", filepath.Join(dir, "none.toml"), "--in", dry, "--out", out}, exitFailure},
		{"missing input", []string{"render", "--chain", "../../chains/demo.toml", "--in", filepath.Join(dir, "none.wav"), "--out", out}, exitFailure},
		{"demo into a full folder", []string{"demo", "--outdir", nonEmpty}, exitUsage},
		{"unknown command", []string{"rendr"}, exitUsage},
		{"unknown help topic", []string{"help", "rendr"}, exitUsage},
		{"NaN flag value", []string{"measure", "--chain", "../../chains/demo.toml", "--amplitude", "nan"}, exitUsage},
		{"NaN knob in an override", []string{"render", "--chain", "../../chains/demo.toml", "--in", dry, "--out", out, "--set", "fuzz.fuzz=NaN"}, exitFailure},
		{"library field mapped to its flag", []string{"measure", "--chain", "../../chains/demo.toml", "--harmonics", "1"}, exitUsage},
	}
	for _, tc := range cases {
		if got := run(append([]string{"renderchain"}, tc.args...)); got != tc.want {
			t.Errorf("%s: exit %d, want %d", tc.name, got, tc.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("%s: output written", tc.name)
		}
	}
}
