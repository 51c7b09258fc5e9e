package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The same seed prints the same JSON on one and two workers; --trials-csv
// writes one row per trial.
func TestSpreadCLI(t *testing.T) {
	dir := t.TempDir()
	csvPath := filepath.Join(dir, "trials.csv")
	args := []string{"spread", "--chain", benchChain, "--trials", "12", "--seed", "9", "--no-thd", "--hfe-bin", "126,158,182,231,268,304",
		"--spec", "fuzz.Q2.vc=4..5V", "--json", "-q"}
	c1, out1, e1 := capture(t, append(args, "--workers", "1", "--trials-csv", csvPath)...)
	c2, out2, _ := capture(t, append(args, "--workers", "2")...)
	if c1 != exitOK || c2 != exitOK || out1 != out2 {
		t.Fatalf("exits %d %d (%s); outputs equal %v", c1, c2, e1, out1 == out2)
	}
	var r struct {
		Trials int      `json:"trials"`
		Yield  *float64 `json:"yield"`
		Specs  []struct {
			Pass int `json:"pass"`
		} `json:"specs"`
	}
	if err := json.Unmarshal([]byte(out1), &r); err != nil || r.Trials != 12 || r.Yield == nil || len(r.Specs) != 1 {
		t.Fatalf("%v %+v", err, r)
	}
	f, err := os.Open(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil || len(rows) != 13 {
		t.Errorf("CSV: %v, %d rows", err, len(rows))
	}
	// No trial meets a spec: a message, not a failure.
	code, out, _ := capture(t, "spread", "--chain", benchChain, "--trials", "4", "--no-thd", "--spec", "fuzz.Q2.vc=20..30V", "-q")
	if code != exitOK || !strings.Contains(out, "no trial meets fuzz.Q2.vc=20..30V") {
		t.Errorf("exit %d:\n%s", code, out)
	}
}

func TestSpreadBadInput(t *testing.T) {
	for _, args := range [][]string{
		{"--trials", "0"},
		{"--hfe-bin", "110,abc"},
		{"--hfe-range", "400..100"},
		{"--spec", "fuzz.Q2.vc=5..4V"},
		{"--spec", "fuzz.Q9.vc=4..5V"},
		{"--distribution", "triangular"},
		{"--leak-spread", "0.5"},
		{"--adjust", "fuzz.trim2"},
		{"--no-thd", "--spec", "thd=..10%"},
	} {
		code, _, errs := capture(t, append([]string{"spread", "--chain", benchChain, "--trials", "2", "-q"}, args...)...)
		if code != exitUsage || strings.Count(strings.TrimSpace(errs), "\n") != 0 || errs == "" {
			t.Errorf("%v: exit %d, stderr %q", args, code, errs)
		}
	}
}
