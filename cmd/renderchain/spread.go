package main

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"text/tabwriter"
	"time"

	"github.com/urfave/cli/v2"

	"renderchain/bias"
	"renderchain/models"
	"renderchain/parallel"
	"renderchain/parts"
	"renderchain/report"
)

func spreadCommand() *cli.Command {
	return &cli.Command{
		Name:  "spread",
		Usage: "Monte Carlo over part tolerances, transistor gain and leakage, JFET pinch-off: percentiles, gain, THD and yield",
		UsageText: "renderchain spread --chain F [--trials N] [--seed S] [--hfe-bin 126,158,182,231,268,304 | --hfe-range 100..400]\n" +
			"   [--spec fuzz.Q2.vc=4..5V]… [--retrim fuzz.Q2.vc=4.5V] [--set K=V]… [--json] [--trials-csv FILE]",
		Description: "Each resistor, capacitor and pot takes its tolerance key, or by default its E-series class\n" +
			"(E12 value ±10 %, E24 value ±5 %, off-series ±5 % resistors / ±10 % capacitors, pot tracks ±20 %).\n" +
			"The same seed gives the same result whatever --workers is.",
		Flags: []cli.Flag{
			chainFlag, setFlag, jsonFlag, quietFlag,
			&cli.IntFlag{Name: "trials", Aliases: []string{"n"}, Value: 200, Usage: fmt.Sprintf("number of trials, 1–%d", parts.MaxTrials)},
			&cli.Uint64Flag{Name: "seed", Value: 1, Usage: "random seed; the same seed gives the same result"},
			&cli.IntFlag{Name: "workers", Usage: "trials run in parallel (default: the CPU count)"},
			&cli.StringFlag{Name: "distribution", Value: "normal", Usage: "part values: normal (tolerance = 3σ, truncated) or uniform (within ±tolerance)"},
			&cli.StringSliceFlag{Name: "hfe-bin", Usage: "measured hFE values `H,H,…` to draw transistors from (distinct devices per trial)"},
			&cli.StringFlag{Name: "hfe-range", Usage: "draw each hFE uniformly from `LO..HI`"},
			&cli.Float64Flag{Name: "leak-spread", Value: parts.DefaultLeakSpread, Usage: "germanium leakage spread: a factor either way, log-uniform (1: none)"},
			&cli.Float64Flag{Name: "fet-spread", Value: parts.DefaultFETSpread, Usage: "JFET pinch-off spread: a factor either way, log-uniform, Idss following as β·Vp² (1: none)"},
			&cli.StringSliceFlag{Name: "spec", Usage: "acceptance window `KEY=LO..HI` (fuzz.Q2.vc=4..5V, gain=30..40dB, thd=..60%; repeatable): yield is the share meeting all"},
			&cli.StringFlag{Name: "retrim", Usage: "re-trim every trial to `KEY=VALUE` first, as on the bench (fuzz.Q2.vc=4.5V)"},
			&cli.StringFlag{Name: "adjust", Usage: "the knob --retrim turns, `STAGE.KNOB` (default: the trimmer marked for that transistor)"},
			&cli.StringFlag{Name: "freq", Value: "1kHz", Usage: "frequency `HZ` of the small-signal gain and the THD sine"},
			&cli.StringFlag{Name: "amplitude", Value: "100mV", Usage: "THD sine at the source, `V` peak (mV, Vpp, Vrms, dBV accepted)"},
			&cli.BoolFlag{Name: "no-thd", Usage: "skip the THD render (much faster)"},
			&cli.BoolFlag{Name: "all-stages", Usage: "vary the pickup and amplifier-input stages too"},
			&cli.StringFlag{Name: "trials-csv", Usage: "write every trial's draws and measurements to `FILE` (CSV)"},
		},
		Before: requireFlags("chain"),
		Action: spreadAction,
	}
}

