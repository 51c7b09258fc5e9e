package parts_test

import (
	"fmt"
	"log"

	"renderchain/chains"
	"renderchain/parts"
)

// Where a part's tolerance comes from when the chain file gives none: its
// E-series class (IEC 60063), or the pot-track rule.
func ExampleTolerance() {
	ch, err := chains.Example("fuzz-only")
	if err != nil {
		log.Fatal(err)
	}
	for _, p := range ch.Stage("fuzz").Parts[:6] {
		if tol, rule := parts.Tolerance(p); tol > 0 {
			fmt.Printf("%-3s %-9s %-4s ±%.0f %% (%s)\n", p.Ref, p.Kind, p.Text, 100*tol, rule)
		}
	}
	// Output:
	// R0  resistor  10k  ±10 % (E12 value)
	// C1  capacitor 1u   ±10 % (E12 value)
	// R1  resistor  27k  ±10 % (E12 value)
	// TR1 pot       50k  ±20 % (pot track)
}

// The yield's 95 % interval for 180 of 200 trials passing (Wilson 1927):
// centre (p + z²/2n)/(1 + z²/n), half-width z·√(p(1−p)/n + z²/4n²)/(1 + z²/n)
// with z = 1.96 gives 85.06 … 93.43 %.
func ExampleWilson() {
	lo, hi := parts.Wilson(180, 200)
	fmt.Printf("90.0 %% (%.1f–%.1f %%)\n", 100*lo, 100*hi)
	// Output: 90.0 % (85.1–93.4 %)
}
