package main

import (
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"renderchain/chains"
	"renderchain/dsp/wavio"
)

// Case 3 (aborts): hostile chain files are refused fast with one line, exit
// 1, and nothing in the output folder: 30 000 nested inline tables in
// 120 KB, 3 000 000 nested arrays, a chain of 100 000 parts, 10 000
// template stages, and a chain just over the part bound (chains.MaxParts).
// "Fast" is under two seconds each, a bound that allows for a loaded
// machine (each is refused by a scan or a count before any parsing or
// building that grows with it; tens of milliseconds here).
func TestHostileChainFiles(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	out := filepath.Join(dir, "out")
	os.Mkdir(out, 0o755)
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	var parts strings.Builder
	parts.WriteString("name = \"many parts\"\n[[stage]]\nid = \"s\"\nparts = [\n")
	for k := 0; k < chains.MaxParts+1; k++ {
		fmt.Fprintf(&parts, "{ ref = \"R%d\", kind = \"resistor\", value = \"1k\", pins = [\"in\", \"out\"] },\n", k)
	}
	parts.WriteString("]\n")
	cases := []struct {
		name, text string
		words      []string
	}{
		{"nested tables", "x = " + strings.Repeat("{a=", 30000) + "1" + strings.Repeat("}", 30000) + "\n", []string{"nesting", "limit"}},
		{"nested arrays", "x = " + strings.Repeat("[", 3000000) + strings.Repeat("]", 3000000) + "\n", []string{"file size", "limit"}},
		{"100 000 parts", "name = \"x\"\n[[stage]]\nid = \"s\"\nparts = [\n" +
			strings.Repeat("{ ref = \"R\", kind = \"resistor\", value = \"1k\", pins = [\"in\", \"out\"] },\n", 100000) + "]\n", []string{"limit"}},
		{"10 000 template stages", strings.Repeat("[[stage]]\nid = \"s\"\ntemplate = \"fuzz-si\"\n", 10000), []string{"number of stages", "limit"}},
		{"one part over the bound", parts.String(), []string{"number of parts", "limit"}},
	}
	for _, tc := range cases {
		chain := write("hostile.toml", tc.text)
		start := time.Now()
		code, _, stderr := capture(t, "render", "--chain", chain, "--in", dry, "--out", filepath.Join(out, "wet.wav"), "--quiet")
		took := time.Since(start)
		t.Logf("%s (%d bytes): %v", tc.name, len(tc.text), took.Round(time.Millisecond))
		if code != exitFailure {
			t.Errorf("%s: exit %d, want %d", tc.name, code, exitFailure)
		}
		oneLineError(t, tc.name, stderr, append([]string{"hostile.toml"}, tc.words...)...)
		if took > 2*time.Second {
			t.Errorf("%s: refused after %v, want under 2 s", tc.name, took)
		}
		if ents, _ := os.ReadDir(out); len(ents) > 0 {
			t.Errorf("%s: %s left in the output folder", tc.name, ents[0].Name())
		}
	}
}

