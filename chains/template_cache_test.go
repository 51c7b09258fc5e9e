package chains

import (
	"fmt"
	"strings"
	"testing"
)

// LoadTemplate parses each built-in template once and hands every caller
// its own copy: changing a returned template's parts or knobs leaves the
// next caller's as the file says.
func TestLoadTemplateCopies(t *testing.T) {
	a, err := LoadTemplate("fuzz-si")
	if err != nil {
		t.Fatal(err)
	}
	want := a.Parts[0].Value
	a.Parts[0].Value = -1
	a.Parts[0].Pins["x"] = "y"
	a.Knobs[0].Default = 0.123
	b, err := LoadTemplate("fuzz-si")
	if err != nil {
		t.Fatal(err)
	}
	if b.Parts[0].Value != want || b.Parts[0].Pins["x"] != "" || b.Knobs[0].Default == 0.123 {
		t.Errorf("a change to one copy reached the next: value %g, pin x %q, knob default %g", b.Parts[0].Value, b.Parts[0].Pins["x"], b.Knobs[0].Default)
	}
	if _, err := LoadTemplate("no-such-template"); err == nil {
		t.Error("an unknown template loaded")
	}
}

// BenchmarkParseManyTemplateStages parses a chain of MaxStages template
// stages, the most the stage bound lets through, each expanded from the
// cached parse of its template (9–21 ms on the project's machine; one stage
// more is refused before any is expanded, TestHostileChainFiles in
// cmd/renderchain).
func BenchmarkParseManyTemplateStages(b *testing.B) {
	var src strings.Builder
	for i := 0; i < MaxStages; i++ {
		fmt.Fprintf(&src, "[[stage]]\nid = \"s%d\"\ntemplate = \"tone-blend\"\n", i)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Parse("many.toml", src.String()); err != nil {
			b.Fatal(err)
		}
	}
}