func spreadAction(c *cli.Context) error {
	if c.NArg() > 0 {
		return usagef("spread takes no arguments (got %q)", c.Args().First())
	}
	if n := c.Int("trials"); n < 1 || n > parts.MaxTrials {
		return usagef("--trials %d is outside 1…%d", n, parts.MaxTrials)
	}
	set := newOutputs(c)
	csvOut := optionalFile(c, set, "trials-csv")
	if err := set.Check(); err != nil { // before any work
		return err
	}
	defer set.Abort()
	ch, err := loadChain(c)
	if err != nil {
		return err
	}
	opt := parts.SpreadOptions{Trials: c.Int("trials"), Seed: c.Uint64("seed"), Workers: c.Int("workers"),
		LeakSpread: c.Float64("leak-spread"), FETSpread: c.Float64("fet-spread"), NoTHD: c.Bool("no-thd"), AllStages: c.Bool("all-stages")}
	if c.IsSet("workers") && opt.Workers < 1 {
		return usagef("--workers %d must be at least 1", opt.Workers)
	}
	if opt.Distribution, err = parts.ParseDistribution(c.String("distribution")); err != nil {
		return err
	}
	if opt.HFEBin, err = parseListFlag(c, "hfe-bin", models.ParseGains); err != nil {
		return err
	}
	if r := c.String("hfe-range"); r != "" {
		if len(opt.HFEBin) > 0 {
			return usagef("--hfe-bin and --hfe-range exclude each other")
		}
		lo, hi, err := models.ParseSpan(r, models.ParseGain, true)
		if err != nil {
			return badFlag("hfe-range", r, err)
		}
		if math.IsInf(lo, 0) || math.IsInf(hi, 0) {
			return usagef("--hfe-range %q: want LO..HI with 0 < LO ≤ HI, e.g. 100..400", r)
		}
		opt.HFELow, opt.HFEHigh = lo, hi
	}
	if opt.Freq, err = parseFlag(c, "freq", models.ParseFrequency); err != nil {
		return err
	}
	if opt.Amplitude, err = parseFlag(c, "amplitude", models.ParseAmplitude); err != nil {
		return err
	}
	for _, s := range c.StringSlice("spec") {
		sp, err := parts.ParseSpec(ch, s)
		if err != nil {
			return err
		}
		opt.Specs = append(opt.Specs, sp)
	}
	if r := c.String("retrim"); r != "" {
		t, err := bias.ParseTarget(ch, r)
		if err != nil {
			return err
		}
		if opt.RetrimAdjust, err = bias.AdjusterFor(ch, t, c.String("adjust")); err != nil {
			return err
		}
		opt.Retrim = t
	} else if c.IsSet("adjust") {
		return usagef("--adjust goes with --retrim")
	}
	prog, done := progress(c.Bool("quiet"), "trials")
	if prog != nil {
		opt.Progress = func(n, total int) { prog(int64(n), int64(total)) }
	}
	start := time.Now()
	res, err := parts.Spread(c.Context, ch, opt)
	done()
	if err != nil {
		return err
	}
	if csvOut != nil {
		var buf bytes.Buffer
		if err := res.WriteCSV(&buf); err != nil {
			return err
		}
		if err := writeAll(csvOut, buf.Bytes()); err != nil {
			return err
		}
	}
	if err := commitOutputs(c, set); err != nil {
		return err
	}
	if c.Bool("json") {
		err = printJSON(c, res)
	} else {
		spreadPrint(c.App.Writer, res)
	}
	if !c.Bool("quiet") {
		fmt.Fprintf(c.App.ErrWriter, "spread: %d trials in %.1f s on %d workers\n", res.Trials, time.Since(start).Seconds(), parallel.Workers(opt.Workers))
	}
	return err
}

func spreadPrint(w io.Writer, r *parts.SpreadResult) {
	fmt.Fprintf(w, "%s: %d trials, seed %d\n", r.Chain, r.Trials, r.Seed)
	fmt.Fprintf(w, "  part values %s; hFE %s\n", r.Distribution, r.HFE)
	if r.Retrim != "" {
		fmt.Fprintf(w, "  each trial re-trimmed: %s\n", r.Retrim)
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "quantity\tnominal\t5 %\t50 %\t95 %\t")
	for _, q := range r.Quantities {
		name := q.Name
		switch name {
		case "gain_db":
			name = fmt.Sprintf("gain at %s", models.FormatValue(r.Freq, "Hz"))
		case "thd_percent":
			name = fmt.Sprintf("THD (%s, %s)", models.FormatValue(r.Amplitude, "V"), models.FormatValue(r.Freq, "Hz"))
		}
		f := func(n report.Number) string { return parts.FormatQuantity(float64(n), q.Unit) }
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t\n", name, f(q.Nominal), f(q.P5), f(q.P50), f(q.P95))
	}
	tw.Flush()
	if len(r.Parts) > 0 {
		fmt.Fprintln(w, "\nvalues drawn:")
		tw = tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "  part\trule\tnominal\t5 %\t50 %\t95 %\t")
		for _, p := range r.Parts {
			rule := p.Rule
			if p.Tolerance > 0 {
				rule = fmt.Sprintf("±%g %% (%s)", p.Tolerance, p.Rule)
			}
			f := func(n report.Number) string { return parts.FormatQuantity(float64(n), p.Unit) }
			fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t%s\t\n", p.Name, rule, f(p.Nominal), f(p.P5), f(p.P50), f(p.P95))
		}
		tw.Flush()
	}
	if len(r.Specs) > 0 {
		fmt.Fprintln(w)
		for _, s := range r.Specs {
			fmt.Fprintf(w, "spec %s: %d of %d trials (%.1f %%)\n", s.Spec, s.Pass, r.Trials, 100*s.Fraction)
		}
		fmt.Fprintf(w, "yield %.1f %% (95 %% interval %.1f–%.1f %%)\n", 100*float64(*r.Yield), 100*float64(*r.YieldLow), 100*float64(*r.YieldHigh))
	}
	for _, m := range r.Messages {
		fmt.Fprintln(w, "note: "+m)
	}
}
