package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/analyze"
	"renderchain/dsp/spectrum"
	"renderchain/plotting"
	"renderchain/report"
)

func analyzeCommand() *cli.Command {
	return &cli.Command{
		Name:      "analyze",
		Usage:     "levels, loudness and spectrum of a WAV file; its spectrogram, or a dry take's against it",
		UsageText: "renderchain analyze FILE.wav [--json] [--plot PICTURE.png|svg [--dry DRY.wav]]",
		Description: "Reads the file once, in constant memory, and reports peak and RMS level (dBFS), crest factor,\n" +
			"integrated loudness (ITU-R BS.1770-4, LUFS), true peak (dBTP), loudness range (EBU Tech 3342, LU),\n" +
			"the largest momentary (400 ms) and short-term (3 s) loudness, the spectral centroid and the\n" +
			"one-third-octave spectrum (dB re a full-scale sine, of the channels' mean).\n\n" +
			"A level that does not exist — silence, or a file shorter than the measurement window — prints as\n" +
			"\"—\" and is null in --json output (JSON has no −∞); the \"notes\" field says why.\n\n" +
			"--plot draws the file's spectrogram (channel mean, 85 ms frames, log frequency, the top 80 dB on\n" +
			"one colour scale); with --dry DRY.wav the dry take above the file, on the same scale, so the\n" +
			"fizz a circuit adds shows against what went in.",
		Flags: []cli.Flag{jsonFlag,
			&cli.StringFlag{Name: "plot", Usage: "also draw the file's spectrogram to `PICTURE`.png or PICTURE.svg"},
			&cli.StringFlag{Name: "dry", Usage: "with --plot: draw the dry take `DRY.wav` above the file, on one colour scale"},
			quietFlag,
		},
		Action: runAnalyze,
	}
}

// analyzeArgs are analyze's flags, which may come before or after the
// file name.
type analyzeArgs struct {
	json, quiet bool
	plot, dry   string
	files       []string
}

// parseAnalyzeArgs reads the flags the library left among the arguments:
// the flag parser stops at the file name, and "analyze FILE --json" is
// the documented form.
func parseAnalyzeArgs(c *cli.Context) (analyzeArgs, error) {
	a := analyzeArgs{json: c.Bool("json"), quiet: c.Bool("quiet"), plot: c.String("plot"), dry: c.String("dry")}
	args := c.Args().Slice()
	for i := 0; i < len(args); i++ {
		arg := args[i]
		if !strings.HasPrefix(arg, "-") || arg == "-" {
			a.files = append(a.files, arg)
			continue
		}
		name, val, hasVal := strings.Cut(strings.TrimLeft(arg, "-"), "=")
		switch name {
		case "json", "quiet", "q":
			on := !hasVal || val == "true"
			if hasVal && val != "true" && val != "false" {
				return a, usagef("analyze: %s takes true or false", arg)
			}
			if name == "json" {
				a.json = on
			} else {
				a.quiet = on
			}
		case "plot", "dry":
			if !hasVal {
				if i+1 >= len(args) {
					return a, usagef("analyze: --%s needs a file name", name)
				}
				i++
				val = args[i]
			}
			if name == "plot" {
				a.plot = val
			} else {
				a.dry = val
			}
		default:
			return a, usagef("analyze: unknown flag %s", arg)
		}
	}
	if len(a.files) != 1 {
		return a, usagef("analyze takes one WAV file (got %d)", len(a.files))
	}
	if a.dry != "" && a.plot == "" {
		return a, usagef("--dry is drawn against the file in the --plot spectrogram: give --plot PICTURE.png|svg")
	}
	if a.plot != "" {
		if _, err := plotting.FormatOf(a.plot); err != nil {
			return a, usagef("--plot: %v", err)
		}
	}
	return a, nil
}

