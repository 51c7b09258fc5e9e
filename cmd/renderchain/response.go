package main

import (
	"fmt"

	"github.com/urfave/cli/v2"

	"renderchain/chains"
	"renderchain/measure"
	"renderchain/models"
	"renderchain/plotting"
)

func responseCommand() *cli.Command {
	return &cli.Command{
		Name:  "response",
		Usage: "frequency response: small-signal at the DC operating point, or swept through the nonlinear circuit",
		UsageText: "renderchain response --chain F [--freqs HZ,HZ,… | --from HZ --to HZ --points N] [--set K=V[,V…]]…\n" +
			"   [--probe NODE] [--ref NODE] [--swept --amplitude V] [--json | --csv] [--plot FILE.png|svg]",
		Description: "Without --swept: the response from the chain's source EMF to the output (or --probe,\n" +
			"relative to --ref) by complex nodal analysis of the circuit linearised at its DC operating\n" +
			"point. With --swept: an exponential sine sweep at --amplitude is rendered through the\n" +
			"nonlinear circuit and deconvolved, giving the large-signal linear response (H1) and the\n" +
			"harmonic responses H2…H<orders>, each against the excitation frequency.\n\n" +
			"A --set value that is a comma list (tone.tone=0,0.25,0.5) gives one curve per value.",
		Flags: []cli.Flag{
			chainFlag,
			&cli.StringFlag{Name: "freqs", Usage: "frequencies `HZ,HZ,…` (100,1k,10k)"},
			&cli.StringFlag{Name: "from", Value: "20", Usage: "lowest frequency of the log grid"},
			&cli.StringFlag{Name: "to", Value: "20k", Usage: "highest frequency of the log grid"},
			&cli.IntFlag{Name: "points", Value: 61, Usage: "points of the log grid, ends included"},
			familySetFlag,
			probeFlag,
			&cli.StringFlag{Name: "ref", Usage: "take the response relative to `NODE` instead of the source EMF (small-signal only)"},
			&cli.BoolFlag{Name: "swept", Usage: "render a swept sine through the nonlinear circuit and deconvolve it"},
			&cli.StringFlag{Name: "amplitude", Aliases: []string{"a"}, Value: "100mV", Usage: "swept-sine amplitude at the source: 100mV (peak), 20mVpp, -20dBV"},
			&cli.DurationFlag{Name: "duration", Value: 2e9, Usage: "swept-sine length (longer: better signal-to-noise and harmonic separation)"},
			&cli.IntFlag{Name: "orders", Value: measure.DefaultSweepOrders, Usage: "highest harmonic response of --swept (1–10)"},
			rateFlag,
			oversampleFlag,
			jsonFlag,
			csvFlag,
			plotFlag,
			workersFlag,
			quietFlag,
		},
		Before: requireFlags("chain"),
		Action: runResponse,
	}
}

func runResponse(c *cli.Context) error {
	if c.NArg() > 0 {
		return usagef("response takes no arguments (got %q)", c.Args().First())
	}
	if c.Bool("json") && c.Bool("csv") {
		return usagef("--json and --csv exclude each other")
	}
	if c.Bool("swept") && c.IsSet("ref") {
		return usagef("--ref works with the small-signal response only, not with --swept")
	}
	if !c.Bool("swept") {
		for _, name := range []string{"amplitude", "duration", "orders"} {
			if c.IsSet(name) {
				return usagef("--%s needs --swept", name)
			}
		}
	}
	plotPath := c.String("plot")
	if plotPath != "" {
		if _, err := plotting.FormatOf(plotPath); err != nil {
			return usagef("--plot: %v", err)
		}
	}
	set := newOutputs(c)
	plot := optionalFile(c, set, "plot")
	if err := set.Check(); err != nil { // before any work
		return err
	}
	defer set.Abort()
	freqs, err := responseFreqs(c)
	if err != nil {
		return err
	}
	variants, err := measure.Expand(c.StringSlice("set"))
	if err != nil {
		return err
	}
	ch, err := chains.Load(c.String("chain"))
	if err != nil {
		return err
	}
	var rep *measure.ResponseReport
	if c.Bool("swept") {
		amp, err := parseFlag(c, "amplitude", models.ParseAmplitude)
		if err != nil {
			return err
		}
		_, done := progress(c.Bool("quiet"), "sweeping")
		rep, err = measure.RunSwept(c.Context, ch, variants, freqs, measure.SweptOptions{
			Amplitude: amp, Duration: c.Duration("duration").Seconds(), SampleRate: c.Float64("rate"),
			Oversample: c.Int("oversample"), Orders: c.Int("orders"), Probe: c.String("probe"),
		}, c.Int("workers"))
		done()
		if err != nil {
			return err
		}
	} else {
		rep, err = measure.RunResponse(c.Context, ch, variants, freqs, measure.ResponseOptions{
			Probe: c.String("probe"), Ref: c.String("ref"), SampleRate: c.Float64("rate"), Oversample: c.Int("oversample"),
		})
		if err != nil {
			return err
		}
	}
	if plot != nil {
		if err := drawTo(plot, rep.Figure()); err != nil {
			return fmt.Errorf("writing plot %s: %w", plotPath, err)
		}
	}
	if err := commitOutputs(c, set); err != nil {
		return err
	}
	switch {
	case c.Bool("json"):
		return printJSON(c, rep)
	case c.Bool("csv"):
		return rep.WriteCSV(c.App.Writer)
	}
	return rep.WriteTable(c.App.Writer)
}

// responseFreqs reads --freqs, or the --from/--to/--points grid.
func responseFreqs(c *cli.Context) ([]float64, error) {
	if c.IsSet("freqs") {
		if c.IsSet("from") || c.IsSet("to") || c.IsSet("points") {
			return nil, usagef("--freqs excludes --from, --to and --points")
		}
		return parseListFlag(c, "freqs", models.ParseFrequencies)
	}
	lo, err := parseFlag(c, "from", models.ParseFrequency)
	if err != nil {
		return nil, err
	}
	hi, err := parseFlag(c, "to", models.ParseFrequency)
	if err != nil {
		return nil, err
	}
	if !(hi > lo) {
		return nil, usagef("--from %s --to %s: bounds are reversed or equal", c.String("from"), c.String("to"))
	}
	if n := c.Int("points"); n < 2 || n > 10000 {
		return nil, usagef("--points %d is outside 2…10000", n)
	}
	return measure.LogGrid(lo, hi, c.Int("points")), nil
}
