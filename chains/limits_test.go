package chains

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"

	"github.com/BurntSushi/toml"

	"renderchain/models"
)

// allocated returns the bytes f allocates (runtime.MemStats.TotalAlloc).
// It is a guard against the parser's blow-up, not a measurement.
func allocated(f func()) uint64 {
	var a, b runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&a)
	f()
	runtime.ReadMemStats(&b)
	return b.TotalAlloc - a.TotalAlloc
}

// The hostile chain files. Each must fail with a one-line
// *LimitError naming file and line, before the TOML parser sees it: the
// guards are a time bound of 2 s (the parser takes minutes or runs out of
// memory on the first four) and 2 MiB of allocation (the parser allocated
// more than 4 GB on the 120 KB input before it was stopped; the inputs
// themselves are built before measuring).
func TestHostileText(t *testing.T) {
	dotted := strings.TrimSuffix(strings.Repeat("a.", 30000), ".")
	var manyKeys strings.Builder
	for i := range MaxKeys + 1 {
		fmt.Fprintf(&manyKeys, "k%d = 1\n", i)
	}
	tests := []struct {
		name, src string
		what      string
		line      int
	}{
		{"30 000 nested inline tables in 120 KB", "x = " + strings.Repeat("{a=", 30000) + "1" + strings.Repeat("}", 30000) + "\n", "nesting", 1},
		{"3 000 000 nested arrays", "x = " + strings.Repeat("[", 3000000) + strings.Repeat("]", 3000000), "file size", 0},
		{"100 000 nested arrays in 200 KB", "name = \"deep\"\nx = " + strings.Repeat("[", 100000) + strings.Repeat("]", 100000), "nesting", 2},
		{"quadratic dotted key, 30 000 parts", "# a comment\n" + dotted + " = 1\n", "dotted key", 2},
		{"quadratic table name, 30 000 parts", "[" + dotted + "]\n", "dotted key", 1},
		{"a 100 KB line", "supply = \"9V\"\nname = \"" + strings.Repeat("x", 100<<10) + "\"\n", "line length", 2},
		{"a 100 KB line without a final newline", "name = \"" + strings.Repeat("x", 100<<10) + "\"", "line length", 1},
		{"more keys than the limit", manyKeys.String(), "number of keys", MaxKeys + 1},
		{"a 2 MiB file", strings.Repeat("# padding\n", 200<<10), "file size", 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var err error
			start := time.Now()
			bytes := allocated(func() { _, err = Parse("hostile.toml", tc.src) })
			if d := time.Since(start); d > 2*time.Second {
				t.Errorf("took %v, want under 2 s", d)
			}
			if bytes > 2<<20 {
				t.Errorf("allocated %d bytes, want under 2 MiB", bytes)
			}
			var le *LimitError
			if !errors.Is(err, ErrLimit) || !errors.As(err, &le) {
				t.Fatalf("err = %v, want *LimitError", err)
			}
			if !strings.Contains(le.What, tc.what) || le.Line != tc.line || le.File != "hostile.toml" {
				t.Errorf("%q at line %d of %q, want %q at line %d", le.What, le.Line, le.File, tc.what, tc.line)
			}
			msg := err.Error()
			want := "hostile.toml"
			if tc.line > 0 {
				want += fmt.Sprintf(":%d", tc.line)
			}
			if strings.ContainsAny(msg, "\r\n") || !strings.HasPrefix(msg, want+": ") || len(msg) > 200 {
				t.Errorf("message %q: want one short line starting %q", msg, want+": ")
			}
		})
	}
}

// Brackets, dots, equals signs and hashes inside the four kinds of TOML
// string and inside comments are not counted (TOML v1.0.0, "String" and
// "Comment"); the text is valid TOML (the reference decoder in use accepts
// it), with more brackets and dots inside strings than the limits allow.
func TestTextStringsAndComments(t *testing.T) {
	many := strings.Repeat("[{", MaxDepth) + strings.Repeat("a.", MaxKeyParts*2)
	src := strings.Join([]string{
		`# ` + many + ` = = =`,
		`basic = "` + many + ` \" still inside ` + many + `"`,
		`literal = '` + many + ` \'`,
		`multi = """`,
		many + ` "" " \"""`,
		`still = "inside" ` + many,
		`"""`,
		`multilit = '''`,
		many + ` '' '`,
		`''''`,
		`quoted."a.b.c.d.e.f.g.h.i.j" = 1 # a two-part key`,
		`[table]`,
		`x = [[1, 2], [3.5, 4.25]] # ` + many,
		`when = 1979-05-27T07:32:00.999Z`,
		`inline = { a = { b = "` + many + `" } }`,
	}, "\n") + "\n"
	var v map[string]any
	if _, err := toml.Decode(src, &v); err != nil {
		t.Fatalf("the test text is not valid TOML: %v", err)
	}
	st, err := scanText("strings.toml", src)
	if err != nil {
		t.Fatalf("CheckText = %v, want nil", err)
	}
	if st.maxDepth != 2 || st.keys != 10 || st.maxParts != 2 {
		t.Errorf("depth %d keys %d parts %d; want 2, 10, 2 (counted by hand)", st.maxDepth, st.keys, st.maxParts)
	}
	// An unterminated basic string ends at its line: what follows counts.
	if err := CheckText("open.toml", "a = \"open\nb = "+strings.Repeat("[", MaxDepth+1)); !errors.Is(err, ErrLimit) {
		t.Errorf("after an unterminated string: %v, want the nesting limit", err)
	}
}

