package measure

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"renderchain/models"
	"renderchain/report"
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
	phase := "—"
	if report.Finite(float64(f.DBV)) {
		phase = report.Fixed(f.PhaseDeg, "%+.1f") + "°"
	}
	fmt.Fprintf(b, "  output     %s rms (%s dBV), gain %s dB, phase %s\n",
		models.FormatValue(f.VRMS, "V"), fmtNum(float64(f.DBV), "%.2f"), fmtNum(float64(m.GainDB), "%.2f"), phase)
	pct, fdb := m.floorPercent(), float64(m.AnalysisFloorDB)
	fmt.Fprintf(b, "  THD_F      %s %%  (%s dB)    THD_R %s %%\n",
		report.AtLeast(float64(m.THDPercent), pct, "%.4g"), report.AtLeast(float64(m.THDDB), fdb, "%.1f"), report.AtLeast(float64(m.THDRPercent), pct, "%.4g"))
	fmt.Fprintf(b, "  THD+N      %s %%  (%s dB)    band %s–%s\n", report.AtLeast(float64(m.THDNPercent), pct, "%.4g"), report.AtLeast(float64(m.THDNDB), fdb, "%.1f"),
		models.FormatValue(m.THDNBandHz[0], "Hz"), models.FormatValue(m.THDNBandHz[1], "Hz"))
	if m.distorts() {
		fmt.Fprintf(b, "  even/odd   %s (%s dB)\n", fmtNum(float64(m.EvenOddRatio), "%.4g"), fmtNum(float64(m.EvenOddDB), "%.1f"))
	} else {
		fmt.Fprintf(b, "  even/odd   — (no harmonic above the analysis floor)\n")
	}
	fmt.Fprintf(b, "  DC, peaks  %s; %s V / %s V, asymmetry %s\n", report.Quantity(m.DCV, report.VoltageFloor, "V"),
		report.Fixed(m.PeakPositiveV, "%+.4g"), report.Fixed(m.PeakNegativeV, "%+.4g"), report.Fixed(float64(m.PeakAsymmetry), "%+.3f"))
	c := m.Clipping
	flat := "no: the circuit does not flatten the peaks"
	if c.Clips {
		flat = "YES: the circuit flattens the peaks"
	}
	fmt.Fprintf(b, "  peaks flat %s (dwell ratio + %s, − %s; crest %s dB)\n", flat,
		fmtNum(float64(c.DwellPositive), "%.2f"), fmtNum(float64(c.DwellNegative), "%.2f"), fmtNum(float64(c.CrestFactorDB), "%.2f"))
	fmt.Fprintf(b, "  file clips %s\n", m.fileClips(true))
	fmt.Fprintf(b, "  floor      %s dB re the fundamental: harmonic and distortion figures under it print as \"< floor\" (the JSON keeps them)\n",
		fmtNum(fdb, "%.0f"))
	fmt.Fprintf(b, "  solver     %.2f mean / %d max Newton iterations, %d not converged\n\n",
		m.Solver.MeanIterations, m.Solver.MaxIterations, m.Solver.NonConverged)
	if _, err := io.WriteString(w, b.String()); err != nil {
		return err
	}
	if m.Alias != nil {
		if err := m.Alias.writeDetail(w); err != nil {
			return err
		}
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "  order\tfrequency\tlevel dBV\tdBc\t%\tphase °\t")
	for i, h := range append([]Line{m.Fundamental}, m.Harmonics...) {
		note := ""
		if h.Attenuated {
			note = " *"
		}
		level, dbc, percent, phase := fmtNum(float64(h.DBV), "%.2f"), fmtNum(float64(h.DBc), "%.2f"), fmtNum(float64(h.Percent), "%.4g"), report.Fixed(h.PhaseDeg, "%+.1f")
		switch {
		case !report.Finite(float64(m.Fundamental.DBV)):
			// No fundamental (a probe with no signal on it): nothing to
			// relate to, no phase.
			phase = "—"
		case i > 0 && !(float64(h.DBc) >= fdb):
			// Under the floor: a bound, and no phase to speak of.
			level = report.AtLeast(float64(h.DBV), float64(m.Fundamental.DBV)+fdb, "%.2f")
			dbc, percent, phase = report.AtLeast(float64(h.DBc), fdb, "%.2f"), report.AtLeast(float64(h.Percent), pct, "%.4g"), "—"
		}
		fmt.Fprintf(tw, "  H%d%s\t%s\t%s\t%s\t%s\t%s\t\n", h.Order, note, models.FormatValue(h.Hz, "Hz"), level, dbc, percent, phase)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	return writeWarnings(w, m.Warnings)
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
	head += "output dBV\tgain dB\tTHD %\tTHD+N %\tH2 dBc\tH3 dBc\teven/odd dB\tDC V\tpeaks flat\tfile clips\tsettled\t"
	aliasCols := r.aliasColumns()
	for _, f := range aliasCols {
		head += fmt.Sprintf("alias %d× dB\t", f)
	}
	fmt.Fprintln(tw, head)
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
		pct, fdb := m.floorPercent(), float64(m.AnalysisFloorDB)
		evenOdd := "—"
		if m.distorts() {
			evenOdd = fmtNum(float64(m.EvenOddDB), "%.1f")
		}
		dc := "0"
		if math.Abs(m.DCV) >= report.VoltageFloor {
			dc = fmtNum(m.DCV, "%.3g")
		}
		row += fmt.Sprintf("%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t",
			fmtNum(float64(m.Fundamental.DBV), "%.2f"), fmtNum(float64(m.GainDB), "%.2f"),
			report.AtLeast(float64(m.THDPercent), pct, "%.4g"), report.AtLeast(float64(m.THDNPercent), pct, "%.4g"),
			report.AtLeast(harmonicDBc(m, 2), fdb, "%.1f"), report.AtLeast(harmonicDBc(m, 3), fdb, "%.1f"),
			evenOdd, dc, yesNo(m.Clipping.Clips), m.fileClips(false), yesNo(m.Settle.Settled))
		for _, f := range aliasCols {
			cell := "—"
			if a, ok := m.aliasAt(f); ok {
				cell = m.Alias.aliasText(a)
			}
			row += cell + "\t"
		}
		fmt.Fprintln(tw, row)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	return writeWarnings(w, r.combinedWarnings())
}

