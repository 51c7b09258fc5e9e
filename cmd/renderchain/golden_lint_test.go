package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// A golden case is a chain under testdata/lint whose header comments say
// what the tool must say about it:
//
//	# command: bias          the command that runs it
//	# stderr: renderchain: … the exact first line of stderr (exit 1)
//	# warning: FILE:LINE: …  a warning line of bias, the chain's own
//	# note: FILE:LINE: …     a note line of bias
//	# works                  exit 0 and no warning or note at all
//	# at: TEXT               the line the first expected message cites
//	                         contains TEXT (its file:line points at the fault)
//
// A "*" in an expected line stands for a figure that depends on the
// solver's last digits; every other figure is closed-form (Ohm's law:
// 9 V over 1 mΩ is 9 kA, (9 V)²/100 Ω is 810 mW, 9 V/47 Ω is 191.5 mA).
type goldenCase struct {
	file, name    string
	command       string
	stderr        string
	warnings      []string
	notes         []string
	works         bool
	at            string
	expectedCount int
}

func readGolden(t *testing.T) []goldenCase {
	t.Helper()
	paths, err := filepath.Glob(filepath.Join("testdata", "lint", "*.toml"))
	if err != nil || len(paths) == 0 {
		t.Fatalf("no golden chains: %v", err)
	}
	var out []goldenCase
	for _, p := range paths {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		gc := goldenCase{file: p, name: filepath.Base(p)}
		for _, ln := range strings.Split(string(b), "\n") {
			switch {
			case strings.HasPrefix(ln, "# command: "):
				gc.command = strings.TrimPrefix(ln, "# command: ")
			case strings.HasPrefix(ln, "# stderr: "):
				gc.stderr = strings.TrimPrefix(ln, "# stderr: ")
			case strings.HasPrefix(ln, "# warning: "):
				gc.warnings = append(gc.warnings, strings.TrimPrefix(ln, "# "))
			case strings.HasPrefix(ln, "# note: "):
				gc.notes = append(gc.notes, strings.TrimPrefix(ln, "# "))
			case ln == "# works":
				gc.works = true
			case strings.HasPrefix(ln, "# at: "):
				gc.at = strings.TrimPrefix(ln, "# at: ")
			}
		}
		gc.expectedCount = len(gc.warnings) + len(gc.notes)
		if gc.stderr != "" {
			gc.expectedCount++
		}
		if gc.command == "" || (gc.expectedCount == 0) == !gc.works {
			t.Fatalf("%s: header needs a command and either expectations or works", p)
		}
		out = append(out, gc)
	}
	return out
}

// globMatch matches text against a pattern in which "*" stands for any
// run of characters.
func globMatch(pattern, text string) bool {
	re := "^" + strings.ReplaceAll(regexp.QuoteMeta(pattern), `\*`, ".*") + "$"
	return regexp.MustCompile(re).MatchString(text)
}

// linesWith returns the lines of s that start with prefix.
func linesWith(s, prefix string) []string {
	var out []string
	for _, ln := range strings.Split(s, "\n") {
		if strings.HasPrefix(ln, prefix) {
			out = append(out, ln)
		}
	}
	return out
}

// citedLine returns the line of the chain file a message cites
// ("FILE:LINE: …").
func citedLine(t *testing.T, gc goldenCase, msg string) string {
	t.Helper()
	m := regexp.MustCompile(regexp.QuoteMeta(gc.name) + `:(\d+):`).FindStringSubmatch(msg)
	if m == nil {
		t.Fatalf("%s: message cites no line: %q", gc.name, msg)
	}
	n, _ := strconv.Atoi(m[1])
	b, _ := os.ReadFile(gc.file)
	lines := strings.Split(string(b), "\n")
	if n < 1 || n > len(lines) {
		t.Fatalf("%s: cites line %d of %d", gc.name, n, len(lines))
	}
	return lines[n-1]
}

