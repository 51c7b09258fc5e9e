package measure

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"renderchain/models"
)

// WriteTable writes a report for people: a full account of a single
// measurement, or one row per measurement for several.
func (r *Report) WriteTable(w io.Writer) error {
	if len(r.Measurements) == 1 && r.Sweep == nil {
		return r.Measurements[0].writeDetail(w, r.Chain)
	}
	return r.writeRows(w)
}

func fmtNum(v float64, format string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return fmt.Sprintf(format, v)
}

func (m *Result) writeDetail(w io.Writer, chain string) error {
	b := &strings.Builder{}
	if chain != "" {
		fmt.Fprintf(b, "%s\n", chain)
	}
	if m.Label != "" {
		fmt.Fprintf(b, "  condition  %s\n", m.Label)
	}
	fmt.Fprintf(b, "  source     %s sine, %s peak (%.2f dBV) at the source EMF\n",
		models.FormatValue(m.FrequencyHz, "Hz"), models.FormatValue(m.AmplitudeV, "V"), m.AmplitudeDBV)
	fmt.Fprintf(b, "  probe      %s; %s base rate × %d (%s inside)\n", m.Probe,
		models.FormatValue(m.SampleRate, "Hz"), m.Oversample, models.FormatValue(m.InternalRate, "Hz"))
	state := "settled"
	if !m.Settle.Settled {
		state = "NOT settled"
	}
	fmt.Fprintf(b, "  record     %s at %.3f s (window change %s, tolerance %.0e); %d samples, %.6g cycles, %s\n",
		state, m.Settle.Seconds, fmtNum(float64(m.Settle.Change), "%.1e"), m.Settle.Tolerance, m.Record.Samples, m.Record.Cycles,
		map[bool]string{true: "coherent DFT", false: "least-squares fit"}[m.Record.Coherent])
	f := m.Fundamental
	fmt.Fprintf(b, "  output     %s rms (%s dBV), gain %s dB, phase %+.1f°\n",
		models.FormatValue(f.VRMS, "V"), fmtNum(float64(f.DBV), "%.2f"), fmtNum(float64(m.GainDB), "%.2f"), f.PhaseDeg)
	fmt.Fprintf(b, "  THD_F      %s %%  (%s dB)    THD_R %s %%\n",
		fmtNum(m.THDPercent, "%.4g"), fmtNum(float64(m.THDDB), "%.1f"), fmtNum(m.THDRPercent, "%.4g"))
	fmt.Fprintf(b, "  THD+N      %s %%  (%s dB)    band %s–%s\n", fmtNum(m.THDNPercent, "%.4g"), fmtNum(float64(m.THDNDB), "%.1f"),
		models.FormatValue(m.THDNBandHz[0], "Hz"), models.FormatValue(m.THDNBandHz[1], "Hz"))
	fmt.Fprintf(b, "  even/odd   %s (%s dB)\n", fmtNum(float64(m.EvenOddRatio), "%.4g"), fmtNum(float64(m.EvenOddDB), "%.1f"))
	fmt.Fprintf(b, "  DC, peaks  %s; %+.4g V / %+.4g V, asymmetry %s\n", models.FormatValue(m.DCV, "V"),
		m.PeakPositiveV, m.PeakNegativeV, fmtNum(float64(m.PeakAsymmetry), "%+.3f"))
	c := m.Clipping
	clip := "no"
	if c.Clips {
		clip = "YES (flattened peaks)"
	}
	fmt.Fprintf(b, "  clipping   %s; dwell ratio + %s, − %s; crest %s dB\n", clip,
		fmtNum(float64(c.DwellPositive), "%.2f"), fmtNum(float64(c.DwellNegative), "%.2f"), fmtNum(float64(c.CrestFactorDB), "%.2f"))
	fmt.Fprintf(b, "  solver     %.2f mean / %d max Newton iterations, %d not converged\n\n",
		m.Solver.MeanIterations, m.Solver.MaxIterations, m.Solver.NonConverged)
	if _, err := io.WriteString(w, b.String()); err != nil {
		return err
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "  order\tfrequency\tlevel dBV\tdBc\t%\tphase °\t")
	for _, h := range append([]Line{m.Fundamental}, m.Harmonics...) {
		note := ""
		if h.Attenuated {
			note = " *"
		}
		fmt.Fprintf(tw, "  H%d%s\t%s\t%s\t%s\t%s\t%+.1f\t\n", h.Order, note, models.FormatValue(h.Hz, "Hz"),
			fmtNum(float64(h.DBV), "%.2f"), fmtNum(float64(h.DBc), "%.2f"), fmtNum(h.Percent, "%.4g"), h.PhaseDeg)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, warn := range m.Warnings {
		if _, err := fmt.Fprintln(w, "  warning: "+warn); err != nil {
			return err
		}
	}
	return nil
}

func (r *Report) writeRows(w io.Writer) error {
	if r.Chain != "" {
		fmt.Fprintln(w, r.Chain)
	}
	if len(r.Measurements) > 0 {
		m := r.Measurements[0]
		src := models.FormatValue(m.AmplitudeV, "V") + " peak"
		if r.Sweep != nil && r.Sweep.Kind == LevelSweep {
			src = "swept level"
		}
		fmt.Fprintf(w, "  %s sine, %s; probe %s\n", models.FormatValue(m.FrequencyHz, "Hz"), src, m.Probe)
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := "  "
	if r.hasLabels() {
		head += "condition\t"
	}
	if r.Sweep != nil {
		if r.Sweep.Kind == LevelSweep {
			head += "input V pk\tinput dBV\t"
		} else {
			head += r.Sweep.Key + "\t"
		}
	}
	head += "output dBV\tgain dB\tTHD %\tTHD+N %\tH2 dBc\tH3 dBc\teven/odd dB\tDC V\tclips\tsettled\t"
	fmt.Fprintln(tw, head)
	var warned []string
	for _, m := range r.Measurements {
		row := "  "
		if r.hasLabels() {
			row += m.Label + "\t"
		}
		if r.Sweep != nil {
			if r.Sweep.Kind == LevelSweep {
				row += models.FormatValue(m.AmplitudeV, "V") + "\t" + fmtNum(m.AmplitudeDBV, "%.1f") + "\t"
			} else {
				row += fmtNum(*m.SweepValue, "%.3g") + "\t"
			}
		}
		row += fmt.Sprintf("%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t",
			fmtNum(float64(m.Fundamental.DBV), "%.2f"), fmtNum(float64(m.GainDB), "%.2f"),
			fmtNum(m.THDPercent, "%.4g"), fmtNum(m.THDNPercent, "%.4g"),
			fmtNum(harmonicDBc(m, 2), "%.1f"), fmtNum(harmonicDBc(m, 3), "%.1f"),
			fmtNum(float64(m.EvenOddDB), "%.1f"), fmtNum(m.DCV, "%.3g"),
			yesNo(m.Clipping.Clips), yesNo(m.Settle.Settled))
		fmt.Fprintln(tw, row)
		for _, warn := range m.Warnings {
			if !slices.Contains(warned, warn) {
				warned = append(warned, warn)
			}
		}
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, warn := range warned {
		if _, err := fmt.Fprintln(w, "  warning: "+warn); err != nil {
			return err
		}
	}
	return nil
}

func (r *Report) hasLabels() bool {
	for _, m := range r.Measurements {
		if m.Label != "" {
			return true
		}
	}
	return false
}

func yesNo(b bool) string {
	if b {
		return "yes"
	}
	return "no"
}

// harmonicDBc returns order h's level in dBc, NaN when not counted.
func harmonicDBc(m *Result, h int) float64 {
	for _, l := range m.Harmonics {
		if l.Order == h {
			return float64(l.DBc)
		}
	}
	return math.NaN()
}

// WriteCSV writes one row per measurement, with a header. Values are in SI
// units; a value that is not defined is an empty field.
func (r *Report) WriteCSV(w io.Writer) error {
	maxOrder := 1
	for _, m := range r.Measurements {
		for _, h := range m.Harmonics {
			maxOrder = max(maxOrder, h.Order)
		}
	}
	cw := csv.NewWriter(w)
	head := []string{"label", "settings", "sweep_value", "frequency_hz", "amplitude_v_peak", "amplitude_dbv", "probe",
		"output_v_rms", "output_dbv", "gain_db", "phase_deg", "thd_percent", "thd_r_percent", "thdn_percent",
		"even_odd_db", "dc_v", "peak_positive_v", "peak_negative_v", "peak_asymmetry", "crest_factor_db", "clips",
		"exceeds_full_scale", "settled", "settle_s"}
	for h := 2; h <= maxOrder; h++ {
		head = append(head, fmt.Sprintf("h%d_dbc", h))
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	g := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ""
		}
		return strconv.FormatFloat(v, 'g', 8, 64)
	}
	for _, m := range r.Measurements {
		sv := ""
		if m.SweepValue != nil {
			sv = g(*m.SweepValue)
		}
		rec := []string{m.Label, strings.Join(m.Settings, " "), sv, g(m.FrequencyHz), g(m.AmplitudeV), g(m.AmplitudeDBV), m.Probe,
			g(m.Fundamental.VRMS), g(float64(m.Fundamental.DBV)), g(float64(m.GainDB)), g(m.Fundamental.PhaseDeg),
			g(m.THDPercent), g(m.THDRPercent), g(m.THDNPercent), g(float64(m.EvenOddDB)), g(m.DCV),
			g(m.PeakPositiveV), g(m.PeakNegativeV), g(float64(m.PeakAsymmetry)), g(float64(m.Clipping.CrestFactorDB)),
			strconv.FormatBool(m.Clipping.Clips), strconv.FormatBool(m.Clipping.ExceedsFullScale),
			strconv.FormatBool(m.Settle.Settled), g(m.Settle.Seconds)}
		for h := 2; h <= maxOrder; h++ {
			rec = append(rec, g(harmonicDBc(m, h)))
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteTable writes the response curves as a table: one row per frequency,
// one dB and one degree column per curve.
func (r *ResponseReport) WriteTable(w io.Writer) error {
	if r.Chain != "" {
		fmt.Fprintln(w, r.Chain)
	}
	what := "small-signal response at the DC operating point"
	if r.Mode == "swept" && r.Swept != nil {
		what = fmt.Sprintf("swept-sine response at %s peak (%s–%s in %.2f s; harmonic curves against the excitation frequency)",
			models.FormatValue(r.Swept.AmplitudeV, "V"), models.FormatValue(r.Swept.F1Hz, "Hz"), models.FormatValue(r.Swept.F2Hz, "Hz"), r.Swept.DurationS)
	}
	fmt.Fprintf(w, "  %s, %s → %s\n", what, r.Reference, r.Probe)
	for i, c := range r.Curves {
		fmt.Fprintf(w, "  [%d] %s\n", i+1, c.Label)
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	head := "  Hz\t"
	for i, c := range r.Curves {
		if c.Harmonic > 1 {
			head += fmt.Sprintf("[%d] dB\t[%d] dBc\t", i+1, i+1)
		} else {
			head += fmt.Sprintf("[%d] dB\t[%d] °\t", i+1, i+1)
		}
	}
	fmt.Fprintln(tw, head)
	for _, f := range r.frequencies() {
		row := "  " + fmtNum(f, "%.5g") + "\t"
		for _, c := range r.Curves {
			p := c.at(f)
			if p == nil {
				row += "\t\t"
				continue
			}
			second := fmtNum(float64(p.Deg), "%.1f")
			if c.Harmonic > 1 && p.DBc != nil {
				second = fmtNum(float64(*p.DBc), "%.2f")
			}
			row += fmtNum(float64(p.DB), "%.3f") + "\t" + second + "\t"
		}
		fmt.Fprintln(tw, row)
	}
	return tw.Flush()
}

// WriteCSV writes one row per curve and frequency.
func (r *ResponseReport) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"curve", "label", "harmonic", "hz", "db", "deg", "dbc"}); err != nil {
		return err
	}
	g := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ""
		}
		return strconv.FormatFloat(v, 'g', 8, 64)
	}
	for i, c := range r.Curves {
		for _, p := range c.Points {
			dbc := ""
			if p.DBc != nil {
				dbc = g(float64(*p.DBc))
			}
			if err := cw.Write([]string{strconv.Itoa(i + 1), c.Label, strconv.Itoa(max(c.Harmonic, 1)), g(p.Hz), g(float64(p.DB)), g(float64(p.Deg)), dbc}); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

func (r *ResponseReport) frequencies() []float64 {
	var out []float64
	seen := map[float64]bool{}
	for _, c := range r.Curves {
		for _, p := range c.Points {
			if !seen[p.Hz] {
				seen[p.Hz] = true
				out = append(out, p.Hz)
			}
		}
	}
	return out
}

func (c *Curve) at(f float64) *Point {
	for i := range c.Points {
		if c.Points[i].Hz == f {
			return &c.Points[i]
		}
	}
	return nil
}
