package parts

import (
	"renderchain/chains"
	"renderchain/eseries"
)

// Default tolerances for parts without a tolerance key (see the package
// documentation for the rule).
const (
	OffSeriesResistorTolerance  = 0.05
	OffSeriesCapacitorTolerance = 0.10
	PotTolerance                = 0.20 // carbon and cermet tracks (common practice)
)

// Tolerance returns a part's tolerance (a fraction) and where it comes
// from: the part's own tolerance key; else, for a resistor or capacitor,
// its E-series class: a value on E12 (and so on E6 and E3) is taken as a
// ±10 % part, one on E24 only as ±5 %, one on neither as ±5 % (resistor) or
// ±10 % (capacitor); a pot's or trimmer's track is ±20 %. Other kinds have
// no tolerance here (0, "").
func Tolerance(p *chains.Part) (float64, string) {
	if p.Tolerance > 0 {
		return p.Tolerance, "written"
	}
	switch p.Kind {
	case chains.Resistor, chains.Capacitor:
		switch {
		case eseries.E12.Contains(p.Value):
			return eseries.E12.Tolerance, "E12 value"
		case eseries.E24.Contains(p.Value):
			return eseries.E24.Tolerance, "E24 value"
		case p.Kind == chains.Resistor:
			return OffSeriesResistorTolerance, "off-series resistor"
		default:
			return OffSeriesCapacitorTolerance, "off-series capacitor"
		}
	case chains.Pot:
		return PotTolerance, "pot track"
	}
	return 0, ""
}
