package main

import (
	"bytes"
	"encoding/json"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"renderchain/dsp/wavio"
)

// Tests of issue 11 ("never lose a file, never abort") at the command
// level: each case the issue saw is run through the command line in
// process. The expected outcome is the project's own rule (interface:
// "a bad file, value or key: a one-line error naming what and where, a
// non-zero exit, and no output file left behind"; issue 11: "an existing
// file is never removed unless its replacement is in place").

const demoChain = "../../chains/demo.toml"

// snapshot records every entry of dir with its bytes (folders as "/").
func snapshot(t *testing.T, dir string) map[string]string {
	t.Helper()
	m := map[string]string{}
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		if e.IsDir() {
			m[e.Name()] = "/"
			continue
		}
		b, err := os.ReadFile(filepath.Join(dir, e.Name()))
		if err != nil {
			b = []byte("unreadable: " + err.Error())
		}
		m[e.Name()] = string(b)
	}
	return m
}

// sameFolder fails unless dir holds exactly what before recorded.
func sameFolder(t *testing.T, name, dir string, before map[string]string) {
	t.Helper()
	after := snapshot(t, dir)
	for n, b := range before {
		if a, ok := after[n]; !ok {
			t.Errorf("%s: %s is gone", name, n)
		} else if a != b {
			t.Errorf("%s: %s changed", name, n)
		}
	}
	for n := range after {
		if _, ok := before[n]; !ok {
			t.Errorf("%s: %s left behind", name, n)
		}
	}
}

// oneLineError fails unless stderr is exactly one line holding every word.
func oneLineError(t *testing.T, name, stderr string, words ...string) {
	t.Helper()
	s := strings.TrimSuffix(stderr, "\n")
	if s == "" || strings.Contains(s, "\n") {
		t.Errorf("%s: stderr %q, want one line", name, stderr)
	}
	for _, w := range words {
		if !strings.Contains(s, w) {
			t.Errorf("%s: stderr %q lacks %q", name, s, w)
		}
	}
}

// Case 1 (data loss): a --report or --out that is the dry take, the chain
// file or the other output, by any spelling or through a symbolic link, is
// refused before any work with a usage error naming both flags; nothing in
// the folder changes. The refused spellings are the issue's own (--report
// = --in; --report = --out) and the ones it asks for (another spelling, a
// symbolic link, a hard link).
func TestOutputsThatAreInputs(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	chain := filepath.Join(dir, "chain.toml")
	src, err := os.ReadFile(demoChain)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(chain, src, 0o644)
	wet := filepath.Join(dir, "wet.wav")
	os.WriteFile(wet, []byte("an earlier render"), 0o644)
	os.Symlink("wet.wav", filepath.Join(dir, "link.json"))
	os.Link(dry, filepath.Join(dir, "hard.wav"))
	os.Mkdir(filepath.Join(dir, "sub"), 0o755)
	base := []string{"render", "--chain", chain, "--in", dry, "--quiet"}
	cases := []struct {
		name  string
		args  []string
		words []string
	}{
		{"--report is --in", []string{"--out", wet, "--report", dry}, []string{"--report", "--in", "same file as an input"}},
		{"--report is --chain", []string{"--out", wet, "--report", chain}, []string{"--report", "--chain"}},
		{"--out is --in by another spelling", []string{"--out", filepath.Join(dir, "sub", "..", "dry.wav")}, []string{"--out", "--in"}},
		{"--out is a hard link to --in", []string{"--out", filepath.Join(dir, "hard.wav")}, []string{"--out", "--in"}},
		{"--report is --out", []string{"--out", wet, "--report", wet}, []string{"--report", "--out", "another output"}},
		{"--report is --out by another spelling", []string{"--out", wet, "--report", filepath.Join(dir, ".", "wet.wav")}, []string{"--report", "--out"}},
		{"--report is a symbolic link to --out", []string{"--out", wet, "--report", filepath.Join(dir, "link.json")}, []string{"--report", "--out"}},
	}
	before := snapshot(t, dir)
	for _, tc := range cases {
		code, _, stderr := capture(t, append(base, tc.args...)...)
		if code != exitUsage {
			t.Errorf("%s: exit %d, want %d", tc.name, code, exitUsage)
		}
		oneLineError(t, tc.name, stderr, tc.words...)
		sameFolder(t, tc.name, dir, before)
	}
}

