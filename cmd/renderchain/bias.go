package main

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"github.com/urfave/cli/v2"

	"renderchain/bias"
	"renderchain/chains"
	"renderchain/models"
	"renderchain/report"
)

func biasCommand() *cli.Command {
	return &cli.Command{
		Name:  "bias",
		Usage: "DC operating point: node voltages, transistor bias and regions; trimmer targets; battery and temperature tables",
		UsageText: "renderchain bias --chain F [--set K=V]… [--json]\n" +
			"   renderchain bias --chain F --target fuzz.Q2.vc=4.5V [--adjust fuzz.trim2]\n" +
			"   renderchain bias --chain F --target symmetric [--level 300mV] [--freq 1kHz] [--probe NODE]\n" +
			"   renderchain bias --chain F --supply 9.6,9,8,7 --temp 0,25,40",
		Description: "Values are signed as measured: a PNP transistor shows negative Vbe, Vce and Ic.\n" +
			"Measure a trimmer's resistance with the battery out and one leg lifted; in circuit the rest\n" +
			"of the board shunts the reading.",
		Flags: []cli.Flag{
			chainFlag, setFlag, jsonFlag,
			&cli.StringFlag{Name: "target", Usage: "turn a trimmer to reach `KEY=VALUE` (fuzz.Q2.vc=4.5V, fuzz.Q2.vce=4V, fuzz.Q2.ic=1mA, fuzz.c2=4.5V), or \"symmetric\" for equal clipping on both half-waves"},
			&cli.StringFlag{Name: "adjust", Usage: "the knob a target turns, `STAGE.KNOB` or STAGE.POT (default: the trimmer the template marks for that transistor)"},
			&cli.StringFlag{Name: "level", Usage: "symmetric target: test sine at the source, `V` peak (mV, Vpp, Vrms, dBV accepted; default: the chain's input peak)"},
			&cli.StringFlag{Name: "freq", Value: "1kHz", Usage: "symmetric target: test sine frequency `HZ`"},
			&cli.StringFlag{Name: "probe", Usage: "symmetric target: `NODE` watched (default: the adjusted transistor's collector)"},
			&cli.StringSliceFlag{Name: "supply", Usage: "table of the operating point at supply `V,V,…` (e.g. 9.6,9,8,7; the chain file's polarity is kept)"},
			&cli.StringSliceFlag{Name: "temp", Usage: "table of the operating point at temperatures `C,C,…` (°C, e.g. 0,25,40)"},
			&cli.BoolFlag{Name: "internal", Usage: "list nodes inside parts (a diode's junction) too"},
		},
		Before: requireFlags("chain"),
		Action: biasAction,
	}
}

func biasAction(c *cli.Context) error {
	if c.NArg() > 0 {
		return usagef("bias takes no arguments (got %q)", c.Args().First())
	}
	ch, err := loadChain(c)
	if err != nil {
		return err
	}
	supplies, temps, err := biasConditions(c, ch)
	if err != nil {
		return err
	}
	var (
		tr  *bias.TargetResult
		sym *bias.SymmetricResult
		b   *bias.Bias
	)
	switch target := strings.TrimSpace(c.String("target")); {
	case target == "":
		if c.IsSet("adjust") || c.IsSet("level") || c.IsSet("probe") || c.IsSet("freq") {
			return usagef("--adjust, --level, --freq and --probe go with --target")
		}
	case strings.EqualFold(target, "symmetric"):
		adj, err := bias.ResolveAdjuster(ch, c.String("adjust"), "")
		if err != nil {
			return err
		}
		opt := bias.SymmetricOptions{Probe: c.String("probe")}
		if c.IsSet("level") {
			if opt.Level, err = parseFlag(c, "level", models.ParseAmplitude); err != nil {
				return err
			}
		}
		if opt.Freq, err = parseFlag(c, "freq", models.ParseFrequency); err != nil {
			return err
		}
		if sym, err = bias.SolveSymmetric(c.Context, ch, adj, opt); err != nil {
			return err
		}
		ch.Stage(adj.Stage).Knobs[adj.Knob] = sym.Rotation
		b = sym.Bias
	default:
		if c.IsSet("level") || c.IsSet("probe") || c.IsSet("freq") {
			return usagef("--level, --freq and --probe go with --target symmetric")
		}
		t, err := bias.ParseTarget(ch, target)
		if err != nil {
			return err
		}
		adj, err := bias.AdjusterFor(ch, t, c.String("adjust"))
		if err != nil {
			return err
		}
		if tr, err = bias.SolveTargetContext(c.Context, ch, t, adj); err != nil {
			return err
		}
		ch.Stage(adj.Stage).Knobs[adj.Knob] = tr.Rotation
		b = tr.Bias
	}
	if b == nil {
		if b, err = bias.SolveContext(c.Context, ch); err != nil {
			return err
		}
	}
	if err := b.Check(c.Context); err != nil {
		return err
	}
	var rows []*bias.Bias
	if supplies != nil || temps != nil {
		if rows, err = bias.SweepContext(c.Context, ch, supplies, temps); err != nil {
			return err
		}
	}
	if c.Bool("json") {
		r := b.Report()
		if tr != nil {
			r.Target = tr.Report()
		}
		if sym != nil {
			r.Symmetric = sym.Report()
		}
		for _, row := range rows {
			r.Conditions = append(r.Conditions, row.Row())
		}
		return printJSON(c, r)
	}
	w := c.App.Writer
	if tr != nil {
		biasPrintTarget(w, tr)
	}
	if sym != nil {
		biasPrintSymmetric(w, sym)
	}
	biasPrint(w, b, c.Bool("internal"))
	if rows != nil {
		biasPrintConditions(w, rows)
	}
	return nil
}

