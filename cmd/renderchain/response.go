package main

import (
	"fmt"
	"math"

	"github.com/urfave/cli/v2"

	"renderchain/chains"
	"renderchain/dsp/spectrum"
	"renderchain/measure"
	"renderchain/models"
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
			"A --set value that is a comma list (tone.tone=0,0.25,0.5) gives one curve per value. Without\n" +
			"--freqs or --points the grid has 48 points a decade (146 from 20 Hz to 20 kHz): smooth curves\n" +
			"at every knob setting, and a phase that --plot can unwrap (drawn without ±180° breaks).",
		Flags: []cli.Flag{
			chainFlag,
			&cli.StringFlag{Name: "freqs", Usage: "frequencies `HZ,HZ,…` (100,1k,10k)"},
			&cli.StringFlag{Name: "from", Value: "20", Usage: "lowest frequency of the log grid"},
			&cli.StringFlag{Name: "to", Value: "20k", Usage: "highest frequency of the log grid"},
			&cli.IntFlag{Name: "points", Usage: "points of the log grid, ends included (default: 48 a decade, 146 from 20 Hz to 20 kHz)"},
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
			&cli.BoolFlag{Name: "group-delay", Usage: "add a group-delay panel to the --plot figure"},
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
	plotPath, err := checkPlotFlag(c)
	if err != nil {
		return err
	}
	if c.Bool("group-delay") && plotPath == "" {
		return usagef("--group-delay adds a panel to the --plot figure: give --plot FILE.png|svg")
	}
	set := newOutputs(c)
	plots := plotFiles(set, plotPath, "", 0)
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
	var figures []figureFile
	if plotPath != "" {
		fig, err := rep.Figure(c.Bool("group-delay"))
		if err != nil {
			return err
		}
		what := "gain and unwrapped phase"
		if c.Bool("group-delay") {
			what += ", group delay"
		}
		figures = []figureFile{{path: plotPath, what: what, fig: fig}}
		if err := saveFigures(figures, plots); err != nil {
			return err
		}
		if sparse(freqs) && !c.Bool("quiet") {
			fmt.Fprintf(c.App.ErrWriter, "note: the plot's phase is unwrapped from the %d frequencies asked for, some more than a 48th of a decade apart;\n"+
				"  where the phase turns by more than 180° between two of them the curve is 360° off: leave out --freqs and --points for the dense grid\n", len(freqs))
		}
	}
	if err := commitOutputs(c, set); err != nil {
		return err
	}
	noteFigures(c, figures, c.Bool("quiet"))
	switch {
	case c.Bool("json"):
		return printJSON(c, rep)
	case c.Bool("csv"):
		return rep.WriteCSV(c.App.Writer)
	}
	return rep.WriteTable(c.App.Writer)
}

// sparse tells whether a grid has a step wider than the default grid's
// (a 48th of a decade), where an unwrapped phase may miss a turn.
func sparse(freqs []float64) bool {
	step := math.Pow(10, 1.0/spectrum.PointsPerDecade) * (1 + 1e-9)
	for i := 1; i < len(freqs); i++ {
		if freqs[i]/freqs[i-1] > step {
			return true
		}
	}
	return false
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
	if !c.IsSet("points") {
		g, err := measure.DefaultGrid(lo, hi)
		if err != nil {
			return nil, usagef("--from %s --to %s: %v", c.String("from"), c.String("to"), err)
		}
		return g, nil
	}
	if n := c.Int("points"); n < 2 || n > 10000 {
		return nil, usagef("--points %d is outside 2…10000", n)
	}
	return measure.LogGrid(lo, hi, c.Int("points")), nil
}