// combinedWarnings joins the measurements' warnings (report.Combine),
// naming a measurement by its condition, its settings or its sweep step.
func (r *Report) combinedWarnings() report.Warnings {
	labels := make([]string, len(r.Measurements))
	lists := make([]report.Warnings, len(r.Measurements))
	for i, m := range r.Measurements {
		lists[i] = m.Warnings
		var name []string
		if m.Label != "" {
			name = append(name, m.Label)
		}
		switch {
		case r.Sweep != nil && r.Sweep.Kind == LevelSweep:
			name = append(name, models.FormatValue(m.AmplitudeV, "V")+" in")
		case r.Sweep != nil && len(m.Settings) > 0:
			name = append(name, m.Settings[len(m.Settings)-1]) // the knob's step
		case len(name) == 0 && len(m.Settings) > 0:
			name = append(name, strings.Join(m.Settings, " "))
		}
		labels[i] = strings.Join(name, ", ")
		if labels[i] == "" {
			labels[i] = fmt.Sprintf("measurement %d", i+1)
		}
	}
	return report.Combine(labels, lists)
}

func (r *Report) hasLabels() bool {
	for _, m := range r.Measurements {
		if m.Label != "" {
			return true
		}
	}
	return false
}

// floorPercent is the analysis floor as a percentage of the fundamental.
func (m *Result) floorPercent() float64 { return 100 * report.FromDB(float64(m.AnalysisFloorDB)) }

// distorts tells whether any harmonic stands above the analysis floor.
func (m *Result) distorts() bool { return float64(m.THDPercent) >= m.floorPercent() }

// fileClips says whether a render at this level would clip the file:
// samples past the output's full scale. Only the output has a full scale;
// at another probe it is "—". Long: a sentence for the detailed view.
func (m *Result) fileClips(long bool) string {
	switch {
	case m.Probe != "out":
		if long {
			return "— (the probe is not the output: no full scale)"
		}
		return "—"
	case m.Clipping.ExceedsFullScale && long:
		return "YES: the output passes its full scale; a render at this level clips the file"
	case long:
		return "no: the output stays within its full scale"
	}
	return yesNo(m.Clipping.ExceedsFullScale)
}

// writeWarnings writes a report's warnings at the end of its table, one
// "warning:" line each.
func writeWarnings(w io.Writer, ws []string) error {
	for _, s := range ws {
		if _, err := fmt.Fprintln(w, "  warning: "+s); err != nil {
			return err
		}
	}
	return nil
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
// units, exactly (no display floors); a value that is not defined is an
// empty field. peaks_flattened is the circuit flattening the peaks (a
// table's "peaks flat"), exceeds_full_scale a render clipping the file
// ("file clips").
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
		"even_odd_db", "dc_v", "peak_positive_v", "peak_negative_v", "peak_asymmetry", "crest_factor_db", "peaks_flattened",
		"exceeds_full_scale", "settled", "settle_s"}
	for h := 2; h <= maxOrder; h++ {
		head = append(head, fmt.Sprintf("h%d_dbc", h))
	}
	aliasCols := r.aliasColumns()
	for _, f := range aliasCols {
		head = append(head, fmt.Sprintf("signal_to_alias_db_x%d", f))
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
			g(float64(m.THDPercent)), g(float64(m.THDRPercent)), g(float64(m.THDNPercent)), g(float64(m.EvenOddDB)), g(m.DCV),
			g(m.PeakPositiveV), g(m.PeakNegativeV), g(float64(m.PeakAsymmetry)), g(float64(m.Clipping.CrestFactorDB)),
			strconv.FormatBool(m.Clipping.Clips), strconv.FormatBool(m.Clipping.ExceedsFullScale),
			strconv.FormatBool(m.Settle.Settled), g(m.Settle.Seconds)}
		for h := 2; h <= maxOrder; h++ {
			rec = append(rec, g(harmonicDBc(m, h)))
		}
		for _, f := range aliasCols {
			a, _ := m.aliasAt(f)
			v := math.NaN()
			if m.Alias != nil && a.Oversample == f {
				v = float64(a.SignalToAliasDB)
			}
			rec = append(rec, g(v))
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
	if err := tw.Flush(); err != nil {
		return err
	}
	return writeWarnings(w, r.Warnings)
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
