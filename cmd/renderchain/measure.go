package main

import (
	"fmt"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/chains"
	"renderchain/measure"
	"renderchain/models"
	"renderchain/outputs"
)

// Flags shared by measure and response.
var (
	rateFlag       = &cli.Float64Flag{Name: "rate", Value: measure.DefaultSampleRate, Usage: "base sample rate in Hz (the circuit runs at rate × oversample)"}
	oversampleFlag = &cli.IntFlag{Name: "oversample", Usage: "internal rate multiple, 1–16 (default: the chain's, else 4)"}
	// renderOversampleFlag is --oversample of a render, whose default is
	// chosen per chain and rate.
	renderOversampleFlag = &cli.IntFlag{Name: "oversample", Usage: "internal rate multiple, 1–16 (default: the chain's, else the lowest that keeps aliases 50 dB down, chosen per chain and rate)"}
	probeFlag            = &cli.StringFlag{Name: "probe", Usage: "measure at `NODE` instead of the output: in, out, v+, STAGE.NODE (fuzz.c1), STAGE.in, STAGE.out"}
	plotFlag             = &cli.StringFlag{Name: "plot", Usage: "also draw the result to `FILE`.png or FILE.svg"}
	csvFlag              = &cli.BoolFlag{Name: "csv", Usage: "print CSV instead of a table"}
	familySetFlag        = &cli.StringSliceFlag{Name: "set", Usage: "override `KEY=VALUE` (stage.knob=0.3, stage.REF=22n, stage.REF.hfe=120, supply=8.5V, …); a comma list (tone.tone=0,0.5,1) gives one result per value (repeatable)"}
)

func measureCommand() *cli.Command {
	return &cli.Command{
		Name:  "measure",
		Usage: "THD, harmonics and levels of a sine through the chain; level and knob sweeps",
		UsageText: "renderchain measure --chain F [--freq HZ] [--amplitude V] [--set K=V]… [--supply V,V,…] [--temp C,C,…]\n" +
			"   [--sweep-level FROM..TO | --sweep-knob STAGE.KNOB=FROM..TO] [--steps N] [--json | --csv] [--plot FILE.png|svg]",
		Description: "Renders a sine through the chain's circuit on the same path as a render (oversampled wave\n" +
			"digital solver), waits until the output has settled (RMS and DC of consecutive record-length\n" +
			"windows changing by less than --settle-tol, at most --settle-max), and analyses a whole number\n" +
			"of cycles: fundamental, harmonics 2–10 (dBc, %), THD_F, THD_R, THD+N (20 Hz–20 kHz), even/odd\n" +
			"energy, DC, peaks and their asymmetry, and whether the output clips.\n\n" +
			"--alias adds the signal-to-alias ratio: the sine rendered again per oversampling factor\n" +
			"(--alias-factors 2,4,8,16), the power on its harmonic lines over the power everywhere else.\n" +
			"A tone whose folded lines would land on its own harmonics (1 kHz at 48 kHz) is moved to a\n" +
			"neighbour that shows them, and the report says so.\n\n" +
			"--amplitude is at the chain's source EMF, before any source impedance: 100mV, 0.1V (peak),\n" +
			"20mVpp, 70.7mVrms, -20dBV. Sweep steps and conditions run in parallel across cores.\n\n" +
			"Safety: on a real bench, keep mains-powered test gear earthed as its maker intends and\n" +
			"power the pedal from its own 9 V supply; this command needs neither.",
		Flags: []cli.Flag{
			chainFlag,
			&cli.StringFlag{Name: "freq", Aliases: []string{"f"}, Value: "1kHz", Usage: "test frequency (5 Hz up to below half the rate)"},
			&cli.StringFlag{Name: "amplitude", Aliases: []string{"a"}, Value: "100mV", Usage: "source amplitude: 100mV (peak), 20mVpp, 70.7mVrms, -20dBV"},
			familySetFlag,
			&cli.StringFlag{Name: "supply", Usage: "one measurement per supply voltage in the `V,V,…` list (plain numbers are volts; the chain file's polarity is kept)"},
			&cli.StringFlag{Name: "temp", Usage: "one measurement per temperature in the `C,C,…` list (plain numbers are °C)"},
			&cli.StringFlag{Name: "sweep-level", Usage: "step the source amplitude over `FROM..TO` in logarithmic steps, e.g. 1mV..1V"},
			&cli.StringFlag{Name: "sweep-knob", Usage: "step a knob over `STAGE.KNOB=FROM..TO` in linear steps, e.g. fuzz.fuzz=0..1"},
			&cli.IntFlag{Name: "steps", Value: 9, Usage: "number of sweep steps, ends included"},
			probeFlag,
			&cli.IntFlag{Name: "harmonics", Value: 10, Usage: "highest harmonic order counted (2–100)"},
			rateFlag,
			oversampleFlag,
			&cli.DurationFlag{Name: "settle-max", Value: 3e9, Usage: "longest wait for the output to settle"},
			&cli.Float64Flag{Name: "settle-tol", Value: measure.DefaultSettleTolerance, Usage: "settled when RMS and DC change by less than this fraction between windows"},
			&cli.DurationFlag{Name: "record", Value: 1e8, Usage: "shortest analysed record (a whole number of cycles)"},
			jsonFlag,
			csvFlag,
			&cli.StringFlag{Name: "plot", Usage: "also draw the result to `FILE`.png or FILE.svg, and a scope view of each measurement beside it (FILE-scope.png, FILE-scope-01.png …; up to 16)"},
			&cli.BoolFlag{Name: "alias", Usage: "also measure the aliasing: the power the output holds off the sine's harmonic lines, under the lines' (its own render per factor)"},
			&cli.StringFlag{Name: "alias-factors", Usage: "oversampling factors to measure the aliasing at, `N,N,…` 1–16 (implies --alias; default: the measurement's)"},
			workersFlag,
			quietFlag,
		},
		Before: requireFlags("chain"),
		Action: runMeasure,
	}
}

