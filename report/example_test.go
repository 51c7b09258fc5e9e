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