// biasConditions reads --supply and --temp (each a comma list,
// repeatable): supplies by models.ParseSupplies with the chain file's
// polarity (the supply rule), temperatures by models.ParseTemperatures.
func biasConditions(c *cli.Context, ch *chains.Chain) (supplies, temps []float64, err error) {
	if supplies, err = parseListFlag(c, "supply", func(s string) ([]float64, error) { return models.ParseSupplies(s, ch.Polarity()) }); err != nil {
		return nil, nil, err
	}
	if temps, err = parseListFlag(c, "temp", models.ParseTemperatures); err != nil {
		return nil, nil, err
	}
	return supplies, temps, nil
}

// amps and watts print a current and a power for people: 0 below the
// display floors of package report.
func amps(a float64) string  { return report.Quantity(a, report.CurrentFloor, "A") }
func watts(w float64) string { return report.Quantity(w, report.PowerFloor, "W") }

// currentGain prints Ic/Ib: "—" when either current is below the display
// floor (a ratio of two unreadable currents says nothing).
func currentGain(ic, ib float64) string {
	if math.Abs(ic) < report.CurrentFloor || math.Abs(ib) < report.CurrentFloor {
		return "—"
	}
	return report.Fixed(ic/ib, "%.0f")
}

// hasTiny tells whether any current or power of b prints as 0 but is not.
func hasTiny(b *bias.Bias) bool {
	tiny := func(v, floor float64) bool { return v != 0 && math.Abs(v) < floor }
	for _, t := range b.Transistors {
		if tiny(t.Ic, report.CurrentFloor) || tiny(t.Ib, report.CurrentFloor) || tiny(t.Power, report.PowerFloor) {
			return true
		}
	}
	for _, d := range b.Diodes {
		if tiny(d.I, report.CurrentFloor) || tiny(d.Power, report.PowerFloor) {
			return true
		}
	}
	return tiny(b.SupplyCurrent, report.CurrentFloor) || tiny(b.SupplyPower, report.PowerFloor)
}

func biasVolts(v float64) string {
	if math.Abs(v) < 0.0005 {
		v = 0 // no "-0.000 V"
	}
	return fmt.Sprintf("%.3f V", v)
}

func biasPrint(w io.Writer, b *bias.Bias, internal bool) {
	fmt.Fprintf(w, "%s (%s)\n", b.Chain, b.File)
	fmt.Fprintf(w, "DC operating point at %s, %.1f °C (%s, %d iterations)\n\n", models.FormatValue(b.Supply, "V"),
		b.Temperature-models.ZeroCelsius, b.Method, b.Iterations)
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "node\tvoltage")
	for _, n := range b.Nodes {
		if n.Internal && !internal {
			continue
		}
		mark := ""
		if n.Internal {
			mark = "\t(inside the part)"
		}
		fmt.Fprintf(tw, "%s\t%s%s\n", n.Name, biasVolts(n.Volts), mark)
	}
	tw.Flush()
	if len(b.Transistors) > 0 {
		fmt.Fprintln(w)
		tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "transistor\tkind\tVc\tVb\tVe\tVbe\tVce\tIc\tIb\tP\tIc/Ib\tregion\t")
		for _, t := range b.Transistors {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t\n", t.Ref, t.Kind(), biasVolts(t.Vc), biasVolts(t.Vb), biasVolts(t.Ve),
				biasVolts(t.Vbe), biasVolts(t.Vce), amps(t.Ic), amps(t.Ib), watts(t.Power), currentGain(t.Ic, t.Ib), t.Region)
		}
		tw.Flush()
	}
	if len(b.Diodes) > 0 {
		fmt.Fprintln(w)
		tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "diode\tanode\tcathode\tV\tI\tP\t")
		for _, d := range b.Diodes {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t\n", d.Ref, d.Anode, d.Cathode, biasVolts(d.V), amps(d.I), watts(d.Power))
		}
		tw.Flush()
	}
	biasPrintFETsAndOpAmps(w, b)
	fmt.Fprintf(w, "\nsupply delivers %s (%s)\n", amps(b.SupplyCurrent), watts(b.SupplyPower))
	if hasTiny(b) {
		fmt.Fprintf(w, "(currents under %s and powers under %s print as 0; the JSON has every figure)\n",
			models.FormatValue(report.CurrentFloor, "A"), models.FormatValue(report.PowerFloor, "W"))
	}
	for _, s := range b.Warnings {
		fmt.Fprintln(w, "warning: "+s)
	}
	for _, s := range b.Notes {
		fmt.Fprintln(w, "note: "+s)
	}
}