// maxScopeViews bounds the scope views one measure command draws: one
// file each, so a long sweep would otherwise leave hundreds.
const maxScopeViews = 16

// saveMeasureFigures writes the report's figure to path and beside it a
// scope view per measurement (siblingPath), into the files plotFiles
// declared; it returns them for noteMeasureFigures.
func saveMeasureFigures(rep *measure.Report, path string, outs map[string]*outputs.File) ([]figureFile, error) {
	fig, err := rep.Figure()
	if err != nil {
		return nil, err
	}
	what := "spectrum and harmonics"
	if rep.Sweep != nil {
		what = "level and distortion against the swept " + string(rep.Sweep.Kind)
	}
	files := []figureFile{{path: path, what: what, fig: fig}}
	scopes, err := rep.ScopeFigures()
	if err != nil {
		return nil, err
	}
	for i, f := range scopes {
		m := rep.Measurements[i]
		name := strings.Join(m.Settings, " ")
		if rep.Sweep != nil && rep.Sweep.Kind == measure.LevelSweep {
			name = strings.TrimSpace(models.FormatValue(m.AmplitudeV, "V") + " peak " + name)
		}
		if name == "" {
			name = "the chain as written"
		}
		files = append(files, figureFile{path: siblingPath(path, "scope", i, len(scopes)), what: "scope view, " + name, fig: f})
	}
	return files, saveFigures(files, outs)
}

// noteMeasureFigures names the figures written, or, past maxScopeViews
// measurements, says on stderr that the scope views were left out.
func noteMeasureFigures(c *cli.Context, files []figureFile, count int) {
	noteFigures(c, files, c.Bool("quiet"))
	if count > maxScopeViews && !c.Bool("quiet") {
		fmt.Fprintf(c.App.ErrWriter, "note: no scope views: they are drawn for up to %d measurements, this run made %d\n", maxScopeViews, count)
	}
}

var workersFlag = &cli.IntFlag{Name: "workers", Usage: "measurements run at once (default: one per core)"}