// Case 1 (data loss): a report that cannot be written after an existing
// --out leaves the old render in place and nothing new; so does a render
// that fails after its outputs were checked (a NaN sample in the take,
// refused by the reader) with both an old render and an old report there.
func TestFailedRenderKeepsEarlierFiles(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	wet := filepath.Join(dir, "wet.wav")
	rep := filepath.Join(dir, "r.json")
	os.WriteFile(wet, []byte("an earlier render"), 0o644)
	os.WriteFile(rep, []byte("an earlier report"), 0o644)
	bad := filepath.Join(dir, "nan.wav")
	x := make([]float64, 4800)
	if err := wavio.WriteFile(bad, wavio.Format{SampleRate: 48000, Channels: 1, BitDepth: 32, Float: true}, x); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(bad)
	copy(b[len(b)-4*100:], []byte{0, 0, 0xc0, 0x7f}) // frame 4700: a float32 NaN
	os.WriteFile(bad, b, 0o644)
	before := snapshot(t, dir)

	code, _, stderr := capture(t, "render", "--chain", demoChain, "--in", dry, "--out", wet, "--report", filepath.Join(dir, "missing", "r.json"), "--quiet")
	if code == exitOK {
		t.Error("a report into a missing folder: exit 0")
	}
	oneLineError(t, "report into a missing folder", stderr, "--report", "folder does not exist")
	sameFolder(t, "report into a missing folder", dir, before)

	code, _, stderr = capture(t, "render", "--chain", demoChain, "--in", bad, "--out", wet, "--report", rep, "--quiet", "--oversample", "1")
	if code != exitFailure {
		t.Errorf("NaN in the take: exit %d, want %d", code, exitFailure)
	}
	oneLineError(t, "NaN in the take", stderr, "nan.wav", "frame 4700")
	sameFolder(t, "NaN in the take", dir, before)
}

// Case 2 (special files): --out /dev/null and --out a FIFO are written
// into, never replaced: /dev/null is still a character device afterwards,
// the FIFO still a FIFO, and what came out of the FIFO is the whole WAV
// stream (read back by the project's reader: the take's 24 000 frames).
func TestOutputIntoDeviceAndFIFO(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	code, _, stderr := capture(t, "render", "--chain", demoChain, "--in", dry, "--out", os.DevNull, "--quiet", "--oversample", "1")
	if code != exitOK {
		t.Fatalf("--out %s: exit %d: %s", os.DevNull, code, stderr)
	}
	if st, err := os.Stat(os.DevNull); err != nil || st.Mode()&os.ModeCharDevice == 0 {
		t.Fatalf("%s is no longer a character device: %v %v", os.DevNull, st.Mode(), err)
	}

	fifo := filepath.Join(dir, "pipe.wav")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("no FIFOs here: %v", err)
	}
	got := make(chan []byte)
	go func() {
		f, err := os.Open(fifo) // blocks until the render opens it
		if err != nil {
			got <- nil
			return
		}
		defer f.Close()
		b, _ := io.ReadAll(f)
		got <- b
	}()
	code, _, stderr = capture(t, "render", "--chain", demoChain, "--in", dry, "--out", fifo, "--report", filepath.Join(dir, "r.json"), "--quiet", "--oversample", "1")
	if code != exitOK {
		t.Fatalf("--out a FIFO: exit %d: %s", code, stderr)
	}
	b := <-got
	if st, err := os.Lstat(fifo); err != nil || st.Mode()&os.ModeNamedPipe == 0 {
		t.Fatalf("the FIFO was replaced: %v %v", st.Mode(), err)
	}
	r, err := wavio.NewReader(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("what came through the FIFO: %v", err)
	}
	if r.Frames() != 24000 {
		t.Errorf("%d frames through the FIFO, want 24000", r.Frames())
	}
	var rep struct {
		Output struct {
			File string `json:"file"`
		} `json:"output"`
	}
	if b, err := os.ReadFile(filepath.Join(dir, "r.json")); err != nil || json.Unmarshal(b, &rep) != nil || rep.Output.File != fifo {
		t.Errorf("report beside a FIFO output: %v, output file %q", err, rep.Output.File)
	}
}