// The limits are far above what the built-in chains and templates use;
// the figures the constants' comment gives are checked here.
func TestBuiltInsWithinLimits(t *testing.T) {
	check := func(name string, b []byte) {
		st, err := scanText(name, string(b))
		if err != nil {
			t.Errorf("%s: %v", name, err)
			return
		}
		if len(b) > 8<<10 || st.lines > 100 || st.maxLine > 300 || st.maxDepth > 6 || st.keys > 400 {
			t.Errorf("%s: %d bytes, %d lines, longest %d, depth %d, %d keys: beyond the figures documented in limits.go",
				name, len(b), st.lines, st.maxLine, st.maxDepth, st.keys)
		}
	}
	for _, fsys := range []struct {
		fs  fs.FS
		dir string
	}{{exampleFS, "."}, {exampleFS, "examples"}, {templateFS, "templates"}} {
		entries, err := fs.ReadDir(fsys.fs, fsys.dir)
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range entries {
			if e.IsDir() {
				continue // the examples/ folder is a row of its own
			}
			b, err := fs.ReadFile(fsys.fs, filepath.Join(fsys.dir, e.Name()))
			if err != nil {
				t.Fatal(err)
			}
			check(e.Name(), b)
		}
	}
}

// Load reads at most MaxFileBytes: an endless device is refused after that
// much, a folder at once.
func TestLoadBounded(t *testing.T) {
	if st, err := os.Stat("/dev/zero"); err == nil && st.Mode()&fs.ModeCharDevice != 0 {
		_, err := Load("/dev/zero")
		if !errors.Is(err, ErrLimit) || !strings.Contains(err.Error(), "file size") {
			t.Errorf("Load(/dev/zero) = %v, want the file-size limit", err)
		}
	}
	dir := t.TempDir()
	if _, err := Load(dir); err == nil || !strings.Contains(err.Error(), "folder") || strings.ContainsAny(err.Error(), "\n") {
		t.Errorf("Load(folder) = %v, want a one-line error saying it is a folder", err)
	}
	big := filepath.Join(dir, "big.toml")
	if err := os.WriteFile(big, []byte(strings.Repeat("#\n", MaxFileBytes)), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Load(big); !errors.Is(err, ErrLimit) {
		t.Errorf("Load(2 MiB) = %v, want ErrLimit", err)
	}
}

// resistorChain is a chain of n resistors in series, one stage, n+1 nodes
// (in, n−1 inner nodes, out), written in memory as a parser would leave it.
func resistorChain(n int) *Chain {
	st := &Stage{ID: "big", Knobs: map[string]float64{}}
	for i := range n {
		a, b := fmt.Sprintf("n%d", i), fmt.Sprintf("n%d", i+1)
		if i == 0 {
			a = "in"
		}
		if i == n-1 {
			b = "out"
		}
		st.Parts = append(st.Parts, &Part{Ref: fmt.Sprintf("R%d", i+1), Kind: Resistor, Value: 1e3,
			Pins: map[string]string{"1": a, "2": b}})
	}
	return &Chain{Name: "series", File: "series.toml", Supply: 9, Temperature: models.ZeroCelsius + 25,
		InputPeak: 0.3, Load: 1e6, FullScale: 1, Stages: []*Stage{st}}
}

// A chain of 100 000 parts fails fast with a clear message instead of
// asking for an 80 GB matrix (the figure: (10^5)² unknowns × 8
// bytes). Guard: no allocation to speak of (1 MiB); the 2 s bound only
// catches a hang (the check is a count, microseconds on an idle machine),
// it is not a speed claim.
func TestCheckSizeHuge(t *testing.T) {
	ch := resistorChain(100000)
	var err error
	start := time.Now()
	bytes := allocated(func() { err = ch.CheckSize() })
	if d := time.Since(start); d > 2*time.Second || bytes > 1<<20 {
		t.Errorf("took %v and %d bytes, want under 2 s and 1 MiB", d, bytes)
	}
	var le *LimitError
	if !errors.As(err, &le) || le.What != "number of parts" || le.Value != 100000 {
		t.Fatalf("err = %v, want the parts limit with 100000", err)
	}
	if msg := err.Error(); msg != "series.toml: number of parts: 100000 parts, beyond the limit of 1000 for chain files" {
		t.Errorf("message %q", msg)
	}
}

// Each bound of CheckSize: stages, nodes and matrix memory; a chain just
// inside the part and node bounds passes.
func TestCheckSizeBounds(t *testing.T) {
	if err := resistorChain(MaxNodes - 4).CheckSize(); err != nil {
		t.Errorf("%d resistors: %v", MaxNodes-4, err)
	}
	many := &Chain{File: "stages.toml"}
	for i := range MaxStages + 1 {
		many.Stages = append(many.Stages, &Stage{ID: fmt.Sprint("s", i)})
	}
	if err := many.CheckSize(); !errors.Is(err, ErrLimit) || !strings.Contains(err.Error(), "stages") {
		t.Errorf("%d stages: %v", MaxStages+1, err)
	}
	// MaxNodes parts in series: MaxNodes − 1 inner nodes + 4 shared + the
	// stage's out, over the node bound.
	if err := resistorChain(MaxNodes).CheckSize(); !errors.Is(err, ErrLimit) {
		t.Errorf("%d parts in series: %v, want a limit", MaxNodes, err)
	}
	// 990 pots, each wiper on its own node: within parts (991) and nodes
	// (4 shared + 990 wipers + the stage's out = 995), but two sections
	// each make the matrices too large. By hand: d = 995 − 1 + 2 = 996
	// unknowns, p = 1 + 1 + 2·990 + 995 = 2977 ports, so
	// 8·(2·996² + 2977² + 997·2977) = 110 517 040 bytes > 64 MiB.
	ch := resistorChain(1)
	st := ch.Stages[0]
	st.Knobs["k"] = 0.5
	for i := range 990 {
		st.Parts = append(st.Parts, &Part{Ref: fmt.Sprint("VR", i), Kind: Pot, Value: 1e4, Knob: "k",
			Pins: map[string]string{"ccw": "in", "wiper": fmt.Sprint("w", i), "cw": "gnd"}})
	}
	err := ch.CheckSize()
	var le *LimitError
	if !errors.As(err, &le) || le.What != "solver matrix memory" || le.Value != 110517040 {
		t.Errorf("990 pots: %v, want the memory limit at 110517040 bytes", err)
	}
}

// A dense n×n float64 matrix takes 8n² bytes (IEEE 754 binary64 is 8
// bytes); the estimate for a circuit of 10^5 nodes must therefore exceed
// the 80 GB for one matrix. Exact arithmetic on small integers.
func TestCircuitBytes(t *testing.T) {
	if got, want := circuitBytes(101, 0, 0), 8*2*100.0*100; got != want {
		t.Errorf("circuitBytes(101 nodes) = %g, want %g (MNA matrix and its LU copy)", got, want)
	}
	if got, want := circuitBytes(11, 2, 5), 8*(2*12.0*12+25+13*5); got != want {
		t.Errorf("circuitBytes(11, 2, 5) = %g, want %g", got, want)
	}
	if b := circuitBytes(100001, 2, 100001); b < 80e9 {
		t.Errorf("10^5 nodes: %g bytes, want more than 80 GB", b)
	}
}

// CheckSize's node count is an upper bound of what Build makes, and
// CheckCircuit passes the built examples; a circuit of 3000 nodes fails.
func TestCheckSizeBoundsBuild(t *testing.T) {
	for _, name := range []string{"demo", "germanium", "fuzz-only"} {
		ch, err := Example(name)
		if err != nil {
			t.Fatal(err)
		}
		if err := ch.CheckSize(); err != nil {
			t.Errorf("%s: %v", name, err)
		}
		_, _, nodes, _, _ := ch.sizes()
		c, err := ch.Build()
		if err != nil {
			t.Fatal(err)
		}
		if len(c.Nodes) > nodes {
			t.Errorf("%s: Build made %d nodes, CheckSize counted at most %d", name, len(c.Nodes), nodes)
		}
		if err := CheckCircuit(c); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	c := models.NewCircuit("huge", models.ZeroCelsius+25)
	for i := range 3000 {
		c.Nodes = append(c.Nodes, fmt.Sprint("n", i))
	}
	if err := CheckCircuit(c); !errors.Is(err, ErrLimit) {
		t.Errorf("3000 nodes: %v", err)
	}
}

// The worst text within the limits for the parser in use: MaxKeys dotted
// keys of MaxKeyParts parts (its cost grows with the square of the parts).
// Measured 0.6 s and 127 MiB on the project's machine; the guards, 10 s
// and 1 GiB, only catch a limit raised without thought (at 30 000 parts
// one key alone took 35 s and 15 GB upstream).
func TestWorstTextWithinLimits(t *testing.T) {
	if testing.Short() {
		t.Skip("about a second of parsing")
	}
	var b strings.Builder
	key := strings.Repeat("a.", MaxKeyParts-1)
	for i := range MaxKeys {
		fmt.Fprintf(&b, "%sk%d = 1\n", key, i)
	}
	src := b.String()
	if err := CheckText("worst.toml", src); err != nil {
		t.Fatalf("the worst text within limits is refused: %v", err)
	}
	var err error
	start := time.Now()
	bytes := allocated(func() { _, err = Parse("worst.toml", src) })
	if d := time.Since(start); d > 10*time.Second || bytes > 1<<30 {
		t.Errorf("parsing took %v and %d MiB, want under 10 s and 1 GiB", d, bytes>>20)
	}
	if err == nil || errors.Is(err, ErrLimit) {
		t.Errorf("err = %v, want the parser's unknown-key error", err)
	}
}