// Case 5 (NaN and Inf): every numeric value, from the file or --set, is
// finite: knob = nan, load = nan, full_scale = inf, tolerance = nan and
// hfe = inf in a file, and a knob, a parameter and the input peak from
// --set, are each refused with one line naming the key, exit 1 and no
// output. (The finite-value rule is the project's interface: "a bad file,
// value or key: a one-line error naming what and where".)
func TestNonFiniteValues(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	out := filepath.Join(dir, "wet.wav")
	base := "name = \"x\"\nsupply = \"9V\"\n[output]\nload = %s\nfull_scale = %s\n[[stage]]\nid = \"s\"\nknobs = { k = %s }\nparts = [\n" +
		"  { ref = \"R1\", kind = \"resistor\", value = \"1k\", tolerance = %s, pins = [\"in\", \"b\"] },\n" +
		"  { ref = \"VR1\", kind = \"pot\", value = \"10k\", taper = \"linear\", knob = \"k\", pins = { ccw = \"b\", wiper = \"out\", cw = \"gnd\" } },\n" +
		"  { ref = \"Q1\", kind = \"npn\", hfe = %s, is = \"10f\", br = 4, pins = { c = \"out\", b = \"b\", e = \"gnd\" } },\n]\n"
	good := []string{"\"1M\"", "\"1V\"", "0.5", "0.05", "150"}
	cases := []struct {
		name  string
		field int // which of good is replaced
		value string
		words []string
	}{
		{"knob = nan", 2, "nan", []string{"knob", "k"}},
		{"load = nan", 0, "nan", []string{"load"}},
		{"full_scale = inf", 1, "inf", []string{"full_scale"}},
		{"tolerance = nan", 3, "nan", []string{"tolerance"}},
		{"hfe = inf", 4, "inf", []string{"hfe"}},
	}
	chain := filepath.Join(dir, "c.toml")
	os.WriteFile(chain, []byte(fmt.Sprintf(base, good[0], good[1], good[2], good[3], good[4])), 0o644)
	if code, _, stderr := capture(t, "bias", "--chain", chain); code != exitOK {
		t.Fatalf("the chain with finite values: exit %d: %s", code, stderr)
	}
	for _, tc := range cases {
		v := append([]string(nil), good...)
		v[tc.field] = tc.value
		os.WriteFile(chain, []byte(fmt.Sprintf(base, v[0], v[1], v[2], v[3], v[4])), 0o644)
		code, _, stderr := capture(t, "render", "--chain", chain, "--in", dry, "--out", out, "--quiet")
		if code != exitFailure {
			t.Errorf("%s: exit %d, want %d (%s)", tc.name, code, exitFailure, stderr)
		}
		oneLineError(t, tc.name, stderr, append([]string{"c.toml:"}, tc.words...)...)
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("%s: output written", tc.name)
		}
	}
	for _, kv := range []string{"fuzz.fuzz=nan", "fuzz.Q1.hfe=inf", "input.peak=NaN", "supply=inf"} {
		code, _, stderr := capture(t, "render", "--chain", demoChain, "--in", dry, "--out", out, "--quiet", "--set", kv)
		if code != exitFailure {
			t.Errorf("--set %s: exit %d, want %d (%s)", kv, code, exitFailure, stderr)
		}
		oneLineError(t, "--set "+kv, stderr, strings.SplitN(kv, "=", 2)[0])
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("--set %s: output written", kv)
		}
	}
}

// floatTake writes a 32- or 64-bit float WAV of 0.5 s at 48 kHz, a 440 Hz
// sine at half scale with sample k set to v.
func floatTake(t *testing.T, path string, bits, k int, v float64) {
	t.Helper()
	n := 24000
	b := []byte("RIFF\x00\x00\x00\x00WAVEfmt ")
	b = binary.LittleEndian.AppendUint32(b, 16)
	b = binary.LittleEndian.AppendUint16(b, 3) // IEEE float
	b = binary.LittleEndian.AppendUint16(b, 1)
	b = binary.LittleEndian.AppendUint32(b, 48000)
	b = binary.LittleEndian.AppendUint32(b, uint32(48000*bits/8))
	b = binary.LittleEndian.AppendUint16(b, uint16(bits/8))
	b = binary.LittleEndian.AppendUint16(b, uint16(bits))
	b = append(b, "data"...)
	b = binary.LittleEndian.AppendUint32(b, uint32(n*bits/8))
	for i := 0; i < n; i++ {
		x := 0.5 * math.Sin(2*math.Pi*440*float64(i)/48000)
		if i == k {
			x = v
		}
		if bits == 32 {
			b = binary.LittleEndian.AppendUint32(b, math.Float32bits(float32(x)))
		} else {
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(x))
		}
	}
	binary.LittleEndian.PutUint32(b[4:], uint32(len(b)-8))
	if err := os.WriteFile(path, b, 0o644); err != nil {
		t.Fatal(err)
	}
}

