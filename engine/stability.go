package engine

import (
	"fmt"
	"math"

	"renderchain/dsp/mna"
	"renderchain/models"
	"renderchain/report"
)

// checkStability runs the pole analysis of the circuit linearised at
// its operating point and says what an unstable pole means for the build.
func (p *Prepared) checkStability() {
	st, err := mna.Poles(p.Circuit, p.DC)
	if err != nil {
		p.Warnings.Add("the stability check could not run (%v): the circuit may oscillate unnoticed", err)
		return
	}
	p.Stability = st
	if w := StabilityWarning(st); w != "" {
		p.Warnings.Add("%s", w)
	}
}

// Motorboating is the frequency, Hz, below which a self-oscillation is
// named motorboating: the put-put of a low-frequency oscillation through a
// shared supply or an overall feedback path, below the guitar's lowest
// fundamental (about 82 Hz for a standard-tuned low E; common practice).
const Motorboating = 80.0

// StabilityWarning words what a pole analysis found: "" for a stable
// circuit; for an unstable complex pole pair "self-oscillates near F Hz"
// with its growth; for an unstable real pole "latches". The least damped
// unstable pole is named, and how many others there are.
func StabilityWarning(st *mna.Stability) string {
	if st == nil || len(st.Unstable) == 0 {
		return ""
	}
	s := st.Unstable[0] // the least damped first
	grow := models.FormatValue(-mna.PoleTimeConstant(s), "s")
	more := ""
	if n := len(st.Unstable) - 1; n > 0 {
		more = fmt.Sprintf(" (and %d more unstable pole%s)", n, map[bool]string{true: "", false: "s"}[n == 1])
	}
	if f := mna.PoleHz(s); f > 0 && imag(s) != 0 {
		name := "a tone with no signal in"
		if f < Motorboating {
			name = "motorboating"
		}
		return fmt.Sprintf("self-oscillates near %s (%s): linearised at its idle point the circuit has a pole pair growing e-fold every %s%s, "+
			"so it never rests there; every figure taken with a signal includes the oscillation", formatHz(f), name, grow, more)
	}
	return fmt.Sprintf("latches: the idle point found is unstable (a real pole growing e-fold every %s%s), so the circuit runs "+
		"away from it to another state; figures taken at this idle point do not describe the build", grow, more)
}

// formatHz writes a frequency with three significant figures.
func formatHz(f float64) string {
	return models.FormatValue(roundSignificant(f, 3), "Hz")
}

// roundSignificant rounds x to n significant figures.
func roundSignificant(x float64, n int) float64 {
	if x == 0 || !report.Finite(x) {
		return x
	}
	e := math.Pow(10, float64(n)-math.Ceil(math.Log10(math.Abs(x))))
	return math.Round(x*e) / e
}

// Unstable reports whether the pole analysis found a growing pole.
func (p *Prepared) Unstable() bool { return p.Stability != nil && len(p.Stability.Unstable) > 0 }

// SlowestTimeConstant returns the longest time constant −1/Re s of the
// stable poles of the circuit linearised at its operating point, seconds:
// how long the slowest transient takes to decay by 1/e, the figure a
// warm-up is sized from. It is 0 when the circuit has no poles below
// mna.MaxPoleHz (no capacitors or inductors) or the analysis could not
// run. A node held only by the solver's minimum conductance (a junction-
// or capacitor-only node) can give a time constant of hours: cap a warm-up
// by what a listener waits for, not by this alone.
func (p *Prepared) SlowestTimeConstant() float64 {
	if p.Stability == nil {
		return 0
	}
	slowest := 0.0
	for _, s := range p.Stability.Poles {
		if real(s) < 0 {
			slowest = math.Max(slowest, mna.PoleTimeConstant(s))
		}
	}
	return slowest
}

// StabilityReport writes the pole analysis for a report; nil when it could
// not run.
func (p *Prepared) StabilityReport() *report.Stability {
	if p.Stability == nil {
		return nil
	}
	r := &report.Stability{Unstable: p.Unstable(), SlowestTimeConstantS: report.Number(p.SlowestTimeConstant()), Poles: []report.Pole{}}
	for _, s := range p.Stability.Poles {
		r.Poles = append(r.Poles, report.Pole{Hz: mna.PoleHz(s), TimeConstantS: report.Number(mna.PoleTimeConstant(s)), Unstable: mna.Unstable(s)})
	}
	return r
}
