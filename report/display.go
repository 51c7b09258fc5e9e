package report

import (
	"fmt"
	"math"
	"strings"

	"renderchain/models"
)

// Display floors: below them a figure is shown to people as 0 (reports
// keep every figure exactly; see the package documentation).
const (
	// CurrentFloor, A. A handheld meter's finest current range resolves
	// about 0.1 µA (from memory), so nothing a builder can read sits below
	// 1 nA; and in the model, currents of picoamperes and less are the
	// devices' saturation-current terms (femtoamperes for silicon) or the
	// 1 pS the DC solve may put across junctions as a last resort (9 pA at
	// 9 V): they say more about the model than about the build.
	CurrentFloor = 1e-9
	// PowerFloor, W. The smallest resistors and transistors are rated for
	// tens of milliwatts (1/16 W, 62.5 mW, for a small surface-mount
	// resistor: common practice); a microwatt is five orders below any
	// rating and below what a warm part shows.
	PowerFloor = 1e-6
	// VoltageFloor, V. A bench meter's finest DC range resolves about
	// 1 µV (a handheld's 0.1 mV; from memory): a DC offset or a distance
	// below it reads as 0.
	VoltageFloor = 1e-6
)

// Quantity writes v with its unit in engineering notation
// (models.FormatValue), "0 unit" when |v| is below floor, and never a
// negative zero; "—" when v is NaN or infinite.
func Quantity(v, floor float64, unit string) string {
	if !Finite(v) {
		return "—"
	}
	if math.Abs(v) < floor {
		return "0 " + unit
	}
	return models.FormatValue(v, unit)
}

// Fixed writes v with a fmt verb for one float ("%.2f", "%+.1f"), never a
// negative zero ("-0.00" reads "0.00", "+0.0" for a signed verb); "—" when
// v is NaN or infinite.
func Fixed(v float64, format string) string {
	if !Finite(v) {
		return "—"
	}
	s := fmt.Sprintf(format, v)
	if strings.HasPrefix(s, "-") && strings.Trim(s[1:], "0.") == "" {
		s = s[1:]
		if strings.Contains(format, "+") {
			s = "+" + s
		}
	}
	return s
}

// AtLeast writes a figure that has an analysis floor under which it
// cannot be told from the measurement's own residue: Fixed(v, format) at or
// above floor, "< " + Fixed(floor, format) below it (a level of −275 dB
// under a −100 dB floor prints "< -100.0"); "—" when v is NaN
// or +∞ (−∞ dB, a level that does not exist, is below any floor).
func AtLeast(v, floor float64, format string) string {
	if math.IsInf(v, -1) || Finite(v) && v < floor {
		return "< " + Fixed(floor, format)
	}
	return Fixed(v, format)
}