func runMeasure(c *cli.Context) error {
	if c.NArg() > 0 {
		return usagef("measure takes no arguments (got %q)", c.Args().First())
	}
	if c.Bool("json") && c.Bool("csv") {
		return usagef("--json and --csv exclude each other")
	}
	if c.IsSet("sweep-level") && c.IsSet("sweep-knob") {
		return usagef("--sweep-level and --sweep-knob exclude each other: sweep one thing at a time")
	}
	if c.IsSet("sweep-level") && c.IsSet("amplitude") {
		return usagef("--amplitude and --sweep-level exclude each other: the sweep sets the amplitude")
	}
	plotPath, err := checkPlotFlag(c)
	if err != nil {
		return err
	}
	freq, err := parseFlag(c, "freq", models.ParseFrequency)
	if err != nil {
		return err
	}
	amp, err := parseFlag(c, "amplitude", models.ParseAmplitude)
	if err != nil {
		return err
	}
	ch, err := chains.Load(c.String("chain"))
	if err != nil {
		return err
	}
	sets, err := conditionSets(c, ch, c.StringSlice("set"))
	if err != nil {
		return err
	}
	variants, err := measure.Expand(sets)
	if err != nil {
		return err
	}
	var sweep *measure.Sweep
	switch {
	case c.IsSet("sweep-level"):
		sweep, err = measure.ParseLevelSweep(c.String("sweep-level"), c.Int("steps"))
	case c.IsSet("sweep-knob"):
		sweep, err = measure.ParseKnobSweep(c.String("sweep-knob"), c.Int("steps"))
	}
	if err != nil {
		return err
	}
	var aliasFactors []int
	if c.IsSet("alias-factors") {
		if aliasFactors, err = measure.ParseFactors(c.String("alias-factors")); err != nil {
			return badFlag("alias-factors", c.String("alias-factors"), err)
		}
	}
	opt := measure.Options{
		Alias:           c.Bool("alias") || c.IsSet("alias-factors"),
		AliasFactors:    aliasFactors,
		SampleRate:      c.Float64("rate"),
		Oversample:      c.Int("oversample"),
		Probe:           c.String("probe"),
		MaxOrder:        c.Int("harmonics"),
		SettleTolerance: c.Float64("settle-tol"),
		MaxSettle:       c.Duration("settle-max").Seconds(),
		MinRecord:       c.Duration("record").Seconds(),
		Spectrum:        plotPath != "" && sweep == nil,
	}
	count := len(variants)
	if sweep != nil {
		count *= len(sweep.StepList)
	}
	opt.Scope = plotPath != "" && count <= maxScopeViews
	set := newOutputs(c)
	scopes := 0
	if opt.Scope {
		scopes = count
	}
	plots := plotFiles(set, plotPath, "scope", scopes)
	if err := set.Check(); err != nil { // before any work
		return err
	}
	defer set.Abort()
	prog, done := progress(c.Bool("quiet"), "measuring")
	plan := measure.Plan{Variants: variants, Freq: freq, Amplitude: amp, Sweep: sweep, Options: opt, Workers: c.Int("workers")}
	if prog != nil {
		plan.Progress = func(d, t int) { prog(int64(d), int64(t)) }
	}
	rep, err := measure.Run(c.Context, ch, plan)
	done()
	if err != nil {
		return err
	}
	var figures []figureFile
	if plotPath != "" {
		if figures, err = saveMeasureFigures(rep, plotPath, plots); err != nil {
			return err
		}
	}
	if err := commitOutputs(c, set); err != nil {
		return err
	}
	if plotPath != "" {
		noteMeasureFigures(c, figures, count)
	}
	switch {
	case c.Bool("json"):
		if len(rep.Measurements) == 1 && sweep == nil {
			return printJSON(c, struct {
				Chain     string `json:"chain"`
				ChainFile string `json:"chain_file"`
				*measure.Result
			}{rep.Chain, rep.ChainFile, rep.Measurements[0]})
		}
		return printJSON(c, rep)
	case c.Bool("csv"):
		return rep.WriteCSV(c.App.Writer)
	}
	return rep.WriteTable(c.App.Writer)
}

// conditionSets adds the --supply and --temp lists to the overrides as
// families: each supply read by models.ParseSupplies with the chain file's
// polarity (the supply rule), each temperature by models.ParseTemperatures.
func conditionSets(c *cli.Context, ch *chains.Chain, sets []string) ([]string, error) {
	if c.IsSet("supply") {
		v, err := parseListFlag(c, "supply", func(s string) ([]float64, error) { return models.ParseSupplies(s, ch.Polarity()) })
		if err != nil {
			return nil, err
		}
		sets = append(sets, measure.SupplyFamily(v))
	}
	if c.IsSet("temp") {
		v, err := parseListFlag(c, "temp", models.ParseTemperatures)
		if err != nil {
			return nil, err
		}
		sets = append(sets, measure.TemperatureFamily(v))
	}
	return sets, nil
}