func runAnalyze(c *cli.Context) error {
	a, err := parseAnalyzeArgs(c)
	if err != nil {
		return err
	}
	set := newOutputs(c)
	set.Input("file", a.files[0])
	if a.dry != "" {
		set.Input("dry", a.dry)
	}
	plots := plotFiles(set, a.plot, "", 0)
	if err := set.Check(); err != nil { // before any work
		return err
	}
	defer set.Abort()
	r, err := analyze.File(c.Context, a.files[0])
	if err != nil {
		return err
	}
	if a.plot != "" {
		fig, err := spectrogramFigure(c, a.files[0], a.dry)
		if err != nil {
			return err
		}
		what := "spectrogram"
		if a.dry != "" {
			what = "spectrogram, dry against wet"
		}
		files := []figureFile{{path: a.plot, what: what, fig: fig}}
		if err := saveFigures(files, plots); err != nil {
			return err
		}
		if err := commitOutputs(c, set); err != nil {
			return err
		}
		noteFigures(c, files, a.quiet)
	}
	if a.json {
		return printJSON(c, r)
	}
	printAnalysis(c.App.Writer, r)
	return nil
}

// spectrogramFigure computes the spectrograms of the file and of the dry
// take (when given) and draws them.
func spectrogramFigure(c *cli.Context, wetPath, dryPath string) (*plotting.Figure, error) {
	wet, err := analyze.Spectrogram(c.Context, wetPath)
	if err != nil {
		return nil, err
	}
	var dry *spectrum.Spectrogram
	if dryPath != "" {
		if dry, err = analyze.Spectrogram(c.Context, dryPath); err != nil {
			return nil, fmt.Errorf("--dry: %w", err)
		}
	}
	return analyze.SpectrogramFigure(wetPath, wet, dryPath, dry)
}

// level formats a level, "—" where it does not exist.
func level(v report.Level, digits int, unit string) string {
	x := float64(v)
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return "—"
	}
	return fmt.Sprintf("%.*f %s", digits, x, unit)
}

func printAnalysis(w io.Writer, r *analyze.Report) {
	fmt.Fprintf(w, "%s: %s, %.3f s (%d frames)\n", r.File, r.Format, r.Seconds, r.Frames)
	fmt.Fprintf(w, "  peak           %-14s true peak        %s\n", level(r.PeakDBFS, 2, "dBFS"), level(r.TruePeakDBTP, 2, "dBTP"))
	fmt.Fprintf(w, "  RMS            %-14s crest factor     %s\n", level(r.RMSDBFS, 2, "dBFS"), level(r.CrestDB, 2, "dB"))
	fmt.Fprintf(w, "  loudness       %-14s loudness range   %s\n", level(r.LUFS, 1, "LUFS"), level(r.LoudnessRangeLU, 1, "LU"))
	fmt.Fprintf(w, "  momentary max  %-14s short-term max   %s\n", level(r.MomentaryMaxLUFS, 1, "LUFS"), level(r.ShortTermMaxLUFS, 1, "LUFS"))
	fmt.Fprintf(w, "  centroid       %-14s DC offset        %.2e\n", level(report.Level(r.CentroidHz), 0, "Hz"), r.DCOffset)
	if r.NearFullScale > 0 {
		fmt.Fprintf(w, "  %d samples at full scale: the file may have clipped\n", r.NearFullScale)
	}
	fmt.Fprintln(w, "  one-third octaves, dB re a full-scale sine:")
	for i, b := range r.Bands {
		hz := fmt.Sprintf("%g", b.Hz)
		if b.Hz >= 1000 {
			hz = fmt.Sprintf("%gk", b.Hz/1000)
		}
		fmt.Fprintf(w, "    %6s %7s", hz, level(b.DB, 1, ""))
		if i%5 == 4 || i == len(r.Bands)-1 {
			fmt.Fprintln(w)
		}
	}
	for _, n := range r.Notes {
		fmt.Fprintln(w, "  note: "+n)
	}
}
