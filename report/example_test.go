package report_test

import (
	"encoding/json"
	"fmt"
	"math"

	"renderchain/report"
)

// Silence has no level: JSON gets null where the value is −∞.
func ExampleLevel() {
	var m report.PeakRMS
	m.Add(make([]float64, 480))
	out := struct {
		Peak  report.Level `json:"peak_dbfs"`
		Crest report.Level `json:"crest_db"`
		Gain  report.Level `json:"gain_db"`
	}{report.Level(report.DB(m.Peak())), report.Level(m.CrestDB()), report.Level(report.DB(math.Sqrt2))}
	b, _ := json.Marshal(out)
	fmt.Println(string(b))
	// Output: {"peak_dbfs":null,"crest_db":null,"gain_db":3.010299956639812}
}

// Warnings of several conditions: one that differs only in its figures is
// said once with their range; one that concerns a single condition names
// it.
func ExampleCombine() {
	w := report.Combine([]string{"9V", "7V"}, []report.Warnings{
		{"Q1's collector sits 470 mV from ground"},
		{"Q1's collector sits 418 mV from ground", "Q2 is saturated at idle"},
	})
	for _, s := range w {
		fmt.Println(s)
	}
	// Output:
	// Q1's collector sits 418 to 470 mV from ground (in both)
	// 7V: Q2 is saturated at idle
}

// Figures for people: under an analysis floor, under a display floor.
func ExampleAtLeast() {
	fmt.Println(report.AtLeast(2.116e-14, 0.001, "%.4g"), "%")
	fmt.Println(report.Quantity(8.7e-33, report.PowerFloor, "W"))
	fmt.Println(report.Fixed(-0.2, "%.0f"))
	// Output:
	// < 0.001 %
	// 0 W
	// 0
}
