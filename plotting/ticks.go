package plotting

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
)

// TickKind picks the steps of a linear axis's labelled ticks.
type TickKind int

// Tick kinds.
const (
	// TicksAuto reads the kind from the axis label: decibel steps for a
	// unit starting "dB" in parentheses, degree steps for "degrees" or
	// "°", plain steps otherwise.
	TicksAuto TickKind = iota
	// TicksPlain steps by 1, 2 or 5 times a power of ten.
	TicksPlain
	// TicksDB steps by 1, 2 or 5 dB below 10 dB, then by 10, 20 or 40 dB.
	TicksDB
	// TicksDegrees steps by 15, 30, 45, 90 or 180 degrees (1, 2, 5 and 10
	// for narrow ranges).
	TicksDegrees
)

// stepChoice is a candidate major step and the number of minor
// intervals it is cut into.
type stepChoice struct {
	step  float64
	minor int
}

var (
	dbSteps = []stepChoice{{0.1, 5}, {0.2, 4}, {0.5, 5}, {1, 5}, {2, 4}, {5, 5}, {10, 5}, {20, 4}, {40, 4},
		{100, 5}, {200, 4}}
	degreeSteps = []stepChoice{{1, 5}, {2, 4}, {5, 5}, {10, 5}, {15, 3}, {30, 3}, {45, 3}, {90, 3}, {180, 4},
		{360, 4}, {720, 4}, {1440, 4}}
)

// plainSteps returns 1, 2, 5 × 10^k steps from below span/1000 upward.
func plainSteps(span float64) []stepChoice {
	e := math.Floor(math.Log10(span)) - 3
	var out []stepChoice
	for k := 0; k < 6; k++ {
		b := math.Pow(10, e+float64(k))
		out = append(out, stepChoice{b, 5}, stepChoice{2 * b, 4}, stepChoice{5 * b, 5})
	}
	return out
}

// kindOf resolves TicksAuto from an axis label.
func kindOf(k TickKind, label string) TickKind {
	if k != TicksAuto {
		return k
	}
	l := strings.ToLower(label)
	switch {
	case strings.Contains(l, "(db"):
		return TicksDB
	case strings.Contains(l, "degrees"), strings.Contains(l, "°"):
		return TicksDegrees
	}
	return TicksPlain
}

// chooseStep returns the smallest candidate step at which the range
// [lo, hi], rounded out to whole steps, holds at most maxIntervals
// intervals.
func chooseStep(lo, hi float64, kind TickKind, maxIntervals int) stepChoice {
	span := hi - lo
	var cands []stepChoice
	switch kind {
	case TicksDB:
		cands = dbSteps
	case TicksDegrees:
		cands = degreeSteps
	}
	if len(cands) == 0 || span/cands[len(cands)-1].step > float64(maxIntervals) || span/cands[0].step < 2 {
		cands = plainSteps(span)
	}
	for _, c := range cands {
		n := math.Ceil(hi/c.step-1e-9) - math.Floor(lo/c.step+1e-9)
		if n <= float64(maxIntervals) {
			return c
		}
	}
	return cands[len(cands)-1]
}

// linearTicks marks a linear axis at whole multiples of a step, labelled
// in units of scale (an engineering prefix) with just the decimals the
// step needs.
type linearTicks struct {
	stepChoice
	scale float64
}

// Ticks implements plot.Ticker.
func (t linearTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || !(t.step > 0) {
		return nil
	}
	decimals := max(0, int(-math.Floor(math.Log10(t.step/t.scale)+1e-9)))
	minor := t.step / float64(t.minor)
	var ticks []plot.Tick
	first := math.Ceil(lo/minor - 1e-9)
	last := math.Floor(hi/minor + 1e-9)
	if last-first > 1000 || math.Abs(first) > 1<<50 || math.Abs(last) > 1<<50 {
		// Too many ticks, or steps too small for k++ to move k.
		return nil
	}
	for k := first; k <= last; k++ {
		v := k * minor
		if math.Abs(v) < minor*1e-9 {
			v = 0
		}
		tk := plot.Tick{Value: v}
		if math.Mod(math.Abs(k), float64(t.minor)) == 0 {
			tk.Label = formatTick(v/t.scale, decimals)
		}
		ticks = append(ticks, tk)
	}
	return ticks
}

// formatTick writes v with the given decimals and a true minus sign.
func formatTick(v float64, decimals int) string {
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-") // no "−0"
	}
	return strings.Replace(s, "-", "−", 1)
}

// prefixes are the engineering prefixes by power of a thousand.
var prefixes = []struct {
	exp int
	s   string
}{{-12, "p"}, {-9, "n"}, {-6, "µ"}, {-3, "m"}, {0, ""}, {3, "k"}, {6, "M"}, {9, "G"}}

// engineering returns the power-of-a-thousand scale and its prefix that
// put the larger magnitude of lo and hi in [1, 1000).
func engineering(lo, hi float64) (float64, string) {
	a := math.Max(math.Abs(lo), math.Abs(hi))
	if a == 0 || math.IsNaN(a) || math.IsInf(a, 0) {
		return 1, ""
	}
	e := 3 * int(math.Floor(math.Log10(a)/3+1e-9))
	pick := prefixes[0]
	for _, p := range prefixes {
		if p.exp <= e {
			pick = p
		}
	}
	return math.Pow10(pick.exp), pick.s
}

// LogTicks marks a logarithmic axis at every 1..9 times a power of ten,
// labelling 1, 2 and 5 with SI prefixes when the range spans at most four
// decades and the powers of ten alone otherwise. A range too narrow for
// two labels gets linear steps.
type LogTicks struct{}

// Ticks implements plot.Ticker.
func (LogTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi > lo) {
		return nil
	}
	dense := math.Log10(hi/lo) <= 4
	var ticks []plot.Tick
	for e := math.Floor(math.Log10(lo)); e <= math.Ceil(math.Log10(hi)); e++ {
		base := math.Pow(10, e)
		for m := 1; m <= 9; m++ {
			v := float64(m) * base
			if v < lo*(1-1e-9) || v > hi*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			if m == 1 || (dense && (m == 2 || m == 5)) {
				t.Label = SI(v)
			}
			ticks = append(ticks, t)
		}
	}
	labelled := 0
	for _, t := range ticks {
		if t.Label != "" {
			labelled++
		}
	}
	if labelled < 2 {
		// A range inside one decade: fall back to linear steps.
		c := chooseStep(lo, hi, TicksPlain, 6)
		ticks = linearTicks{stepChoice: c, scale: 1}.Ticks(lo, hi)
		for i := range ticks {
			if ticks[i].Label != "" {
				ticks[i].Label = SI(ticks[i].Value)
			}
		}
	}
	return ticks
}

// SI formats v with an SI prefix and at most three significant digits:
// SI(20000) = "20k", SI(0.001) = "1m", SI(1.5) = "1.5".
func SI(v float64) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Sprint(v)
	}
	a := math.Abs(v)
	pick := prefixes[0]
	for _, p := range prefixes {
		if a >= math.Pow10(p.exp)*(1-1e-9) {
			pick = p
		}
	}
	m := v / math.Pow10(pick.exp)
	s := fmt.Sprintf("%.3g", m)
	return s + pick.s
}