// Case 7: --out naming a folder fails before any work: the chain file and
// the take are not even read (both are missing here, and the error is
// about --out).
func TestOutputFolderFailsFirst(t *testing.T) {
	dir := t.TempDir()
	code, _, stderr := capture(t, "render", "--chain", filepath.Join(dir, "none.toml"), "--in", filepath.Join(dir, "none.wav"), "--out", dir)
	if code != exitUsage {
		t.Errorf("exit %d, want %d", code, exitUsage)
	}
	oneLineError(t, "--out a folder", stderr, "--out", "is a folder")
	if strings.Contains(stderr, "none.") {
		t.Errorf("the inputs were read before --out was checked: %q", stderr)
	}
}

// Every command that writes a file refuses one that is its chain file, and
// leaves the chain file as it was: measure --plot, response --plot, spread
// --trials-csv, demo --outdir (a file where a folder goes), ab --key.
func TestEveryCommandChecksItsOutputs(t *testing.T) {
	dir := t.TempDir()
	chain := filepath.Join(dir, "chain.png")
	src, _ := os.ReadFile("../../chains/fuzz-only.toml")
	os.WriteFile(chain, src, 0o644)
	dry := abDry(t, dir)
	sibling := filepath.Join(dir, "p-scope.png") // the scope view measure draws beside --plot p.png
	os.WriteFile(sibling, src, 0o644)
	wavPNG := filepath.Join(dir, "take.png") // a WAV under a picture's name
	b, _ := os.ReadFile(dry)
	os.WriteFile(wavPNG, b, 0o644)
	before := snapshot(t, dir)
	cases := []struct {
		name  string
		args  []string
		code  int
		words []string
	}{
		{"measure --plot", []string{"measure", "--chain", chain, "--plot", chain}, exitUsage, []string{"--plot", "--chain"}},
		{"response --plot", []string{"response", "--chain", chain, "--plot", chain}, exitUsage, []string{"--plot", "--chain"}},
		{"measure --plot's scope view", []string{"measure", "--chain", sibling, "--plot", filepath.Join(dir, "p.png")}, exitUsage, []string{"--plot", "p-scope.png", "--chain"}},
		{"analyze --plot", []string{"analyze", wavPNG, "--plot", wavPNG}, exitUsage, []string{"--plot", "same file as an input"}},
		{"spread --trials-csv", []string{"spread", "--chain", chain, "--trials", "2", "--trials-csv", chain}, exitUsage, []string{"--trials-csv", "--chain"}},
		{"demo --outdir a file", []string{"demo", "--outdir", chain, "--force"}, exitUsage, []string{"--outdir", "is not a folder"}},
		{"ab --key", []string{"ab", "--chain", chain, "--in", dry, "--outdir", filepath.Join(dir, "set"), "--blind", "--seed", "1", "--key", chain, "--force", "--segment", "0"}, exitUsage, []string{"--key", "--chain"}},
		{"ab --key is --in", []string{"ab", "--chain", chain, "--in", dry, "--outdir", filepath.Join(dir, "set"), "--blind", "--seed", "1", "--key", dry, "--force", "--segment", "0"}, exitUsage, []string{"--key", "--in"}},
	}
	for _, tc := range cases {
		code, _, stderr := capture(t, tc.args...)
		if code != tc.code {
			t.Errorf("%s: exit %d, want %d (%s)", tc.name, code, tc.code, stderr)
		}
		oneLineError(t, tc.name, stderr, tc.words...)
		sameFolder(t, tc.name, dir, before)
	}
}