// Case 4 (one absurd float sample): a float sample beyond the reader's
// bound (+24 dBFS, wavio.DefaultFloatLimit) stops the render before the
// solver sees it, naming the file, the frame and the channel: 1e30 in
// 32-bit float, 1e300 in 64-bit float with --format float32 (no longer
// "non-finite"). A moderate over (+6 dBFS, 2.0) passes and is reported:
// in the render's report and summary, in analyze's notes and in ab.json's
// warnings.
func TestInputSampleBound(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "wet.wav")
	huge := filepath.Join(dir, "huge.wav")
	floatTake(t, huge, 32, 12345, 1e30)
	code, _, stderr := capture(t, "render", "--chain", demoChain, "--in", huge, "--out", out, "--quiet", "--oversample", "1")
	if code != exitFailure {
		t.Errorf("1e30: exit %d, want %d", code, exitFailure)
	}
	oneLineError(t, "1e30", stderr, "huge.wav", "frame 12345", "channel 0", "dBFS")
	huge64 := filepath.Join(dir, "huge64.wav")
	floatTake(t, huge64, 64, 20000, 1e300)
	code, _, stderr = capture(t, "render", "--chain", demoChain, "--in", huge64, "--out", out, "--quiet", "--oversample", "1", "--format", "float32")
	if code != exitFailure {
		t.Errorf("1e300: exit %d, want %d", code, exitFailure)
	}
	oneLineError(t, "1e300", stderr, "huge64.wav", "frame 20000", "channel 0")
	if strings.Contains(stderr, "non-finite") {
		t.Errorf("1e300 reported as non-finite: %q", stderr)
	}
	if _, err := os.Stat(out); err == nil {
		t.Fatal("output written")
	}

	over := filepath.Join(dir, "over.wav")
	floatTake(t, over, 32, 100, 2.0)
	rep := filepath.Join(dir, "r.json")
	code, _, stderr = capture(t, "render", "--chain", demoChain, "--in", over, "--out", out, "--report", rep, "--oversample", "1")
	if code != exitOK {
		t.Fatalf("+6 dBFS: exit %d: %s", code, stderr)
	}
	if !strings.Contains(stderr, "1 float samples are beyond full scale") {
		t.Errorf("render summary lacks the over: %q", stderr)
	}
	var r struct{ Warnings []string }
	if b, err := os.ReadFile(rep); err != nil || json.Unmarshal(b, &r) != nil || !strings.Contains(strings.Join(r.Warnings, "|"), "beyond full scale") {
		t.Errorf("report warnings %q lack the over (%v)", r.Warnings, err)
	}
	code, stdout, _ := capture(t, "analyze", over, "--json")
	var a struct{ Notes []string }
	if code != exitOK || json.Unmarshal([]byte(stdout), &a) != nil || !strings.Contains(strings.Join(a.Notes, "|"), "1 float samples are beyond full scale") {
		t.Errorf("analyze: exit %d, notes %q lack the over", code, a.Notes)
	}

	// ab: a 1.5 s take with one over.
	take := filepath.Join(dir, "take.wav")
	x := make([]float64, 72000)
	for i := range x {
		x[i] = 0.3 * math.Sin(2*math.Pi*220*float64(i)/48000)
	}
	x[5000] = 2
	if err := wavio.WriteFile(take, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true}, x); err != nil {
		t.Fatal(err)
	}
	set := filepath.Join(dir, "set")
	code, _, stderr = capture(t, "ab", "--chain", "../../chains/fuzz-only.toml", "--in", take, "--outdir", set, "--oversample", "1", "--segment", "0", "--quiet")
	if code != exitOK {
		t.Fatalf("ab: exit %d: %s", code, stderr)
	}
	var s struct{ Warnings []string }
	if b, err := os.ReadFile(filepath.Join(set, "ab.json")); err != nil || json.Unmarshal(b, &s) != nil || !strings.Contains(strings.Join(s.Warnings, "|"), "1 float samples are beyond full scale") {
		t.Errorf("ab.json warnings %q lack the over (%v)", s.Warnings, err)
	}
}