func biasPrintTarget(w io.Writer, r *bias.TargetResult) {
	if r.Reached {
		fmt.Fprintf(w, "target %s: reached at %s = %.3f (was %.3f)\n", r.Target.Text, r.Adjust.Key(), r.Rotation, r.Start)
	} else {
		fmt.Fprintf(w, "target %s: OUT OF REACH\n", r.Target.Text)
	}
	fmt.Fprintf(w, "  %s\n", r.Message())
	if len(r.Alternatives) > 0 {
		var s []string
		for _, x := range r.Alternatives {
			s = append(s, fmt.Sprintf("%.3f", x))
		}
		fmt.Fprintf(w, "  also reached at %s\n", strings.Join(s, ", "))
	}
	fmt.Fprintf(w, "  measure with the battery out and the trimmer out of circuit; reproduce with --set %s=%.4f\n\n", r.Adjust.Key(), r.Rotation)
}

func biasPrintSymmetric(w io.Writer, r *bias.SymmetricResult) {
	o := r.Options
	fmt.Fprintf(w, "symmetric swing at %s for a %s, %s sine at the source:\n", r.Probe, models.FormatValue(o.Level, "V"), models.FormatValue(o.Freq, "Hz"))
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "  %s\tidle\tup\tdown\tasymmetry\t\n", r.Adjust.Key())
	for _, s := range r.Scan {
		fmt.Fprintf(tw, "  %.2f\t%s\t%s\t%s\t%+.3f\t\n", s.Rotation, biasVolts(s.Idle), biasVolts(s.Up), biasVolts(s.Down), s.Asymmetry)
	}
	tw.Flush()
	if r.Reached {
		fmt.Fprintf(w, "  equal half-waves at %s = %.3f (was %.3f): %s up, %s down; measure %s between ccw and wiper of %s\n",
			r.Adjust.Key(), r.Rotation, r.Start, biasVolts(r.At.Up), biasVolts(r.At.Down), models.FormatValue(r.Lower, "Ω"), r.Adjust.PotRef())
	} else {
		fmt.Fprintf(w, "  not found: %s\n", r.Note)
	}
	fmt.Fprintf(w, "  reproduce with --set %s=%.4f\n\n", r.Adjust.Key(), r.Rotation)
}

func biasPrintConditions(w io.Writer, rows []*bias.Bias) {
	fmt.Fprintln(w, "\noperating point by supply and temperature:")
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
	head := "  supply\ttemp\t"
	for _, t := range rows[0].Transistors {
		head += t.Ref + " Vc\tVce\tIc\tregion\t"
	}
	fmt.Fprintln(tw, head+"supply I\t")
	for _, b := range rows {
		line := fmt.Sprintf("  %s\t%.0f °C\t", models.FormatValue(b.Supply, "V"), b.Temperature-models.ZeroCelsius)
		for _, t := range b.Transistors {
			region := string(t.Region)
			if t.NearRail != "" {
				region += " (near " + t.NearRail + ")"
			}
			line += fmt.Sprintf("%s\t%s\t%s\t%s\t", biasVolts(t.Vc), biasVolts(t.Vce), amps(t.Ic), region)
		}
		fmt.Fprintf(tw, "%s%s\t\n", line, amps(b.SupplyCurrent))
	}
	tw.Flush()
	fmt.Fprintf(w, "  (near gnd / near v+: collector within %g V of that rail; the JSON rows carry the full warnings)\n", bias.RailMargin)
}
