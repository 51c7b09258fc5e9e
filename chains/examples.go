package chains

import (
	"embed"
	"fmt"
	"io/fs"
	"sort"
	"strings"
)

// The example chains are embedded so the demo runs from any directory:
// the demo's own in chains/, one per device template in chains/examples/.
//
//go:embed demo.toml germanium.toml fuzz-only.toml examples/*.toml
var exampleFS embed.FS

// Example parses one of the example chains shipped in chains/ ("demo",
// "germanium", "fuzz-only") or chains/examples/ ("examples/opamp-clip",
// …; ExampleNames lists them all).
func Example(name string) (*Chain, error) {
	b, err := exampleFS.ReadFile(name + ".toml")
	if err != nil {
		return nil, fmt.Errorf("no example chain %q (examples: %s)", name, strings.Join(ExampleNames(), ", "))
	}
	return Parse(name+".toml", string(b))
}

// ExampleNames lists the example chains Example reads.
func ExampleNames() []string {
	names := []string{"demo", "germanium", "fuzz-only"}
	entries, _ := fs.ReadDir(exampleFS, "examples")
	var more []string
	for _, e := range entries {
		more = append(more, "examples/"+strings.TrimSuffix(e.Name(), ".toml"))
	}
	sort.Strings(more)
	return append(names, more...)
}