// Issue 10, seen cases 2, 3, 6 and 7 and their neighbours: every
// testdata/lint chain makes the tool say exactly what its header says —
// the first line of stderr with file:line, part and fix for a fault, the
// warning or note line for a suspicious build, nothing for one that
// works — and the line it cites is the line of the fault.
func TestGoldenLint(t *testing.T) {
	for _, gc := range readGolden(t) {
		t.Run(gc.name, func(t *testing.T) {
			code, stdout, stderr := capture(t, gc.command, "--chain", gc.file)
			first := strings.SplitN(stderr, "\n", 2)[0]
			if gc.stderr != "" {
				if code != exitFailure || !globMatch(gc.stderr, first) {
					t.Fatalf("exit %d, first line of stderr\n got %q\nwant %q", code, first, gc.stderr)
				}
				if line := citedLine(t, gc, first); !strings.Contains(line, gc.at) {
					t.Errorf("cites the line %q, which does not contain %q", line, gc.at)
				}
				return
			}
			if code != exitOK {
				t.Fatalf("exit %d: %s", code, first)
			}
			own := linesWith(stdout, "warning: "+gc.name)
			notes := linesWith(stdout, "note: ")
			if gc.works {
				if all := append(linesWith(stdout, "warning: "), notes...); len(all) > 0 {
					t.Fatalf("a working build gives %q", all)
				}
				return
			}
			for _, check := range []struct {
				kind      string
				got, want []string
			}{{"warnings", own, gc.warnings}, {"notes", notes, gc.notes}} {
				if len(check.got) != len(check.want) {
					t.Errorf("%s\n got %q\nwant %q", check.kind, check.got, check.want)
					continue
				}
				for i := range check.want {
					if !globMatch(check.want[i], check.got[i]) {
						t.Errorf("%s[%d]\n got %q\nwant %q", check.kind, i, check.got[i], check.want[i])
					}
				}
			}
			firstWant := append(append([]string(nil), own...), notes...)
			if len(firstWant) > 0 {
				if line := citedLine(t, gc, firstWant[0]); !strings.Contains(line, gc.at) {
					t.Errorf("cites the line %q, which does not contain %q", line, gc.at)
				}
			}
		})
	}
}

// The lint runs where every command flattens the chain, so a fault gives
// the same first line of stderr in render, measure, response, bias,
// spread, parts and ab, and render and ab leave no output behind.
func TestGoldenLintEveryCommand(t *testing.T) {
	dir := t.TempDir()
	dry := dryTake(t, dir)
	for _, gc := range readGolden(t) {
		if gc.stderr == "" {
			continue
		}
		wet := filepath.Join(dir, "wet.wav")
		set := filepath.Join(dir, "set")
		runs := map[string][]string{
			"render":   {"render", "--chain", gc.file, "--in", dry, "--out", wet, "-q"},
			"measure":  {"measure", "--chain", gc.file, "--freq", "1kHz", "--amplitude", "10mV", "--oversample", "1", "-q"},
			"response": {"response", "--chain", gc.file, "--freqs", "1k"},
			"spread":   {"spread", "--chain", gc.file, "--trials", "2", "--no-thd", "-q"},
			"parts":    {"parts", "--chain", gc.file},
			"ab":       {"ab", "--chain", gc.file, "--in", dry, "--outdir", set, "--variant", "as written:", "--segment", "0", "-q"},
		}
		for name, args := range runs {
			code, _, stderr := capture(t, args...)
			first := strings.SplitN(stderr, "\n", 2)[0]
			want := gc.stderr
			if name == "ab" {
				// ab says which variant it was building when the fault is
				// found building it (not when the file is read).
				first = strings.Replace(first, `renderchain: variant "as written": `, "renderchain: ", 1)
			}
			if code != exitFailure || !globMatch(want, first) {
				t.Errorf("%s %s: exit %d, first line %q\nwant %q", name, gc.name, code, first, want)
			}
		}
		for _, left := range []string{wet, filepath.Join(set, "ab.json")} {
			if _, err := os.Stat(left); err == nil {
				t.Errorf("%s: %s left behind", gc.name, left)
			}
		}
	}
}

// biasJSON runs bias --json on a chain with overrides and returns the
// report.
func biasJSON(t *testing.T, chain string, set ...string) map[string]any {
	t.Helper()
	args := []string{"bias", "--chain", chain, "--json"}
	for _, s := range set {
		args = append(args, "--set", s)
	}
	code, stdout, stderr := capture(t, args...)
	if code != exitOK {
		t.Fatalf("bias %s: exit %d: %s", chain, code, stderr)
	}
	var r map[string]any
	if err := json.Unmarshal([]byte(stdout), &r); err != nil {
		t.Fatal(err)
	}
	return r
}

func nodeV(t *testing.T, r map[string]any, name string) float64 {
	t.Helper()
	v, ok := r["nodes"].(map[string]any)[name].(float64)
	if !ok {
		t.Fatalf("no node %q in %v", name, r["nodes"])
	}
	return v
}

// ohmTol is the tolerance, V, of the Ohm's-law checks below: the DC solve
// stops at a Newton step under 1e-10 V, so node voltages carry errors of
// that order; 1e-6 V leaves room and is still a thousand times finer than
// any figure the checks compare.
const ohmTol = 1e-6

