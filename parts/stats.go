package parts

import (
	"math"
	"sort"

	"renderchain/report"
)

// Percentile returns the p-quantile (0 ≤ p ≤ 1) of sorted data by linear
// interpolation between order statistics, definition 7 of Hyndman & Fan,
// "Sample quantiles in statistical packages", The American Statistician
// 50(4), 1996: h = (n−1)·p, Q = x[⌊h⌋] + (h−⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋]).
// It returns NaN for no data.
func Percentile(sorted []float64, p float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := float64(n-1) * p
	i := int(math.Floor(h))
	if i >= n-1 {
		return sorted[n-1]
	}
	if i < 0 {
		return sorted[0]
	}
	return sorted[i] + (h-float64(i))*(sorted[i+1]-sorted[i])
}

// Summary is the spread of one quantity over the trials.
type Summary struct {
	Name    string        `json:"name"`
	Unit    string        `json:"unit"`
	Nominal report.Number `json:"nominal"`
	P5      report.Number `json:"p5"`
	P50     report.Number `json:"p50"`
	P95     report.Number `json:"p95"`
	Min     report.Number `json:"min"`
	Max     report.Number `json:"max"`
	Mean    report.Number `json:"mean"`
	N       int           `json:"n"`
}

func summarise(name, unit string, nominal float64, x []float64) Summary {
	s := Summary{Name: name, Unit: unit, Nominal: report.Number(nominal)}
	var v []float64
	for _, f := range x {
		if !math.IsNaN(f) {
			v = append(v, f)
		}
	}
	sort.Float64s(v)
	s.N = len(v)
	s.P5, s.P50, s.P95 = report.Number(Percentile(v, 0.05)), report.Number(Percentile(v, 0.5)), report.Number(Percentile(v, 0.95))
	s.Min, s.Max, s.Mean = report.Number(math.NaN()), report.Number(math.NaN()), report.Number(math.NaN())
	if len(v) > 0 {
		sum := 0.0
		for _, f := range v {
			sum += f
		}
		s.Min, s.Max, s.Mean = report.Number(v[0]), report.Number(v[len(v)-1]), report.Number(sum/float64(len(v)))
	}
	return s
}

// Wilson returns the 95 % Wilson score interval for k successes in n
// trials (E. B. Wilson, "Probable inference, the law of succession, and
// statistical inference", J. Am. Stat. Assoc. 22, 1927).
func Wilson(k, n int) (lo, hi float64) {
	if n == 0 {
		return 0, 1
	}
	const z = 1.959963984540054 // Φ⁻¹(0.975)
	p := float64(k) / float64(n)
	nn := float64(n)
	d := 1 + z*z/nn
	c := (p + z*z/(2*nn)) / d
	h := z * math.Sqrt(p*(1-p)/nn+z*z/(4*nn*nn)) / d
	return math.Max(0, c-h), math.Min(1, c+h)
}
