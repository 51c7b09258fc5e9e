package bench

import (
	"math"
	"strconv"
	"strings"

	"renderchain/chains"
	"renderchain/models"
)

// ParseSupplies reads a comma-separated list of supply voltages
// ("9.6,9,8,7" or "9.6V,9V"). Each takes the polarity of the chain's own
// supply, so a positive-ground build's −9 V may be written 9 or −9.
func ParseSupplies(list string, chainSupply float64) ([]float64, error) {
	var out []float64
	for _, f := range splitList(list) {
		v, err := models.ParseValue(f, models.Voltage)
		if err != nil {
			return nil, keyErr(f, "%v", err)
		}
		if v == 0 || math.Abs(v) > 60 {
			return nil, keyErr(f, "a supply must be non-zero and within ±60 V")
		}
		if (v > 0) != (chainSupply > 0) {
			v = -v
		}
		out = append(out, v)
	}
	if len(out) == 0 {
		return nil, keyErr(list, "no supply voltages in the list")
	}
	return out, nil
}

// ParseTemperatures reads a comma-separated list of temperatures. A plain
// number is in degrees Celsius ("0,25,40"); "25C", "298.15K" are accepted.
// It returns kelvin.
func ParseTemperatures(list string) ([]float64, error) {
	var out []float64
	for _, f := range splitList(list) {
		var k float64
		if c, err := strconv.ParseFloat(f, 64); err == nil {
			k = c + models.ZeroCelsius
		} else if k, err = models.ParseValue(f, models.Temperature); err != nil {
			return nil, keyErr(f, "%v", err)
		}
		if k < models.ZeroCelsius-60 || k > models.ZeroCelsius+150 || math.IsNaN(k) {
			return nil, keyErr(f, "temperature outside −60…150 °C")
		}
		out = append(out, k)
	}
	if len(out) == 0 {
		return nil, keyErr(list, "no temperatures in the list")
	}
	return out, nil
}

func splitList(s string) []string {
	var out []string
	for _, f := range strings.Split(s, ",") {
		if f = strings.TrimSpace(f); f != "" {
			out = append(out, f)
		}
	}
	return out
}

// Sweep solves the chain's operating point at every combination of the
// given supplies and temperatures (kelvin); an empty list stands for the
// chain's own value. Rows come supply-major in the order given.
func Sweep(ch *chains.Chain, supplies, temps []float64) ([]*Bias, error) {
	if len(supplies) == 0 {
		supplies = []float64{ch.Supply}
	}
	if len(temps) == 0 {
		temps = []float64{ch.Temperature}
	}
	var rows []*Bias
	work := ch.Clone()
	for _, v := range supplies {
		for _, t := range temps {
			work.Supply, work.Temperature = v, t
			b, err := Solve(work)
			if err != nil {
				return nil, err
			}
			rows = append(rows, b)
		}
	}
	return rows, nil
}
