package engine

import (
	"fmt"
	"math"
	"strings"

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
	// Every growing pair is named (a build can motorboat and ring at a
	// high frequency at once); the growth quoted is the fastest one's.
	var tones []string
	latches := 0
	for _, s := range st.Unstable {
		f := mna.PoleHz(s)
		if f == 0 || imag(s) == 0 {
			latches++
			continue
		}
		name := "a tone with no signal in"
		if f < Motorboating {
			name = "motorboating"
		}
		tones = append(tones, fmt.Sprintf("near %s (%s)", formatHz(f), name))
	}
	grow := models.FormatValue(-mna.PoleTimeConstant(st.Unstable[0]), "s")
	if len(tones) > 0 {
		growth := "a pole pair growing e-fold every " + grow
		if len(tones) > 1 {
			growth = fmt.Sprintf("%d pole pairs growing, the fastest e-fold every %s", len(tones), grow)
		}
		msg := fmt.Sprintf("self-oscillates %s: linearised at its idle point the circuit has %s, "+
			"so it never rests there; every figure taken with a signal includes the oscillation", strings.Join(tones, " and "), growth)
		if latches > 0 {
			msg += "; it also has a growing real pole, so it may latch"
		}
		return msg
	}
	return fmt.Sprintf("latches: the idle point found is unstable (a real pole growing e-fold every %s), so the circuit runs "+
		"away from it to another state; figures taken at this idle point do not describe the build", grow)
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
