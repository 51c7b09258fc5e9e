package main

import (
	"encoding/csv"
	"encoding/json"
	"strings"
	"testing"

	"renderchain/parts"
)

func TestPartsCLI(t *testing.T) {
	code, out, errs := capture(t, "parts", "--chain", "../../chains/demo.toml", "--csv")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(recs) < 10 || strings.Join(recs[0], ",") != strings.Join(parts.CSVHeader, ",") {
		t.Fatalf("CSV: %v, %d records", err, len(recs))
	}
	code, out, _ = capture(t, "parts", "--chain", "../../chains/demo.toml", "--json")
	var b struct {
		Parts []struct {
			Ref, Kind, E12, E24, Rating string
		} `json:"parts"`
	}
	if err := json.Unmarshal([]byte(out), &b); err != nil || code != exitOK {
		t.Fatal(code, err)
	}
	for _, p := range b.Parts {
		if p.Kind == "capacitor" && p.Rating != "≥ 16 V" {
			t.Errorf("%s on a 9 V rail: %s (want 16 V: common practice)", p.Ref, p.Rating)
		}
		if (p.Kind == "resistor" || p.Kind == "capacitor") && (p.E12 == "" || p.E24 == "") {
			t.Errorf("%s: no E12/E24 value", p.Ref)
		}
	}
	code, out, _ = capture(t, "parts", "--chain", "../../chains/demo.toml")
	if code != exitOK || !strings.Contains(out, "to order:") {
		t.Errorf("text: exit %d\n%s", code, out)
	}
	if code, _, _ := capture(t, "parts", "--chain", "../../chains/demo.toml", "--csv", "--json"); code != exitUsage {
		t.Errorf("--csv --json: exit %d", code)
	}
}