// Case 6 (hidden names): a node a user names like a node inside a part
// ("D1.junction", the junction behind diode D1's series resistance; "#"
// names are the inside of parts too) must not join it. Were it joined, the
// 9 V supply through R1 into D1 would drive the user's node to the
// junction's forward voltage and R2/R3 would halve it at out; kept apart,
// the user's node is reached by R2 alone and out sits at 0 V (Kirchhoff's
// current law: no current into R2–R3). The chain is either refused with a
// one-line error naming the node, or out reads 0 V within 1 µV (the solver
// tolerance is far below that).
func TestHiddenNodeNames(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"D1.junction", "D1#junction", "s.D1.junction"} {
		chain := filepath.Join(dir, "hidden.toml")
		text := "name = \"hidden\"\nsupply = \"9V\"\n[[stage]]\nid = \"s\"\nparts = [\n" +
			"  { ref = \"R1\", kind = \"resistor\", value = \"10k\", pins = [\"v+\", \"a\"] },\n" +
			"  { ref = \"D1\", kind = \"diode\", is = \"2.52n\", n = 1.75, rs = \"10\", pins = { anode = \"a\", cathode = \"gnd\" } },\n" +
			"  { ref = \"R2\", kind = \"resistor\", value = \"1k\", pins = [\"" + name + "\", \"out\"] },\n" +
			"  { ref = \"R3\", kind = \"resistor\", value = \"1k\", pins = [\"out\", \"gnd\"] },\n]\n"
		os.WriteFile(chain, []byte(text), 0o644)
		code, stdout, stderr := capture(t, "bias", "--chain", chain, "--json")
		if code != exitOK {
			oneLineError(t, name, stderr, name)
			continue
		}
		var b struct{ Nodes map[string]float64 }
		if err := json.Unmarshal([]byte(stdout), &b); err != nil {
			t.Fatal(err)
		}
		if v, ok := b.Nodes["out"]; !ok || math.Abs(v) > 1e-6 {
			t.Errorf("%s: out at %v V (present %v): the user's node joined the inside of D1", name, v, ok)
		}
	}
}

// Case 8 (messages that mislead): a template stage's error has no empty
// segment ("stage f: : template …" before).
func TestStageErrorHasNoEmptySegment(t *testing.T) {
	dir := t.TempDir()
	chain := filepath.Join(dir, "f.toml")
	os.WriteFile(chain, []byte("name = \"x\"\n[[stage]]\nid = \"f\"\ntemplate = \"fuzz-si\"\nknobs = { nope = 0.5 }\n"), 0o644)
	code, _, stderr := capture(t, "bias", "--chain", chain)
	if code != exitFailure {
		t.Errorf("unknown knob: exit %d, want %d", code, exitFailure)
	}
	oneLineError(t, "unknown knob", stderr, "f.toml:5: stage f: template fuzz-si has no knob \"nope\"")
	if strings.Contains(stderr, ": :") {
		t.Errorf("an empty segment: %q", stderr)
	}
}

// Case 8: a folder that cannot be written is reported by the target the
// user typed (--out), never by the hidden temporary name.
func TestUnwritableFolderNamesTheFlag(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("as root every folder is writable: the read-only case cannot be made here")
	}
	dir := t.TempDir()
	dry := dryTake(t, dir)
	ro := filepath.Join(dir, "ro")
	os.Mkdir(ro, 0o555)
	defer os.Chmod(ro, 0o755)
	code, _, stderr := capture(t, "render", "--chain", demoChain, "--in", dry, "--out", filepath.Join(ro, "wet.wav"), "--quiet")
	if code != exitFailure {
		t.Errorf("read-only folder: exit %d, want %d", code, exitFailure)
	}
	oneLineError(t, "read-only folder", stderr, "--out", filepath.Join(ro, "wet.wav"), "cannot be written")
	if strings.Contains(stderr, ".tmp") {
		t.Errorf("the message names the temporary file: %q", stderr)
	}
}
