package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/urfave/cli/v2"

	"renderchain/engine"
	"renderchain/render"
	"renderchain/report"
)

func renderCommand() *cli.Command {
	return &cli.Command{
		Name:      "render",
		Usage:     "render a dry WAV through the chain's circuit",
		UsageText: "renderchain render --chain F --in DRY.wav --out WET.wav [--set K=V]… [--oversample N] [--report R.json]",
		Flags: []cli.Flag{
			chainFlag,
			&cli.StringFlag{Name: "in", Aliases: []string{"i"}, Usage: "dry WAV (PCM 8–32 bit or float, mono/stereo, 44.1–192 kHz), required"},
			&cli.StringFlag{Name: "out", Aliases: []string{"o"}, Usage: "wet WAV to write, required"},
			setFlag,
			renderOversampleFlag,
			&cli.IntFlag{Name: "workers", Usage: "cores a mono render is cut across (default: one per core; 1: serial)"},
			&cli.StringFlag{Name: "format", Value: render.FormatPCM24, Usage: "output samples: pcm24, pcm16 or float32"},
			&cli.StringFlag{Name: "report", Usage: "write the render report as JSON to `FILE`"},
			quietFlag,
		},
		Before: requireFlags("chain", "in", "out"),
		Action: func(c *cli.Context) error {
			if c.NArg() > 0 {
				return usagef("render takes no arguments (got %q); use --in and --out", c.Args().First())
			}
			set := newOutputs(c)
			set.Input("in", c.String("in"))
			wav := set.File("out", c.String("out"))
			report := optionalFile(c, set, "report")
			if err := set.Check(); err != nil { // before any work
				return err
			}
			defer set.Abort()
			ch, err := loadChain(c)
			if err != nil {
				return err
			}
			eng, err := engine.PrepareContext(c.Context, ch, c.Int("oversample"))
			if err != nil {
				return err
			}
			prog, done := progress(c.Bool("quiet"), "rendering")
			rep, err := render.Render(c.Context, eng, c.String("in"), wav, render.FileOptions{Format: c.String("format"), Workers: c.Int("workers"), Progress: prog})
			done()
			if err != nil {
				return err
			}
			if report != nil {
				if err := writeJSONTo(report, rep); err != nil {
					return err
				}
			}
			if err := commitOutputs(c, set); err != nil {
				return err
			}
			if !c.Bool("quiet") {
				printSummary(c.App.ErrWriter, rep, leastStepDBFS(c.String("format")))
			}
			return nil
		},
	}
}

// leastStepDBFS is the level of half the least step of a PCM output
// format, 20·log10(2^−bits) dBFS (−96.3 for 16 bits, −144.5 for 24): a
// sample under it rounds to 0 in the file. A float format has none (−∞).
func leastStepDBFS(format string) float64 {
	switch format {
	case render.FormatPCM16:
		return report.DB(math.Ldexp(1, -16))
	case render.FormatPCM24, "":
		return report.DB(math.Ldexp(1, -24))
	}
	return math.Inf(-1)
}

// printSummary writes the short human summary of a render. Wet levels
// under half the output format's least step (floorDBFS) print as under it:
// such samples are zeros in the file, whatever the solver's residue was.
func printSummary(w io.Writer, r *render.Report, floorDBFS float64) {
	fmt.Fprintf(w, "%s → %s (%.1f s, %d ch, %d Hz; %d× oversampled, %s)\n", r.Input.File, r.Output.File, r.Input.Seconds, r.Input.Channels, r.Input.SampleRate,
		r.Solver.Oversample, map[string]string{engine.FactorAuto: "chosen for this chain", engine.FactorRequested: "as asked", engine.FactorChain: "the chain's setting"}[r.Solver.OversampleFrom])
	if p := r.Solver.AliasProbe; p != nil {
		tried := make([]string, len(p.Trials))
		for i, t := range p.Trials {
			tried[i] = fmt.Sprintf("%d× %s", t.Factor, map[bool]string{true: "∞ dB", false: level(t.DB, 1, "dB")}[math.IsInf(float64(t.DB), 1)])
		}
		fmt.Fprintf(w, "  factor   lowest with aliases %g dB under probe tones near 1.3 kHz at %.1f FS; tried %s (%.1f s)\n",
			p.TargetDB, p.ProbeLevelFS, strings.Join(tried, ", "), p.Seconds)
	}
	if r.Solver.Segments > 1 {
		fmt.Fprintf(w, "  cores    %d segments, each from %.2f s before its start\n", r.Solver.Segments, r.Solver.WarmupS)
	}
	fmt.Fprintf(w, "  dry  peak %14s  RMS %14s  crest %8s\n", level(r.Input.PeakDBFS, 2, "dBFS"), level(r.Input.RMSDBFS, 2, "dBFS"), level(r.Input.CrestDB, 2, "dB"))
	peak, rms, crest := level(r.Output.PeakDBFS, 2, "dBFS"), level(r.Output.RMSDBFS, 2, "dBFS"), level(r.Output.CrestDB, 2, "dB")
	if float64(r.Output.PeakDBFS) < floorDBFS {
		peak, crest = report.AtLeast(float64(r.Output.PeakDBFS), floorDBFS, "%.2f")+" dBFS", "—"
	}
	if float64(r.Output.RMSDBFS) < floorDBFS {
		rms = report.AtLeast(float64(r.Output.RMSDBFS), floorDBFS, "%.2f") + " dBFS"
	}
	fmt.Fprintf(w, "  wet  peak %14s  RMS %14s  crest %8s  samples past full scale %d\n", peak, rms, crest, r.Output.ClippedSamples)
	fmt.Fprintf(w, "  solver  mean %.2f / max %d Newton iterations, %d fallbacks, %d not converged; %.1fx realtime\n",
		r.Solver.MeanIterations, r.Solver.MaxIterations, r.Solver.Fallbacks, r.Solver.NonConverged, r.RealtimeFactor)
	for _, warn := range r.Warnings {
		fmt.Fprintln(w, "  warning: "+warn)
	}
}