// Issue 10, seen case 3: a filtered rail (100 Ω, 100 µF) declared once as
// a net feeds two stages. The net is reported by its own name, and every
// milliampere the build draws crosses the filter resistor, so Ohm's law
// gives V(vf) = V(v+) − 100 Ω · I(supply) (every part but RF hangs on vf).
// Both stages are identical, so their operating points agree, and the
// rail stage, which names neither in nor out, passes the signal through.
func TestFilteredRailFeedsTwoStages(t *testing.T) {
	r := biasJSON(t, "testdata/lint/filtered-rail.toml")
	vf, vplus := nodeV(t, r, "vf"), nodeV(t, r, "v+")
	i := r["supply_current_a"].(float64)
	if want := vplus - 100*i; math.Abs(vf-want) > ohmTol {
		t.Errorf("V(vf) = %.9f V, Ohm's law %.9f V (I = %g A)", vf, want, i)
	}
	if c1, c2 := nodeV(t, r, "amp1.c"), nodeV(t, r, "amp2.c"); math.Abs(c1-c2) > ohmTol || !(c1 < vf) {
		t.Errorf("collectors %.6f V and %.6f V under a rail of %.6f V", c1, c2, vf)
	}
	for _, d := range r["devices"].([]any) {
		if region := d.(map[string]any)["region"]; region != "active" {
			t.Errorf("%v is %v", d.(map[string]any)["ref"], region)
		}
	}
	// The net is probe-able by its name.
	code, out, errs := capture(t, "response", "--chain", "testdata/lint/filtered-rail.toml", "--freqs", "1k", "--probe", "vf", "--json")
	var resp struct {
		Curves []struct {
			Points []struct{ DB float64 }
		}
	}
	if code != exitOK || json.Unmarshal([]byte(out), &resp) != nil || len(resp.Curves) == 0 || len(resp.Curves[0].Points) != 1 {
		t.Fatalf("response --probe vf: exit %d: %s%s", code, errs, out)
	}
}

// A dotted name that names another stage's own node lands on that node:
// "rail.vf" in stage amp is the rail stage's vf, with the same Ohm's-law
// drop across its 100 Ω.
func TestDottedNameReachesAnotherStage(t *testing.T) {
	r := biasJSON(t, "testdata/lint/dotted-works.toml")
	vf, vplus := nodeV(t, r, "rail.vf"), nodeV(t, r, "v+")
	if want := vplus - 100*r["supply_current_a"].(float64); math.Abs(vf-want) > ohmTol {
		t.Errorf("V(rail.vf) = %.9f V, Ohm's law %.9f V", vf, want)
	}
	if _, private := r["nodes"].(map[string]any)["amp.rail.vf"]; private {
		t.Error("the dotted name made a private node")
	}
}

// Issue 10, seen case 3: a worn battery is a supply network with a
// documented internal resistance, not only a lower voltage. The rail is
// the cell's EMF less the drop across its resistance (Ohm's law:
// V(v+) = EMF − RBAT · I), and --set reaches the network's parts
// (power.RBAT): a fresh cell (9.5 V behind 3 Ω, the supply-battery
// template's figures) leaves the collector more room below the rail than
// the worn one (7.5 V behind 50 Ω).
func TestWornBattery(t *testing.T) {
	const chain = "testdata/lint/worn-battery.toml"
	worn := biasJSON(t, chain)
	fresh := biasJSON(t, chain, "power.RBAT=3", "supply=9.5V")
	for _, c := range []struct {
		r        map[string]any
		emf, res float64
	}{{worn, 7.5, 50}, {fresh, 9.5, 3}} {
		i := c.r["supply_current_a"].(float64)
		if got, want := nodeV(t, c.r, "v+"), c.emf-c.res*i; math.Abs(got-want) > ohmTol {
			t.Errorf("EMF %g V behind %g Ω: V(v+) = %.9f V, Ohm's law %.9f V", c.emf, c.res, got, want)
		}
		if got := nodeV(t, c.r, "power.emf"); math.Abs(got-c.emf) > ohmTol {
			t.Errorf("power.emf = %g V, want the supply %g V", got, c.emf)
		}
	}
	room := func(r map[string]any) float64 { return nodeV(t, r, "v+") - nodeV(t, r, "amp.c") }
	if !(room(worn) < room(fresh)) {
		t.Errorf("room above the collector: worn %.3f V, fresh %.3f V; want less when worn", room(worn), room(fresh))
	}
	if w := worn["warnings"].([]any); len(w) != 0 {
		t.Errorf("a worn battery that still works gives warnings %v", w)
	}
}
