package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"renderchain/dsp/synth"
	"renderchain/dsp/wavio"
)

// abDry writes 1.5 s of the synthesised demonstration phrase as a dry take.
func abDry(t *testing.T, dir string) string {
	t.Helper()
	x, err := synth.DemoPhrase(48000, 4)
	if err != nil {
		t.Fatal(err)
	}
	x = x[:72000]
	path := filepath.Join(dir, "take.wav")
	if err := wavio.WriteFile(path, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 24}, x); err != nil {
		t.Fatal(err)
	}
	return path
}

// abStdout runs the command line with stdout captured.
func abStdout(t *testing.T, args ...string) (int, string) {
	t.Helper()
	code, out, _ := capture(t, args...)
	return code, out
}

// TestABCommand runs ab end to end and reads what the project's interface
// fixes: ab.json's target_lufs and variants[].label, .file, .gain_db, .lufs,
// the WAV files it names, index.html; then analyze --json on a clip gives
// that clip's lufs (the same BS.1770-4 meter, so within 0.01 LU) and a
// true peak under the ceiling.
func TestABCommand(t *testing.T) {
	dir := t.TempDir()
	dry := abDry(t, dir)
	out := filepath.Join(dir, "set")
	code, _, stderr := capture(t, "ab", "--chain", "../../chains/fuzz-only.toml", "--in", dry, "--outdir", out,
		"--variant", "as built:", "--variant", "more fuzz: fuzz.fuzz=1", "--oversample", "1",
		"--segment", "500ms", "--crossfade", "10ms", "--quiet")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	// The hearing caution is printed even with --quiet.
	if !strings.Contains(stderr, hearingCaution) {
		t.Errorf("stderr %q lacks the hearing caution", stderr)
	}
	b, err := os.ReadFile(filepath.Join(out, "ab.json"))
	if err != nil {
		t.Fatal(err)
	}
	var m struct {
		TargetLUFS *float64 `json:"target_lufs"`
		Variants   []struct {
			Label  string   `json:"label"`
			File   string   `json:"file"`
			GainDB *float64 `json:"gain_db"`
			LUFS   *float64 `json:"lufs"`
		} `json:"variants"`
	}
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	if m.TargetLUFS == nil || *m.TargetLUFS != -18 || len(m.Variants) != 3 {
		t.Fatalf("ab.json: %s", b)
	}
	for i, want := range []string{"as built", "more fuzz", "bypass"} {
		v := m.Variants[i]
		if v.Label != want || v.GainDB == nil || v.LUFS == nil || math.Abs(*v.LUFS+18) > 0.01 {
			t.Errorf("variant %d: %+v, want %q at −18 LUFS", i, v, want)
		}
		if _, err := os.Stat(filepath.Join(out, v.File)); err != nil {
			t.Error(err)
		}
	}
	for _, f := range []string{"index.html", "sequence.wav"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Error(err)
		}
	}
	// The interface's form: the flag after the file.
	code, js := abStdout(t, "analyze", filepath.Join(out, m.Variants[1].File), "--json")
	var a struct {
		LUFS     *float64 `json:"lufs"`
		TruePeak *float64 `json:"true_peak_dbtp"`
		Peak     *float64 `json:"peak_dbfs"`
		RMS      *float64 `json:"rms_dbfs"`
	}
	if code != exitOK || json.Unmarshal([]byte(js), &a) != nil || a.LUFS == nil || a.TruePeak == nil || a.Peak == nil || a.RMS == nil {
		t.Fatalf("analyze --json: exit %d, %s", code, js)
	}
	if math.Abs(*a.LUFS-*m.Variants[1].LUFS) > 0.01 || *a.TruePeak > -1 {
		t.Errorf("analyze: %.4f LUFS, %.4f dBTP; ab.json says %.4f LUFS, ceiling −1 dBTP", *a.LUFS, *a.TruePeak, *m.Variants[1].LUFS)
	}
}

