package chains_test

import (
	"errors"
	"fmt"
	"strings"

	"renderchain/chains"
)

// ExampleCheckText shows a hostile chain file refused before parsing:
// 30 000 nested inline tables in 120 KB, which would exhaust the parser's
// memory, stop at the 33rd level.
func ExampleCheckText() {
	src := "name = \"deep\"\nx = " + strings.Repeat("{a=", 30000) + "1" + strings.Repeat("}", 30000) + "\n"
	_, err := chains.Parse("deep.toml", src)
	fmt.Println(err)
	fmt.Println(errors.Is(err, chains.ErrLimit))
	// Output:
	// deep.toml:2: nesting of arrays and tables: 33 levels (at least), beyond the limit of 32 for chain files
	// true
}

// ExampleChain_CheckSize checks a parsed chain before building it.
func ExampleChain_CheckSize() {
	ch, err := chains.Example("demo")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(ch.CheckSize())
	// Output:
	// <nil>
}
