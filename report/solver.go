package report

import (
	"math"

	"renderchain/dsp/wdf"
)

// Solver is the Newton work of a run of the wave digital solver, over all
// its channels: samples solved, mean and largest iterations per sample,
// samples that needed the sub-stepped retry, and samples no retry brought
// within tolerance (kept finite, see package wdf).
type Solver struct {
	Samples        int64   `json:"samples"`
	MeanIterations float64 `json:"mean_iterations"`
	MaxIterations  int     `json:"max_iterations"`
	Fallbacks      int64   `json:"fallbacks"`
	NonConverged   int64   `json:"nonconverged"`
}

// SolverOf reads a solver's statistics; the mean is rounded to three
// decimals (a thousandth of an iteration).
func SolverOf(s wdf.Stats) Solver {
	return Solver{Samples: s.Samples, MeanIterations: math.Round(s.MeanIterations()*1000) / 1000,
		MaxIterations: s.MaxIterations, Fallbacks: s.Fallbacks, NonConverged: s.NonConverged}
}