// TestABExitStatuses: a wrong command line exits 2, bad input 1, and the
// output folder is not created either way.
func TestABExitStatuses(t *testing.T) {
	dir := t.TempDir()
	dry := abDry(t, dir)
	older := filepath.Join(dir, "older")
	os.Mkdir(older, 0o755)
	os.WriteFile(filepath.Join(older, "ab.json"), []byte("{}"), 0o644)
	out := filepath.Join(dir, "set")
	base := []string{"ab", "--chain", "../../chains/fuzz-only.toml", "--in", dry, "--oversample", "1", "--quiet"}
	for _, tc := range []struct {
		name string
		args []string
		want int
		msg  string // in the one-line message
	}{
		{"unknown variant key", []string{"--outdir", out, "--variant", "x: fuzz.nope=1"}, exitFailure, `"nope"`},
		{"variant without colon", []string{"--outdir", out, "--variant", "x fuzz.fuzz=1"}, exitUsage, "colon"},
		{"duplicate labels", []string{"--outdir", out, "--variant", "a:", "--variant", "A: fuzz.fuzz=1"}, exitUsage, `label "A"`},
		{"older clips without --force", []string{"--outdir", older, "--variant", "a:", "--segment", "0.5s"}, exitFailure, "--force"},
		{"take shorter than a segment", []string{"--outdir", out, "--variant", "a:", "--segment", "2s"}, exitFailure, "1.500 s"},
		{"bad segment", []string{"--outdir", out, "--segment", "four"}, exitUsage, "--segment"},
		{"blind without seed", []string{"--outdir", out, "--blind"}, exitUsage, "--seed"},
		{"seed without blind", []string{"--outdir", out, "--seed", "3"}, exitUsage, "--blind"},
		{"ceiling above 0 dBTP", []string{"--outdir", out, "--ceiling", "1"}, exitUsage, "--ceiling"},
	} {
		code, _, msg := capture(t, append(base, tc.args...)...)
		if code != tc.want || !strings.Contains(msg, tc.msg) || strings.Count(msg, "\n") != 1 {
			t.Errorf("%s: exit %d, message %q; want exit %d and one line naming %s", tc.name, code, msg, tc.want, tc.msg)
		}
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("%s: %s was created", tc.name, out)
		}
		if b, _ := os.ReadFile(filepath.Join(older, "ab.json")); string(b) != "{}" {
			t.Fatalf("%s: the earlier set was touched", tc.name)
		}
	}
	if got := abEntries(t, dir); strings.Join(got, " ") != "older take.wav" {
		t.Errorf("left in the folder: %q", got)
	}
}

func abEntries(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var n []string
	for _, e := range es {
		n = append(n, e.Name())
	}
	return n
}

// TestAnalyzeCommand: analyze --json of a silent file is valid JSON with
// null levels; a missing argument exits 2, a missing file 1.
func TestAnalyzeCommand(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "silence.wav")
	if err := wavio.WriteFile(p, wavio.Format{SampleRate: 44100, Channels: 2, BitDepth: 16}, make([]float64, 2*44100)); err != nil {
		t.Fatal(err)
	}
	code, js := abStdout(t, "analyze", "--json", p)
	var m map[string]any
	if code != exitOK || json.Unmarshal([]byte(js), &m) != nil {
		t.Fatalf("exit %d, output %q", code, js)
	}
	for _, k := range []string{"lufs", "true_peak_dbtp", "peak_dbfs", "rms_dbfs"} {
		if v, ok := m[k]; !ok || v != nil {
			t.Errorf("%s = %v, want null for silence", k, v)
		}
	}
	if code, _ := abStdout(t, "analyze", p, "--bogus"); code != exitUsage {
		t.Errorf("analyze with an unknown flag after the file: exit %d, want %d", code, exitUsage)
	}
	if code, _ := abStdout(t, "analyze"); code != exitUsage {
		t.Errorf("analyze without a file: exit %d, want %d", code, exitUsage)
	}
	if code, _ := abStdout(t, "analyze", filepath.Join(dir, "none.wav")); code != exitFailure {
		t.Errorf("analyze of a missing file: exit %d, want %d", code, exitFailure)
	}
}
