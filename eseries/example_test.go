package eseries_test

import (
	"fmt"

	"renderchain/eseries"
)

func ExampleSeries_Nearest() {
	// A calculated 5.2 kΩ collector load: the nearest E12 and E24 parts.
	fmt.Println(eseries.E12.Nearest(5200), eseries.E24.Nearest(5200))
	lo, hi := eseries.E12.Bracket(5200)
	fmt.Println(lo, hi)
	// Output:
	// 5600 5100
	// 4700 5600
}
