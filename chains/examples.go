package chains

import (
	"embed"
	"fmt"
)

// The example chains are embedded so the demo runs from any directory.
//
//go:embed demo.toml germanium.toml fuzz-only.toml
var exampleFS embed.FS

// Example parses one of the example chains shipped in chains/ ("demo",
// "germanium", "fuzz-only").
func Example(name string) (*Chain, error) {
	b, err := exampleFS.ReadFile(name + ".toml")
	if err != nil {
		return nil, fmt.Errorf("no example chain %q", name)
	}
	return Parse(name+".toml", string(b))
}
